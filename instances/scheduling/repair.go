package scheduling

import (
	"context"
	"math/rand/v2"
	"slices"
	"sort"

	"pincer/decomp"
	"pincer/subproblem"
)

// repairer turns the relaxed starts into schedules: list scheduling in
// the order of the relaxed start times, then an iterated local search
// (dynasearch swaps, insertions, moves and swaps between machines, seeded
// random kicks) that also continues from the best plan so far.
//
// Its effort is counted in work units (one job position evaluated by a
// move), never by the clock: moves units on round 1, growing with the
// round (see budget), so that runs are reproducible and later rounds,
// whose plans are hard to improve, search longer. It reads the
// instance only, so it shares no mutable state with the blocks; every call
// builds its own search state.
type repairer struct {
	in    *Instance
	lay   *subproblem.SlotLayout
	moves int64
	// cls[g] is the class of machine g, machines numbered class by
	// class; first[k] is class k's first machine.
	cls, first []int
	elig       []bool // elig[j*K+k]: job j may run on class k
	// quick is the schedule that the starting prices came from (set once
	// by NewProblem, read-only afterwards); the first repairs start from
	// it too when it beats this round's list schedule.
	quick *state
}

func newRepairer(in *Instance, lay *subproblem.SlotLayout, moves int) *repairer {
	r := &repairer{in: in, lay: lay, moves: int64(moves)}
	K := len(in.Classes)
	for k, c := range in.Classes {
		r.first = append(r.first, len(r.cls))
		for range c.Machines {
			r.cls = append(r.cls, k)
		}
	}
	r.elig = make([]bool, len(in.Jobs)*K)
	for j := range in.Jobs {
		for k := range K {
			r.elig[j*K+k] = in.EligibleOn(j, k)
		}
	}
	return r
}

// budget is the work allowed to the repair of round: the first budget,
// growing by one share every ten rounds up to ten times it, but never
// past 100 million units (a second or two) beyond the first, so that on
// large instances a repair does not hold up the rounds that merge it.
func (r *repairer) budget(round int, final bool) int64 {
	limit := max(r.moves, min(10*r.moves, 100_000_000))
	if final {
		return limit
	}
	return min(r.moves*int64(1+round/10), limit)
}

// Repair implements decomp.Repairer.
func (r *repairer) Repair(ctx context.Context, ri *decomp.RepairInput) (*decomp.Plan, error) {
	budget := r.budget(ri.Round, ri.Final)
	// The descent from this round's list schedule gets at most half the
	// budget, so that the search from the best plan always gets the rest.
	s := r.newSearch(ri.Seed, budget/2)
	if len(ri.Answers) == len(r.in.Jobs) {
		s.listSchedule(ri.Answers)
		s.descend(ctx)
	}
	s.budget = budget
	start := s.snapshot() // val −1: no start yet
	if r.quick != nil && (start.val < 0 || r.quick.val < start.val) {
		s.restore(*r.quick, false)
		start = s.snapshot()
	}
	if ri.Best != nil {
		if sch, ok := ri.Best.Detail.(*Schedule); ok && s.load(sch) && (start.val < 0 || s.val <= start.val) {
			start = s.snapshot()
		}
	}
	if start.val < 0 {
		return nil, nil // neither answers nor a plan to start from
	}
	s.restore(start, false)
	s.iterate(ctx)
	return s.plan(), nil
}

// search is one repair's private state: a sequence per machine with its
// completion times and cumulated costs.
type search struct {
	r      *repairer
	K      int
	seq    [][]int   // seq[g]: jobs of machine g in order
	C      [][]int   // C[g][i]: completion of position i
	cum    [][]int64 // cum[g][i]: cost of positions < i
	mach   []int     // machine of each job
	dirty  []bool    // machine changed since its moves were last tried
	val    int64     // objective value
	work   int64     // work units spent
	budget int64
	rng    *rand.Rand
	seg    []int
	dp     []int64
	choice []int
}

func (r *repairer) newSearch(seed uint64, budget int64) *search {
	M := len(r.cls)
	s := &search{r: r, K: len(r.in.Classes), seq: make([][]int, M), C: make([][]int, M), cum: make([][]int64, M),
		mach: make([]int, len(r.in.Jobs)), dirty: make([]bool, M), budget: budget, rng: rand.New(rand.NewPCG(seed, seed^0x5ca1ab1e)), val: -1}
	return s
}

func (s *search) cost(j, c int) int64 { return s.r.in.Cost(j, c) }

func (s *search) prevC(g, i int) int {
	if i == 0 {
		return 0
	}
	return s.C[g][i-1]
}

// rebuild recomputes machine g's completions and costs from position lo.
func (s *search) rebuild(g, lo int) {
	sq := s.seq[g]
	n := len(sq)
	s.C[g] = slices.Grow(s.C[g][:min(lo, len(s.C[g]))], n)[:n]
	if len(s.cum[g]) == 0 {
		s.cum[g] = append(s.cum[g], 0)
	}
	s.cum[g] = slices.Grow(s.cum[g][:min(lo+1, len(s.cum[g]))], n+1)[:n+1]
	t := s.prevC(g, lo)
	jobs := s.r.in.Jobs
	for i := lo; i < n; i++ {
		j := sq[i]
		t = max(t, jobs[j].Release) + jobs[j].Processing
		s.C[g][i] = t
		s.cum[g][i+1] = s.cum[g][i] + s.cost(j, t)
		s.mach[j] = g
	}
	s.dirty[g] = true
}

func (s *search) total() int64 {
	var v int64
	for g := range s.seq {
		v += s.cum[g][len(s.seq[g])]
	}
	return v
}

// delta is the change of cost when positions lo..hi of machine g
// (hi = lo−1: none) are replaced by seg. The old tail is re-timed only
// until it meets its old timing again.
func (s *search) delta(g, lo, hi int, seg []int) int64 {
	sq := s.seq[g]
	jobs := s.r.in.Jobs
	t := s.prevC(g, lo)
	var c int64
	for _, j := range seg {
		t = max(t, jobs[j].Release) + jobs[j].Processing
		c += s.cost(j, t)
	}
	q := hi + 1
	for q < len(sq) && t != s.prevC(g, q) {
		j := sq[q]
		t = max(t, jobs[j].Release) + jobs[j].Processing
		c += s.cost(j, t)
		q++
	}
	s.work += int64(len(seg) + q - hi)
	return c - (s.cum[g][q] - s.cum[g][lo])
}

// replace puts seg in place of positions lo..hi of machine g.
func (s *search) replace(g, lo, hi int, seg []int) {
	sq := s.seq[g]
	tail := append([]int(nil), sq[hi+1:]...)
	sq = append(append(sq[:lo], seg...), tail...)
	s.seq[g] = sq
	s.rebuild(g, lo)
}

// listSchedule orders the jobs by their relaxed start (ties: larger
// weight per unit of processing, then job number) and puts each on the
// eligible machine where it can start first; ties go to the class the
// job's block chose (its least priced cost), then the lowest machine.
// Without answers (nil) every job's relaxed start is its release date.
func (s *search) listSchedule(ans []decomp.Answer) {
	in := s.r.in
	n := len(in.Jobs)
	start := make([]int, n)
	chosen := make([]int, n)
	for j := range n {
		k, st, ok := -1, 0, false
		if ans != nil {
			k, st, ok = subproblem.TimeIndexedStart(ans[j].Primal, s.K)
		}
		if !ok {
			k, st = -1, in.Jobs[j].Release
		}
		start[j], chosen[j] = st, k
	}
	order := make([]int, n)
	for j := range order {
		order[j] = j
	}
	sort.SliceStable(order, func(a, b int) bool {
		x, y := order[a], order[b]
		if start[x] != start[y] {
			return start[x] < start[y]
		}
		jx, jy := in.Jobs[x], in.Jobs[y]
		return int64(jx.Weight)*int64(jy.Processing) > int64(jy.Weight)*int64(jx.Processing)
	})
	free := make([]int, len(s.r.cls))
	for g := range s.seq {
		s.seq[g] = s.seq[g][:0]
	}
	for _, j := range order {
		best, bestT := -1, 0
		for g, k := range s.r.cls {
			if !s.r.elig[j*s.K+k] {
				continue
			}
			t := max(free[g], in.Jobs[j].Release)
			if best < 0 || t < bestT || (t == bestT && k == chosen[j] && s.r.cls[best] != chosen[j]) {
				best, bestT = g, t
			}
		}
		s.seq[best] = append(s.seq[best], j)
		free[best] = bestT + in.Jobs[j].Processing
	}
	for g := range s.seq {
		s.rebuild(g, 0)
	}
	s.val = s.total()
}

// load takes a schedule's machine sequences (ordered by start, then
// shifted left as far as releases allow); false when it does not fit.
func (s *search) load(sch *Schedule) bool {
	in := s.r.in
	n := len(in.Jobs)
	if sch == nil || len(sch.Class) != n || len(sch.Machine) != n || len(sch.Start) != n {
		return false
	}
	for g := range s.seq {
		s.seq[g] = s.seq[g][:0]
	}
	for j := range n {
		k, m := sch.Class[j], sch.Machine[j]
		if k < 0 || k >= s.K || m < 0 || m >= in.Classes[k].Machines || !s.r.elig[j*s.K+k] {
			return false
		}
		g := s.r.first[k] + m
		s.seq[g] = append(s.seq[g], j)
	}
	for g := range s.seq {
		slices.SortStableFunc(s.seq[g], func(a, b int) int { return sch.Start[a] - sch.Start[b] })
		s.rebuild(g, 0)
	}
	s.val = s.total()
	return true
}

// state is a copy of the sequences and value.
type state struct {
	seq [][]int
	val int64
}

func (s *search) snapshot() state {
	st := state{seq: make([][]int, len(s.seq)), val: s.val}
	for g, q := range s.seq {
		st.seq[g] = append([]int(nil), q...)
	}
	return st
}

// restore goes back to st; with optimum set st is a local optimum, so
// no machine needs its moves tried again.
func (s *search) restore(st state, optimum bool) {
	for g := range s.seq {
		s.seq[g] = append(s.seq[g][:0], st.seq[g]...)
		s.rebuild(g, 0)
		s.dirty[g] = !optimum
	}
	s.val = st.val
}

func (s *search) out() bool { return s.work >= s.budget }

// descend applies improving moves until none is left or the budget is
// spent: dynasearch and insertion on each machine, then moves and swaps
// between machines.
func (s *search) descend(ctx context.Context) {
	active := make([]bool, len(s.seq))
	for !s.out() && ctx.Err() == nil {
		some := false
		for g := range s.seq {
			active[g] = s.dirty[g]
			some = some || active[g]
		}
		if !some {
			return
		}
		for g := range s.seq {
			if !active[g] {
				continue
			}
			s.dirty[g] = false // set again by any move applied to g
			for !s.out() && s.dynasearch(g) {
			}
			if !s.out() {
				s.insertion(g)
			}
		}
		if len(s.seq) > 1 && !s.out() {
			s.between(ctx, active)
		}
	}
}

// window is how far apart two positions of one machine a move may be.
func window(n int) int {
	if n <= 120 {
		return n
	}
	return 40
}

// dynasearch applies the best set of independent swaps on machine g
// (Congram, Potts & van de Velde 2002): a dynamic program over positions
// where F(q) is the best gain on positions < q, and a swap of positions
// i < q−1 ends a stage. A swap counts only when the job after it starts
// as before (always so without release dates), which makes the gains of
// disjoint swaps add up exactly.
func (s *search) dynasearch(g int) bool {
	sq := s.seq[g]
	n := len(sq)
	if n < 2 {
		return false
	}
	W := window(n)
	s.dp = slices.Grow(s.dp[:0], n+1)[:n+1]
	s.choice = slices.Grow(s.choice[:0], n+1)[:n+1]
	jobs := s.r.in.Jobs
	C, cum := s.C[g], s.cum[g]
	s.dp[0] = 0
	for q := 0; q < n; q++ {
		s.dp[q+1], s.choice[q+1] = s.dp[q], -1
		for i := max(0, q-W); i < q; i++ {
			// swap positions i and q: sq[q], sq[i+1..q-1], sq[i].
			t := s.prevC(g, i)
			jq := sq[q]
			t = max(t, jobs[jq].Release) + jobs[jq].Processing
			c := s.cost(jq, t)
			for l := i + 1; l < q; l++ {
				j := sq[l]
				t = max(t, jobs[j].Release) + jobs[j].Processing
				c += s.cost(j, t)
			}
			ji := sq[i]
			t = max(t, jobs[ji].Release) + jobs[ji].Processing
			c += s.cost(ji, t)
			s.work += int64(q - i + 1)
			if t != C[q] {
				continue
			}
			if d := s.dp[i] + c - (cum[q+1] - cum[i]); d < s.dp[q+1] {
				s.dp[q+1], s.choice[q+1] = d, i
			}
		}
	}
	if s.dp[n] >= 0 {
		return false
	}
	lo := n
	for q := n; q > 0; {
		i := s.choice[q]
		if i < 0 {
			q--
			continue
		}
		sq[i], sq[q-1] = sq[q-1], sq[i]
		lo = i
		q = i
	}
	s.rebuild(g, lo)
	s.val += s.dp[n]
	return true
}

// insertion moves each job of machine g to its best position within the
// window when that lowers the cost.
func (s *search) insertion(g int) bool {
	if s.released(g) {
		return s.insertionReleased(g)
	}
	// No release dates on this machine: its jobs run back to back from 0,
	// so moving the job at i to j shifts the jobs between by its
	// processing time, and the gains of all targets j of one job add up
	// in one sweep each way (O(1) per move).
	improved := false
	jobs := s.r.in.Jobs
	n := len(s.seq[g])
	W := window(n)
	for i := 0; i < n && !s.out(); i++ {
		sq, C := s.seq[g], s.C[g]
		x := sq[i]
		px := jobs[x].Processing
		own := s.cost(x, C[i])
		bestD, bestJ := int64(0), -1
		var sum int64
		for j := i + 1; j <= min(n-1, i+W); j++ {
			l := sq[j]
			sum += s.cost(l, C[j]-px) - s.cost(l, C[j])
			if d := sum + s.cost(x, C[j]) - own; d < bestD {
				bestD, bestJ = d, j
			}
		}
		sum = 0
		for j := i - 1; j >= max(0, i-W); j-- {
			l := sq[j]
			sum += s.cost(l, C[j]+px) - s.cost(l, C[j])
			if d := sum + s.cost(x, C[j]-jobs[l].Processing+px) - own; d < bestD {
				bestD, bestJ = d, j
			}
		}
		s.work += int64(min(n-1, i+W) - max(0, i-W) + 1)
		if bestJ >= 0 {
			seg := append([]int(nil), s.insertSeg(g, i, bestJ)...)
			s.replace(g, min(i, bestJ), max(i, bestJ), seg)
			s.val += bestD
			improved = true
		}
	}
	return improved
}

// released reports whether a job of machine g has a release date.
func (s *search) released(g int) bool {
	for _, j := range s.seq[g] {
		if s.r.in.Jobs[j].Release > 0 {
			return true
		}
	}
	return false
}

// insertionReleased is insertion on a machine with release dates: each
// move is re-timed (see delta).
func (s *search) insertionReleased(g int) bool {
	improved := false
	n := len(s.seq[g])
	W := window(n)
	for i := 0; i < n && !s.out(); i++ {
		bestD, bestJ := int64(0), -1
		for j := max(0, i-W); j <= min(n-1, i+W); j++ {
			if j == i {
				continue
			}
			seg := s.insertSeg(g, i, j)
			lo, hi := min(i, j), max(i, j)
			if d := s.delta(g, lo, hi, seg); d < bestD {
				bestD, bestJ = d, j
			}
		}
		if bestJ >= 0 {
			seg := append([]int(nil), s.insertSeg(g, i, bestJ)...)
			s.replace(g, min(i, bestJ), max(i, bestJ), seg)
			s.val += bestD
			improved = true
		}
	}
	return improved
}

// insertSeg is positions min(i,j)..max(i,j) of machine g after moving the
// job at i to j.
func (s *search) insertSeg(g, i, j int) []int {
	sq := s.seq[g]
	s.seg = s.seg[:0]
	if i < j {
		s.seg = append(append(s.seg, sq[i+1:j+1]...), sq[i])
	} else {
		s.seg = append(append(s.seg, sq[i]), sq[j:i]...)
	}
	return s.seg
}

// between tries, for every job on an active machine, moving it to another eligible machine and
// swapping it with a job there, near the position where it would start at
// the same time, and applies the best improving one.
func (s *search) between(ctx context.Context, active []bool) bool {
	const near = 4
	in := s.r.in
	n := len(in.Jobs)
	improved := false
	off := s.rng.IntN(n)
	one := make([]int, 1)
	other := make([]int, 1)
	for c := 0; c < n && !s.out(); c++ {
		if c%64 == 0 && ctx.Err() != nil {
			return improved
		}
		x := (off + c) % n
		a := s.mach[x]
		if !active[a] {
			continue
		}
		i := slices.Index(s.seq[a], x)
		startX := s.C[a][i] - in.Jobs[x].Processing
		ka := s.r.cls[a]
		bestD, bestB, bestJ, swap := int64(0), -1, -1, false
		remove := int64(0)
		haveRemove := false
		for b, kb := range s.r.cls {
			if b == a || !s.r.elig[x*s.K+kb] {
				continue
			}
			nb := len(s.seq[b])
			j0 := sort.Search(nb, func(q int) bool { return s.prevC(b, q) >= startX })
			for j := max(0, j0-near); j <= min(nb, j0+near); j++ {
				if !haveRemove {
					remove, haveRemove = s.delta(a, i, i, nil), true
				}
				one[0] = x
				if d := remove + s.delta(b, j, j-1, one); d < bestD {
					bestD, bestB, bestJ, swap = d, b, j, false
				}
				if j < nb {
					y := s.seq[b][j]
					if !s.r.elig[y*s.K+ka] {
						continue
					}
					other[0] = y
					d := s.delta(a, i, i, other)
					one[0] = x
					if d += s.delta(b, j, j, one); d < bestD {
						bestD, bestB, bestJ, swap = d, b, j, true
					}
				}
			}
		}
		if bestB < 0 {
			continue
		}
		if swap {
			y := s.seq[bestB][bestJ]
			s.replace(a, i, i, []int{y})
			s.replace(bestB, bestJ, bestJ, []int{x})
		} else {
			s.replace(a, i, i, nil)
			s.replace(bestB, bestJ, bestJ-1, []int{x})
		}
		s.val += bestD
		improved = true
	}
	return improved
}

// kick perturbs the current sequences by a few random swaps of nearby
// positions (and, with several machines, moves of random jobs to another
// eligible machine).
func (s *search) kick() {
	in := s.r.in
	n := len(in.Jobs)
	moves := 2 + s.rng.IntN(3+n/25)
	for range moves {
		x := s.rng.IntN(n)
		g := s.mach[x]
		i := slices.Index(s.seq[g], x)
		if len(s.seq) > 1 && s.rng.IntN(4) == 0 {
			b := s.rng.IntN(len(s.seq))
			if b != g && s.r.elig[x*s.K+s.r.cls[b]] {
				nb := len(s.seq[b])
				j := 0
				if nb > 0 {
					startX := s.C[g][i] - in.Jobs[x].Processing
					j = sort.Search(nb, func(q int) bool { return s.prevC(b, q) >= startX })
					j = min(nb, max(0, j+s.rng.IntN(5)-2))
				}
				s.seq[g] = slices.Delete(s.seq[g], i, i+1)
				s.seq[b] = slices.Insert(s.seq[b], j, x)
				s.rebuild(g, i)
				s.rebuild(b, j)
				continue
			}
		}
		m := len(s.seq[g])
		if m < 2 {
			continue
		}
		dist := 1 + s.rng.IntN(max(1, min(m-1, 2+m/8)))
		j := i + dist
		if s.rng.IntN(2) == 0 {
			j = i - dist
		}
		if j < 0 || j >= m {
			j = i - (j - i)
		}
		j = min(m-1, max(0, j))
		if j == i {
			continue
		}
		s.seq[g][i], s.seq[g][j] = s.seq[g][j], s.seq[g][i]
		s.rebuild(g, min(i, j))
	}
	s.val = s.total()
	s.work += int64(moves)
}

// iterate runs the iterated local search from the current sequences
// until the budget is spent: kick, descend, accept the result when it is
// no worse than the current one, and go back to the best after a while
// without progress.
func (s *search) iterate(ctx context.Context) {
	s.descend(ctx)
	best := s.snapshot()
	cur := best
	idle := 0
	for !s.out() && ctx.Err() == nil {
		s.kick()
		s.descend(ctx)
		switch {
		case s.val < best.val:
			best = s.snapshot()
			cur, idle = best, 0
		case s.val <= cur.val:
			cur = s.snapshot()
			idle++
		default:
			s.restore(cur, true)
			idle++
		}
		if idle > 200 {
			s.restore(best, true)
			cur, idle = best, 0
		}
	}
	s.restore(best, true)
}

// plan turns the sequences into a schedule with its value and slot use.
func (s *search) plan() *decomp.Plan {
	in := s.r.in
	n := len(in.Jobs)
	sch := &Schedule{Class: make([]int, n), Machine: make([]int, n), Start: make([]int, n)}
	use := make([]float64, s.r.lay.Rows())
	var val int64
	for g, sq := range s.seq {
		k := s.r.cls[g]
		off, H := s.r.lay.Offsets[k], s.r.lay.Horizons[k]
		for i, j := range sq {
			st := s.C[g][i] - in.Jobs[j].Processing
			sch.Class[j], sch.Machine[j], sch.Start[j] = k, g-s.r.first[k], st
			val += s.cost(j, s.C[g][i])
			for t := st; t < min(H, s.C[g][i]); t++ {
				use[off+t]++
			}
		}
	}
	return &decomp.Plan{Value: float64(val), Use: use, Detail: sch}
}

// slotValues estimates, from the current sequences, the value of one
// more machine of class k in slot t: on each machine, a slot inside a
// job's run is worth the summed weight of the later jobs on that machine
// whose cost grows when they finish one slot later (tardy jobs, or every
// job for weighted completion), since losing the slot delays them all; an
// idle slot is worth nothing. These are the complementary-slackness prices
// of a schedule without idle time (each job's own start is a locally best
// start at them), so they make a strong starting point for the price
// rule. With pooled unset the machines of each class are averaged; with
// pooled set all machines are, and every class gets the same price in a
// slot, which keeps jobs that may run on several classes from fleeing to
// the class whose quick schedule happened to be lighter.
func (s *search) slotValues(pooled bool) []float64 {
	in := s.r.in
	lay := s.r.lay
	v := make([]float64, lay.Rows())
	total := 0
	maxH := 0
	for k, c := range in.Classes {
		total += c.Machines
		maxH = max(maxH, lay.Horizons[k])
	}
	shared := make([]float64, maxH)
	for g, sq := range s.seq {
		k := s.r.cls[g]
		off, H := lay.Offsets[k], lay.Horizons[k]
		scale := 1 / float64(in.Classes[k].Machines)
		acc := 0.0
		for i := len(sq) - 1; i >= 0; i-- {
			j := sq[i]
			c := s.C[g][i]
			for t := c - in.Jobs[j].Processing; t < min(c, H); t++ {
				if pooled {
					shared[t] += acc / float64(total)
				} else {
					v[off+t] += scale * acc
				}
			}
			if s.cost(j, c+1) > s.cost(j, c) {
				acc += float64(in.Jobs[j].Weight)
			}
		}
	}
	if pooled {
		for k := range in.Classes {
			copy(v[lay.Offsets[k]:lay.Offsets[k]+lay.Horizons[k]], shared)
		}
	}
	return v
}
