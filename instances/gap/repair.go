package gap

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"

	"pincer/decomp"
	"pincer/heuristics"
)

// repairer turns block answers into an assignment with the shared
// assignment heuristics. It is called from one goroutine at a time.
type repairer struct {
	in       *Instance
	opt      Options
	model    *heuristics.Assignment
	searcher *heuristics.Searcher
	priced   [][]float64
	relaxed  [][]int
	options  [][]int // choice relaxation: agents of each job's options
	// failures counts repairs in a row that found no plan; while it grows
	// the repairer skips more and more calls (deterministically), so an
	// infeasible or very tight instance does not spend the run repairing.
	failures, skip int
	calls          int // in-round improvements made
	// idle counts in-round repairs since the best plan last improved; the
	// longer it grows, the more tabu moves the periodic search gets, and
	// it then starts from the best plan (the bound has usually settled by
	// then, so the run's time is better spent on the plan).
	idle int
	// values are the agent blocks' optimal values of the round, for the
	// pair bounds of the knapsack relaxation.
	values []float64
	bestL  float64 // best relaxed value seen, and whether there is one
	haveL  bool
}

func newRepairer(in *Instance, opt Options) *repairer {
	m := &heuristics.Assignment{
		Cost:     make([][]float64, in.Agents),
		Weight:   make([][]float64, in.Agents),
		Capacity: make([]float64, in.Agents),
		Maximise: opt.Maximise,
	}
	for i := 0; i < in.Agents; i++ {
		m.Cost[i] = make([]float64, in.Jobs)
		m.Weight[i] = make([]float64, in.Jobs)
		for j := 0; j < in.Jobs; j++ {
			m.Cost[i][j] = float64(in.Cost[i][j])
			m.Weight[i][j] = float64(in.Use[i][j])
		}
		m.Capacity[i] = float64(in.Capacity[i])
	}
	return &repairer{in: in, opt: opt, model: m}
}

// searchEvery makes every so many in-round repairs run the tabu search
// too (the others only descend).
const searchEvery = 8

// improveSettings gives the move budget of a repair: a light polish in
// rounds, a thorough search at the end (which the time limit may cut).
// The budgets count moves, so runs are reproducible.
func (r *repairer) improveSettings(final bool) heuristics.ImproveSettings {
	n := r.in.Jobs
	if final {
		if r.opt.FinalImprove != (heuristics.ImproveSettings{}) {
			return r.opt.FinalImprove
		}
		return heuristics.ImproveSettings{Moves: 10*n + 2000}
	}
	if r.opt.Improve != (heuristics.ImproveSettings{}) {
		return r.opt.Improve
	}
	// Repairs in rounds are frequent: most only descend, and every
	// searchEvery-th one also runs the tabu search.
	if r.calls%searchEvery == 0 {
		scale := min(1+r.idle/32, 16)
		return heuristics.ImproveSettings{Moves: (n + 200) * scale, PairNodes: -1}
	}
	return heuristics.ImproveSettings{Moves: -1, PairNodes: -1}
}

// searchSettings gives the effort of a plan search: two path-relinking
// tasks per merge point (run side by side when the run has two workers or
// more), each with tabu moves growing with the repairs since the plan last
// improved, four times as many once the rounds have stalled under a time
// budget (the rounds then wait for the repair), and several merge points
// in the last repair (which the time limit may cut). The budgets count
// moves, and the number of tasks does not depend on the workers, so a run
// is the same for any worker count.
func (r *repairer) searchSettings(rin *decomp.RepairInput) heuristics.SearchSettings {
	n := r.in.Jobs
	scale := min(1+r.idle/32, 16)
	st := heuristics.SearchSettings{Moves: (n + 200) * scale, Rounds: 1, Tasks: 2, Workers: repairWorkers(rin), Focus: r.focus()}
	switch {
	case rin.Final:
		st.Moves, st.Rounds = 2*n+1000, 2
		if r.opt.FinalImprove != (heuristics.ImproveSettings{}) {
			// an explicit final effort bounds the final search as well
			st.Moves, st.Stall, st.Rounds = r.opt.FinalImprove.Moves, r.opt.FinalImprove.Stall, 1
		}
	case rin.Stalled:
		st.Moves *= 4
		st.Rounds = 2
		if r.opt.Improve != (heuristics.ImproveSettings{}) {
			st.Moves, st.Stall, st.Rounds = r.opt.Improve.Moves, r.opt.Improve.Stall, 1
		}
	}
	return st
}

// focus gives the narrowing of the plan search's tasks (see
// heuristics.SearchSettings.Focus): with 20 agents or more, the first task
// keeps the 3 agents of least pair bound per job and the second 6; below,
// every agent the fixing allows. On the 80-agent instances of types D and E
// the narrowed search reached plans within 1 % of the best known in a few
// hundred rounds, against 2-9 % with every agent; D did best with 2-4
// agents, E with 4-8, hence one task of each.
func (r *repairer) focus() []int {
	if r.in.Agents >= 20 {
		return []int{3, 6}
	}
	return nil
}

// prepare builds the searcher and the buffers on first use.
func (r *repairer) prepare() error {
	if r.searcher != nil {
		return nil
	}
	in := r.in
	s, err := heuristics.NewSearcher(r.model)
	if err != nil {
		return err
	}
	r.searcher = s
	r.priced = make([][]float64, in.Agents)
	for i := range r.priced {
		r.priced[i] = make([]float64, in.Jobs)
	}
	r.relaxed = make([][]int, in.Agents)
	if r.opt.Relaxation == ChoiceRelaxation {
		r.options = make([][]int, in.Jobs)
		for j := range r.options {
			r.options[j] = jobAgents(in, j)
		}
	}
	return nil
}

func (r *repairer) Repair(ctx context.Context, rin *decomp.RepairInput) (*decomp.Plan, error) {
	in := r.in
	if err := r.prepare(); err != nil {
		return nil, err
	}
	relaxed, priced := r.relaxed, r.priced
	for i := range relaxed {
		relaxed[i] = relaxed[i][:0]
	}
	switch r.opt.Relaxation {
	case KnapsackRelaxation:
		for i := range relaxed {
			for _, e := range rin.Answers[i].Primal {
				relaxed[i] = append(relaxed[i], e.Index)
			}
			for j := 0; j < in.Jobs; j++ {
				priced[i][j] = float64(in.Cost[i][j]) + rin.Prices[j]
			}
		}
	default:
		for j := range rin.Answers {
			i := r.options[j][rin.Answers[j].Primal[0].Index]
			relaxed[i] = append(relaxed[i], j)
		}
		for i := range priced {
			for j := 0; j < in.Jobs; j++ {
				priced[i][j] = float64(in.Cost[i][j]) + rin.Prices[i]*float64(in.Use[i][j])
			}
		}
	}
	if !rin.Final && r.skip > 0 {
		r.skip--
		return nil, nil
	}
	rng := rand.New(rand.NewPCG(rin.Seed, 0x6a6f62))
	if !rin.Final {
		r.calls++
	}
	intensify := !rin.Final && r.calls%searchEvery == 0 && r.idle >= 32 && rin.Best != nil
	fromBest := (rin.Final || intensify) && rin.Best != nil
	var best []int
	if rin.Best != nil {
		var ok bool
		if best, ok = rin.Best.Detail.([]int); !ok || len(best) != r.in.Jobs {
			return nil, fmt.Errorf("gap: best plan of type %T is not an assignment of %d jobs", rin.Best.Detail, r.in.Jobs)
		}
	}
	// The construction from the relaxed answer and the bookkeeping of the
	// pair bounds (and the restriction they give) touch disjoint parts of
	// the searcher (see heuristics.Searcher), so with two workers or more
	// they run side by side; either way both run on every call and the
	// searcher ends in the same state, so the run does not depend on the
	// worker count.
	var assign []int
	var constructed bool
	construct := func() {
		if !fromBest {
			assign, constructed = r.searcher.Repair(ctx, relaxed, priced, rng)
		}
	}
	var bookErr error
	if workers := repairWorkers(rin); workers > 1 && !fromBest {
		done := make(chan struct{})
		go func() {
			defer close(done)
			bookErr = r.bookkeeping(rin, best)
		}()
		construct()
		<-done
	} else {
		construct()
		bookErr = r.bookkeeping(rin, best)
	}
	if bookErr != nil {
		return nil, bookErr
	}
	if fromBest {
		// The last repair, and the periodic search once the plan has
		// stopped improving, work from the best plan found so far.
		assign = append([]int(nil), best...)
	} else {
		if !constructed {
			r.failures++
			r.skip = 1<<min(r.failures, 6) - 1
			return nil, nil
		}
		r.failures = 0
	}
	// In rounds, the plan search replaces the periodic tabu search where
	// the tasks are narrowed (20 agents or more); on smaller instances the
	// tabu search from the repaired plan did as well or better (fingerprint
	// runs of 10 agents and 100 jobs), so they keep it and search plans
	// only in the last repair and once the rounds have stalled.
	search := rin.Final || rin.Stalled ||
		(r.focus() != nil && r.calls%searchEvery == 0 && r.opt.Improve == (heuristics.ImproveSettings{}))
	settings := r.improveSettings(rin.Final)
	if rin.Best == nil && !rin.Final && r.opt.Improve == (heuristics.ImproveSettings{}) && !search {
		// No plan yet: the price rounds aim their steps at the best plan's
		// value, so a first plan far from the optimum (a descent from the
		// first round's answers can leave it at three times the optimum on
		// the 80-agent type E files) throws the prices far off for a
		// hundred rounds. A short tabu search makes the first plan much
		// closer.
		settings.Moves = 3*in.Jobs + 200
	}
	if search && !rin.Final {
		settings.Moves = -1 // the plan search below does the tabu moves
	}
	assign, value := r.searcher.Improve(ctx, assign, settings, rng)
	r.searcher.Offer(assign)
	if best != nil {
		r.searcher.Offer(best)
	}
	planSearch := func() {
		if search && ctx.Err() == nil {
			if next, v, ok := r.searcher.PlanSearch(ctx, r.searchSettings(rin), rin.Seed); ok && rin.Sense.Better(v, value) {
				assign, value = next, v
			}
		}
	}
	if !rin.Final {
		planSearch()
	} else {
		// More passes while they pay off (each from the best so far, with
		// fresh random choices). Small instances, whose passes are cheap,
		// get more patience: 1000/n fruitless passes in a row (at least 3)
		// end it.
		idle, patience := 0, max(3, 1000/max(in.Jobs, 1))
		for pass := 1; pass < 2*patience && idle < patience && ctx.Err() == nil; pass++ {
			next, v := r.searcher.Improve(ctx, assign, settings, rng)
			if rin.Sense.Better(v, value) {
				assign, value, idle = next, v, 0
			} else {
				idle++
			}
		}
		// The plan search last, from the pool that now holds the passes'
		// plan too: it can only improve on what the passes found.
		r.searcher.Offer(assign)
		planSearch()
	}
	if !rin.Final {
		if rin.Best == nil || rin.Sense.Better(value, rin.Best.Value) {
			r.idle = 0
		} else {
			r.idle++
		}
	}
	return r.plan(assign), nil
}

// bookkeeping records the pair bounds of the knapsack relaxation at this
// call's prices and restricts the searches to the pairs that can still be
// part of a plan better than best (nil: none yet).
func (r *repairer) bookkeeping(rin *decomp.RepairInput, best []int) error {
	in := r.in
	if r.opt.Relaxation == KnapsackRelaxation {
		// Reduced costs of every job-agent pair at this round's prices;
		// the searcher keeps the strongest bound of each pair over the
		// rounds and forbids the pairs that cannot improve on the best
		// plan.
		if r.values == nil {
			r.values = make([]float64, in.Agents)
		}
		L := 0.0
		for i := range r.values {
			r.values[i] = rin.Answers[i].Value
			L += r.values[i]
		}
		for _, v := range rin.Prices {
			L -= v
		}
		// Rounds whose bound is well below the best one seldom tighten a
		// pair: they are skipped (a tenth of the gap below at most).
		// (a bound is stronger when it is worse as a plan value)
		stronger := !r.haveL || rin.Sense.Better(r.bestL, L)
		if stronger || rin.Best == nil || math.Abs(L-r.bestL) <= 0.1*math.Abs(rin.Best.Value-r.bestL) {
			if _, err := r.searcher.AddItemPrices(rin.Prices, r.values); err != nil {
				return fmt.Errorf("gap: pair bounds: %w", err)
			}
		}
		if stronger {
			r.bestL, r.haveL = L, true
		}
	}
	if best != nil {
		r.searcher.Restrict(best, rin.Best.Value, 1)
	}
	return nil
}

// repairWorkers is the worker budget of a repair (0 means every core).
func repairWorkers(rin *decomp.RepairInput) int {
	if rin.Workers <= 0 {
		return runtime.GOMAXPROCS(0)
	}
	return rin.Workers
}

// jobAgents lists, in option order, the agents job j may go to in the
// choice relaxation. A job whose use exceeds an agent's whole capacity can
// never go there; leaving that option out keeps the bound valid and makes
// it stronger. The repair maps a job block's chosen option back to its
// agent with the same list.
func jobAgents(in *Instance, j int) []int {
	idx := make([]int, 0, in.Agents)
	for i := 0; i < in.Agents; i++ {
		if in.Use[i][j] <= in.Capacity[i] {
			idx = append(idx, i)
		}
	}
	return idx
}

// plan computes the value and row use of an assignment in exact integer
// arithmetic; it returns nil for an infeasible assignment.
func (r *repairer) plan(assign []int) *decomp.Plan {
	in := r.in
	load := make([]int64, in.Agents)
	var value int64
	for j, i := range assign {
		if i < 0 || i >= in.Agents {
			return nil
		}
		load[i] += in.Use[i][j]
		value += in.Cost[i][j]
	}
	for i, l := range load {
		if l > in.Capacity[i] {
			return nil
		}
	}
	p := &decomp.Plan{Value: float64(value), Detail: append([]int(nil), assign...)}
	if r.opt.Relaxation == KnapsackRelaxation {
		p.Use = make([]float64, in.Jobs)
		for j := range p.Use {
			p.Use[j] = 1
		}
	} else {
		p.Use = make([]float64, in.Agents)
		for i, l := range load {
			p.Use[i] = float64(l)
		}
	}
	return p
}
