package gap

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sort"

	"pincer/decomp"
	"pincer/heuristics"
	"pincer/subproblem"
)

// Relaxation chooses which rows of the assignment model are priced.
type Relaxation int8

const (
	// KnapsackRelaxation prices the "each job exactly once" rows: one 0-1
	// knapsack block per agent. It is the stronger of the two and the
	// default.
	KnapsackRelaxation Relaxation = iota
	// ChoiceRelaxation prices the agent capacity rows: one choose-one block
	// per job. It is cheap, and its best bound equals the LP relaxation
	// (Geoffrion 1974: the blocks have the integrality property).
	ChoiceRelaxation
)

// String returns "knapsack" or "choice".
func (r Relaxation) String() string {
	if r == ChoiceRelaxation {
		return "choice"
	}
	return "knapsack"
}

// ParseRelaxation reads "knapsack" or "choice".
func ParseRelaxation(s string) (Relaxation, error) {
	switch s {
	case "knapsack", "":
		return KnapsackRelaxation, nil
	case "choice":
		return ChoiceRelaxation, nil
	}
	return 0, fmt.Errorf("unknown relaxation %q (want knapsack or choice)", s)
}

// Options configure the engine problem built from an instance. The zero
// value minimises with the knapsack relaxation and default repair effort.
type Options struct {
	Maximise   bool
	Relaxation Relaxation
	// Improve bounds the local search after each repair; the zero value
	// means a light polish proportional to the number of jobs.
	Improve heuristics.ImproveSettings
	// FinalImprove bounds the local search of the last repair; the zero
	// value means a thorough search (which a time limit may cut short).
	FinalImprove heuristics.ImproveSettings
}

// NewProblem builds the engine problem of an instance: its blocks, coupling
// rows, starting prices and repair. The plan's Detail is the assignment as
// []int (job -> agent, 0-based).
func NewProblem(in *Instance, opt Options) (*decomp.Problem, error) {
	if err := in.Validate(); err != nil {
		return nil, err
	}
	sense := decomp.Minimise
	if opt.Maximise {
		sense = decomp.Maximise
	}
	p := &decomp.Problem{Name: in.Name, Sense: sense, IntegralObjective: true}
	switch opt.Relaxation {
	case KnapsackRelaxation:
		p.Rows = make([]decomp.Row, in.Jobs)
		for j := range p.Rows {
			p.Rows[j] = decomp.Row{Name: fmt.Sprintf("job %d", j+1), Sense: decomp.Equal, RHS: 1}
		}
		p.Blocks = make([]decomp.Block, in.Agents)
		for i := range p.Blocks {
			p.Blocks[i] = &agentBlock{cost: in.Cost[i], use: in.Use[i], capacity: in.Capacity[i],
				profit: make([]float64, in.Jobs), take: make([]bool, in.Jobs)}
		}
		p.Prices = knapsackStartPrices(in, opt.Maximise)
	case ChoiceRelaxation:
		p.Rows = make([]decomp.Row, in.Agents)
		for i := range p.Rows {
			p.Rows[i] = decomp.Row{Name: fmt.Sprintf("agent %d", i+1), Sense: decomp.LessEqual, RHS: float64(in.Capacity[i])}
		}
		p.Blocks = make([]decomp.Block, in.Jobs)
		for j := range p.Blocks {
			c := &subproblem.Choice{}
			for _, i := range jobAgents(in, j) {
				c.Options = append(c.Options, subproblem.Option{
					Cost: float64(in.Cost[i][j]),
					Use:  []decomp.Entry{{Index: i, Value: float64(in.Use[i][j])}},
				})
			}
			if len(c.Options) == 0 {
				return nil, fmt.Errorf("gap: instance %q: job %d fits no agent (its use exceeds every capacity)", in.Name, j+1)
			}
			p.Blocks[j] = c
		}
	default:
		return nil, fmt.Errorf("gap: unknown relaxation %d", opt.Relaxation)
	}
	// Every job at its worst agent bounds every plan's value: a bound past
	// it proves the instance infeasible.
	for j := 0; j < in.Jobs; j++ {
		worst := in.Cost[0][j]
		for i := 1; i < in.Agents; i++ {
			if c := in.Cost[i][j]; (opt.Maximise && c < worst) || (!opt.Maximise && c > worst) {
				worst = c
			}
		}
		p.PlanLimit += float64(worst)
	}
	p.HasPlanLimit = true
	p.Repair = newRepairer(in, opt)
	return p, nil
}

// knapsackStartPrices starts each job's price at minus its second-best
// cost, so that in the first round a job tempts only the agents that serve
// it better than its runner-up (a common starting rule for this
// relaxation, e.g. Fisher 1981).
func knapsackStartPrices(in *Instance, maximise bool) []float64 {
	prices := make([]float64, in.Jobs)
	for j := range prices {
		best, second := math.Inf(1), math.Inf(1)
		for i := 0; i < in.Agents; i++ {
			c := float64(in.Cost[i][j])
			if maximise {
				c = -c
			}
			if c < best {
				best, second = c, best
			} else if c < second {
				second = c
			}
		}
		if math.IsInf(second, 1) {
			second = best
		}
		if maximise {
			second = -second
		}
		prices[j] = -second
	}
	return prices
}

// agentBlock is agent i's 0-1 knapsack: take the jobs whose priced cost
// c_ij + λ_j is favourable, within the agent's capacity.
//
// Variables: one binary x_ij per job, numbered by the job's 0-based index j
// (all jobs, also those that cannot fit); Answer.Primal lists the jobs
// taken with value 1. A job fixed to 1 is taken (its use comes off the
// capacity, its priced cost is added), a job fixed to 0 is left out, and
// the exact knapsack runs on the rest. Fixed-in jobs over the capacity, or
// a value other than 0 or 1, leave no point: the error wraps
// decomp.ErrInfeasible.
type agentBlock struct {
	cost, use []int64
	capacity  int64
	solver    subproblem.Knapsack
	profit    []float64
	take      []bool
}

func (b *agentBlock) Solve(_ context.Context, req *decomp.Request, ans *decomp.Answer) error {
	sign := -1.0 // minimising cost = maximising its negative
	if req.Sense == decomp.Maximise {
		sign = 1
	}
	for j, c := range b.cost {
		b.profit[j] = sign * (float64(c) + req.Prices[j])
	}
	fixed := req.Fixed()
	room := b.capacity
	var fixedProfit float64
	for _, f := range fixed {
		j := f.Var
		if j < 0 || j >= len(b.cost) {
			return fmt.Errorf("gap: agent block %d: fixing of variable %d, but there are %d jobs", req.Block, j, len(b.cost))
		}
		switch f.Value {
		case 0:
		case 1:
			room -= b.use[j]
			fixedProfit += b.profit[j]
		default:
			return fmt.Errorf("gap: agent block %d: job %d fixed to %v, not 0 or 1: %w", req.Block, j, f.Value, decomp.ErrInfeasible)
		}
		// A fixed job is no longer the knapsack's to choose: profit 0 keeps
		// it out of the search; fixed-in jobs are marked taken below.
		b.profit[j] = 0
	}
	if room < 0 {
		return fmt.Errorf("gap: agent block %d: jobs fixed to 1 use %d, capacity %d: %w", req.Block, b.capacity-room, b.capacity, decomp.ErrInfeasible)
	}
	v, err := b.solver.Solve(b.profit, b.use, room, b.take)
	if err != nil {
		return err
	}
	if len(fixed) > 0 {
		for _, f := range fixed {
			if f.Value == 1 {
				b.take[f.Var] = true
			}
		}
		v += fixedProfit
	}
	ans.Value = sign * v
	ans.Cost = 0
	ans.Use = ans.Use[:0]
	ans.Primal = ans.Primal[:0]
	for j, t := range b.take {
		if t {
			ans.Cost += float64(b.cost[j])
			ans.Use = append(ans.Use, decomp.Entry{Index: j, Value: 1})
			ans.Primal = append(ans.Primal, decomp.Entry{Index: j, Value: 1})
		}
	}
	return nil
}

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

func (r *repairer) Repair(ctx context.Context, rin *decomp.RepairInput) (*decomp.Plan, error) {
	in := r.in
	if r.searcher == nil {
		s, err := heuristics.NewSearcher(r.model)
		if err != nil {
			return nil, err
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
	var assign []int
	if !rin.Final {
		r.calls++
	}
	intensify := !rin.Final && r.calls%searchEvery == 0 && r.idle >= 32 && rin.Best != nil
	if (rin.Final || intensify) && rin.Best != nil {
		// The last repair, and the periodic search once the plan has
		// stopped improving, work from the best plan found so far.
		assign = append([]int(nil), rin.Best.Detail.([]int)...)
	} else {
		var ok bool
		assign, ok = r.searcher.Repair(ctx, relaxed, priced, rng)
		if !ok {
			r.failures++
			r.skip = 1<<min(r.failures, 6) - 1
			return nil, nil
		}
		r.failures = 0
	}
	settings := r.improveSettings(rin.Final)
	assign, value := r.searcher.Improve(ctx, assign, settings, rng)
	if rin.Final {
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

// Resource describes one agent's capacity at the end of a run.
type Resource struct {
	Agent    int // 0-based
	Capacity int64
	Load     int64 // in the plan; 0 without one
	// Price is the value of one more unit of capacity at the best prices:
	// the row price in the choice relaxation, or the LP dual of the
	// agent's knapsack capacity (the efficiency of its critical job) in the
	// knapsack relaxation. It is >= 0 for both senses: what a unit more is
	// worth (cost saved when minimising, profit gained when maximising).
	Price   float64
	Binding bool // the agent is full (no job left out fits the slack) in the plan
}

// Resources reports every agent's capacity, load and price. assign may be
// nil (no plan).
func Resources(in *Instance, opt Options, prices []float64, assign []int) []Resource {
	res := make([]Resource, in.Agents)
	load := make([]int64, in.Agents)
	for j, i := range assign {
		load[i] += in.Use[i][j]
	}
	for i := range res {
		res[i] = Resource{Agent: i, Capacity: in.Capacity[i], Load: load[i]}
		if opt.Relaxation == ChoiceRelaxation {
			res[i].Price = math.Abs(prices[i])
		} else {
			res[i].Price = criticalRatio(in, i, prices, opt.Maximise)
		}
		if assign != nil {
			slack := in.Capacity[i] - load[i]
			min := int64(math.MaxInt64)
			for j := 0; j < in.Jobs; j++ {
				if assign[j] != i && in.Use[i][j] < min {
					min = in.Use[i][j]
				}
			}
			res[i].Binding = slack == 0 || slack < min
		}
	}
	return res
}

// criticalRatio is the LP dual of agent i's capacity in its knapsack at the
// given job prices: fill by decreasing profit per unit of use; the ratio of
// the first job that does not fit whole prices the capacity (zero when
// every profitable job fits).
func criticalRatio(in *Instance, i int, prices []float64, maximise bool) float64 {
	type item struct {
		p float64
		w int64
	}
	var items []item
	sign := -1.0
	if maximise {
		sign = 1
	}
	for j := 0; j < in.Jobs; j++ {
		p := sign * (float64(in.Cost[i][j]) + prices[j])
		if p > 0 && in.Use[i][j] > 0 {
			items = append(items, item{p, in.Use[i][j]})
		}
	}
	sort.Slice(items, func(a, b int) bool {
		return items[a].p*float64(items[b].w) > items[b].p*float64(items[a].w)
	})
	room := in.Capacity[i]
	for _, it := range items {
		if it.w > room {
			return it.p / float64(it.w)
		}
		room -= it.w
	}
	return 0
}
