package heuristics

import (
	"container/heap"
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
// moving one placed item elsewhere (within a work budget of a few times
// n*m). If items are still left over, a penalised search (priced cost plus
// an adaptive weight on capacity excess, shift, swap and ejection moves)
// runs until the excess is zero or its budget of 50*(n+m)+1000 moves is
// spent.
//
// Repair returns assign[j] = resource of item j and ok = true when every item
// is placed on an allowed pair within capacity; otherwise (also for a
// malformed p, relaxed or priced, and when ctx is cancelled before a
// feasible assignment is found) it returns ok = false. It checks ctx about
// every millisecond of work.
//
// Repair compiles p on every call; use a [Searcher] for repeated calls.
func Repair(ctx context.Context, p *Assignment, relaxed [][]int, priced [][]float64, rng *rand.Rand) (assign []int, ok bool) {
	sr, err := NewSearcher(p)
	if err != nil {
		return nil, false
	}
	return sr.Repair(ctx, relaxed, priced, rng)
}

// Repair is the package-level [Repair] on the compiled assignment.
func (sr *Searcher) Repair(ctx context.Context, relaxed [][]int, priced [][]float64, rng *rand.Rand) (assign []int, ok bool) {
	md := sr.base
	if len(relaxed) > md.m {
		return nil, false
	}
	if priced != nil {
		pm, err := withPriced(sr.base, priced, sr.sign, sr.priced)
		if err != nil {
			return nil, false
		}
		sr.priced = pm.cost
		md = pm
	}
	r := sr.rep
	r.reset(ctx, md)
	r.keepRelaxed(relaxed)
	failed := r.insertByRegret()
	if r.cancelled() {
		return nil, false
	}
	if len(failed) > 0 {
		if !r.feasibilityPhase(failed, sr.srch, rng) {
			return nil, false
		}
	}
	out := append([]int(nil), r.asg...)
	if _, feas := sr.p.Evaluate(out); !feas {
		return nil, false
	}
	return out, true
}

type repairer struct {
	*model
	ctx     context.Context
	asg     []int // -1 while unplaced, -2 once insertion failed
	load    []float64
	members [][]int // [i] items placed on i
	pos     []int   // [j] index of j in members[asg[j]]
	work    int     // ejection work left, in pair evaluations

	count, start, cand []int // relaxed takes per item and their resources (CSR)

	// insertion by regret
	first, second []int
	regret        []float64
	version       []int
	watch         [][]watcher // [i] items whose first or second resource is i
	queue         regretQueue
	stale         []watcher
}

// watcher is an item watching a resource since the evaluation of the given
// version; it is stale once the item's version moved on.
type watcher struct{ j, vers int }

func newRepairer(m, n int) *repairer {
	return &repairer{
		asg:     make([]int, n),
		load:    make([]float64, m),
		members: make([][]int, m),
		pos:     make([]int, n),
		count:   make([]int, n),
		start:   make([]int, n+1),
		first:   make([]int, n),
		second:  make([]int, n),
		regret:  make([]float64, n),
		version: make([]int, n),
		watch:   make([][]watcher, m),
	}
}

func (r *repairer) reset(ctx context.Context, md *model) {
	r.model, r.ctx = md, ctx
	for j := range r.asg {
		r.asg[j] = -1
	}
	for i := range r.load {
		r.load[i] = 0
		r.members[i] = r.members[i][:0]
		r.watch[i] = r.watch[i][:0]
	}
	r.work = 8*md.n*md.m + 100000
}

func (r *repairer) cancelled() bool { return r.ctx.Err() != nil }

func (r *repairer) fits(i, j int) bool {
	k := j*r.m + i
	return r.cost[k] <= maxFinite && r.load[i]+r.weight[k] <= r.limit[i]
}

func (r *repairer) place(j, i int) {
	r.asg[j] = i
	r.load[i] += r.weight[j*r.m+i]
	r.pos[j] = len(r.members[i])
	r.members[i] = append(r.members[i], j)
}

func (r *repairer) unplace(j int) {
	i := r.asg[j]
	r.load[i] -= r.weight[j*r.m+i]
	mi := r.members[i]
	p := r.pos[j]
	last := mi[len(mi)-1]
	mi[p] = last
	r.pos[last] = p
	r.members[i] = mi[:len(mi)-1]
	r.asg[j] = -1
}

// keepRelaxed places the items the relaxation gave to one resource, then the
// items it gave to several, each on its cheapest one.
func (r *repairer) keepRelaxed(relaxed [][]int) {
	n := r.n
	m := r.m
	for j := range r.count {
		r.count[j] = 0
	}
	total := 0
	for _, items := range relaxed {
		for _, j := range items {
			if j >= 0 && j < n {
				r.count[j]++
				total++
			}
		}
	}
	for i, items := range relaxed {
		for _, j := range items {
			if j >= 0 && j < n && r.count[j] == 1 && r.fits(i, j) {
				r.place(j, i)
			}
		}
	}
	// resources of the multiply taken items, in CSR form by item
	r.start[0] = 0
	for j := 0; j < n; j++ {
		c := 0
		if r.count[j] > 1 {
			c = r.count[j]
		}
		r.start[j+1] = r.start[j] + c
	}
	if cap(r.cand) < r.start[n] {
		r.cand = make([]int, r.start[n])
	}
	r.cand = r.cand[:r.start[n]]
	fill := r.count // reused as a fill pointer
	for j := 0; j < n; j++ {
		fill[j] = r.start[j]
	}
	for i, items := range relaxed {
		for _, j := range items {
			if j >= 0 && j < n && r.start[j+1] > r.start[j] {
				r.cand[fill[j]] = i
				fill[j]++
			}
		}
	}
	for j := 0; j < n; j++ {
		cs := r.cand[r.start[j]:r.start[j+1]]
		if len(cs) == 0 {
			continue
		}
		best := -1
		for _, i := range cs {
			k := j*m + i
			if r.cost[k] > maxFinite {
				continue
			}
			if best < 0 {
				best = i
				continue
			}
			kb := j*m + best
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

// regretEntry is an item in the insertion queue with the version of its
// regret when pushed; entries of older versions are skipped.
type regretEntry struct {
	regret  float64
	j, vers int
}

// regretQueue is a max-heap on regret, ties to the lower item number.
type regretQueue []regretEntry

func (q regretQueue) Len() int { return len(q) }
func (q regretQueue) Less(a, b int) bool {
	return q[a].regret > q[b].regret || (q[a].regret == q[b].regret && q[a].j < q[b].j)
}
func (q regretQueue) Swap(a, b int) { q[a], q[b] = q[b], q[a] }
func (q *regretQueue) Push(x any)   { *q = append(*q, x.(regretEntry)) }
func (q *regretQueue) Pop() any {
	old := *q
	e := old[len(old)-1]
	*q = old[:len(old)-1]
	return e
}

// eval computes the best and second-best resources with room of unplaced
// item j and queues it with its regret.
func (r *repairer) eval(j int) {
	m := r.m
	b1, b2 := -1, -1
	for i := 0; i < r.m; i++ {
		if !r.fits(i, j) {
			continue
		}
		c := r.cost[j*m+i]
		switch {
		case b1 < 0 || c < r.cost[j*m+b1]:
			b1, b2 = i, b1
		case b2 < 0 || c < r.cost[j*m+b2]:
			b2 = i
		}
	}
	r.first[j], r.second[j] = b1, b2
	switch {
	case b1 < 0:
		r.regret[j] = math.Inf(1) // handled first
	case b2 < 0:
		r.regret[j] = math.MaxFloat64
	default:
		r.regret[j] = r.cost[j*m+b2] - r.cost[j*m+b1]
	}
	r.version[j]++
	if b1 >= 0 {
		r.watch[b1] = append(r.watch[b1], watcher{j, r.version[j]})
	}
	if b2 >= 0 {
		r.watch[b2] = append(r.watch[b2], watcher{j, r.version[j]})
	}
	heap.Push(&r.queue, regretEntry{r.regret[j], j, r.version[j]})
}

// insertByRegret places the unplaced items, largest regret first, and
// returns those that could not be placed. When ctx is cancelled it returns
// early.
func (r *repairer) insertByRegret() (failed []int) {
	r.queue = r.queue[:0]
	left := 0
	for j, i := range r.asg {
		if i < 0 {
			r.eval(j)
			left++
		}
	}
	for done := 0; r.queue.Len() > 0; {
		e := heap.Pop(&r.queue).(regretEntry)
		j := e.j
		if e.vers != r.version[j] || r.asg[j] != -1 {
			continue
		}
		r.version[j]++ // no longer queued
		left--
		if done++; done%ctxEvery == 0 && r.cancelled() {
			return nil
		}
		i := r.first[j]
		if i < 0 {
			if !r.eject(j) {
				failed = append(failed, j)
				r.asg[j] = -2 // failed, not queued
				continue
			}
			// two loads changed: re-evaluate every queued item, on a
			// fresh queue
			r.work -= left * r.m
			r.queue = r.queue[:0]
			for i := range r.watch {
				r.watch[i] = r.watch[i][:0]
			}
			for q, a := range r.asg {
				if a == -1 {
					r.eval(q)
				}
			}
			continue
		}
		r.place(j, i)
		// re-evaluate the queued items for which i was first or second
		// and which no longer fit on it
		w := r.watch[i]
		keep := w[:0]
		stale := r.stale[:0]
		for _, e := range w {
			if e.vers != r.version[e.j] {
				continue // placed, failed or evaluated again since
			}
			if r.fits(i, e.j) {
				keep = append(keep, e)
				continue
			}
			stale = append(stale, e)
		}
		r.watch[i] = keep
		for _, e := range stale {
			if e.vers == r.version[e.j] && r.asg[e.j] == -1 {
				r.eval(e.j)
			}
		}
		r.stale = stale
	}
	return failed
}

// eject places item j, which fits nowhere, by moving one placed item from a
// resource to another one with room, at least priced cost. It gives up when
// the ejection work budget is spent.
func (r *repairer) eject(j int) bool {
	m := r.m
	if r.work <= 0 {
		return false
	}
	bestD := math.Inf(1)
	bi, bk, bh := -1, -1, -1
	for i := 0; i < r.m; i++ {
		kij := j*m + i
		if r.cost[kij] > maxFinite {
			continue
		}
		need := r.load[i] + r.weight[kij] - r.limit[i]
		r.work -= len(r.members[i])
		for _, k := range r.members[i] {
			if r.weight[k*m+i] < need {
				continue
			}
			r.work -= r.m
			for h := 0; h < r.m; h++ {
				if h == i || !r.fits(h, k) {
					continue
				}
				d := r.cost[kij] + r.cost[k*m+h] - r.cost[k*m+i]
				if d < bestD {
					bestD, bi, bk, bh = d, i, k, h
				}
			}
		}
	}
	if bi < 0 {
		return false
	}
	r.unplace(bk)
	r.place(bk, bh)
	r.place(j, bi)
	return true
}

// feasibilityPhase puts the failed items where they add the least excess and
// runs the penalised search until no capacity is exceeded.
func (r *repairer) feasibilityPhase(failed []int, srch *search, rng *rand.Rand) bool {
	n := r.n
	m := r.m
	for _, j := range failed {
		best, bestEx := -1, math.Inf(1)
		for i := 0; i < r.m; i++ {
			k := j*m + i
			if r.cost[k] > maxFinite {
				continue
			}
			ex := r.load[i] + r.weight[k] - r.limit[i]
			if ex < bestEx || (ex == bestEx && r.cost[k] < r.cost[j*m+best]) {
				best, bestEx = i, ex
			}
		}
		if best < 0 {
			return false // forbidden everywhere
		}
		r.place(j, best)
	}
	srch.reset(r.ctx, r.model, r.asg, rng)
	if srch.over > 0 {
		srch.tabuSearch(50*(n+r.m)+1000, math.MaxInt, true)
	}
	if !srch.haveBest {
		return false
	}
	copy(r.asg, srch.best)
	return true
}
