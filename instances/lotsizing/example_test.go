package lotsizing_test

import (
	"context"
	"fmt"
	"os"

	"pincer/decomp"
	"pincer/instances/lotsizing"
)

func Example() {
	in := lotsizing.Demo()
	p, err := lotsizing.NewProblem(in, lotsizing.Options{OvertimeCost: 90})
	if err != nil {
		fmt.Println(err)
		return
	}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 50})
	if err != nil {
		fmt.Println(err)
		return
	}
	s := res.Plan.Detail.(*lotsizing.Schedule)
	loads := lotsizing.Loads(in, s, res.Prices)
	fmt.Println(len(loads), res.Bound <= res.Plan.Value)
	_ = lotsizing.WriteLoadCSV(os.Stdout, loads[:0])
	// Output:
	// 13 true
	// period,load,capacity,slack,overtime,shadow_price
}
