package scheduling_test

import (
	"context"
	"fmt"

	"pincer/decomp"
	"pincer/instances/scheduling"
)

// A print shop (invented) has one press and four orders due by the end of
// the shift; which order first, and how late is the shift in total?
func ExampleNewProblem() {
	in := &scheduling.Instance{
		Name:    "press",
		Classes: []scheduling.Class{{ID: "press", Machines: 1}},
		Jobs: []scheduling.Job{
			{ID: "flyers", Processing: 3, Weight: 2, Due: 4},
			{ID: "posters", Processing: 5, Weight: 1, Due: 6},
			{ID: "cards", Processing: 2, Weight: 3, Due: 3},
			{ID: "menus", Processing: 4, Weight: 2, Due: 12},
		},
	}
	p, err := scheduling.NewProblem(in, scheduling.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 200, Seed: 1, Workers: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	s := res.Plan.Detail.(*scheduling.Schedule)
	for j, jb := range in.Jobs {
		fmt.Printf("%-8s starts %2d, ends %2d\n", jb.ID, s.Start[j], s.Start[j]+jb.Processing)
	}
	fmt.Printf("weighted tardiness %v, proved optimal %v\n", res.Plan.Value, res.ProvedOptimal)
	// Output:
	// flyers   starts  2, ends  5
	// posters  starts  5, ends 10
	// cards    starts  0, ends  2
	// menus    starts 10, ends 14
	// weighted tardiness 10, proved optimal true
}
