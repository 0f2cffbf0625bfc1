package lotsizing

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
)

// planted builds a tight instance that has a plan by construction: item
// data and demand from Generate (setup times scaled), a planted plan that
// sets every item up in its first period with demand and then every one to
// three periods, each lot covering the demand up to the next setup, and
// capacity per period equal to the planted plan's load times 1 + slack.
// The planted plan proves that a plan without overtime exists.
func planted(items, periods int, scale, slack float64, seed uint64) (*Instance, error) {
	in, err := Generate(GenerateConfig{Items: items, Periods: periods, SetupTimeScale: scale, Seed: seed})
	if err != nil {
		return nil, err
	}
	r := rand.New(rand.NewPCG(seed, 42))
	load := make([]float64, periods)
	for i, it := range in.Items {
		next := 0
		for t := 0; t < periods; t++ {
			if in.Demand[i][t] > 0 && t >= next {
				// a lot from t up to the next setup
				end := t + 1 + r.IntN(3)
				q := 0.0
				for u := t; u < min(end, periods); u++ {
					q += in.Demand[i][u]
				}
				load[t] += it.SetupTime + it.UnitTime*q
				next = end
			}
		}
	}
	for t := range in.Capacity {
		in.Capacity[t] = math.Ceil(load[t] * (1 + slack))
	}
	in.Name = fmt.Sprintf("planted-%dx%d-%d", items, periods, seed)
	return in, in.Validate()
}

// tightPlans runs planted tight instances (setup times doubled, capacity
// the planted plan's load times 1 + slack, no overtime) for a fixed round
// budget and counts those that get a plan; each plan is checked by Verify.
// Every instance has a plan (the planted one).
func tightPlans(tb testing.TB, items, periods int, slack float64, seeds, rounds int) (found int) {
	for seed := 1; seed <= seeds; seed++ {
		in, err := planted(items, periods, 2, slack, uint64(seed))
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
	found := tightPlans(t, 6, 15, 0.02, 5, 40)
	t.Logf("planted 6x15, setup times x2, capacity 2%% above the planted load: %d of 5 with a plan in 40 rounds", found)
	if found < 3 {
		t.Errorf("only %d of 5 tight instances got a plan", found)
	}
}

// BenchmarkTightPlans reports the share of planted tight instances (20
// seeds per case) that get a plan without overtime in 200 rounds.
func BenchmarkTightPlans(b *testing.B) {
	for _, c := range []struct {
		name           string
		items, periods int
		slack          float64
	}{{"6x15-slack0", 6, 15, 0}, {"6x15-slack0.05", 6, 15, 0.05}, {"10x20-slack0", 10, 20, 0}, {"10x20-slack0.05", 10, 20, 0.05}} {
		b.Run(c.name, func(b *testing.B) {
			for k := 0; k < b.N; k++ {
				b.ReportMetric(float64(tightPlans(b, c.items, c.periods, c.slack, 20, 200))/20*100, "%-with-plan")
			}
		})
	}
}
