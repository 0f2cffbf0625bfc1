package subproblem_test

import (
	"fmt"

	"pincer/subproblem"
)

// A courier van with 10 units of room chooses parcels to carry; each
// parcel's profit is its fee minus the handling price of the round, so one
// parcel is not worth carrying at all.
func ExampleKnapsack_Solve() {
	fee := []float64{10, 40, 30, 50, -4}
	size := []int64{5, 4, 6, 3, 1}
	take := make([]bool, len(fee))
	var k subproblem.Knapsack
	v, err := k.Solve(fee, size, 10, take)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(v, take)
	// Output: 90 [false true false true false]
}

// A depot with 7 units of stock serves towns whose demand may be split.
func ExampleFractionalKnapsack() {
	gain := []float64{12, 10, 6}
	demand := []float64{4, 5, 3}
	x := make([]float64, 3)
	v, err := subproblem.FractionalKnapsack(gain, demand, 7, x)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(v, x)
	// Output: 18 [1 0.6 0]
}
