package subproblem

import (
	"errors"
	"fmt"
	"math"
	"slices"
)

// ErrInvalidInput is wrapped by every error the solvers return for bad
// input (length mismatch, negative weight or capacity, NaN or infinite
// numbers).
var ErrInvalidInput = errors.New("invalid input")

const (
	// relTol is the relative gap below which a partial solution is not
	// worth keeping: a state is dropped when its bound does not exceed the
	// incumbent by more than relTol times the root linear bound. The root
	// linear bound is at most twice the optimum, so the value returned is
	// within about 2*relTol (plus summation rounding) of the optimum.
	relTol = 1e-12
	// smallSort is the block length below which the break item search
	// stops partitioning and sorts outright.
	smallSort = 24
	// minNodeLimit is the decision log length that triggers the first
	// compaction.
	minNodeLimit = 1 << 16
)

// Knapsack is a reusable exact 0-1 knapsack solver; the zero value is ready
// to use. It keeps scratch buffers between calls, so one Knapsack must not be
// used by two goroutines at once.
//
// Method. The break item (the first one a greedy fill by decreasing
// profit/weight cannot take) is found by repeated partitioning, without a
// full sort. The break solution plus a greedy fill gives a starting
// incumbent, and every item whose linear relaxation bound with its break
// value flipped cannot beat that incumbent is fixed. Only the remaining
// items are sorted. Starting from their break solution, a core of items is
// widened one item at a time, alternately above the break (the item may be
// added) and below it (the item may be dropped). For the current core the
// solver keeps the list of non-dominated partial solutions (no other one
// weighs no more and earns at least as much) and drops those whose linear
// relaxation bound cannot beat the incumbent. It stops when the list is
// empty or the core holds every item. The list never holds two states of
// equal weight, so the work is at most items times the weight span of the
// states, as for a dynamic program over the capacity, and usually far less;
// unlike a depth-first branch and bound it does not revisit equivalent
// subsets, which matters on correlated profits.
type Knapsack struct {
	items []kItem    // candidates; after reduction the free ones, sorted
	frac  []fracItem // scratch for SolveFractional
	cur   []state    // current list of non-dominated states
	next  []state    // list being built
	nodes []node     // decision log: each state's path back to the break solution
	mark  []int32    // compaction scratch
	start []int32    // the starting incumbent (caller indices)
	fixed []int32    // items fixed in by reduction (caller indices)

	// Search state of the current Solve.
	z         float64 // incumbent value
	best      int32   // incumbent's decision log entry (see solveCore)
	tol       float64 // absolute pruning tolerance
	capacity  int64   // capacity left for the free items
	nodeLimit int

	// testNodeLimit, when positive, replaces minNodeLimit so that tests
	// can exercise compaction on small instances.
	testNodeLimit int
}

// kItem is a 0-1 knapsack candidate: positive profit, weight in
// [1, capacity].
type kItem struct {
	e   float64 // profit / weight
	p   float64
	w   int64
	idx int // index in the caller's arrays
}

// state is a partial solution: the break solution with some core items
// flipped. r is the residual capacity (negative when over capacity).
type state struct {
	r    int64
	p    float64
	node int32
}

// node records that the item with caller index idx was flipped, after the
// flips of parent (-1 for none).
type node struct {
	idx, parent int32
}

// before is the solver's strict total order on items: decreasing efficiency,
// then increasing index.
func before(x, y *kItem) bool {
	return x.e > y.e || (x.e == y.e && x.idx < y.idx)
}

func compareItems(x, y kItem) int {
	switch {
	case before(&x, &y):
		return -1
	case before(&y, &x):
		return 1
	}
	return 0
}

// Solve maximises sum profit[j]*x[j] subject to sum weight[j]*x[j] <= capacity,
// x binary. It writes the choice into take (len n) and returns the optimal
// value, computed as the sum of the chosen profits.
//
// Items with profit <= 0 are never taken; items with zero weight and positive
// profit are always taken. The result is exact up to floating point: the
// returned value is within a relative 1e-11 of the true optimum (pruning
// ignores improvements smaller than 1e-12 times the linear relaxation bound).
// The same input always gives the same choice.
func (k *Knapsack) Solve(profit []float64, weight []int64, capacity int64, take []bool) (float64, error) {
	n := len(profit)
	if len(weight) != n || len(take) != n {
		return 0, fmt.Errorf("subproblem: knapsack: len(profit)=%d, len(weight)=%d, len(take)=%d: %w",
			n, len(weight), len(take), ErrInvalidInput)
	}
	if n > math.MaxInt32 {
		return 0, fmt.Errorf("subproblem: knapsack: %d items, at most %d supported: %w", n, math.MaxInt32, ErrInvalidInput)
	}
	if capacity < 0 {
		return 0, fmt.Errorf("subproblem: knapsack: capacity %d is negative: %w", capacity, ErrInvalidInput)
	}
	for j := range n {
		if p := profit[j]; math.IsNaN(p) || math.IsInf(p, 0) {
			return 0, fmt.Errorf("subproblem: knapsack: profit[%d] = %v is not finite: %w", j, p, ErrInvalidInput)
		}
		if weight[j] < 0 {
			return 0, fmt.Errorf("subproblem: knapsack: weight[%d] = %d is negative: %w", j, weight[j], ErrInvalidInput)
		}
	}

	// Keep the items that may be taken; take the free ones now.
	items := k.items[:0]
	r := capacity
	allFit := true
	for j := range n {
		take[j] = false
		p, w := profit[j], weight[j]
		switch {
		case p <= 0 || w > capacity:
		case w == 0:
			take[j] = true
		default:
			items = append(items, kItem{e: p / float64(w), p: p, w: w, idx: j})
			if allFit {
				// r stays in [-capacity, capacity]: no overflow.
				r -= w
				allFit = r >= 0
			}
		}
	}
	k.items = items
	if allFit {
		for _, it := range items {
			take[it.idx] = true
		}
	} else {
		k.solveCore(capacity, take)
	}
	var v float64
	for j := range n {
		if take[j] {
			v += profit[j]
		}
	}
	return v, nil
}

// solveCore solves the problem on k.items, whose total weight exceeds the
// capacity, and marks the chosen items in take.
//
// Steps: find the break item by partitioning; build a starting incumbent
// (break solution plus a greedy fill); fix every item whose linear bound
// with its break value flipped cannot beat the incumbent; sort the items
// left and widen a core around their own break item.
func (k *Knapsack) solveCore(capacity int64, take []bool) {
	items := k.items
	b, r, psb := k.findBreak(capacity)
	eb := items[b].e
	ub := psb + float64(r)*eb
	k.tol = relTol * ub

	// Starting incumbent: the break solution, then greedily any item after
	// the break that still fits (in the partitioned order).
	z := psb
	start := k.start[:0]
	for i := range b {
		start = append(start, int32(items[i].idx))
	}
	for i, rg := b+1, r; i < len(items) && rg > 0; i++ {
		if it := &items[i]; it.w <= rg {
			rg -= it.w
			z += it.p
			start = append(start, int32(it.idx))
		}
	}
	k.start = start

	// Fix items: flipping item i from its break value gives at most
	// psb -/+ p_i + (r +/- w_i)*eb, since items before the break are at
	// least as efficient as eb and items after it at most as efficient.
	var baseW int64
	var baseP float64
	fixed := k.fixed[:0]
	free := items[:0]
	if ub > z+k.tol {
		for i, it := range items {
			switch {
			case i < b && psb-it.p+float64(r+it.w)*eb <= z+k.tol:
				baseW += it.w // fixed in
				baseP += it.p
				fixed = append(fixed, int32(it.idx))
			case i > b && psb+it.p+float64(r-it.w)*eb <= z+k.tol:
				// fixed out
			default:
				free = append(free, it)
			}
		}
	}

	// Core search on the free items, relative to the fixed ones.
	// k.best: -2 for the starting incumbent, -1 for the break solution of
	// the free items, else the decision log entry of the best state.
	k.z = z - baseP
	k.best = -2
	k.nodes = k.nodes[:0]
	k.nodeLimit = minNodeLimit
	if k.testNodeLimit > 0 {
		k.nodeLimit = k.testNodeLimit
	}
	k.cur = k.cur[:0]
	n := len(free)
	fb := 0 // break item of the free items
	if n > 0 {
		slices.SortFunc(free, compareItems)
		fr := capacity - baseW
		k.capacity = fr
		var fp float64
		for fb < n && free[fb].w <= fr {
			fr -= free[fb].w
			fp += free[fb].p
			fb++
		}
		if fp > k.z {
			k.z = fp
			k.best = -1
		}
		if fb < n && fp+float64(fr)*free[fb].e > k.z+k.tol {
			k.cur = append(k.cur, state{r: fr, p: fp, node: -1})
		}
	}
	k.items = free
	k.fixed = fixed
	// Core is free[a:e]: items before a are taken, items from e on are not.
	a, e := fb, fb
	for len(k.cur) > 0 && (a > 0 || e < n) {
		if e < n {
			it := free[e]
			e++
			k.expand(-it.w, it.p, int32(it.idx), k.addBound(e), k.dropBound(a))
		}
		if len(k.cur) > 0 && a > 0 {
			a--
			it := free[a]
			k.expand(it.w, -it.p, int32(it.idx), k.addBound(e), k.dropBound(a))
		}
	}

	if k.best == -2 {
		for _, j := range start {
			take[j] = true
		}
		return
	}
	for _, j := range fixed {
		take[j] = true
	}
	for _, it := range free[:fb] {
		take[it.idx] = true
	}
	for nd := k.best; nd >= 0; nd = k.nodes[nd].parent {
		j := k.nodes[nd].idx
		take[j] = !take[j]
	}
}

// addBound is the best efficiency among the items from position e on (zero
// when there are none): the price at which spare capacity can be filled.
func (k *Knapsack) addBound(e int) float64 {
	if e >= len(k.items) {
		return 0
	}
	return k.items[e].e
}

// dropBound is the worst efficiency among the items before position a
// (+Inf when there are none): the price at which excess weight can be shed.
func (k *Knapsack) dropBound(a int) float64 {
	if a <= 0 {
		return math.Inf(1)
	}
	return k.items[a-1].e
}

// expand adds one item to the core: every state gets a twin shifted by
// (dr, dp) with item idx flipped. The two lists are merged by
// increasing weight, dominated states are dropped, feasible states update
// the incumbent, and states whose linear bound (fill spare capacity at
// price eAdd, shed excess weight at price eDrop) does not beat the incumbent
// by more than the tolerance are dropped.
func (k *Knapsack) expand(dr int64, dp float64, idx int32, eAdd, eDrop float64) {
	// Quick pass: see whether any twin could be kept at all. If none can,
	// the item is fixed at its break value: skip the merge and only drop
	// the states that the tighter bounds now exclude.
	bound := func(r int64, p float64) float64 {
		if r >= 0 {
			return p + float64(r)*eAdd
		}
		return p + float64(r)*eDrop
	}
	thr := k.z + k.tol
	need := false
	for _, s := range k.cur {
		if dr < 0 && s.r < -k.capacity-dr {
			continue
		}
		r, p := s.r+dr, s.p+dp
		if (r >= 0 && p > k.z) || bound(r, p) > thr {
			need = true
			break
		}
	}
	if !need {
		kept := k.cur[:0]
		for _, s := range k.cur {
			if bound(s.r, s.p) > thr {
				kept = append(kept, s)
			}
		}
		k.cur = kept
		return
	}

	old := k.cur
	out := k.next[:0]
	maxP := math.Inf(-1)
	i, j := 0, 0
	for i < len(old) || j < len(old) {
		var s state
		shifted := false
		if j < len(old) && dr < 0 && old[j].r < -k.capacity-dr {
			// More than the capacity over: dropping every taken item
			// cannot make it fit (and r could overflow).
			j++
			continue
		}
		if j < len(old) {
			s = state{r: old[j].r + dr, p: old[j].p + dp, node: old[j].node}
			shifted = true
			// Decreasing residual (increasing weight); for equal
			// residual the larger profit first, the unshifted state on ties.
			if i < len(old) && (old[i].r > s.r || (old[i].r == s.r && old[i].p >= s.p)) {
				s = old[i]
				shifted = false
				i++
			} else {
				j++
			}
		} else {
			s = old[i]
			i++
		}
		if s.p <= maxP {
			continue // dominated: another state weighs no more and earns at least as much
		}
		maxP = s.p
		var ub float64
		if s.r >= 0 {
			if s.p > k.z {
				if shifted {
					s.node = k.newNode(idx, s.node)
					shifted = false
				}
				k.z = s.p
				k.best = s.node
			}
			ub = s.p + float64(s.r)*eAdd
		} else {
			ub = s.p + float64(s.r)*eDrop
		}
		if ub <= k.z+k.tol {
			continue
		}
		if shifted {
			s.node = k.newNode(idx, s.node)
		}
		out = append(out, s)
	}
	k.cur, k.next = out, old
	if len(k.nodes) > k.nodeLimit {
		k.compact()
	}
}

func (k *Knapsack) newNode(idx, parent int32) int32 {
	k.nodes = append(k.nodes, node{idx: idx, parent: parent})
	return int32(len(k.nodes) - 1)
}

// compact drops the decision log entries that no live state and not the
// incumbent refer to. Parents are always older than their children, so one
// forward pass renumbers in place.
func (k *Knapsack) compact() {
	nodes := k.nodes
	mark := slices.Grow(k.mark[:0], len(nodes))[:len(nodes)]
	clear(mark)
	walk := func(nd int32) {
		for ; nd >= 0 && mark[nd] == 0; nd = nodes[nd].parent {
			mark[nd] = 1
		}
	}
	walk(k.best)
	for _, s := range k.cur {
		walk(s.node)
	}
	var live int32
	for i := range nodes {
		if mark[i] == 0 {
			continue
		}
		nd := nodes[i]
		if nd.parent >= 0 {
			nd.parent = mark[nd.parent] - 1
		}
		nodes[live] = nd
		live++
		mark[i] = live // new index + 1
	}
	k.nodes = nodes[:live]
	k.mark = mark
	remap := func(nd int32) int32 {
		if nd < 0 {
			return nd
		}
		return mark[nd] - 1
	}
	k.best = remap(k.best)
	for i := range k.cur {
		k.cur[i].node = remap(k.cur[i].node)
	}
	k.nodeLimit = max(k.nodeLimit, 2*int(live))
}

// findBreak partitions the items just enough to find the break item b:
// items[:b] are the most efficient items (in no particular order) and fit
// together, items[b] is the next most efficient and does not fit with
// them, and items[b+1:] are the rest. It returns b, the residual capacity
// left by items[:b] and their profit.
func (k *Knapsack) findBreak(capacity int64) (b int, r int64, psb float64) {
	items := k.items
	lo, hi := 0, len(items)
	var wlo int64 // weight of items[:lo]; wlo <= capacity < weight of items[:hi]
	for hi-lo > smallSort {
		m := partition(items[lo:hi]) + lo
		var wl int64
		for i := lo; i < m; i++ {
			wl += items[i].w
			if wlo+wl > capacity {
				break
			}
		}
		switch {
		case wlo+wl > capacity:
			hi = m
		case wlo+wl+items[m].w > capacity:
			wlo += wl
			lo, hi = m, m+1
		default:
			wlo += wl + items[m].w
			lo = m + 1
		}
	}
	slices.SortFunc(items[lo:hi], compareItems)
	r = capacity - wlo
	b = lo
	for items[b].w <= r {
		r -= items[b].w
		b++
	}
	for i := range b {
		psb += items[i].p
	}
	return b, r, psb
}

// partition reorders s around a median-of-three pivot in the order of
// before and returns the pivot's final position m: s[:m] come before it,
// s[m+1:] after it.
func partition(s []kItem) int {
	n := len(s)
	mid := n / 2
	// Median of first, middle, last moved to the end.
	if before(&s[mid], &s[0]) {
		s[mid], s[0] = s[0], s[mid]
	}
	if before(&s[n-1], &s[0]) {
		s[n-1], s[0] = s[0], s[n-1]
	}
	if before(&s[mid], &s[n-1]) {
		s[mid], s[n-1] = s[n-1], s[mid]
	}
	pivot := s[n-1]
	m := 0
	for i := range n - 1 {
		if before(&s[i], &pivot) {
			s[i], s[m] = s[m], s[i]
			m++
		}
	}
	s[m], s[n-1] = s[n-1], s[m]
	return m
}
