package decomp_test

import (
	"context"
	"fmt"
	"hash/fnv"
	"math"
	"testing"

	"pincer/decomp"
	"pincer/instances/cflp"
	"pincer/instances/gap"
)

func runFingerprint(t *testing.T, p *decomp.Problem, s decomp.Settings) string {
	t.Helper()
	res, err := decomp.Solve(context.Background(), p, s)
	if err != nil {
		t.Fatal(err)
	}
	h := fnv.New64a()
	for _, r := range res.History {
		fmt.Fprintf(h, "%d %x %x %x %x %x\n", r.Round, math.Float64bits(r.Value), math.Float64bits(r.Bound), math.Float64bits(r.PlanValue), math.Float64bits(r.Step), math.Float64bits(r.Norm))
	}
	for _, v := range res.Prices {
		fmt.Fprintf(h, "%x ", math.Float64bits(v))
	}
	pv := math.NaN()
	if res.Plan != nil {
		pv = res.Plan.Value
	}
	return fmt.Sprintf("%s rounds=%d bound=%v plan=%v hash=%x", res.Status, res.Rounds, res.Bound, pv, h.Sum64())
}

// TestFingerprint: the expected lines were recorded from the engine before
// the run became a State value (commit 2d38dca); the Subgradient runs must
// stay bit-identical (status, rounds, bound, plan and a hash of the whole
// history and prices).
func TestFingerprint(t *testing.T) {
	if testing.Short() {
		t.Skip("long: runs GAP and facility problems")
	}
	want := []string{
		// The GAP lines moved when the first repair of a run (no plan yet)
		// got a short tabu search, so the price steps aim at a closer plan
		// from the start: the repair changed, not the engine.
		"gap c knapsack: integer-closed rounds=165 bound=1473.8740261545586 plan=1474 hash=87086e524db434a7",
		"gap c choice: round-limit rounds=200 bound=1460.3840223229786 plan=1474 hash=a79667cb9277e461",
		// The final repair's polish has the multi-exchange moves: the
		// same history (hash), a plan one unit cheaper.
		"gap d knapsack: round-limit rounds=200 bound=6199.823094149585 plan=6278 hash=45b91121e2111e4e",
		"gap d choice: round-limit rounds=200 bound=6214.312180130947 plan=6281 hash=d08251dc2fb8cc0e",
		// The generator writes data with at most two decimals since the CLI
		// issue, so this instance differs from the one first pinned. Since
		// the site search runs on SolveNode its path (and so the warm
		// transport bases) differ: the same open set and history, a plan
		// value one unit in the last place away. Since the site search is
		// an instance of decomp.Search the repair evaluates other open sets
		// on its way (the same tree, fewer node ascents): the same open
		// set and history again, the plan value one unit in the last
		// place away once more.
		"cflp: search-closed rounds=105 bound=14508.036600000001 plan=14508.036600000001 hash=af70ecd42f1edbfd",
		"many: round-limit rounds=100 bound=626568.5008650353 plan=NaN hash=e2347a6443467298",
	}
	var got []string

	for _, kind := range []byte{'c', 'd'} {
		in, err := gap.Generate(kind, 10, 100, 7)
		if err != nil {
			t.Fatal(err)
		}
		for _, rel := range []gap.Relaxation{gap.KnapsackRelaxation, gap.ChoiceRelaxation} {
			p, err := gap.NewProblem(in, gap.Options{Relaxation: rel})
			if err != nil {
				t.Fatal(err)
			}
			got = append(got, fmt.Sprintf("gap %c %v: %s", kind, rel, runFingerprint(t, p, decomp.Settings{Rounds: 200, Seed: 3, Gap: -1, Evaluator: decomp.Pool{Workers: 2}})))
		}
	}
	in, err := cflp.Generate(30, 80, 3, 5)
	if err != nil {
		t.Fatal(err)
	}
	p, err := cflp.NewProblem(in, cflp.Options{})
	if err != nil {
		t.Fatal(err)
	}
	got = append(got, fmt.Sprintf("cflp: %s", runFingerprint(t, p, decomp.Settings{Rounds: 150, Seed: 3, Gap: -1, Evaluator: decomp.Pool{Workers: 2}})))
	got = append(got, fmt.Sprintf("many: %s", runFingerprint(t, manyBlocks(2000, 30), decomp.Settings{Rounds: 100, Seed: 1})))
	for i := range want {
		if i >= len(got) || got[i] != want[i] {
			t.Errorf("run %d:\n got %v\nwant %s", i, got[i:min(i+1, len(got))], want[i])
		}
	}
}
