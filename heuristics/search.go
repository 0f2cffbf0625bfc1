package heuristics

import (
	"math"
	"math/rand/v2"
)

// search holds a complete (possibly over-capacity) assignment with its loads
// and runs the moves shared by the repair's feasibility phase and Improve.
// All costs are in minimisation sense.
type search struct {
	*model
	rng *rand.Rand

	asg  []int
	load []float64
	cost float64 // sum of the pairs' costs
	over int     // number of resources above their limit

	alpha []float64 // [i] weight of resource i's capacity excess in the penalised objective
	tabu  []int     // [i*n+j]: moving item j onto resource i is tabu before this iteration
	iter  int
	cands pool

	// scratch of step
	members [][]int   // [i] items on resource i
	gain    []float64 // [i*n+j] cost change of shifting j to i
	minGain []float64 // [i*m+a] least gain of an item on a shifting to i
	exc     []float64 // [i] weighted excess of resource i

	best     []int
	bestCost float64
	haveBest bool
}

func newSearch(md *model, asg []int, rng *rand.Rand) *search {
	s := &search{
		model: md,
		rng:   rng,
		asg:   append([]int(nil), asg...),
		load:  make([]float64, md.m),
		tabu:  make([]int, md.m*md.n),
		best:  make([]int, md.n),
		cands: pool{size: 32},

		members: make([][]int, md.m),
		gain:    make([]float64, md.m*md.n),
		minGain: make([]float64, md.m*md.m),
		exc:     make([]float64, md.m),
	}
	s.recompute()
	s.bestCost = math.Inf(1)
	s.alpha = make([]float64, md.m)
	a0 := s.initialAlpha()
	for i := range s.alpha {
		s.alpha[i] = a0
	}
	s.record()
	return s
}

// recompute rebuilds loads, cost and the over count from scratch, which also
// clears rounding drift.
func (s *search) recompute() {
	for i := range s.load {
		s.load[i] = 0
	}
	s.cost = 0
	for j, i := range s.asg {
		s.load[i] += s.weight[i*s.n+j]
		s.cost += s.cost1(i, j)
	}
	s.over = 0
	for i, l := range s.load {
		if l > s.limit[i] {
			s.over++
		}
	}
}

func (s *search) cost1(i, j int) float64 { return s.model.cost[i*s.n+j] }

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
	s.setLoad(a, s.load[a]-s.weight[a*s.n+j])
	s.setLoad(i, s.load[i]+s.weight[i*s.n+j])
	s.cost += s.cost1(i, j) - s.cost1(a, j)
	s.asg[j] = i
	s.tabu[a*s.n+j] = s.iter + s.tenure()
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
	lo := 3 + s.n/200
	return lo + s.rng.IntN(2*lo+1)
}

// descend applies improving shift and swap moves among feasible assignments
// (first improvement) until none is left or the budget of moves is spent. It
// assumes the current assignment is feasible and returns the moves made.
func (s *search) descend(budget int) int {
	n := s.n
	moves := 0
	for improved := true; improved && moves < budget; {
		improved = false
		for j := 0; j < n && moves < budget; j++ {
			a := s.asg[j]
			ca := s.cost1(a, j)
			for i := 0; i < s.m; i++ {
				k := i*n + j
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
		}
		for j := 0; j < n && moves < budget; j++ {
			for k := j + 1; k < n; k++ {
				a, b := s.asg[j], s.asg[k]
				if a == b {
					continue
				}
				d := s.model.cost[a*n+k] + s.model.cost[b*n+j] - s.model.cost[a*n+j] - s.model.cost[b*n+k]
				if !(d < -costEps(s.cost)) {
					continue
				}
				la := s.load[a] - s.weight[a*n+j] + s.weight[a*n+k]
				lb := s.load[b] - s.weight[b*n+k] + s.weight[b*n+j]
				if la > s.limit[a] || lb > s.limit[b] {
					continue
				}
				s.shift(j, b)
				s.shift(k, a)
				moves++
				improved = true
			}
		}
	}
	s.record()
	return moves
}

// move is one neighbour of the current assignment: item j to resource i, and
// when k >= 0 item k to j's present resource.
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

// step makes the best admissible move (shift, swap or ejection chain) on the
// penalised objective: cost plus, for each resource, its excess weight times
// its excess. A move is tabu when it puts an item back on a resource it left
// recently, unless it yields a feasible assignment better than the best one.
// It returns false when no move is admissible.
func (s *search) step() bool {
	n, m := s.n, s.m
	cost, weight, limit, load, asg := s.model.cost, s.weight, s.limit, s.load, s.asg
	alpha, gain, minGain, exc := s.alpha, s.gain, s.minGain, s.exc
	bestLimit := s.bestCost - costEps(s.bestCost)
	mv := move{j: -1, val: math.Inf(1)}
	it := s.iter
	cands := &s.cands
	cands.reset()
	for i := range s.members {
		s.members[i] = s.members[i][:0]
		exc[i] = alpha[i] * s.excess(i, load[i])
	}
	for k := range minGain {
		minGain[k] = math.Inf(1)
	}

	// shifts; also the cost change of every shift (gain) and its minimum
	// per pair of resources, used to prune swaps
	for j := 0; j < n; j++ {
		a := asg[j]
		s.members[a] = append(s.members[a], j)
		ka := a*n + j
		ca, wa := cost[ka], weight[ka]
		la := load[a]
		exA := alpha[a]*s.excess(a, la-wa) - exc[a]
		aOver := la > limit[a]
		aOverAfter := la-wa > limit[a]
		for i := 0; i < m; i++ {
			k := i*n + j
			c := cost[k]
			if i == a || math.IsInf(c, 1) {
				gain[k] = math.Inf(1)
				continue
			}
			dc := c - ca
			gain[k] = dc
			if dc < minGain[i*m+a] {
				minGain[i*m+a] = dc
			}
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
	}

	// swaps of j (on a) with k > j (on b)
	for j := 0; j < n; j++ {
		a := asg[j]
		rowA := a * n
		waj := weight[rowA+j]
		la := load[a]
		for b := 0; b < m; b++ {
			if b == a {
				continue
			}
			rowB := b * n
			gj := gain[rowB+j]
			if gj+minGain[a*m+b]-exc[a]-exc[b] > mv.val {
				continue
			}
			lb := load[b]
			wbj := weight[rowB+j]
			for _, k := range s.members[b] {
				if k <= j {
					continue
				}
				dc := gj + gain[rowA+k]
				if dc-exc[a]-exc[b] > mv.val {
					continue
				}
				nla := la - waj + weight[rowA+k]
				nlb := lb - weight[rowB+k] + wbj
				val := dc - exc[a] - exc[b]
				if nla > limit[a] {
					val += alpha[a] * (nla - limit[a])
				}
				if nlb > limit[b] {
					val += alpha[b] * (nlb - limit[b])
				}
				if val > mv.val {
					continue
				}
				if s.tabu[rowB+j] > it || s.tabu[rowA+k] > it {
					if nla > limit[a] || nlb > limit[b] || !(s.cost+dc < bestLimit) {
						continue
					}
					over := s.over
					if la > limit[a] {
						over--
					}
					if lb > limit[b] {
						over--
					}
					if over != 0 {
						continue
					}
				}
				mv.offer(s, j, b, k, a, val)
			}
		}
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
// b, which it overloads, and an item k leaves b for a third resource c.
func (s *search) ejections(mv *move) {
	n, m := s.n, s.m
	cost, weight, limit, load, alpha := s.model.cost, s.weight, s.limit, s.load, s.alpha
	it := s.iter
	for _, cd := range s.cands.items {
		j, b := cd.j, cd.i
		a := s.asg[j]
		kaj, kbj := a*n+j, b*n+j
		la, lb := load[a], load[b]
		nla := la - weight[kaj]
		pa := alpha[a] * (s.excess(a, nla) - s.excess(a, la))
		dc0 := cost[kbj] - cost[kaj]
		lb1 := lb + weight[kbj]
		exB0 := s.excess(b, lb)
		for k := 0; k < n; k++ {
			if s.asg[k] != b || k == j {
				continue
			}
			kbk := b*n + k
			nlb := lb1 - weight[kbk]
			pb := alpha[b] * (s.excess(b, nlb) - exB0)
			base := dc0 - cost[kbk] + pa + pb
			for c := 0; c < m; c++ {
				if c == a || c == b {
					continue
				}
				kck := c*n + k
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
