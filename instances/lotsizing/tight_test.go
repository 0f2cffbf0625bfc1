package lotsizing

import (
	"context"
	"testing"

	"pincer/decomp"
)

// tightPlans runs generated tight instances (setup times doubled,
// utilisation u, no overtime) for a fixed round budget and counts those
// that get a plan; each plan is checked by Verify. Whether an instance has
// any plan at all is not known here (the generator only makes cumulative
// demand fit, setup times aside), so the count is a lower bound on the
// share of feasible instances the repair solves.
func tightPlans(tb testing.TB, items, periods int, u float64, seeds, rounds int) (found int) {
	for seed := 1; seed <= seeds; seed++ {
		in, err := Generate(GenerateConfig{Items: items, Periods: periods, Utilisation: u, SetupTimeScale: 2, Seed: uint64(seed)})
		if err != nil {
			tb.Fatal(err)
		}
		p, err := NewProblem(in, Options{})
		if err != nil {
			tb.Fatal(err)
		}
		res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: rounds, Gap: -1, Seed: 1})
		if err != nil {
			tb.Fatal(err)
		}
		if res.Plan == nil {
			continue
		}
		if err := Verify(in, res.Plan.Detail.(*Schedule), nil); err != nil {
			tb.Fatalf("seed %d: %v", seed, err)
		}
		found++
	}
	return found
}

func TestTightInstancesGetPlans(t *testing.T) {
	if testing.Short() {
		t.Skip("tight-instance campaign skipped in -short mode")
	}
	found := tightPlans(t, 6, 15, 0.95, 5, 40)
	t.Logf("6x15, utilisation 0.95, setup times x2: %d of 5 with a plan in 40 rounds", found)
	if found < 4 {
		t.Errorf("only %d of 5 tight instances got a plan", found)
	}
}

// BenchmarkTightPlans reports the share of generated tight instances (20
// seeds per size) that get a plan without overtime in 200 rounds.
func BenchmarkTightPlans(b *testing.B) {
	for _, c := range []struct {
		name           string
		items, periods int
		u              float64
	}{{"6x15-u0.95", 6, 15, 0.95}, {"6x15-u1.00", 6, 15, 1}, {"10x20-u0.95", 10, 20, 0.95}, {"10x20-u1.00", 10, 20, 1}} {
		b.Run(c.name, func(b *testing.B) {
			for k := 0; k < b.N; k++ {
				b.ReportMetric(float64(tightPlans(b, c.items, c.periods, c.u, 20, 200))/20*100, "%-with-plan")
			}
		})
	}
}
