package heuristics

import (
	"context"
	"math"
	"math/rand/v2"
)

// Neighbourhood bounds. One move of the tabu search looks at window items;
// for each it evaluates the shift to every resource (O(m)) and swaps with at
// most swapResources*swapPartners items (O(K)). Ejection chains start from at
// most ejectStarts overloading shifts and look at ejectPartners items of the
// overloaded resource each. So a move costs O(window*(m+K)), independent of
// the number of items. Instances of at most fullWindow items keep the whole
// neighbourhood (every item, every swap partner, every ejected item), which
// is what their quality needs and costs a bounded amount.
//
// On a narrowed model (the candidate lists of SearchSettings.Focus, after
// the reduced-cost candidate lists of Yagiura, Ibaraki & Glover, INFORMS J.
// Computing 16, 2004) the moves are cheap and most random partners could not
// swap: swap partners are drawn among the items allowed on the other
// resource, ejection chains look at more items of the overloaded resource
// (see ejectEvals) and the window grows, to at most maxWindow items (twice
// window: at four times the repairs got slower, and the rounds wait for
// them, so it lost at a fixed time on the 20-agent type D file).
const (
	window = 32
	// A narrowed model (short allowed lists, see SearchSettings.Focus)
	// makes each window item cheap: the window then grows so that a move
	// evaluates about as many shifts as with windowShifts resources per
	// item, up to maxWindow items.
	windowShifts  = 16
	maxWindow     = 64
	fullWindow    = 200 // up to this many items, a move looks at all of them
	swapResources = 3
	swapPartners  = 8
	ejectStarts   = 6
	ejectPartners = 4
	// ejectEvals is the number of evaluations an ejection candidate may
	// spend on the items it could eject: ejectPartners items at least, more
	// when their allowed lists are short (narrowed models).
	ejectEvals = 96
	// ctxEvery is how many moves (or items in a descent pass) run between
	// two looks at the context; a move costs a few microseconds.
	ctxEvery = 32
)

// search holds a complete (possibly over-capacity) assignment with its loads
// and runs the moves shared by the repair's feasibility phase and Improve.
// All costs are in minimisation sense. A search is reused across calls by a
// Searcher: reset prepares it for a new model (cost array) and start.
type search struct {
	*model
	rng *rand.Rand
	ctx context.Context

	asg  []int
	load []float64
	cost float64 // sum of the pairs' costs
	over int     // number of resources above their limit

	alpha []float64 // [i] weight of resource i's capacity excess in the penalised objective
	tabu  []int32   // [j*m+i]: moving item j onto resource i is tabu before this iteration
	iter  int32

	members [][]int // [i] items on resource i
	pos     []int   // [j] index of j in members[asg[j]]
	order   []int   // a random permutation of the items, scanned cyclically
	cursor  int
	winSize int // items per window on this model (see windowShifts)

	// scratch of step
	cands   pool
	win     []int
	exc     []float64 // [i] weighted excess of resource i
	topRes  []int     // best few swap resources of the current item
	topCost []float64

	exch   *exchange // labels of the multi-exchange polish, made on first use
	ilsBuf []int     // current assignment of the iterated local search
	// touched marks the resources whose items changed since the marks
	// were last cleared, listed in touchedList (for the local exchange
	// search of the iterated local search)
	touched     []bool
	touchedList []int

	best     []int
	bestCost float64
	haveBest bool
}

func newSearch(m, n int) *search {
	s := &search{
		asg:     make([]int, n),
		load:    make([]float64, m),
		alpha:   make([]float64, m),
		tabu:    make([]int32, m*n),
		members: make([][]int, m),
		pos:     make([]int, n),
		order:   make([]int, n),
		best:    make([]int, n),
		touched: make([]bool, m),
		cands:   pool{size: ejectStarts},
		win:     make([]int, 0, maxWindow),
		exc:     make([]float64, m),
		topRes:  make([]int, 0, swapResources),
		topCost: make([]float64, 0, swapResources),
	}
	return s
}

// reset starts a search on md from asg (every entry a valid resource).
func (s *search) reset(ctx context.Context, md *model, asg []int, rng *rand.Rand) {
	s.model, s.rng, s.ctx = md, rng, ctx
	copy(s.asg, asg)
	for k := range s.tabu {
		s.tabu[k] = 0
	}
	s.iter = 0
	for j := range s.order {
		s.order[j] = j
	}
	rng.Shuffle(len(s.order), func(a, b int) { s.order[a], s.order[b] = s.order[b], s.order[a] })
	s.cursor = 0
	s.winSize = window
	if per := float64(len(md.opt)) / float64(max(md.n, 1)); per < windowShifts {
		s.winSize = min(maxWindow, int(window*windowShifts/max(per, 1)))
	}
	s.recompute()
	s.bestCost = math.Inf(1)
	s.haveBest = false
	a0 := s.initialAlpha()
	for i := range s.alpha {
		s.alpha[i] = a0
	}
	s.record()
}

func (s *search) cancelled() bool { return s.ctx.Err() != nil }

// recompute rebuilds loads, cost, member lists and the over count from
// scratch, which also clears rounding drift.
func (s *search) recompute() {
	for i := range s.load {
		s.load[i] = 0
		s.members[i] = s.members[i][:0]
	}
	s.cost = 0
	for j, i := range s.asg {
		s.load[i] += s.weight[j*s.m+i]
		s.cost += s.cost1(i, j)
		s.pos[j] = len(s.members[i])
		s.members[i] = append(s.members[i], j)
	}
	s.over = 0
	for i, l := range s.load {
		if l > s.limit[i] {
			s.over++
		}
	}
}

func (s *search) cost1(i, j int) float64 { return s.model.cost[j*s.m+i] }

// initialAlpha scales the excess penalty so that one unit of excess costs
// about as much as the spread of costs over the mean weight.
func (s *search) initialAlpha() float64 {
	lo, hi := math.Inf(1), math.Inf(-1)
	var wsum float64
	cnt := 0
	for k, c := range s.model.cost {
		if math.IsInf(c, 1) {
			continue
		}
		lo = math.Min(lo, c)
		hi = math.Max(hi, c)
		wsum += s.weight[k]
		cnt++
	}
	if cnt == 0 || wsum == 0 || hi <= lo {
		return 1
	}
	return (hi - lo) / (wsum / float64(cnt))
}

// record stores the current assignment as best when it is feasible and
// cheaper than the best so far.
func (s *search) record() bool {
	if s.over == 0 && (!s.haveBest || s.cost < s.bestCost-costEps(s.bestCost)) {
		copy(s.best, s.asg)
		s.bestCost = s.cost
		s.haveBest = true
		return true
	}
	return false
}

func costEps(v float64) float64 { return 1e-9 * (1 + math.Abs(v)) }

func (s *search) excess(i int, l float64) float64 {
	if d := l - s.limit[i]; d > 0 {
		return d
	}
	return 0
}

// shift moves item j to resource i.
func (s *search) shift(j, i int) {
	a := s.asg[j]
	if a == i {
		return
	}
	s.setLoad(a, s.load[a]-s.weight[j*s.m+a])
	s.setLoad(i, s.load[i]+s.weight[j*s.m+i])
	s.cost += s.cost1(i, j) - s.cost1(a, j)
	s.asg[j] = i
	// member lists: swap j out of a, append it to i
	ma := s.members[a]
	p := s.pos[j]
	last := ma[len(ma)-1]
	ma[p] = last
	s.pos[last] = p
	s.members[a] = ma[:len(ma)-1]
	s.pos[j] = len(s.members[i])
	s.members[i] = append(s.members[i], j)
	s.tabu[j*s.m+a] = s.iter + int32(s.tenure())
	s.touch(a)
	s.touch(i)
}

func (s *search) setLoad(i int, l float64) {
	wasOver := s.load[i] > s.limit[i]
	s.load[i] = l
	if isOver := l > s.limit[i]; isOver != wasOver {
		if isOver {
			s.over++
		} else {
			s.over--
		}
	}
}

// tenure is the number of iterations during which an item may not return to
// a resource it has left: short and randomised, which worked best on the GAP
// benchmark types B to D.
func (s *search) tenure() int {
	lo := 3 + min(s.n, 2000)/200
	return lo + s.rng.IntN(2*lo+1)
}

// partners calls f for the swap partners of item j (on resource a): the
// members of the swapResources resources with the least cost for j, all of
// them when a resource holds at most swapPartners items, else swapPartners
// consecutive ones from a random offset. It is O(m + K). On instances of at
// most fullWindow items every item on another allowed resource is a partner.
func (s *search) partners(j, a int, f func(k, b int)) {
	n := s.n
	m := s.m
	if n <= fullWindow {
		// small instance: the whole swap neighbourhood
		for _, b32 := range s.allowed(j) {
			b := int(b32)
			if b == a || !(s.model.cost[j*m+b] <= maxFinite) {
				continue
			}
			for _, k := range s.members[b] {
				f(k, b)
			}
		}
		return
	}
	s.topRes, s.topCost = s.topRes[:0], s.topCost[:0]
	for _, b32 := range s.allowed(j) {
		b := int(b32)
		c := s.model.cost[j*m+b]
		if b == a || !(c <= maxFinite) || len(s.members[b]) == 0 {
			continue
		}
		if len(s.topRes) < swapResources {
			s.topRes = append(s.topRes, b)
			s.topCost = append(s.topCost, c)
		} else if c < s.topCost[swapResources-1] {
			s.topRes[swapResources-1], s.topCost[swapResources-1] = b, c
		} else {
			continue
		}
		// keep sorted by cost (insertion)
		for q := len(s.topRes) - 1; q > 0 && s.topCost[q] < s.topCost[q-1]; q-- {
			s.topRes[q], s.topRes[q-1] = s.topRes[q-1], s.topRes[q]
			s.topCost[q], s.topCost[q-1] = s.topCost[q-1], s.topCost[q]
		}
	}
	for _, b := range s.topRes {
		// swapPartners items of b allowed on a, from a random offset: on a
		// narrowed model most items of b may not go to a, so they are
		// skipped at the price of one look-up and the partners tried are
		// ones that can swap
		mb := s.members[b]
		if len(mb) == 0 {
			continue
		}
		off := s.rng.IntN(len(mb))
		for q, got := 0, 0; q < len(mb) && got < swapPartners; q++ {
			p := off + q
			if p >= len(mb) {
				p -= len(mb)
			}
			if k := mb[p]; s.may(k, a) {
				f(k, b)
				got++
			}
		}
	}
}

// descend applies improving shift and swap moves among feasible assignments
// (first improvement) until none is left, the budget of moves is spent or
// ctx is cancelled. It assumes the current assignment is feasible and
// returns the moves made. One pass costs O(n*m + n*K).
func (s *search) descend(budget int) int {
	n := s.n
	m := s.m
	moves := 0
	for improved := true; improved && moves < budget; {
		improved = false
		for t := 0; t < n && moves < budget; t++ {
			if t%ctxEvery == 0 && s.cancelled() {
				s.record()
				return moves
			}
			j := s.order[t]
			a := s.asg[j]
			ca := s.cost1(a, j)
			for _, i32 := range s.allowed(j) {
				i := int(i32)
				k := j*m + i
				if i == a || s.load[i]+s.weight[k] > s.limit[i] {
					continue
				}
				if s.model.cost[k] < ca-costEps(ca) {
					s.shift(j, i)
					moves++
					improved = true
					a, ca = i, s.model.cost[k]
				}
			}
			// swaps of j with partners on other resources
			bj, bk, bb, bd := -1, -1, -1, -costEps(s.cost)
			s.partners(j, a, func(k, b int) {
				d := s.model.cost[k*m+a] + s.model.cost[j*m+b] - ca - s.model.cost[k*m+b]
				if !(d < bd) {
					return
				}
				la := s.load[a] - s.weight[j*m+a] + s.weight[k*m+a]
				lb := s.load[b] - s.weight[k*m+b] + s.weight[j*m+b]
				if la > s.limit[a] || lb > s.limit[b] {
					return
				}
				bj, bk, bb, bd = j, k, b, d
			})
			if bj >= 0 {
				s.shift(bj, bb)
				s.shift(bk, a)
				moves++
				improved = true
			}
		}
	}
	s.record()
	return moves
}

// move is one neighbour of the current assignment: item j to resource i, and
// when k >= 0 item k to resource c.
type move struct {
	j, i, k, c int
	val        float64
	ties       int
}

func (mv *move) offer(s *search, j, i, k, c int, val float64) {
	switch {
	case !(val <= maxFinite): // a forbidden pair
		return
	case val < mv.val:
		mv.j, mv.i, mv.k, mv.c, mv.val, mv.ties = j, i, k, c, val, 1
	case val == mv.val:
		mv.ties++
		if s.rng.IntN(mv.ties) == 0 {
			mv.j, mv.i, mv.k, mv.c = j, i, k, c
		}
	}
}

// candidate is a shift that overloads its target, kept for ejection.
type candidate struct {
	j, i int
	val  float64
}

// pool keeps the best few candidates by value.
type pool struct {
	items []candidate
	size  int
	worst int     // index of the worst kept candidate once full
	bar   float64 // value a new candidate must beat (+Inf until full)
}

func (p *pool) reset() {
	p.items = p.items[:0]
	p.bar = math.Inf(1)
}

func (p *pool) keep(j, i int, val float64) {
	if len(p.items) < p.size {
		p.items = append(p.items, candidate{j, i, val})
		if len(p.items) < p.size {
			return
		}
	} else {
		p.items[p.worst] = candidate{j, i, val}
	}
	p.worst = 0
	for q := range p.items {
		if p.items[q].val > p.items[p.worst].val {
			p.worst = q
		}
	}
	p.bar = p.items[p.worst].val
}

// fillWindow chooses the items whose neighbourhood the next move evaluates:
// every item when there are at most window of them; otherwise the next
// items of a random cyclic order and, while some resource is over capacity,
// for half of the window random items of over-capacity resources.
func (s *search) fillWindow() {
	s.win = s.win[:0]
	if s.n <= fullWindow {
		s.win = append(s.win, s.order...)
		return
	}
	w := s.winSize
	if s.over > 0 {
		for tries := 0; len(s.win) < w/2 && tries < w; tries++ {
			i := s.rng.IntN(s.m)
			if s.load[i] <= s.limit[i] || len(s.members[i]) == 0 {
				continue
			}
			s.win = append(s.win, s.members[i][s.rng.IntN(len(s.members[i]))])
		}
		w -= len(s.win)
	}
	for q := 0; q < w; q++ {
		s.win = append(s.win, s.order[s.cursor])
		s.cursor++
		if s.cursor == s.n {
			s.cursor = 0
		}
	}
}

// step makes the best admissible move (shift, swap or ejection chain) among
// those of the window's items on the penalised objective: cost plus, for
// each resource, its excess weight times its excess. A move is tabu when it
// puts an item back on a resource it left recently, unless it yields a
// feasible assignment better than the best one. It returns false when no
// move is admissible. Its cost is O(window*(m+K)).
func (s *search) step() bool {
	m := s.m
	cost, weight, limit, load, asg := s.model.cost, s.weight, s.limit, s.load, s.asg
	alpha, exc := s.alpha, s.exc
	bestLimit := s.bestCost - costEps(s.bestCost)
	mv := move{j: -1, val: math.Inf(1)}
	it := s.iter
	cands := &s.cands
	cands.reset()
	for i := range exc {
		exc[i] = alpha[i] * s.excess(i, load[i])
	}
	s.fillWindow()

	for _, j := range s.win {
		a := asg[j]
		ka := j*m + a
		ca, wa := cost[ka], weight[ka]
		la := load[a]
		exA := alpha[a]*s.excess(a, la-wa) - exc[a]
		aOver := la > limit[a]
		aOverAfter := la-wa > limit[a]
		// shifts
		for _, i32 := range s.allowed(j) {
			i := int(i32)
			k := j*m + i
			c := cost[k]
			if i == a || math.IsInf(c, 1) {
				continue
			}
			dc := c - ca
			li := load[i]
			nl := li + weight[k]
			val := dc + exA
			if nl > limit[i] {
				val += alpha[i]*(nl-limit[i]) - exc[i]
			}
			if val < cands.bar && nl > limit[i] && s.tabu[k] <= it {
				cands.keep(j, i, val)
			}
			if val > mv.val {
				continue
			}
			if s.tabu[k] > it {
				// aspiration: the result is feasible and beats the best
				over := s.over
				if aOver && !aOverAfter {
					over--
				}
				if nl > limit[i] {
					continue
				}
				if li > limit[i] {
					over--
				}
				if over != 0 || !(s.cost+dc < bestLimit) {
					continue
				}
			}
			mv.offer(s, j, i, -1, -1, val)
		}
		// swaps of j (on a) with k (on b)
		waj := wa
		s.partners(j, a, func(k, b int) {
			kbj, kak, kbk := j*m+b, k*m+a, k*m+b
			dc := cost[kbj] - ca + cost[kak] - cost[kbk]
			if dc-exc[a]-exc[b] > mv.val || !(dc <= maxFinite) {
				return
			}
			lb := load[b]
			nla := la - waj + weight[kak]
			nlb := lb - weight[kbk] + weight[kbj]
			val := dc - exc[a] - exc[b]
			if nla > limit[a] {
				val += alpha[a] * (nla - limit[a])
			}
			if nlb > limit[b] {
				val += alpha[b] * (nlb - limit[b])
			}
			if val > mv.val {
				return
			}
			if s.tabu[kbj] > it || s.tabu[kak] > it {
				if nla > limit[a] || nlb > limit[b] || !(s.cost+dc < bestLimit) {
					return
				}
				over := s.over
				if la > limit[a] {
					over--
				}
				if lb > limit[b] {
					over--
				}
				if over != 0 {
					return
				}
			}
			mv.offer(s, j, b, k, a, val)
		})
	}

	s.ejections(&mv)

	s.iter++
	if mv.j < 0 {
		return false
	}
	s.shift(mv.j, mv.i)
	if mv.k >= 0 {
		s.shift(mv.k, mv.c)
	}
	return true
}

// ejections offers chains of two shifts: a candidate item j moves to resource
// b, which it overloads, and an item k leaves b for a third resource c. At
// most ejectPartners items k of b are tried per candidate.
func (s *search) ejections(mv *move) {
	m := s.m
	cost, weight, limit, load, alpha := s.model.cost, s.weight, s.limit, s.load, s.alpha
	it := s.iter
	for _, cd := range s.cands.items {
		j, b := cd.j, cd.i
		a := s.asg[j]
		kaj, kbj := j*m+a, j*m+b
		la, lb := load[a], load[b]
		nla := la - weight[kaj]
		pa := alpha[a] * (s.excess(a, nla) - s.excess(a, la))
		dc0 := cost[kbj] - cost[kaj]
		lb1 := lb + weight[kbj]
		exB0 := s.excess(b, lb)
		mb := s.members[b]
		cnt, off := len(mb), 0
		if lim := max(ejectPartners, ejectEvals*s.n/max(len(s.opt), 1)); cnt > lim && s.n > fullWindow {
			cnt, off = lim, s.rng.IntN(len(mb))
		}
		for q := 0; q < cnt; q++ {
			k := mb[(off+q)%len(mb)]
			kbk := k*m + b
			nlb := lb1 - weight[kbk]
			pb := alpha[b] * (s.excess(b, nlb) - exB0)
			base := dc0 - cost[kbk] + pa + pb
			for _, c32 := range s.allowed(k) {
				c := int(c32)
				if c == a || c == b {
					continue
				}
				kck := k*m + c
				cc := cost[kck]
				if math.IsInf(cc, 1) || s.tabu[kck] > it {
					continue
				}
				lc := load[c]
				nlc := lc + weight[kck]
				val := base + cc
				if nlc > limit[c] {
					val += alpha[c] * (nlc - limit[c])
					if lc > limit[c] {
						val -= alpha[c] * (lc - limit[c])
					}
				}
				if val < mv.val {
					mv.offer(s, j, b, k, c, val)
				}
			}
		}
	}
}
