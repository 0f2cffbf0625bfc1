package transport

import (
	"fmt"
	"math"
	"slices"
)

// Solver solves a transportation problem and keeps its optimal basis, so
// that after a few calls to SetSupply or SetDemand the next Solve starts
// from the previous solution. A Solver is not safe for concurrent use.
//
// The network has a root node 0, site i as node 1+i and customer j as
// node 1+m+j. Its arcs, all without upper bound, are
//
//	real        i*n+j        site i -> customer j, cost Cost[i][j]
//	slack       m*n+i        site i -> root, cost 0 (unused supply)
//	artificial  m*n+m+v-1    root -> node v, cost bigM (unmet demand)
//
// The basis is a spanning tree stored with parent pointers and child
// lists; pot holds node potentials with pot[head] = pot[tail] + cost on
// every tree arc, so the reduced cost of arc t->h is cost + pot[t] - pot[h].
type Solver struct {
	m, n           int
	supply, demand []float64
	rows           [][]float64 // rows[i][j] = Cost[i][j]
	bigM           float64     // cost of an artificial arc
	tolC           float64     // reduced costs above -tolC count as >= 0
	tolF           float64     // flows and amounts below tolF count as 0

	// Spanning-tree basis, indexed by node.
	parent []int     // parent node, -1 for the root
	pred   []int     // arc joining the node to its parent
	up     []bool    // pred is oriented node -> parent
	flow   []float64 // flow on pred
	pot    []float64 // node potential
	depth  []int     // number of arcs to the root
	first  []int     // first child, -1 if none
	next   []int     // next sibling, -1 if none
	prev   []int     // previous sibling, -1 if first child
	warm   bool      // the basis holds the result of an earlier Solve
	// restored, when not nil, replaces the basis as the next start (see
	// SetWarmFlows).
	restored []Shipment

	// SkipDuals, when set, leaves SiteDual and CustomerDual nil, which
	// saves a pass over the lanes of every closed site.
	SkipDuals bool

	open   []int // sites with positive supply, in index order
	cursor int   // where block pricing resumes
	block  int   // block size for pricing

	// Scratch space for building a starting basis.
	fa    []flowArc
	resid []float64
	comp  []int
	mark  []int
	stack []int
	adjAt []int
	adj   []int
	par   []int
	parK  []int
	ships []Shipment
}

// flowArc is a positive flow on a real arc, used while building a basis.
type flowArc struct {
	i, j int
	f    float64
}

func (s *Solver) init() {
	nodes := 1 + s.m + s.n
	s.parent = make([]int, nodes)
	s.pred = make([]int, nodes)
	s.up = make([]bool, nodes)
	s.flow = make([]float64, nodes)
	s.pot = make([]float64, nodes)
	s.depth = make([]int, nodes)
	s.first = make([]int, nodes)
	s.next = make([]int, nodes)
	s.prev = make([]int, nodes)
	s.resid = make([]float64, nodes)
	s.comp = make([]int, nodes)
	s.mark = make([]int, nodes)
	s.adjAt = make([]int, nodes+1)
	s.par = make([]int, nodes)
	s.parK = make([]int, nodes)
}

func (s *Solver) slackArc(i int) int { return s.m*s.n + i }
func (s *Solver) artArc(v int) int   { return s.m*s.n + s.m + v - 1 }
func (s *Solver) isSite(v int) bool  { return v >= 1 && v <= s.m }

// arcEnds returns the tail, head and cost of arc a.
func (s *Solver) arcEnds(a int) (tail, head int, cost float64) {
	mn := s.m * s.n
	switch {
	case a < mn:
		i, j := a/s.n, a%s.n
		return 1 + i, 1 + s.m + j, s.rows[i][j]
	case a < mn+s.m:
		return 1 + a - mn, 0, 0
	default:
		return 0, 1 + a - mn - s.m, s.bigM
	}
}

// Solve returns an optimal solution for the current supplies and demands,
// starting from the previous solution when there is one. When the demand
// cannot be met the error is an [*InfeasibleError]; the Solver stays
// usable either way.
func (s *Solver) Solve() (*Solution, error) {
	totS, totD := 0.0, 0.0
	for _, v := range s.supply {
		totS += v
	}
	for _, v := range s.demand {
		totD += v
	}
	s.tolF = 1e-11 * max(1, totS, totD)
	s.open = s.open[:0]
	for i, v := range s.supply {
		if v > s.tolF {
			s.open = append(s.open, i)
		}
	}
	switch {
	case s.restored != nil:
		s.restoredFlows()
	case s.warm:
		s.warmFlows()
	default:
		s.greedyFlows()
	}
	s.buildBasis()
	s.warm = true

	total := len(s.open)*(s.n+1) + s.n
	s.block = max(8, int(math.Sqrt(float64(total))))
	s.cursor = 0
	nodes := len(s.parent)
	limit := 100*nodes + 10*total
	pivots := 0
	fresh := true // potentials were computed from scratch
	for {
		a := s.findEntering()
		if a < 0 {
			if fresh {
				break
			}
			s.recomputePotentials()
			fresh = true
			continue
		}
		if err := s.pivot(a); err != nil {
			s.warm = false
			return nil, err
		}
		pivots++
		fresh = false
		if pivots%nodes == 0 {
			s.recomputePotentials()
			fresh = true
		}
		if pivots > limit {
			s.warm = false
			return nil, fmt.Errorf("transport: internal error: no optimum after %d pivots", pivots)
		}
	}
	return s.solution(pivots, totS, totD)
}

// greedyFlows fills s.fa with a starting flow: each customer in turn takes
// what it needs from the cheapest sites that still have supply. The
// support is a forest: a site that two customers share is exhausted by
// the first of them that is split, so no cycle can close.
func (s *Solver) greedyFlows() {
	s.fa = s.fa[:0]
	rem := s.resid[1 : 1+s.m] // scratch, overwritten by buildBasis
	for i := range rem {
		rem[i] = 0
	}
	for _, i := range s.open {
		rem[i] = s.supply[i]
	}
	for j, d := range s.demand {
		need := d
		for need > s.tolF {
			best, bi := math.Inf(1), -1
			for _, i := range s.open {
				if rem[i] > s.tolF && s.rows[i][j] < best {
					best, bi = s.rows[i][j], i
				}
			}
			if bi < 0 {
				break
			}
			q := min(need, rem[bi])
			s.fa = append(s.fa, flowArc{bi, j, q})
			rem[bi] -= q
			need -= q
		}
	}
}

// warmFlows fills s.fa with the positive flows of the current basis,
// reduced where supplies or demands have shrunk below them.
func (s *Solver) warmFlows() {
	s.fa = s.fa[:0]
	mn := s.m * s.n
	for v := 1; v < len(s.parent); v++ {
		if a := s.pred[v]; a < mn && s.flow[v] > s.tolF {
			s.fa = append(s.fa, flowArc{a / s.n, a % s.n, s.flow[v]})
		}
	}
	s.reduceFlows()
}

// reduceFlows cuts the flows in s.fa where supplies or demands have
// shrunk below them and drops those that vanish.
func (s *Solver) reduceFlows() {
	out := s.resid[1 : 1+s.m]
	in := s.resid[1+s.m:]
	clear(s.resid)
	for _, x := range s.fa {
		out[x.i] += x.f
		in[x.j] += x.f
	}
	for k := range s.fa {
		x := &s.fa[k]
		if lim := s.effSupply(x.i); out[x.i] > lim {
			r := min(x.f, out[x.i]-lim)
			x.f -= r
			out[x.i] -= r
			in[x.j] -= r
		}
	}
	for k := range s.fa {
		x := &s.fa[k]
		if lim := s.effDemand(x.j); in[x.j] > lim {
			r := min(x.f, in[x.j]-lim)
			x.f -= r
			in[x.j] -= r
		}
	}
	s.fa = slices.DeleteFunc(s.fa, func(x flowArc) bool { return x.f <= s.tolF })
}

func (s *Solver) effSupply(i int) float64 {
	if v := s.supply[i]; v > s.tolF {
		return v
	}
	return 0
}

func (s *Solver) effDemand(j int) float64 {
	if v := s.demand[j]; v > s.tolF {
		return v
	}
	return 0
}

// buildBasis turns the forest flow in s.fa into a strongly feasible
// spanning-tree basis. Each tree of the forest must hang from the root by
// one arc, which carries the tree's leftover supply or unmet demand; a
// tree with leftovers at two nodes is first repaired by shifting flow
// along the path between them (in the cheaper direction) until a leftover
// or a path arc drops to zero.
func (s *Solver) buildBasis() {
	nodes := len(s.parent)
	// Leftovers: spare supply at sites (>= 0), minus unmet demand at
	// customers (<= 0).
	e := s.resid
	e[0] = 0
	for i := range s.m {
		e[1+i] = s.effSupply(i)
	}
	for j := range s.n {
		e[1+s.m+j] = -s.effDemand(j)
	}
	for _, x := range s.fa {
		e[1+x.i] -= x.f
		e[1+s.m+x.j] += x.f
	}
	for v := range e {
		if math.Abs(e[v]) <= s.tolF {
			e[v] = 0
		}
	}
	// Adjacency of the forest (compressed rows).
	at := s.adjAt
	clear(at)
	for _, x := range s.fa {
		at[1+x.i+1]++
		at[1+s.m+x.j+1]++
	}
	for v := 1; v <= nodes; v++ {
		at[v] += at[v-1]
	}
	s.adj = slices.Grow(s.adj[:0], at[nodes])[:at[nodes]]
	fill := s.par // temporary insertion cursor
	copy(fill, at[:nodes])
	for k, x := range s.fa {
		u, w := 1+x.i, 1+s.m+x.j
		s.adj[fill[u]] = k
		fill[u]++
		s.adj[fill[w]] = k
		fill[w]++
	}

	for s.fixLeftovers() {
	}

	// Hang every tree from the root by its attachment node.
	for v := range nodes {
		s.first[v], s.next[v], s.prev[v] = -1, -1, -1
	}
	s.parent[0], s.pred[0], s.flow[0] = -1, -1, 0
	for v := 1; v < nodes; v++ {
		s.mark[v] = -1
	}
	for c := 1; c < nodes; c++ {
		if s.mark[c] != -1 {
			continue
		}
		// Find the attachment node of c's tree: its node with a
		// leftover, else a customer, else c itself.
		members := s.collect(c, c)
		attach := c
		found := false
		for _, v := range members {
			if e[v] != 0 {
				attach, found = v, true
				break
			}
		}
		if !found {
			for _, v := range members {
				if !s.isSite(v) {
					attach = v
					break
				}
			}
		}
		s.parent[attach] = 0
		s.addChild(0, attach)
		switch {
		case e[attach] > 0:
			s.pred[attach], s.up[attach], s.flow[attach] = s.slackArc(attach-1), true, e[attach]
		default:
			s.pred[attach], s.up[attach], s.flow[attach] = s.artArc(attach), false, -e[attach]
		}
		// Depth-first from the attachment node.
		s.stack = append(s.stack[:0], attach)
		s.mark[attach] = -2
		for len(s.stack) > 0 {
			v := s.stack[len(s.stack)-1]
			s.stack = s.stack[:len(s.stack)-1]
			for _, k := range s.adj[at[v]:at[v+1]] {
				x := s.fa[k]
				if x.f == 0 {
					continue
				}
				u, w := 1+x.i, 1+s.m+x.j
				child, childIsSite := w, false
				if w == v {
					child, childIsSite = u, true
				}
				if s.mark[child] == -2 {
					continue
				}
				s.mark[child] = -2
				s.parent[child] = v
				s.pred[child] = x.i*s.n + x.j
				s.up[child] = childIsSite
				s.flow[child] = x.f
				s.addChild(v, child)
				s.stack = append(s.stack, child)
			}
		}
	}
	s.recomputePotentials()
}

// collect marks the tree of the forest containing start with id and
// returns its nodes (in s.stack's backing store of a separate slice).
func (s *Solver) collect(start, id int) []int {
	members := s.comp[:0]
	s.mark[start] = id
	members = append(members, start)
	at := s.adjAt
	for h := 0; h < len(members); h++ {
		v := members[h]
		for _, k := range s.adj[at[v]:at[v+1]] {
			x := s.fa[k]
			if x.f == 0 {
				continue
			}
			w := 1 + x.i
			if w == v {
				w = 1 + s.m + x.j
			}
			if s.mark[w] == -1 {
				s.mark[w] = id
				members = append(members, w)
			}
		}
	}
	return members
}

// fixLeftovers makes one pass over the trees of the forest and shifts
// flow inside every tree that has leftovers at two or more nodes. It
// reports whether anything changed.
func (s *Solver) fixLeftovers() bool {
	nodes := len(s.parent)
	e := s.resid
	for v := 1; v < nodes; v++ {
		s.mark[v] = -1
	}
	changed := false
	for c := 1; c < nodes; c++ {
		if s.mark[c] != -1 {
			continue
		}
		members := s.collect(c, c)
		r, count := -1, 0
		for _, v := range members {
			if e[v] != 0 {
				if r < 0 {
					r = v
				}
				count++
			}
		}
		if count < 2 {
			continue
		}
		// Breadth-first tree rooted at r; members is reused as the
		// queue, which collect already filled with the same nodes.
		order := members[:0]
		order = append(order, r)
		s.par[r], s.parK[r] = -1, -1
		visited := s.stack[:0]
		s.mark[r] = -3
		visited = append(visited, r)
		for h := 0; h < len(order); h++ {
			v := order[h]
			for _, k := range s.adj[s.adjAt[v]:s.adjAt[v+1]] {
				x := s.fa[k]
				if x.f == 0 {
					continue
				}
				w := 1 + x.i
				if w == v {
					w = 1 + s.m + x.j
				}
				if s.mark[w] != -3 {
					s.mark[w] = -3
					visited = append(visited, w)
					s.par[w], s.parK[w] = v, k
					order = append(order, w)
				}
			}
		}
		for _, v := range visited {
			s.mark[v] = c
		}
		s.stack = visited
		for _, v := range order[1:] {
			if e[r] == 0 {
				break
			}
			if e[v] != 0 && s.pathIntact(v, r) {
				s.shift(v, r)
				changed = true
			}
		}
	}
	return changed
}

func (s *Solver) pathIntact(v, r int) bool {
	for w := v; w != r; w = s.par[w] {
		if s.fa[s.parK[w]].f == 0 {
			return false
		}
	}
	return true
}

// shift moves flow along the forest path between v and r, both with a
// leftover, in the direction that does not raise the big-M cost, as far
// as the leftovers and the path flows allow.
func (s *Solver) shift(v, r int) {
	e := s.resid
	pathCost := 0.0
	fwdMin, bwdMin := math.Inf(1), math.Inf(1) // as seen walking v -> r
	for w := v; w != r; w = s.par[w] {
		x := s.fa[s.parK[w]]
		if w == 1+x.i { // site -> customer: forward
			pathCost += s.rows[x.i][x.j]
			fwdMin = min(fwdMin, x.f)
		} else {
			pathCost -= s.rows[x.i][x.j]
			bwdMin = min(bwdMin, x.f)
		}
	}
	unmet := func(w int) float64 {
		if s.isSite(w) {
			return 0
		}
		return 1
	}
	costVR := pathCost + s.bigM*(unmet(v)-unmet(r))
	// Send delta from a to b; sign +1 means along v -> r.
	a, b, sign, delta := v, r, 1.0, bwdMin
	if costVR > 0 {
		a, b, sign, delta = r, v, -1.0, fwdMin
	}
	if s.isSite(a) {
		delta = min(delta, e[a])
	}
	if !s.isSite(b) {
		delta = min(delta, -e[b])
	}
	if !(delta > 0) || math.IsInf(delta, 1) {
		return
	}
	for w := v; w != r; w = s.par[w] {
		x := &s.fa[s.parK[w]]
		if w == 1+x.i {
			x.f += sign * delta
		} else {
			x.f -= sign * delta
		}
		if x.f <= s.tolF {
			x.f = 0
		}
	}
	e[a] -= delta
	e[b] += delta
	for _, w := range [2]int{a, b} {
		if math.Abs(e[w]) <= s.tolF {
			e[w] = 0
		}
	}
}

func (s *Solver) addChild(p, c int) {
	s.next[c] = s.first[p]
	s.prev[c] = -1
	if f := s.first[p]; f >= 0 {
		s.prev[f] = c
	}
	s.first[p] = c
}

func (s *Solver) removeChild(p, c int) {
	if q := s.prev[c]; q >= 0 {
		s.next[q] = s.next[c]
	} else {
		s.first[p] = s.next[c]
	}
	if q := s.next[c]; q >= 0 {
		s.prev[q] = s.prev[c]
	}
}

// recomputePotentials sets potentials and depths from the tree, root
// first, which also removes rounding drift from incremental updates.
func (s *Solver) recomputePotentials() {
	s.pot[0], s.depth[0] = 0, 0
	s.walkSubtree(0, func(x int) {
		p := s.parent[x]
		_, _, c := s.arcEnds(s.pred[x])
		if s.up[x] {
			s.pot[x] = s.pot[p] - c
		} else {
			s.pot[x] = s.pot[p] + c
		}
		s.depth[x] = s.depth[p] + 1
	})
}

// walkSubtree calls f on every node below q in preorder (parents before
// children), not on q itself.
func (s *Solver) walkSubtree(q int, f func(int)) {
	x := q
	for {
		if c := s.first[x]; c >= 0 {
			x = c
		} else {
			for x != q && s.next[x] < 0 {
				x = s.parent[x]
			}
			if x == q {
				return
			}
			x = s.next[x]
		}
		f(x)
	}
}

// findEntering returns an arc with negative reduced cost, the most
// negative of the first block of arcs that has one, or -1 if there is
// none. Blocks are scanned round-robin from where the last search ended.
func (s *Solver) findEntering() int {
	n := s.n
	nOpen := len(s.open)
	realEnd := nOpen * n
	slackEnd := realEnd + nOpen
	total := slackEnd + n
	pot := s.pot
	custPot := pot[1+s.m:]
	best := -s.tolC
	bestArc := -1
	pos := s.cursor
	if pos >= total {
		pos = 0
	}
	left := s.block
	for scanned := 0; scanned < total; {
		var cnt int
		switch {
		case pos < realEnd:
			r, j0 := pos/n, pos%n
			i := s.open[r]
			row := s.rows[i]
			j1 := min(n, j0+left)
			pi := pot[1+i]
			for j := j0; j < j1; j++ {
				if rc := row[j] + pi - custPot[j]; rc < best {
					best, bestArc = rc, i*n+j
				}
			}
			cnt = j1 - j0
		case pos < slackEnd:
			k0 := pos - realEnd
			k1 := min(nOpen, k0+left)
			for k := k0; k < k1; k++ {
				i := s.open[k]
				if rc := pot[1+i]; rc < best {
					best, bestArc = rc, s.slackArc(i)
				}
			}
			cnt = k1 - k0
		default:
			j0 := pos - slackEnd
			j1 := min(n, j0+left)
			for j := j0; j < j1; j++ {
				if rc := s.bigM - custPot[j]; rc < best {
					best, bestArc = rc, s.artArc(1+s.m+j)
				}
			}
			cnt = j1 - j0
		}
		pos += cnt
		if pos >= total {
			pos = 0
		}
		scanned += cnt
		left -= cnt
		if left == 0 {
			if bestArc >= 0 {
				break
			}
			left = s.block
		}
	}
	s.cursor = pos
	return bestArc
}

// pivot brings arc a into the basis. The leaving arc is the last blocking
// arc met when the cycle is walked in the direction of the flow change
// from its apex, which keeps the tree strongly feasible.
func (s *Solver) pivot(a int) error {
	u, v, c := s.arcEnds(a)
	// Apex of the cycle closed by a.
	x, y := u, v
	for x != y {
		if s.depth[x] >= s.depth[y] {
			x = s.parent[x]
		} else {
			y = s.parent[y]
		}
	}
	apex := x
	// Flow is pushed apex -> ... -> u -> v -> ... -> apex. On the u side an
	// arc pointing up (node -> parent) is walked backwards and loses flow;
	// on the v side an arc pointing down loses flow.
	delta := math.Inf(1)
	out, outOnU := -1, false
	for w := u; w != apex; w = s.parent[w] {
		if s.up[w] && s.flow[w] < delta {
			delta, out, outOnU = s.flow[w], w, true
		}
	}
	for w := v; w != apex; w = s.parent[w] {
		if !s.up[w] && s.flow[w] <= delta {
			delta, out, outOnU = s.flow[w], w, false
		}
	}
	if out < 0 {
		return fmt.Errorf("transport: internal error: unbounded cycle through arc %d", a)
	}
	if delta > 0 {
		for w := u; w != apex; w = s.parent[w] {
			if s.up[w] {
				s.flow[w] -= delta
			} else {
				s.flow[w] += delta
			}
			if s.flow[w] <= s.tolF {
				s.flow[w] = 0
			}
		}
		for w := v; w != apex; w = s.parent[w] {
			if s.up[w] {
				s.flow[w] += delta
			} else {
				s.flow[w] -= delta
			}
			if s.flow[w] <= s.tolF {
				s.flow[w] = 0
			}
		}
	}
	// Re-hang the subtree cut off by the leaving arc from the entering
	// arc, reversing the tree path from q (the end of a inside it) to out.
	q, np, qUp := v, u, false
	if outOnU {
		q, np, qUp = u, v, true
	}
	prevNode, prevArc, prevUp, prevFlow := np, a, qUp, max(delta, 0)
	for w := q; ; {
		oldParent, oldArc, oldUp, oldFlow := s.parent[w], s.pred[w], s.up[w], s.flow[w]
		s.removeChild(oldParent, w)
		s.parent[w], s.pred[w], s.up[w], s.flow[w] = prevNode, prevArc, prevUp, prevFlow
		s.addChild(prevNode, w)
		if w == out {
			break
		}
		prevNode, prevArc, prevUp, prevFlow = w, oldArc, !oldUp, oldFlow
		w = oldParent
	}
	// Shift the potentials of the re-hung subtree and renew its depths.
	var newPot float64
	if qUp {
		newPot = s.pot[np] - c
	} else {
		newPot = s.pot[np] + c
	}
	sigma := newPot - s.pot[q]
	s.pot[q] = newPot
	s.depth[q] = s.depth[np] + 1
	s.walkSubtree(q, func(x int) {
		s.pot[x] += sigma
		s.depth[x] = s.depth[s.parent[x]] + 1
	})
	return nil
}

// solution reads the optimal basis.
func (s *Solver) solution(pivots int, totS, totD float64) (*Solution, error) {
	mn := s.m * s.n
	nodes := len(s.parent)
	short := 0.0
	for v := 1; v < nodes; v++ {
		if s.pred[v] >= mn+s.m && s.flow[v] > s.tolF {
			short += s.flow[v]
		}
	}
	if short > s.tolF {
		return nil, &InfeasibleError{Shortfall: short, Supply: totS, Demand: totD}
	}
	// Positive real-arc flows, sorted by site then customer with two
	// stable counting passes (customer first, then site).
	tmp := s.ships[:0]
	for v := 1; v < nodes; v++ {
		if a := s.pred[v]; a < mn && s.flow[v] > s.tolF {
			tmp = append(tmp, Shipment{Site: a / s.n, Customer: a % s.n, Qty: s.flow[v]})
		}
	}
	s.ships = tmp
	byCust := make([]Shipment, len(tmp))
	countingSort(byCust, tmp, s.n, func(x Shipment) int { return x.Customer }, s.adjAt)
	sol := &Solution{Pivots: pivots, Shipments: make([]Shipment, len(tmp))}
	countingSort(sol.Shipments, byCust, s.m, func(x Shipment) int { return x.Site }, s.adjAt)
	for _, sh := range sol.Shipments {
		sol.Cost += sh.Qty * s.rows[sh.Site][sh.Customer]
	}
	if s.SkipDuals {
		return sol, nil
	}
	s.duals(sol)
	return sol, nil
}

// countingSort copies src into dst stably ordered by key, which lies in
// [0, buckets); count is scratch of length >= buckets+1.
func countingSort(dst, src []Shipment, buckets int, key func(Shipment) int, count []int) {
	if len(count) < buckets+1 {
		count = make([]int, buckets+1)
	}
	count = count[:buckets+1]
	clear(count)
	for _, x := range src {
		count[key(x)+1]++
	}
	for b := 1; b <= buckets; b++ {
		count[b] += count[b-1]
	}
	for _, x := range src {
		k := key(x)
		dst[count[k]] = x
		count[k]++
	}
}

// duals fills the dual values from the potentials. Trees that hang from
// the root by an artificial arc without flow have potentials near bigM,
// which are feasible but meaningless; each such tree is lowered as far as
// dual feasibility allows, which gives a closed site the value
// min(0, min_j Cost[i][j]-CustomerDual[j]).
func (s *Solver) duals(sol *Solution) {
	mn := s.m * s.n
	p := slices.Clone(s.pot)
	members := s.comp[:0]
	for v := s.first[0]; v >= 0; v = s.next[v] {
		if s.pred[v] < mn+s.m {
			continue
		}
		members = append(members[:0], v)
		s.walkSubtree(v, func(x int) { members = append(members, x) })
		for _, x := range members {
			s.mark[x] = -4
		}
		lower := math.Inf(1)
		sites := false
		if len(members) == 1 && s.isSite(v) {
			// A closed site (the usual case): no marks needed.
			custPot := p[1+s.m:]
			best := math.Inf(1)
			for j, c := range s.rows[v-1] {
				best = min(best, c-custPot[j])
			}
			p[v] = max(0, -best)
			s.mark[v] = 0
			continue
		}
		for _, x := range members {
			if !s.isSite(x) {
				continue
			}
			sites = true
			i := x - 1
			lower = min(lower, p[x]) // slack arc to the root
			for j, c := range s.rows[i] {
				if w := 1 + s.m + j; s.mark[w] != -4 {
					lower = min(lower, c+p[x]-p[w])
				}
			}
		}
		switch {
		case sites && !math.IsInf(lower, 1):
			for _, x := range members {
				p[x] -= lower
			}
		case !sites:
			// A lone customer: its demand is zero. Report the cheapest
			// way to serve one more unit.
			best := math.Inf(1)
			for _, i := range s.open {
				best = min(best, s.rows[i][v-1-s.m]+p[1+i])
			}
			if math.IsInf(best, 1) {
				best = 0
			}
			p[v] = best
		}
		for _, x := range members {
			s.mark[x] = 0
		}
	}
	sol.SiteDual = make([]float64, s.m)
	for i := range s.m {
		if v := p[1+i]; v > 0 {
			sol.SiteDual[i] = -v
		}
	}
	sol.CustomerDual = make([]float64, s.n)
	copy(sol.CustomerDual, p[1+s.m:])
}
