package gap

import (
	"context"
	"reflect"
	"testing"

	"pincer/decomp"
	"pincer/heuristics"
	"pincer/internal/resumecheck"
)

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
			if res := resumecheck.At(t, mk, s, k); !resumecheck.Same(ref, res) {
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
	if res := resumecheck.At(t, mk, s, 46); !resumecheck.Same(ref, res) {
		t.Fatalf("resumed at 46: %s after %d rounds, plan %v bound %v; uninterrupted %s after %d, plan %v bound %v",
			res.Status, res.Rounds, res.Plan.Value, res.Bound, ref.Status, ref.Rounds, ref.Plan.Value, ref.Bound)
	}
}
