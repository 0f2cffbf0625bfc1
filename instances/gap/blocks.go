package gap

import (
	"context"
	"fmt"

	"pincer/decomp"
	"pincer/subproblem"
)

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
