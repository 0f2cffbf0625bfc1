package gap

import (
	"context"
	"math"
	"reflect"
	"testing"
	"time"

	"pincer/decomp"
	"pincer/heuristics"
)

// resumeAt runs p to the round limit, breaking it at round k through a
// checkpoint (encoded and decoded as a file would be), and resumes the
// saved state on a fresh problem from mk.
func resumeAt(t *testing.T, mk func() *decomp.Problem, s decomp.Settings, k int) *decomp.Result {
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

func sameRun(a, b *decomp.Result) bool {
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

// TestResumeExact: a run broken by a checkpoint and resumed ends with the
// same status, plan value, bound, rounds, prices and history as the
// uninterrupted run (the reference), for both relaxations; the repairer's
// counters travel in the state.
func TestResumeExact(t *testing.T) {
	in, err := Generate('d', 10, 100, 7)
	if err != nil {
		t.Fatal(err)
	}
	for _, rel := range []Relaxation{KnapsackRelaxation, ChoiceRelaxation} {
		mk := func() *decomp.Problem {
			// A light last repair keeps the test short.
			p, err := NewProblem(in, Options{Relaxation: rel, FinalImprove: heuristics.ImproveSettings{Moves: 300, PairNodes: -1}})
			if err != nil {
				t.Fatal(err)
			}
			return p
		}
		s := decomp.Settings{Rounds: 250, Seed: 3, Gap: -1, Evaluator: decomp.Pool{Workers: 2}, Workers: 2}
		ref, err := decomp.Solve(context.Background(), mk(), s)
		if err != nil {
			t.Fatal(err)
		}
		breaks := []int{4, 97, 201}
		if rel == ChoiceRelaxation {
			breaks = breaks[1:2] // the package's tests are long already
		}
		for _, k := range breaks {
			if res := resumeAt(t, mk, s, k); !sameRun(ref, res) {
				t.Errorf("%v, break at round %d: resumed %s rounds %d bound %v plan %v; uninterrupted %s rounds %d bound %v plan %v",
					rel, k, res.Status, res.Rounds, res.Bound, res.Plan.Value, ref.Status, ref.Rounds, ref.Bound, ref.Plan.Value)
			}
		}
		t.Logf("%v: %s after %d rounds, plan %v bound %v", rel, ref.Status, ref.Rounds, ref.Plan.Value, ref.Bound)
	}
}

// FuzzRestoreRepairState: the repairer's state reader refuses what it did
// not write and never panics; what it accepts it writes back the same.
func FuzzRestoreRepairState(f *testing.F) {
	in, err := Generate('c', 3, 10, 1)
	if err != nil {
		f.Fatal(err)
	}
	r := newRepairer(in, Options{})
	r.calls, r.idle, r.failures, r.skip = 9, 4, 1, 1
	good, _ := r.RepairState()
	f.Add(good)
	f.Add(good[:len(good)-1])
	f.Fuzz(func(t *testing.T, data []byte) {
		q := newRepairer(in, Options{})
		if err := q.RestoreRepairState(data); err != nil {
			return
		}
		back, _ := q.RepairState()
		if !reflect.DeepEqual(back, data) {
			t.Fatalf("state %x read back as %x", data, back)
		}
	})
}

// TestResumeExactPlanSearch: with 20 agents the in-round repairs run the
// plan search, whose elite plans and pair bounds carry over between
// calls; a run broken at a checkpoint and resumed must end as the
// uninterrupted one, so both are part of the repairer's saved state.
func TestResumeExactPlanSearch(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: two runs of a 20 x 100 instance")
	}
	in, err := Generate('d', 20, 100, 9)
	if err != nil {
		t.Fatal(err)
	}
	mk := func() *decomp.Problem {
		t.Helper()
		p, err := NewProblem(in, Options{Relaxation: KnapsackRelaxation, FinalImprove: heuristics.ImproveSettings{Moves: 300, PairNodes: -1}})
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	s := decomp.Settings{Rounds: 90, Seed: 5, Gap: -1, Evaluator: decomp.Pool{Workers: 2}, Workers: 2}
	ref, err := decomp.Solve(context.Background(), mk(), s)
	if err != nil {
		t.Fatal(err)
	}
	if res := resumeAt(t, mk, s, 46); !sameRun(ref, res) {
		t.Fatalf("resumed at 46: %s after %d rounds, plan %v bound %v; uninterrupted %s after %d, plan %v bound %v",
			res.Status, res.Rounds, res.Plan.Value, res.Bound, ref.Status, ref.Rounds, ref.Plan.Value, ref.Bound)
	}
}
