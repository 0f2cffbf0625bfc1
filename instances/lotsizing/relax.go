package lotsizing

import (
	"context"
	"fmt"
	"math"

	"pincer/decomp"
	"pincer/subproblem"
)

// Options configure the engine problem. The zero value means no overtime
// beyond the instance's own per-period costs and default repair budgets.
type Options struct {
	// OvertimeCost, when positive, lets every period without an overtime
	// cost of its own exceed its capacity at this cost per capacity unit.
	OvertimeCost float64
	// Moves bounds the candidate moves evaluated by one repair's local
	// search; 0 means 20 per item-period pair.
	Moves int
	// Effort scales the work of the repair's setup-pattern search (see
	// repairer.budget); 0 means 1.
	Effort float64
}

// overtimeCosts returns the per-period overtime cost (negative = none).
func overtimeCosts(in *Instance, opt Options) []float64 {
	T := in.Periods()
	oc := make([]float64, T)
	for t := range oc {
		oc[t] = -1
		if in.OvertimeCost != nil && in.OvertimeCost[t] >= 0 {
			oc[t] = in.OvertimeCost[t]
		} else if opt.OvertimeCost > 0 {
			oc[t] = opt.OvertimeCost
		}
	}
	return oc
}

// overtimeLimit is U_t: the most any plan can load period t (every setup
// time plus unit times of all remaining demand) beyond its capacity.
func overtimeLimit(in *Instance, t int) float64 {
	load := 0.0
	for i, it := range in.Items {
		rem := 0.0
		for u := t; u < in.Periods(); u++ {
			rem += in.Demand[i][u]
		}
		load += it.SetupTime + it.UnitTime*rem
	}
	return math.Max(0, load-in.Capacity[t])
}

// overtimeBlock chooses o_t in [0, Limit] at cost Cost per unit; it uses
// its capacity row by −o_t.
type overtimeBlock struct {
	Row         int
	Cost, Limit float64
}

func (b *overtimeBlock) Solve(_ context.Context, req *decomp.Request, ans *decomp.Answer) error {
	lam := req.Prices[b.Row]
	o := 0.0
	if b.Cost-lam < 0 {
		o = b.Limit
	}
	for _, f := range req.Fixed() {
		if f.Var != 0 || f.Value < 0 || f.Value > b.Limit {
			return fmt.Errorf("overtime block %d: fixing %+v outside [0, %v]: %w", req.Block, f, b.Limit, decomp.ErrInfeasible)
		}
		o = f.Value
	}
	ans.Use, ans.Primal = ans.Use[:0], ans.Primal[:0]
	ans.Cost = b.Cost * o
	ans.Value = ans.Cost - lam*o
	if o != 0 {
		ans.Use = append(ans.Use, decomp.Entry{Index: b.Row, Value: -o})
		ans.Primal = append(ans.Primal, decomp.Entry{Index: 0, Value: o})
	}
	return nil
}

// NewProblem builds the engine problem: one capacity row per period, one
// lot-sizing block per item (blocks 0..n-1; block variables as documented
// on subproblem.LotSizing), one overtime block per period that allows
// overtime (blocks n, n+1, ...), and the repair.
func NewProblem(in *Instance, opt Options) (*decomp.Problem, error) {
	if err := in.Validate(); err != nil {
		return nil, err
	}
	T := in.Periods()
	p := &decomp.Problem{Name: in.Name, Sense: decomp.Minimise, Plans: decomp.GobPlans[*Schedule]{}}
	oc := overtimeCosts(in, opt)
	for t := 0; t < T; t++ {
		p.Rows = append(p.Rows, decomp.Row{Name: fmt.Sprintf("capacity %d", t+1), Sense: decomp.LessEqual, RHS: in.Capacity[t]})
	}
	rows := make([]int, T)
	for t := range rows {
		rows[t] = t
	}
	for i, it := range in.Items {
		p.Blocks = append(p.Blocks, &subproblem.LotSizing{
			Demand: append([]float64(nil), in.Demand[i]...), InitialStock: it.InitialStock,
			SetupCost: it.SetupCost, SetupTime: it.SetupTime, UnitTime: it.UnitTime, Holding: it.Holding, Rows: rows,
		})
	}
	for t := 0; t < T; t++ {
		if oc[t] >= 0 {
			p.Blocks = append(p.Blocks, &overtimeBlock{Row: t, Cost: oc[t], Limit: overtimeLimit(in, t)})
		}
	}
	moves := opt.Moves
	if moves <= 0 {
		moves = 20 * len(in.Items) * T
	}
	effort := opt.Effort
	if effort <= 0 {
		effort = 1
	}
	// About the work of five rounds: a fixed part for the engine's round
	// overhead and n·T² for the blocks' dynamic programs.
	base := int(effort * (200000 + 3*float64(len(in.Items)*T*T)))
	p.Repair = &repairer{in: in, overtime: oc, moves: moves, work: base, firstPlanWork: 6 * base}
	return p, nil
}
