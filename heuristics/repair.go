package heuristics

import (
	"context"
	"math"
	"math/rand/v2"
)

// Repair builds a feasible assignment from a relaxed answer.
//
// relaxed[i] lists the items resource i took in the relaxation; an item may
// appear under no, one or several resources. priced[i][j] is the priced
// (reduced) cost of the pair, in the sense of p.Cost, used to judge which
// resource to keep and the regret of an item; nil means p.Cost. Item numbers
// outside 0..n-1 in relaxed are ignored.
//
// Items taken exactly once stay where they are, an item taken several times
// stays on its cheapest priced resource (ties: more capacity left), as long as
// capacity allows. The other items are inserted by regret, the difference
// between the priced costs of their best and second-best resources that still
// have room, largest regret first; an item that fits nowhere gets room by
// moving one placed item elsewhere. If items are still left over, a penalised
// search (priced cost plus an adaptive weight on capacity excess, shift and
// swap moves) runs until the excess is zero.
//
// Repair returns assign[j] = resource of item j and ok = true when every item
// is placed on an allowed pair within capacity; otherwise (also for a
// malformed p, relaxed or priced) it returns ok = false.
func Repair(p *Assignment, relaxed [][]int, priced [][]float64, rng *rand.Rand) (assign []int, ok bool) {
	md, err := compile(p, priced)
	if err != nil || len(relaxed) > md.m {
		return nil, false
	}
	r := &repairer{model: md, asg: make([]int, md.n), load: make([]float64, md.m)}
	for j := range r.asg {
		r.asg[j] = -1
	}
	r.keepRelaxed(relaxed)
	failed := r.insertByRegret()
	if len(failed) > 0 {
		if !r.feasibilityPhase(failed, rng) {
			return nil, false
		}
	}
	if _, feas := p.Evaluate(r.asg); !feas {
		return nil, false
	}
	return r.asg, true
}

type repairer struct {
	*model
	asg  []int // -1 while unplaced
	load []float64
}

func (r *repairer) fits(i, j int) bool {
	k := i*r.n + j
	return r.cost[k] <= maxFinite && r.load[i]+r.weight[k] <= r.limit[i]
}

func (r *repairer) place(j, i int) {
	r.asg[j] = i
	r.load[i] += r.weight[i*r.n+j]
}

// keepRelaxed places the items the relaxation gave to one resource, then the
// items it gave to several, each on its cheapest one.
func (r *repairer) keepRelaxed(relaxed [][]int) {
	count := make([]int, r.n)
	for _, items := range relaxed {
		for _, j := range items {
			if j >= 0 && j < r.n {
				count[j]++
			}
		}
	}
	for i, items := range relaxed {
		for _, j := range items {
			if j >= 0 && j < r.n && count[j] == 1 && r.fits(i, j) {
				r.place(j, i)
			}
		}
	}
	// candidates of the multiply taken items
	cands := make([][]int, r.n)
	for i, items := range relaxed {
		for _, j := range items {
			if j >= 0 && j < r.n && count[j] > 1 {
				cands[j] = append(cands[j], i)
			}
		}
	}
	for j, cs := range cands {
		if len(cs) == 0 {
			continue
		}
		best := -1
		for _, i := range cs {
			k := i*r.n + j
			if r.cost[k] > maxFinite {
				continue
			}
			if best < 0 {
				best = i
				continue
			}
			kb := best*r.n + j
			if r.cost[k] < r.cost[kb] || (r.cost[k] == r.cost[kb] &&
				r.limit[i]-r.load[i]-r.weight[k] > r.limit[best]-r.load[best]-r.weight[kb]) {
				best = i
			}
		}
		if best >= 0 && r.fits(best, j) {
			r.place(j, best)
		}
	}
}

// insertByRegret places the unplaced items, largest regret first, and
// returns those that could not be placed.
func (r *repairer) insertByRegret() (failed []int) {
	n := r.n
	var pool []int
	for j, i := range r.asg {
		if i < 0 {
			pool = append(pool, j)
		}
	}
	first := make([]int, n)  // best resource with room, -1 if none
	second := make([]int, n) // second best, -1 if none
	regret := make([]float64, n)
	eval := func(j int) {
		b1, b2 := -1, -1
		for i := 0; i < r.m; i++ {
			if !r.fits(i, j) {
				continue
			}
			c := r.cost[i*n+j]
			switch {
			case b1 < 0 || c < r.cost[b1*n+j]:
				b1, b2 = i, b1
			case b2 < 0 || c < r.cost[b2*n+j]:
				b2 = i
			}
		}
		first[j], second[j] = b1, b2
		switch {
		case b1 < 0:
			regret[j] = math.Inf(1) // handled first
		case b2 < 0:
			regret[j] = math.MaxFloat64
		default:
			regret[j] = r.cost[b2*n+j] - r.cost[b1*n+j]
		}
	}
	for _, j := range pool {
		eval(j)
	}
	for len(pool) > 0 {
		pick := 0
		for q := 1; q < len(pool); q++ {
			j, b := pool[q], pool[pick]
			if regret[j] > regret[b] || (regret[j] == regret[b] && j < b) {
				pick = q
			}
		}
		j := pool[pick]
		pool[pick] = pool[len(pool)-1]
		pool = pool[:len(pool)-1]
		i := first[j]
		if i < 0 {
			if !r.eject(j) {
				failed = append(failed, j)
				continue
			}
			for _, q := range pool {
				eval(q)
			}
			continue
		}
		r.place(j, i)
		for _, q := range pool {
			if (first[q] == i || second[q] == i) && !r.fits(i, q) {
				eval(q)
			}
		}
	}
	return failed
}

// eject places item j, which fits nowhere, by moving one placed item from a
// resource to another one with room, at least priced cost.
func (r *repairer) eject(j int) bool {
	n := r.n
	bestD := math.Inf(1)
	bi, bk, bh := -1, -1, -1
	for i := 0; i < r.m; i++ {
		kij := i*n + j
		if r.cost[kij] > maxFinite {
			continue
		}
		need := r.load[i] + r.weight[kij] - r.limit[i]
		for k, ik := range r.asg {
			if ik != i || r.weight[i*n+k] < need {
				continue
			}
			for h := 0; h < r.m; h++ {
				if h == i || !r.fits(h, k) {
					continue
				}
				d := r.cost[kij] + r.cost[h*n+k] - r.cost[i*n+k]
				if d < bestD {
					bestD, bi, bk, bh = d, i, k, h
				}
			}
		}
	}
	if bi < 0 {
		return false
	}
	r.asg[bk] = bh
	r.load[bi] -= r.weight[bi*n+bk]
	r.load[bh] += r.weight[bh*n+bk]
	r.place(j, bi)
	return true
}

// feasibilityPhase puts the failed items where they add the least excess and
// runs the penalised search until no capacity is exceeded.
func (r *repairer) feasibilityPhase(failed []int, rng *rand.Rand) bool {
	n := r.n
	for _, j := range failed {
		best, bestEx := -1, math.Inf(1)
		for i := 0; i < r.m; i++ {
			k := i*n + j
			if r.cost[k] > maxFinite {
				continue
			}
			ex := r.load[i] + r.weight[k] - r.limit[i]
			if ex < bestEx || (ex == bestEx && r.cost[k] < r.cost[best*n+j]) {
				best, bestEx = i, ex
			}
		}
		if best < 0 {
			return false // forbidden everywhere
		}
		r.place(j, best)
	}
	s := newSearch(r.model, r.asg, rng)
	if s.over > 0 {
		s.tabuSearch(context.Background(), 200*(n+r.m)+1000, math.MaxInt, true)
	}
	if !s.haveBest {
		return false
	}
	copy(r.asg, s.best)
	return true
}
