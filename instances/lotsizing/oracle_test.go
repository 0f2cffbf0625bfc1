package lotsizing

import (
	"context"
	"io"
	"testing"

	"pincer/decomp"
	"pincer/internal/oracle"
)

// Source of the expected values: CBC on the exported MPS model.
func TestCBCGenerated(t *testing.T) {
	if testing.Short() {
		t.Skip("CBC oracle skipped in -short mode")
	}
	for seed := uint64(1); seed <= 1; seed++ { // one seed keeps the test short; CBC gets 10 s per model
		for _, ot := range []float64{0, 3} {
			in, err := Generate(GenerateConfig{Items: 6, Periods: 15, Utilisation: 0.7, Seed: seed})
			if err != nil {
				t.Fatal(err)
			}
			opt := Options{OvertimeCost: ot}
			out := oracle.CBC(t, func(w io.Writer) error { return WriteMPS(w, in, opt) }, 10)
			p, err := NewProblem(in, opt)
			if err != nil {
				t.Fatal(err)
			}
			res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 200, Gap: -1})
			if err != nil {
				t.Fatal(err)
			}
			tol := 1e-6 * out.Objective
			if res.Bound > out.Objective+tol { // CBC's incumbent is feasible, so it is never below the optimum
				t.Errorf("seed %d overtime %v: bound %v above the CBC optimum %v", seed, ot, res.Bound, out.Objective)
			}
			if res.Plan == nil {
				t.Logf("seed %d overtime %v: no plan (CBC %v)", seed, ot, out.Objective)
				continue
			}
			if res.Plan.Value < out.Objective-tol && out.Optimal {
				t.Errorf("seed %d overtime %v: plan %v below the CBC optimum %v", seed, ot, res.Plan.Value, out.Objective)
			}
			t.Logf("seed %d overtime %v: bound %.1f CBC %.1f (optimal %v) plan %.1f", seed, ot, res.Bound, out.Objective, out.Optimal, res.Plan.Value)
		}
	}
}
