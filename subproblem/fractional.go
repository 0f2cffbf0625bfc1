package subproblem

import (
	"fmt"
	"math"
	"slices"
)

// FractionalKnapsack maximises sum profit[j]*x[j] subject to
// sum weight[j]*x[j] <= capacity and 0 <= x[j] <= 1.
// It writes the optimal x into x (len n) and returns the optimal value.
// Items with profit <= 0 get x = 0; items with zero weight and positive
// profit get x = 1; the others are filled greedily by decreasing
// profit/weight ratio, so at most one item ends up fractional.
// capacity may be +Inf (no capacity limit).
//
// FractionalKnapsack allocates scratch memory on each call; use
// [Knapsack.SolveFractional] to reuse it across calls.
func FractionalKnapsack(profit, weight []float64, capacity float64, x []float64) (float64, error) {
	var k Knapsack
	return k.SolveFractional(profit, weight, capacity, x)
}

// SolveFractional is [FractionalKnapsack] using the scratch buffers of k.
func (k *Knapsack) SolveFractional(profit, weight []float64, capacity float64, x []float64) (float64, error) {
	n := len(profit)
	if len(weight) != n || len(x) != n {
		return 0, fmt.Errorf("subproblem: fractional knapsack: len(profit)=%d, len(weight)=%d, len(x)=%d: %w",
			n, len(weight), len(x), ErrInvalidInput)
	}
	if math.IsNaN(capacity) || capacity < 0 {
		return 0, fmt.Errorf("subproblem: fractional knapsack: capacity %v is not a non-negative number: %w",
			capacity, ErrInvalidInput)
	}
	for j := range n {
		if p := profit[j]; math.IsNaN(p) || math.IsInf(p, 0) {
			return 0, fmt.Errorf("subproblem: fractional knapsack: profit[%d] = %v is not finite: %w", j, p, ErrInvalidInput)
		}
		if w := weight[j]; math.IsNaN(w) || math.IsInf(w, 0) || w < 0 {
			return 0, fmt.Errorf("subproblem: fractional knapsack: weight[%d] = %v is not a finite non-negative number: %w",
				j, w, ErrInvalidInput)
		}
	}

	cand := k.frac[:0]
	for j := range n {
		x[j] = 0
		p, w := profit[j], weight[j]
		switch {
		case p <= 0:
		case w == 0:
			x[j] = 1
		default:
			cand = append(cand, fracItem{e: p / w, idx: j})
		}
	}
	k.frac = cand

	// Find the break item by partitioning around median-of-three pivots in
	// the order of fracBefore; blocks that fit whole are taken whole.
	rem := capacity
	lo, hi := 0, len(cand)
	for hi-lo > smallSort {
		m := partitionFrac(cand[lo:hi]) + lo
		var wl float64
		for _, it := range cand[lo:m] {
			wl += weight[it.idx]
		}
		if wl > rem {
			hi = m // the break item is before the pivot
			continue
		}
		for _, it := range cand[lo:m] {
			x[it.idx] = 1
		}
		rem -= wl
		if wp := weight[cand[m].idx]; wp <= rem {
			x[cand[m].idx] = 1
			rem -= wp
			lo = m + 1
		} else {
			lo, hi = m, m+1 // the pivot is the break item
		}
	}
	slices.SortFunc(cand[lo:hi], func(a, b fracItem) int {
		switch {
		case fracBefore(&a, &b):
			return -1
		case fracBefore(&b, &a):
			return 1
		}
		return 0
	})
	for _, it := range cand[lo:hi] {
		w := weight[it.idx]
		if w <= rem {
			x[it.idx] = 1
			rem -= w
			continue
		}
		x[it.idx] = rem / w
		break
	}
	var v float64
	for j := range n {
		if x[j] != 0 {
			v += profit[j] * x[j]
		}
	}
	return v, nil
}

// fracItem is a continuous knapsack candidate: its profit/weight ratio and
// its index in the caller's arrays.
type fracItem struct {
	e   float64
	idx int
}

// fracBefore is the greedy order: decreasing ratio, then increasing index
// (so that ties are broken the same way on every run).
func fracBefore(x, y *fracItem) bool {
	return x.e > y.e || (x.e == y.e && x.idx < y.idx)
}

// partitionFrac reorders s around a median-of-three pivot in the order of
// fracBefore and returns the pivot's final position m: s[:m] come before
// it, s[m+1:] after it.
func partitionFrac(s []fracItem) int {
	n := len(s)
	mid := n / 2
	if fracBefore(&s[mid], &s[0]) {
		s[mid], s[0] = s[0], s[mid]
	}
	if fracBefore(&s[n-1], &s[0]) {
		s[n-1], s[0] = s[0], s[n-1]
	}
	if fracBefore(&s[mid], &s[n-1]) {
		s[mid], s[n-1] = s[n-1], s[mid]
	}
	pivot := s[n-1]
	m := 0
	for i := range n - 1 {
		if fracBefore(&s[i], &pivot) {
			s[i], s[m] = s[m], s[i]
			m++
		}
	}
	s[m], s[n-1] = s[n-1], s[m]
	return m
}
