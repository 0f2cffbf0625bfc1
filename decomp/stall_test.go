package decomp_test

import (
	"context"
	"sync/atomic"
	"testing"
	"time"

	"pincer/decomp"
	"pincer/subproblem"
)

// stallRepairer returns the same plan every time and counts the repairs
// that were told the rounds had stalled.
type stallRepairer struct{ stalled atomic.Int64 }

func (s *stallRepairer) Repair(_ context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	if in.Stalled {
		s.stalled.Add(1)
	}
	return &decomp.Plan{Value: 100, Use: []float64{1}}, nil
}

// stallProblem never settles: its one row asks for 1 unit, the only block
// offers 0 or 2, so the subgradient never vanishes, and the plan (value
// 100) stays far above the bound (at most 1/2).
func stallProblem(rep decomp.Repairer) *decomp.Problem {
	b := &subproblem.Choice{Options: []subproblem.Option{
		{Cost: 0, Use: []decomp.Entry{{Index: 0, Value: 0}}},
		{Cost: 1, Use: []decomp.Entry{{Index: 0, Value: 2}}},
	}}
	return &decomp.Problem{Sense: decomp.Minimise, Rows: []decomp.Row{{Name: "r", Sense: decomp.Equal, RHS: 1}},
		Blocks: []decomp.Block{b}, Repair: rep}
}

// TestStallRule checks the stall rule of Settings: without a time limit a
// stall ends the run; with one and no StallRounds given the run goes on to
// its limit and the repairs are told the rounds have stalled; with
// StallRounds given a stall ends a timed run too. (The rounds of a timed
// run stop before the limit to leave the last repair its reserve, a fifth
// of this one, which the fixed plan does not use.)
func TestStallRule(t *testing.T) {
	rep := &stallRepairer{}
	res, err := decomp.Solve(context.Background(), stallProblem(rep), decomp.Settings{Gap: -1})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != decomp.Stalled || rep.stalled.Load() != 0 {
		t.Fatalf("no time limit: status %v, %d stalled repairs; want stalled, 0", res.Status, rep.stalled.Load())
	}
	rep = &stallRepairer{}
	limit := time.Second
	res, err = decomp.Solve(context.Background(), stallProblem(rep), decomp.Settings{Gap: -1, Time: limit, StallRounds: 0})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != decomp.TimeLimit || res.Elapsed < limit*3/4 || rep.stalled.Load() == 0 {
		t.Fatalf("time budget: status %v after %v, %d stalled repairs; want time-limit after about %v and some", res.Status, res.Elapsed, rep.stalled.Load(), limit)
	}
	rep = &stallRepairer{}
	res, err = decomp.Solve(context.Background(), stallProblem(rep), decomp.Settings{Gap: -1, Time: 10 * time.Second, StallRounds: 20})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != decomp.Stalled || rep.stalled.Load() != 0 {
		t.Fatalf("stall given: status %v, %d stalled repairs; want stalled, 0", res.Status, rep.stalled.Load())
	}
}
