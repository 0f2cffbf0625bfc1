package heuristics

import "math"

// Multi-exchange polish: cyclic and path exchanges of up to exchangeDepth
// items, found in an improvement graph by a label-correcting search.
//
// The neighbourhood is that of the cyclic-transfer and multi-exchange
// methods (Thompson & Orlin 1989; Ahuja, Orlin, Pallottino, Scaparra &
// Scutellà, Management Science 50, 2004, for single-source facility
// location). Every item is a node. An arc j -> k, between items on
// different resources, means that j enters k's resource while k leaves it;
// it is feasible when that resource's load stays within its limit, and its
// cost is c(j, res k) - c(k, res k). A path j1 -> ... -> jL whose resources
// are all different changes each resource on it by one item in and one
// out, so its feasibility is that of its arcs alone. It closes as a cycle
// when jL enters j1's resource (which j1 has left), or as a path when jL
// enters a resource off the path with room for it (j1's resource then only
// loses j1). A negative total is a feasible improving move of up to
// exchangeDepth items spread over as many resources, which the shift, swap
// and two-pair moves cannot make: on the tightly packed type D files the
// tabu search of this package made no progress from plans that this polish
// improved at once (d40400 from 24514 to 24505, d801600 from 97548 to 97388
// in a single descent, measured on this machine).
//
// The search keeps, for every item and path length, the cheapest path that
// ends at it (with the set of resources it has used), and extends only
// paths of negative cost (a negative cycle has a rotation whose every
// prefix is negative). It is a heuristic search of the neighbourhood, not
// an exhaustive one, and costs O(exchangeDepth * A) per step, A the number
// of arcs: the sum over items of the members of their allowed resources
// (small on the narrowed models of SearchSettings.Focus).

// exchangeDepth is the most items one exchange moves.
const exchangeDepth = 6

// xlabel is the cheapest path found that ends at an item, at one length.
type xlabel struct {
	cost  float64  // sum of its arcs (the start's leaving cost excluded)
	set   []uint64 // bit set of the resources on the path
	start int32    // first item
	pred  int32    // item before this one, -1 at the start
}

// exchange holds the labels of the multi-exchange search, one array of
// items per path length.
type exchange struct {
	levels [][]xlabel
	path   []int
	target []int
}

func newExchange(m, n int) *exchange {
	words := (m + 63) / 64
	x := &exchange{levels: make([][]xlabel, exchangeDepth)}
	for l := range x.levels {
		buf := make([]uint64, n*words)
		x.levels[l] = make([]xlabel, n)
		for j := range x.levels[l] {
			x.levels[l][j].set = buf[j*words : (j+1)*words]
		}
	}
	return x
}

func hasBit(set []uint64, i int) bool { return set[i>>6]&(1<<(uint(i)&63)) != 0 }

func setBit(set []uint64, i int) { set[i>>6] |= 1 << (uint(i) & 63) }

// touch marks resource i as changed.
func (s *search) touch(i int) {
	if !s.touched[i] {
		s.touched[i] = true
		s.touchedList = append(s.touchedList, i)
	}
}

// untouch clears the marks of touch.
func (s *search) untouch() {
	for _, i := range s.touchedList {
		s.touched[i] = false
	}
	s.touchedList = s.touchedList[:0]
}

// exchangeStep applies the cheapest improving exchange the search finds in
// the current assignment, which must be feasible, and reports whether it
// found one. The assignment stays feasible. With local, only exchanges that
// start at an item of a resource marked by touch are searched: after a
// change to an assignment no exchange improved, an improving exchange must
// pass through a changed resource, and a cycle can be started at any of its
// items, but a path through a changed resource that starts elsewhere is
// missed (a heuristic narrowing, for speed). Either way the marks are
// cleared, and the exchange applied marks its resources.
func (s *search) exchangeStep(local bool) bool {
	if s.exch == nil || len(s.exch.levels[0]) != s.n {
		s.exch = newExchange(s.m, s.n)
	}
	x := s.exch
	m, n := s.m, s.n
	cost, weight, limit, load, asg := s.model.cost, s.weight, s.limit, s.load, s.asg
	bestCost, bestLevel, bestNode, bestClose := -costEps(s.cost), -1, -1, -1
	l0 := x.levels[0]
	for j := 0; j < n; j++ {
		lb := &l0[j]
		lb.cost, lb.start, lb.pred = 0, int32(j), -1
		if local && !s.touched[asg[j]] {
			lb.cost = math.Inf(1)
			continue
		}
		clear(lb.set)
		setBit(lb.set, asg[j])
	}
	s.untouch()
	for l := 0; l < exchangeDepth; l++ {
		cur := x.levels[l]
		var next []xlabel
		if l+1 < exchangeDepth {
			next = x.levels[l+1]
			for k := range next {
				next[k].cost = math.Inf(1)
			}
		}
		for j := 0; j < n; j++ {
			if j%(8*ctxEvery) == 0 && s.cancelled() {
				return false
			}
			lb := &cur[j]
			if !(lb.cost < 0) && (l > 0 || lb.cost > 0) {
				continue
			}
			a := asg[j]
			st := int(lb.start)
			sa := asg[st]
			for _, b32 := range s.allowed(j) {
				b := int(b32)
				kjb := j*m + b
				cjb := cost[kjb]
				if !(cjb <= maxFinite) || b == a {
					continue
				}
				if b == sa {
					// cycle: j enters the start's resource, which the
					// start has left
					if l > 0 && load[b]-weight[st*m+b]+weight[kjb] <= limit[b] {
						if v := lb.cost + cjb - cost[st*m+b]; v < bestCost {
							bestCost, bestLevel, bestNode, bestClose = v, l, j, -1
						}
					}
					continue
				}
				if hasBit(lb.set, b) {
					continue
				}
				if l > 0 && load[b]+weight[kjb] <= limit[b] {
					// path: j enters b, which has room for it
					if v := lb.cost + cjb - cost[st*m+sa]; v < bestCost {
						bestCost, bestLevel, bestNode, bestClose = v, l, j, b
					}
				}
				if next == nil {
					continue
				}
				// longer path: j enters b and an item k of b leaves it
				base := lb.cost + cjb
				room := limit[b] - load[b] - weight[kjb]
				for _, k := range s.members[b] {
					kkb := k*m + b
					if room+weight[kkb] < 0 {
						continue
					}
					if v := base - cost[kkb]; v < 0 && v < next[k].cost {
						nk := &next[k]
						nk.cost, nk.start, nk.pred = v, lb.start, int32(j)
						copy(nk.set, lb.set)
						setBit(nk.set, b)
					}
				}
			}
		}
	}
	if bestLevel < 0 {
		return false
	}
	// the items of the exchange, first to last, and where each goes: to
	// the resource of the next one, the last to the close
	x.path = x.path[:0]
	for l, j := bestLevel, bestNode; l >= 0; l-- {
		x.path = append(x.path, j)
		j = int(x.levels[l][j].pred)
	}
	for p, q := 0, len(x.path)-1; p < q; p, q = p+1, q-1 {
		x.path[p], x.path[q] = x.path[q], x.path[p]
	}
	x.target = x.target[:0]
	for p := 1; p < len(x.path); p++ {
		x.target = append(x.target, asg[x.path[p]])
	}
	if bestClose < 0 {
		x.target = append(x.target, asg[x.path[0]])
	} else {
		x.target = append(x.target, bestClose)
	}
	for p := len(x.path) - 1; p >= 0; p-- {
		s.shift(x.path[p], x.target[p])
	}
	return true
}

// polish alternates the descent of shift and swap moves with improving
// exchanges until neither finds one (or ctx is cancelled), and records the
// result. The current assignment must be feasible. With local, the
// exchanges start at resources changed since the marks of touch were last
// cleared (the first search, and those after a descent that moved, look at
// every change since).
func (s *search) polish(local bool) {
	for !s.cancelled() {
		s.descend(1 << 30)
		if s.n < 3 || s.m < 2 || !s.exchangeStep(local) {
			break
		}
		for !s.cancelled() && s.exchangeStep(local) {
		}
		s.recompute()
	}
	s.recompute()
	s.record()
}

// ilsKicks is the number of random feasible shifts of one perturbation of
// the iterated local search.
const ilsKicks = 5

// ils runs iters rounds of an iterated local search from the best
// assignment (which must exist): each round shifts ilsKicks random items to
// random allowed resources with room, polishes the result and keeps it as
// the current assignment when it costs no more than the current one or
// than the best one plus rrtShare of it (so the search drifts along
// plateaus and across low ridges). New best assignments are recorded.
func (s *search) ils(iters int) {
	cur := append(s.ilsBuf[:0], s.best...)
	s.ilsBuf = cur
	curCost := s.bestCost
	for it := 0; it < iters && !s.cancelled(); it++ {
		copy(s.asg, cur)
		s.recompute()
		s.untouch()
		for r, tries := 0, 0; r < ilsKicks && tries < 20*ilsKicks; tries++ {
			j := s.rng.IntN(s.n)
			opts := s.allowed(j)
			if len(opts) < 2 {
				continue
			}
			i := int(opts[s.rng.IntN(len(opts))])
			if k := j*s.m + i; i != s.asg[j] && s.model.cost[k] <= maxFinite && s.load[i]+s.weight[k] <= s.limit[i] {
				s.shift(j, i)
				r++
			}
		}
		s.recompute()
		s.polish(true)
		if s.over == 0 && s.cost <= math.Max(curCost, s.bestCost+rrtShare*math.Abs(s.bestCost))+costEps(curCost) {
			copy(cur, s.asg)
			curCost = s.cost
		}
	}
}

// rrtShare is how far above the best plan's cost the iterated local search
// may let its current assignment drift (a share of that cost): a
// record-to-record travel acceptance (G. Dueck, "New optimization
// heuristics: the great deluge algorithm and the record-to-record travel",
// J. Computational Physics 104, 1993). Accepting only assignments that cost
// no more kept the search on one plateau of the packed type D files; at a
// tenth of a percent, 10 s runs on four to nine large D and E files did
// better in each of three comparisons (mean deviation 0.361 % -> 0.311 %,
// 0.185 % -> 0.171 %).
const rrtShare = 1e-3
