package heuristics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// knapsackValue solves resource i's priced knapsack of a tiny instance by
// enumerating every subset of the items (the brute-force reference of the
// pair bounds): min (max when maximising) Σ (cost + price) x within the
// capacity.
func knapsackValue(p *Assignment, i int, prices []float64) (float64, []bool) {
	_, n := p.Size()
	best := 0.0
	var take []bool
	for mask := 0; mask < 1<<n; mask++ {
		w, v := 0.0, 0.0
		ok := true
		for j := 0; j < n; j++ {
			if mask&(1<<j) == 0 {
				continue
			}
			if math.IsInf(p.Cost[i][j], 0) {
				ok = false
				break
			}
			w += p.Weight[i][j]
			v += p.Cost[i][j] + prices[j]
		}
		if !ok || w > p.Capacity[i] {
			continue
		}
		if take == nil || (p.Maximise && v > best) || (!p.Maximise && v < best) {
			best = v
			take = make([]bool, n)
			for j := range take {
				take[j] = mask&(1<<j) != 0
			}
		}
	}
	return best, take
}

// allPlans calls f for every feasible assignment of a tiny instance.
func allPlans(p *Assignment, f func(asg []int, v float64)) {
	m, n := p.Size()
	asg := make([]int, n)
	var rec func(j int)
	rec = func(j int) {
		if j == n {
			if v, ok := p.Evaluate(asg); ok {
				f(asg, v)
			}
			return
		}
		for i := 0; i < m; i++ {
			asg[j] = i
			rec(j + 1)
		}
	}
	rec(0)
}

func tinyAssignment(rng *rand.Rand, maximise bool) *Assignment {
	m, n := 2+rng.IntN(2), 3+rng.IntN(5)
	p := &Assignment{Maximise: maximise, Capacity: make([]float64, m)}
	for i := 0; i < m; i++ {
		c, w := make([]float64, n), make([]float64, n)
		sum := 0.0
		for j := 0; j < n; j++ {
			c[j] = float64(rng.IntN(30))
			w[j] = float64(1 + rng.IntN(12))
			if rng.IntN(15) == 0 {
				c[j] = math.Inf(1)
			}
			sum += w[j]
		}
		p.Cost = append(p.Cost, c)
		p.Weight = append(p.Weight, w)
		p.Capacity[i] = math.Floor(sum * (0.4 + 0.5*rng.Float64()) * 2 / float64(m))
	}
	return p
}

// TestPairBoundsBruteForce checks the reduced-cost bounds and fixings
// against brute force on random tiny instances in both senses: every
// feasible plan is worth at least (at most, maximising) the recorded bound
// of each pair it uses and of each pair it avoids, the relaxation never
// passes the optimum, and Restrict against an incumbent one unit worse than
// the optimum leaves some optimal plan allowed and proves nothing. Prices
// come from a few subgradient steps, with exact knapsack values found by
// enumeration, so that the bounds get tight enough to forbid pairs.
func TestPairBoundsBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	forbidden, fixed := 0, 0
	for trial := 0; trial < 300; trial++ {
		maximise := trial%2 == 1
		p := tinyAssignment(rng, maximise)
		m, n := p.Size()
		opt, have := 0.0, false
		allPlans(p, func(_ []int, v float64) {
			if !have || (maximise && v > opt) || (!maximise && v < opt) {
				opt, have = v, true
			}
		})
		if !have {
			continue
		}
		sr, err := NewSearcher(p)
		if err != nil {
			t.Fatal(err)
		}
		sign := 1.0
		if maximise {
			sign = -1
		}
		prices := make([]float64, n)
		for j := range prices {
			prices[j] = sign * (-10 - float64(rng.IntN(20)))
		}
		values := make([]float64, m)
		for it := 0; it < 12; it++ {
			sub := make([]float64, n)
			for i := 0; i < m; i++ {
				v, take := knapsackValue(p, i, prices)
				values[i] = v
				for j, tk := range take {
					if tk {
						sub[j]++
					}
				}
			}
			L, err := sr.AddItemPrices(prices, values)
			if err != nil {
				t.Fatal(err)
			}
			if sign*L > sign*opt+1e-9 {
				t.Fatalf("trial %d: bound %v passes the optimum %v", trial, L, opt)
			}
			step := 8.0 / float64(it+1)
			for j := range prices {
				// minimising, a price rises where the row is short of 1
				prices[j] += sign * step * (1 - sub[j])
			}
		}
		allPlans(p, func(asg []int, v float64) {
			for i := 0; i < m; i++ {
				for j := 0; j < n; j++ {
					with, without := sr.PairBound(i, j)
					b := without
					if asg[j] == i {
						b = with
					}
					if sign*b > sign*v+1e-9 {
						t.Fatalf("trial %d: plan %v worth %v, but the bound of pair (%d,%d) used=%v is %v", trial, asg, v, i, j, asg[j] == i, b)
					}
				}
			}
		})
		// an incumbent one unit off the optimum: the optimum improves on it
		_, proved := sr.Restrict(nil, opt+sign, 1)
		if proved {
			t.Fatalf("trial %d: restriction claims no plan better than %v, but the optimum is %v", trial, opt+sign, opt)
		}
		found := false
		allPlans(p, func(asg []int, v float64) {
			if v != opt {
				return
			}
			for j, i := range asg {
				if !sr.Allowed(i, j) {
					return
				}
			}
			found = true
		})
		if !found {
			t.Fatalf("trial %d: every optimal plan (value %v) uses a forbidden pair", trial, opt)
		}
		for j := 0; j < n; j++ {
			left := 0
			for i := 0; i < m; i++ {
				if !math.IsInf(p.Cost[i][j], 0) && !sr.Allowed(i, j) {
					forbidden++
				}
				if sr.Allowed(i, j) {
					left++
				}
			}
			if left == 1 {
				fixed++
			}
		}
	}
	t.Logf("pairs forbidden %d, items left with one resource %d", forbidden, fixed)
	if forbidden == 0 {
		t.Fatal("no pair was ever forbidden: the check is vacuous")
	}
}
