// Package resumecheck is test support: it breaks an engine run at a
// checkpoint, resumes it, and compares the end with the uninterrupted run,
// for the families' exact-resume tests.
package resumecheck

import (
	"context"
	"math"
	"reflect"
	"testing"
	"time"

	"pincer/decomp"
)

// At runs p to the round limit, breaking it at round k through a
// checkpoint (encoded and decoded as a file would be), and resumes the
// saved state on a fresh problem from mk.
func At(t testing.TB, mk func() *decomp.Problem, s decomp.Settings, k int) *decomp.Result {
	t.Helper()
	p := mk()
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	var saved *decomp.State
	cs := s
	cs.FinalRepairTime = time.Millisecond // the broken run's last plan is not used
	cs.CheckpointEvery = k
	cs.Checkpoint = func(st *decomp.State) error {
		if st.Round != k {
			return nil
		}
		cancel()
		b, err := decomp.EncodeCheckpoint(&decomp.Checkpoint{State: st}, p.Plans)
		if err != nil {
			return err
		}
		c, err := decomp.DecodeCheckpoint(b, p.Plans)
		if err != nil {
			return err
		}
		saved = c.State
		return nil
	}
	if _, err := decomp.Solve(ctx, p, cs); err != nil {
		t.Fatal(err)
	}
	if saved == nil || saved.Repair == nil {
		t.Fatalf("no checkpoint with the repairer's state at round %d", k)
	}
	res, err := decomp.Resume(context.Background(), mk(), s, saved)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// Same reports whether two runs ended alike: status, rounds, bound,
// prices, plan value and every round's value, bound, step and plan value
// (timings aside).
func Same(a, b *decomp.Result) bool {
	pa, pb := math.NaN(), math.NaN()
	if a.Plan != nil {
		pa = a.Plan.Value
	}
	if b.Plan != nil {
		pb = b.Plan.Value
	}
	same := a.Status == b.Status && a.Rounds == b.Rounds && a.Bound == b.Bound && reflect.DeepEqual(a.Prices, b.Prices) &&
		(pa == pb || math.IsNaN(pa) && math.IsNaN(pb)) && len(a.History) == len(b.History)
	for i := 0; same && i < len(a.History); i++ {
		x, y := a.History[i], b.History[i]
		same = x.Value == y.Value && x.Bound == y.Bound && x.Step == y.Step && (x.PlanValue == y.PlanValue || math.IsNaN(x.PlanValue) && math.IsNaN(y.PlanValue))
	}
	return same
}
