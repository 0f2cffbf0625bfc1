package heuristics

import (
	"math"
	"sort"
)

// pairOpt re-solves, for every pair of resources, the assignment of the items
// on those two resources by depth-first branch and bound (each search limited
// to nodeLimit nodes), keeping feasibility. It works on the current
// assignment, which must be feasible, and returns whether it improved it.
func (s *search) pairOpt(nodeLimit int) bool {
	improved := false
	for a := 0; a < s.m; a++ {
		for b := a + 1; b < s.m; b++ {
			if s.reoptimise(a, b, nodeLimit) {
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

type pairSearch struct {
	s          *search
	a, b       int
	items      []int
	restMin    []float64 // least cost of items[q:]
	choice     []int     // current partial choice: 0 = a, 1 = b
	best       []int
	bestCost   float64
	nodes, cap int
}

func (s *search) reoptimise(a, b, nodeLimit int) bool {
	n := s.n
	var items []int
	for j, i := range s.asg {
		if i == a || i == b {
			items = append(items, j)
		}
	}
	if len(items) < 2 {
		return false
	}
	// most decisive items first
	sort.SliceStable(items, func(x, y int) bool {
		jx, jy := items[x], items[y]
		return math.Abs(s.model.cost[a*n+jx]-s.model.cost[b*n+jx]) > math.Abs(s.model.cost[a*n+jy]-s.model.cost[b*n+jy])
	})
	ps := &pairSearch{s: s, a: a, b: b, items: items, cap: nodeLimit,
		restMin: make([]float64, len(items)+1),
		choice:  make([]int, len(items)), best: make([]int, len(items))}
	cur := 0.0
	for q, j := range items {
		side := 0
		if s.asg[j] == b {
			side = 1
		}
		ps.best[q] = side
		cur += s.model.cost[s.asg[j]*n+j]
	}
	for q := len(items) - 1; q >= 0; q-- {
		j := items[q]
		ps.restMin[q] = ps.restMin[q+1] + math.Min(s.model.cost[a*n+j], s.model.cost[b*n+j])
	}
	ps.bestCost = cur - costEps(cur)
	start := ps.bestCost
	ps.dfs(0, 0, 0, 0)
	if !(ps.bestCost < start) {
		return false
	}
	for q, j := range items {
		i := a
		if ps.best[q] == 1 {
			i = b
		}
		s.asg[j] = i
	}
	return true
}

func (ps *pairSearch) dfs(q int, cost, la, lb float64) {
	ps.nodes++
	if cost+ps.restMin[q] >= ps.bestCost || ps.nodes > ps.cap {
		return
	}
	if q == len(ps.items) {
		ps.bestCost = cost
		copy(ps.best, ps.choice)
		return
	}
	s, n, j := ps.s, ps.s.n, ps.items[q]
	ka, kb := ps.a*n+j, ps.b*n+j
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
