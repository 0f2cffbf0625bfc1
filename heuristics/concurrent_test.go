package heuristics

import (
	"context"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestRepairBesideBoundsSameState: the Searcher's one allowed overlap
// (Repair on one goroutine, AddItemPrices and Restrict on another) leaves
// the searcher as running them one after the other does: the same
// constructed plan, the same pair bounds and the same improved plan from
// the restricted search. Run it with -race to see that the two touch
// disjoint state.
func TestRepairBesideBoundsSameState(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := 0; trial < 4; trial++ {
		m, n := 5+trial, 60+20*trial
		p := &Assignment{Capacity: make([]float64, m), Maximise: trial%2 == 1}
		for i := 0; i < m; i++ {
			c, w := make([]float64, n), make([]float64, n)
			sum := 0.0
			for j := 0; j < n; j++ {
				w[j] = float64(1 + rng.IntN(25))
				c[j] = float64(10 + rng.IntN(40))
				sum += w[j]
			}
			p.Cost, p.Weight = append(p.Cost, c), append(p.Weight, w)
			p.Capacity[i] = 0.85 * sum / float64(m)
		}
		sign := 1.0
		if p.Maximise {
			sign = -1
		}
		prices := make([]float64, n)
		values := make([]float64, m)
		for j := range prices {
			prices[j] = sign * -float64(20+rng.IntN(10))
		}
		for i := range values {
			// below (above, maximising) every knapsack's optimum: weak
			// but valid bounds
			values[i] = sign * -60 * float64(n)
		}
		priced := make([][]float64, m)
		for i := range priced {
			priced[i] = make([]float64, n)
			for j := range priced[i] {
				priced[i][j] = p.Cost[i][j] + prices[j]
			}
		}
		type outcome struct {
			start, improved []int
			with, without   []float64
		}
		run := func(parallel bool) outcome {
			sr, err := NewSearcher(p)
			if err != nil {
				t.Fatal(err)
			}
			incumbent, ok := sr.Repair(context.Background(), nil, nil, rand.New(rand.NewPCG(1, 2)))
			if !ok {
				t.Fatalf("trial %d: no first plan", trial)
			}
			value, _ := p.Evaluate(incumbent)
			var start []int
			var bookErr error
			book := func() {
				if _, bookErr = sr.AddItemPrices(prices, values); bookErr == nil {
					sr.Restrict(incumbent, value, 1)
				}
			}
			rngRepair := rand.New(rand.NewPCG(3, 4))
			if parallel {
				done := make(chan struct{})
				go func() { defer close(done); book() }()
				start, ok = sr.Repair(context.Background(), nil, priced, rngRepair)
				<-done
			} else {
				start, ok = sr.Repair(context.Background(), nil, priced, rngRepair)
				book()
			}
			if bookErr != nil {
				t.Fatal(bookErr)
			}
			if !ok {
				t.Fatalf("trial %d: no priced plan", trial)
			}
			improved, _ := sr.Improve(context.Background(), start, ImproveSettings{Moves: 200}, rand.New(rand.NewPCG(5, 6)))
			o := outcome{start: start, improved: improved}
			for j := 0; j < n; j++ {
				for i := 0; i < m; i++ {
					w, wo := sr.PairBound(i, j)
					o.with, o.without = append(o.with, w), append(o.without, wo)
				}
			}
			return o
		}
		a, b := run(false), run(true)
		if !slices.Equal(a.start, b.start) || !slices.Equal(a.improved, b.improved) ||
			!slices.Equal(a.with, b.with) || !slices.Equal(a.without, b.without) {
			t.Fatalf("trial %d: side by side differs from one after the other", trial)
		}
	}
}
