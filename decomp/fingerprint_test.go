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

func TestFingerprint(t *testing.T) {
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
			t.Logf("gap %c %v: %s", kind, rel, runFingerprint(t, p, decomp.Settings{Rounds: 200, Seed: 3, Gap: -1, Evaluator: decomp.Pool{Workers: 2}}))
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
	t.Logf("cflp: %s", runFingerprint(t, p, decomp.Settings{Rounds: 150, Seed: 3, Gap: -1, Evaluator: decomp.Pool{Workers: 2}}))
	t.Logf("many: %s", runFingerprint(t, manyBlocks(2000, 30), decomp.Settings{Rounds: 100, Seed: 1}))
}
