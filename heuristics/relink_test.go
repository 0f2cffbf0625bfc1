package heuristics

import (
	"context"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestPlanSearchNeverWorseAndWorkerFree: on random instances PlanSearch
// returns a feasible plan that is never worse than the best plan offered to
// its pool, and the same plan whether its tasks run on 1 or 3 goroutines,
// with and without a restriction from pair bounds and narrowed tasks (whose
// move budgets then differ), on instances small enough for the tabu search
// alone and large enough for the iterated local search.
func TestPlanSearchNeverWorseAndWorkerFree(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	for trial := 0; trial < 8; trial++ {
		m, n, moves := 6+trial, 40+10*trial, 300
		if trial >= 6 {
			n, moves = fullWindow+60, 1500 // past fullWindow: tabu and iterated local search
		}
		p := &Assignment{Capacity: make([]float64, m), Maximise: trial%3 == 2 || trial == 7}
		for i := 0; i < m; i++ {
			c, w := make([]float64, n), make([]float64, n)
			sum := 0.0
			for j := 0; j < n; j++ {
				w[j] = float64(1 + rng.IntN(30))
				c[j] = float64(rng.IntN(50))
				sum += w[j]
			}
			p.Cost, p.Weight = append(p.Cost, c), append(p.Weight, w)
			p.Capacity[i] = 0.9 * sum / float64(m)
		}
		var first []int
		var firstValue float64
		for _, workers := range []int{1, 3} {
			sr, err := NewSearcher(p)
			if err != nil {
				t.Fatal(err)
			}
			start, ok := sr.Repair(context.Background(), nil, nil, rand.New(rand.NewPCG(1, 1)))
			if !ok {
				t.Fatalf("trial %d: no start plan", trial)
			}
			sr.Offer(start)
			second, _ := sr.Improve(context.Background(), start, ImproveSettings{Moves: -1, PairNodes: -1}, rand.New(rand.NewPCG(2, 2)))
			sr.Offer(second)
			offered, _ := p.Evaluate(start)
			if v, _ := p.Evaluate(second); (p.Maximise && v > offered) || (!p.Maximise && v < offered) {
				offered = v
			}
			st := SearchSettings{Moves: moves, Rounds: 2, Tasks: 2, Workers: workers}
			if trial%2 == 1 {
				// Pair bounds from knapsack values below (above, when
				// maximising) every knapsack's optimum: they only weaken
				// the bounds, which stay valid, and give the ranking that
				// narrows the tasks.
				prices := make([]float64, n)
				for j := range prices {
					prices[j] = -60
					if p.Maximise {
						prices[j] = 60
					}
				}
				values := make([]float64, m)
				for i := range values {
					values[i] = -60 * float64(n) // below every knapsack value
					if p.Maximise {
						values[i] = 60 * float64(n)
					}
				}
				if _, err := sr.AddItemPrices(prices, values); err != nil {
					t.Fatal(err)
				}
				sr.Restrict(second, offered, 1)
				st.Focus = []int{2, 4}
			}
			got, v, ok := sr.PlanSearch(context.Background(), st, 9)
			if !ok {
				t.Fatalf("trial %d: no plan", trial)
			}
			if w, feas := p.Evaluate(got); !feas || w != v {
				t.Fatalf("trial %d: plan infeasible or value %v != %v", trial, w, v)
			}
			if (p.Maximise && v < offered) || (!p.Maximise && v > offered) {
				t.Fatalf("trial %d: plan %v worse than the offered %v", trial, v, offered)
			}
			if first == nil {
				first, firstValue = got, v
			} else if v != firstValue || !slices.Equal(got, first) {
				t.Fatalf("trial %d: %d workers give %v, 1 worker %v", trial, workers, v, firstValue)
			}
		}
	}
}
