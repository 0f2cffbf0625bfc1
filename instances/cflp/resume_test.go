package cflp

import (
	"context"
	"testing"

	"pincer/decomp"
	"pincer/internal/resumecheck"
)

// TestResumeExact: a run broken by a checkpoint and resumed ends with the
// same status, plan value, bound, rounds, prices and history as the
// uninterrupted run (the reference), on a generated instance (the
// repairer's cache and warm allocation travel in the state) and on
// OR-Library cap41 (the site search closes the run).
func TestResumeExact(t *testing.T) {
	check := func(t *testing.T, in *Instance, s decomp.Settings) {
		mk := func() *decomp.Problem {
			p, err := NewProblem(in, Options{})
			if err != nil {
				t.Fatal(err)
			}
			return p
		}
		ref, err := decomp.Solve(context.Background(), mk(), s)
		if err != nil {
			t.Fatal(err)
		}
		for _, k := range []int{3, 47, 101} {
			if k >= ref.Rounds {
				continue
			}
			if res := resumecheck.At(t, mk, s, k); !resumecheck.Same(ref, res) {
				t.Errorf("break at round %d: resumed %s rounds %d bound %v plan %v; uninterrupted %s rounds %d bound %v plan %v",
					k, res.Status, res.Rounds, res.Bound, res.Plan.Value, ref.Status, ref.Rounds, ref.Bound, ref.Plan.Value)
			}
		}
		t.Logf("%s after %d rounds, plan %v bound %v", ref.Status, ref.Rounds, ref.Plan.Value, ref.Bound)
	}
	t.Run("generated", func(t *testing.T) {
		in, err := Generate(80, 150, 3, 11)
		if err != nil {
			t.Fatal(err)
		}
		check(t, in, decomp.Settings{Rounds: 120, Seed: 4, Gap: -1, Evaluator: decomp.Pool{Workers: 2}, Workers: 2})
	})
	t.Run("cap41", func(t *testing.T) {
		check(t, readORLibFile(t, "cap41.txt", 0), decomp.Settings{Rounds: 200, Seed: 1, Gap: 1e-9, Workers: 1})
	})
}

// FuzzRestoreRepairState: the repairer's state reader refuses what it did
// not write and never panics; what it accepts it writes back the same.
func FuzzRestoreRepairState(f *testing.F) {
	in, err := Generate(12, 30, 3, 2)
	if err != nil {
		f.Fatal(err)
	}
	p, err := NewProblem(in, Options{})
	if err != nil {
		f.Fatal(err)
	}
	if _, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 12, Gap: -1}); err != nil {
		f.Fatal(err)
	}
	good, err := p.Repair.(decomp.StatefulRepairer).RepairState()
	if err != nil {
		f.Fatal(err)
	}
	f.Add(good)
	f.Add(good[:len(good)/2])
	f.Add([]byte(cflpRepairTag))
	q, err := NewProblem(in, Options{})
	if err != nil {
		f.Fatal(err)
	}
	// One repairer for every input: a restore replaces its state whole.
	r := q.Repair.(decomp.StatefulRepairer)
	f.Fuzz(func(t *testing.T, data []byte) {
		if err := r.RestoreRepairState(data); err != nil {
			return
		}
		if _, err := r.RepairState(); err != nil {
			t.Fatalf("accepted state does not write back: %v", err)
		}
	})
}
