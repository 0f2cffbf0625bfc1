package gap

import (
	"context"
	"slices"
	"testing"

	"pincer/decomp"
)

// TestPlanSearchWorkersAgree runs a generated type D instance with 20
// agents (so that the plan search narrows to the pairs of least bound) for
// a fixed number of rounds with 1, 2 and 8 workers: the plan search splits
// into tasks merged at fixed points, so plan, bound and rounds must be the
// same whatever the worker count.
func TestPlanSearchWorkersAgree(t *testing.T) {
	in, err := Generate('d', 20, 400, 5)
	if err != nil {
		t.Fatal(err)
	}
	var first *decomp.Result
	for _, w := range []int{1, 2, 8} {
		p, err := NewProblem(in, Options{})
		if err != nil {
			t.Fatal(err)
		}
		res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 40, Gap: -1, Workers: w, Seed: 3})
		if err != nil {
			t.Fatal(err)
		}
		if res.Plan == nil {
			t.Fatalf("workers %d: no plan", w)
		}
		if first == nil {
			first = res
			continue
		}
		if res.Plan.Value != first.Plan.Value || res.Bound != first.Bound || res.Rounds != first.Rounds ||
			!slices.Equal(res.Plan.Detail.([]int), first.Plan.Detail.([]int)) {
			t.Fatalf("workers %d: plan %v, bound %v, %d rounds; with 1 worker %v, %v, %d",
				w, res.Plan.Value, res.Bound, res.Rounds, first.Plan.Value, first.Bound, first.Rounds)
		}
	}
}
