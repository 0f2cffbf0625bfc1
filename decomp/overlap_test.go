package decomp_test

import (
	"context"
	"sync"
	"sync/atomic"
	"testing"
	"time"

	"pincer/decomp"
)

// gatedRepairer's first repair waits until the rounds have passed round
// 40 (gate closed by the observer) or until its context ends.
type gatedRepairer struct {
	gate    chan struct{}
	once    sync.Once
	calls   atomic.Int64
	viaGate atomic.Bool
}

func (g *gatedRepairer) Repair(ctx context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	if g.calls.Add(1) == 1 {
		select {
		case <-g.gate:
			g.viaGate.Store(true)
		case <-ctx.Done():
			return nil, ctx.Err()
		}
	}
	return &decomp.Plan{Value: 100, Use: []float64{1}}, nil
}

func (g *gatedRepairer) Observe(p *decomp.Progress) {
	if p.Record.Round >= 40 {
		g.once.Do(func() { close(g.gate) })
	}
}

// TestRoundsGoOnUnderTimeBudget: with the time limit as the only bound on
// rounds, a repair round does not wait for the repair in flight; the
// first repair here finishes only once the rounds have passed round 40,
// which they could not reach if round 5 waited for it.
func TestRoundsGoOnUnderTimeBudget(t *testing.T) {
	g := &gatedRepairer{gate: make(chan struct{})}
	res, err := decomp.Solve(context.Background(), stallProblem(g), decomp.Settings{
		Gap: -1, Time: 2 * time.Second, Workers: 2, Observer: g})
	if err != nil {
		t.Fatal(err)
	}
	if !g.viaGate.Load() {
		t.Fatalf("the rounds waited for the first repair (status %v after %d rounds)", res.Status, res.Rounds)
	}
	if res.Plan == nil || res.Plan.Value != 100 {
		t.Fatalf("plan %+v, want the repairer's plan of value 100", res.Plan)
	}
}
