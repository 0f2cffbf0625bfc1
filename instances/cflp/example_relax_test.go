package cflp_test

import (
	"context"
	"fmt"
	"math"

	"pincer/decomp"
	"pincer/instances/cflp"
)

func ExampleNewProblem() {
	// Two depots and three customers; North may not serve customer c.
	// The demand (60) exceeds each depot's capacity, so both open: c and
	// b fill South (40), a goes to North. Optimum by hand:
	// 100 + 80 fixed + 40 (a) + 30 (b) + 20 (c) = 270.
	in := &cflp.Instance{
		Name: "two depots",
		Sites: []cflp.Site{
			{ID: "N", Name: "North", Capacity: 50, FixedCost: 100},
			{ID: "S", Name: "South", Capacity: 40, FixedCost: 80},
		},
		Customers: []cflp.Customer{{ID: "a", Demand: 20}, {ID: "b", Demand: 30}, {ID: "c", Demand: 10}},
		Cost: [][]float64{
			{40, 90, math.Inf(1)},
			{60, 30, 20},
		},
	}
	p, err := cflp.NewProblem(in, cflp.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 100})
	if err != nil {
		fmt.Println(err)
		return
	}
	sol := res.Plan.Detail.(*cflp.Solution)
	fmt.Printf("plan value %.2f, proved %v\n", res.Plan.Value, res.ProvedOptimal || sol.Optimal)
	for i, s := range in.Sites {
		fmt.Printf("%s open=%v load %.0f of %.0f\n", s.Name, sol.Open[i], sol.Load[i], s.Capacity)
	}
	// Output:
	// plan value 270.00, proved true
	// North open=true load 20 of 50
	// South open=true load 40 of 40
}
