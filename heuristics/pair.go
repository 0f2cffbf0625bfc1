package heuristics

import (
	"cmp"
	"math"
	"slices"
)

// pairOpt re-solves, for every pair of resources, the assignment of the items
// on those two resources by depth-first branch and bound (each search limited
// to nodeLimit nodes, less with many resources), keeping feasibility. It works on the current
// assignment, which must be feasible, and returns whether it improved it.
// It stops early when the context is cancelled.
func (s *search) pairOpt(nodeLimit int) bool {
	improved := false
	// with many resources, share a total of pairTotal nodes among the pairs
	if pairs := s.m * (s.m - 1) / 2; pairs > 0 && pairs*nodeLimit > pairTotal {
		nodeLimit = max(pairTotal/pairs, 200)
	}
	ps := &pairSearch{s: s, cap: nodeLimit}
	for a := 0; a < s.m; a++ {
		for b := a + 1; b < s.m; b++ {
			if s.cancelled() {
				break
			}
			if ps.reoptimise(a, b) {
				improved = true
			}
		}
	}
	if improved {
		s.recompute()
		s.record()
	}
	return improved
}

// pairTotal bounds the nodes of one pairOpt over all pairs of resources
// (except that every pair may use 200), so that its cost does not grow with
// the square of the number of resources.
const pairTotal = 1000000

type pairSearch struct {
	s        *search
	a, b     int
	items    []int
	restMin  []float64 // least cost of items[q:]
	choice   []int     // current partial choice: 0 = a, 1 = b
	best     []int
	bestCost float64
	nodes    int
	cap      int
	stopped  bool
}

// reoptimise re-solves the items on resources a and b. The member lists of
// a and b must be current; it keeps them current.
func (ps *pairSearch) reoptimise(a, b int) bool {
	s := ps.s
	m := s.m
	items := append(append(ps.items[:0], s.members[a]...), s.members[b]...)
	ps.items = items
	if len(items) < 2 {
		return false
	}
	// most decisive items first
	slices.SortStableFunc(items, func(jx, jy int) int {
		return cmp.Compare(math.Abs(s.model.cost[jy*m+a]-s.model.cost[jy*m+b]), math.Abs(s.model.cost[jx*m+a]-s.model.cost[jx*m+b]))
	})
	ps.a, ps.b, ps.nodes, ps.stopped = a, b, 0, false
	ps.restMin = slices.Grow(ps.restMin[:0], len(items)+1)[:len(items)+1]
	ps.choice = slices.Grow(ps.choice[:0], len(items))[:len(items)]
	ps.best = slices.Grow(ps.best[:0], len(items))[:len(items)]
	cur := 0.0
	for q, j := range items {
		side := 0
		if s.asg[j] == b {
			side = 1
		}
		ps.best[q] = side
		cur += s.model.cost[j*m+s.asg[j]]
	}
	ps.restMin[len(items)] = 0
	for q := len(items) - 1; q >= 0; q-- {
		j := items[q]
		ps.restMin[q] = ps.restMin[q+1] + math.Min(s.model.cost[j*m+a], s.model.cost[j*m+b])
	}
	ps.bestCost = cur - costEps(cur)
	start := ps.bestCost
	ps.dfs(0, 0, 0, 0)
	if !(ps.bestCost < start) {
		return false
	}
	s.members[a], s.members[b] = s.members[a][:0], s.members[b][:0]
	for q, j := range items {
		i := a
		if ps.best[q] == 1 {
			i = b
		}
		s.asg[j] = i
		s.pos[j] = len(s.members[i])
		s.members[i] = append(s.members[i], j)
	}
	return true
}

func (ps *pairSearch) dfs(q int, cost, la, lb float64) {
	m := ps.s.m
	ps.nodes++
	if ps.nodes&1023 == 0 && ps.s.cancelled() {
		ps.stopped = true
	}
	if ps.stopped || cost+ps.restMin[q] >= ps.bestCost || ps.nodes > ps.cap {
		return
	}
	if q == len(ps.items) {
		ps.bestCost = cost
		copy(ps.best, ps.choice)
		return
	}
	s, j := ps.s, ps.items[q]
	ka, kb := j*m+ps.a, j*m+ps.b
	first := 0
	if s.model.cost[kb] < s.model.cost[ka] {
		first = 1
	}
	for t := 0; t < 2; t++ {
		side := first ^ t
		if side == 0 {
			if c := s.model.cost[ka]; c <= maxFinite && la+s.weight[ka] <= s.limit[ps.a] {
				ps.choice[q] = 0
				ps.dfs(q+1, cost+c, la+s.weight[ka], lb)
			}
		} else {
			if c := s.model.cost[kb]; c <= maxFinite && lb+s.weight[kb] <= s.limit[ps.b] {
				ps.choice[q] = 1
				ps.dfs(q+1, cost+c, la, lb+s.weight[kb])
			}
		}
	}
}
