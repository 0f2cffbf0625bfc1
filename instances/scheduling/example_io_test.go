package scheduling_test

import (
	"fmt"
	"os"

	"pincer/instances/scheduling"
)

// Two jobs share one press; the second waits for the first and ends late.
func ExampleWriteScheduleCSV() {
	in := &scheduling.Instance{
		Name:    "two jobs",
		Classes: []scheduling.Class{{ID: "press", Machines: 1}},
		Jobs: []scheduling.Job{
			{ID: "a", Name: "posters", Processing: 3, Weight: 2, Due: 3},
			{ID: "b", Name: "flyers", Processing: 2, Weight: 1, Due: 4},
		},
	}
	s := &scheduling.Schedule{Class: []int{0, 0}, Machine: []int{0, 0}, Start: []int{0, 3}}
	if err := scheduling.WriteScheduleCSV(os.Stdout, in, s); err != nil {
		fmt.Println(err)
	}
	rep := scheduling.Verify(in, s)
	fmt.Println("feasible:", rep.Feasible, "weighted tardiness:", rep.Value)
	// Output:
	// job,name,class,machine,start,end,tardiness
	// a,posters,press,1,0,3,0
	// b,flyers,press,1,3,5,1
	// feasible: true weighted tardiness: 1
}

// Slot prices on the press's rows 2..4 say where a second press would pay.
func ExampleBusiestWindows() {
	in := &scheduling.Instance{
		Name:    "press",
		Classes: []scheduling.Class{{ID: "press", Name: "offset press", Machines: 1}},
		Jobs:    []scheduling.Job{{ID: "a", Processing: 3}, {ID: "b", Processing: 3}},
	}
	horizons := []int{6}
	prices := []float64{0, 0, 1.5, 2, 0.5, 0}
	wins, err := scheduling.BusiestWindows(in, horizons, prices, 3)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, w := range wins {
		fmt.Println(scheduling.WindowSentence(in, w))
	}
	// Output:
	// one more machine of class offset press between 2 and 5 would save up to about 4
}
