package transport_test

import (
	"errors"
	"fmt"
	"math"

	"pincer/subproblem/transport"
)

// Two bakeries supply three cafés with trays of bread; the lane from the
// river bakery to the hill café is closed. Costs are per tray.
func Example() {
	p := &transport.Problem{
		Supply: []float64{45, 20}, // old town bakery, river bakery
		Demand: []float64{20, 25, 18},
		Cost: [][]float64{
			{4, 6, 9},
			{5, 3, math.Inf(1)},
		},
	}
	sol, err := transport.Solve(p)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("cost %g\n", sol.Cost)
	for _, s := range sol.Shipments {
		fmt.Printf("bakery %d -> café %d: %g trays\n", s.Site, s.Customer, s.Qty)
	}
	fmt.Printf("capacity shadow prices %v\n", sol.SiteDual)
	fmt.Printf("demand prices %v\n", sol.CustomerDual)

	// Closing the old town bakery leaves demand unmet.
	s, _ := transport.NewSolver(p)
	_ = s.SetSupply(0, 0)
	_, err = s.Solve()
	fmt.Println(errors.Is(err, transport.ErrInfeasible))
	fmt.Println(err)
	// Output:
	// cost 332
	// bakery 0 -> café 0: 20 trays
	// bakery 0 -> café 1: 5 trays
	// bakery 0 -> café 2: 18 trays
	// bakery 1 -> café 1: 20 trays
	// capacity shadow prices [0 -3]
	// demand prices [4 6 9]
	// true
	// transport: demand cannot be met: short by 43 (total supply 20 < total demand 63)
}
