package heuristics_test

import (
	"context"
	"fmt"
	"math/rand/v2"

	"pincer/heuristics"
)

// Three kitchens share out six catering orders. Each kitchen has a number of
// oven hours; an order costs a different amount and takes a different time
// in each kitchen. The relaxed answer (say, from a priced round) gave orders
// 1 and 4 to two kitchens each and order 5 to none.
func Example() {
	p := &heuristics.Assignment{
		Cost: [][]float64{
			{9, 4, 7, 3, 8, 6},
			{5, 6, 4, 7, 5, 9},
			{8, 3, 9, 6, 4, 5},
		},
		Weight: [][]float64{
			{3, 2, 4, 2, 3, 3},
			{2, 3, 3, 4, 2, 4},
			{4, 2, 5, 3, 2, 2},
		},
		Capacity: []float64{5, 6, 5},
	}
	relaxed := [][]int{{1, 3}, {0, 2, 4}, {1, 4}}
	rng := rand.New(rand.NewPCG(1, 2))

	assign, ok := heuristics.Repair(context.Background(), p, relaxed, nil, rng)
	v, _ := p.Evaluate(assign)
	fmt.Println("repaired:", assign, ok, v)

	best, value := heuristics.Improve(context.Background(), p, assign, heuristics.ImproveSettings{}, rng)
	fmt.Println("improved:", best, value)
	// 25 is the optimum: enumerating all 3^6 assignments (a throwaway
	// script) finds no cheaper feasible one.

	// Output:
	// repaired: [1 2 1 0 2 0] true 25
	// improved: [1 2 1 0 2 0] 25
}
