package gap

import (
	"fmt"
	"math"

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
	p := &decomp.Problem{Name: in.Name, Sense: sense, IntegralObjective: true, Plans: decomp.GobPlans[[]int]{}}
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
		p.WorstPlanValue += float64(worst)
	}
	p.HasWorstPlanValue = true
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
