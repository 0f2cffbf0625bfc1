package lotsizing

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"

	"pincer/decomp"
)

// bruteOptimum enumerates every setup pattern and solves the remaining
// production LP with gonum's simplex (an outside oracle), returning the
// optimum or +Inf when no plan exists. Independent of the blocks and repair.
func bruteOptimum(in *Instance, overtime []float64) float64 {
	n, T := len(in.Items), in.Periods()
	best := math.Inf(1)
	for mask := 0; mask < 1<<(n*T); mask++ {
		on := func(i, t int) bool { return mask>>(i*T+t)&1 == 1 }
		best = math.Min(best, patternOptimum(in, overtime, on))
	}
	return best
}

// patternOptimum is the cheapest plan with exactly the setups on (setup
// costs paid for every setup), by gonum's simplex on the production LP;
// +Inf when the LP is infeasible.
func patternOptimum(in *Instance, overtime []float64, on func(i, t int) bool) float64 {
	n, T := len(in.Items), in.Periods()
	{
		// columns: x_it (only when set up), s_it, slack_t, overtime_t
		type col struct {
			cost float64
			rows map[int]float64
		}
		var cols []col
		setupCost := 0.0
		capRHS := append([]float64(nil), in.Capacity...)
		for i, it := range in.Items {
			for t := 0; t < T; t++ {
				if on(i, t) {
					setupCost += it.SetupCost
					capRHS[t] -= it.SetupTime
					cols = append(cols, col{0, map[int]float64{i*T + t: 1, n*T + t: it.UnitTime}})
				}
				c := col{it.Holding, map[int]float64{i*T + t: -1}}
				if t+1 < T {
					c.rows[i*T+t+1] = 1
				}
				cols = append(cols, c)
			}
		}
		for t := 0; t < T; t++ {
			cols = append(cols, col{0, map[int]float64{n*T + t: 1}})
			if overtime[t] >= 0 {
				cols = append(cols, col{overtime[t], map[int]float64{n*T + t: -1}})
			}
		}
		m := n*T + T
		A := mat.NewDense(m, len(cols), nil)
		c := make([]float64, len(cols))
		for j, cl := range cols {
			c[j] = cl.cost
			for r, v := range cl.rows {
				A.Set(r, j, v)
			}
		}
		b := make([]float64, m)
		for i, it := range in.Items {
			for t := 0; t < T; t++ {
				b[i*T+t] = in.Demand[i][t]
			}
			b[i*T] -= it.InitialStock
		}
		copy(b[n*T:], capRHS)
		// The simplex wants b >= 0: negate rows with negative rhs.
		for r := 0; r < m; r++ {
			if b[r] < 0 {
				b[r] = -b[r]
				for j := range cols {
					A.Set(r, j, -A.At(r, j))
				}
			}
		}
		v, _, err := lp.Simplex(c, A, b, 1e-10, nil)
		if err != nil {
			return math.Inf(1) // infeasible pattern (gonum reports it as an error)
		}
		return v + setupCost
	}
}

func tinyInstance(r *rand.Rand, overtime bool) *Instance {
	n, T := 2, 3
	in := &Instance{Name: "tiny", Capacity: make([]float64, T)}
	for i := 0; i < n; i++ {
		in.Items = append(in.Items, Item{Name: string(rune('a' + i)), UnitTime: float64(1 + r.IntN(2)), SetupTime: float64(r.IntN(3)), SetupCost: float64(r.IntN(10)), Holding: float64(r.IntN(3)), InitialStock: float64(r.IntN(2))})
		d := make([]float64, T)
		for t := range d {
			d[t] = float64(r.IntN(3))
		}
		in.Demand = append(in.Demand, d)
	}
	for t := range in.Capacity {
		in.Capacity[t] = float64(2 + r.IntN(6))
	}
	if overtime {
		in.OvertimeCost = []float64{float64(r.IntN(5)), -1, float64(r.IntN(5))}
	}
	return in
}

// Weak duality: L(λ) at random sign-valid prices and the bound of a run
// never exceed the brute-force optimum; the plan never goes below it.
func TestWeakDualityBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 1974))
	ctx := context.Background()
	for trial := 0; trial < 60; trial++ {
		in := tinyInstance(r, trial%2 == 1)
		oc := overtimeCosts(in, Options{})
		opt := bruteOptimum(in, oc)
		p, err := NewProblem(in, Options{})
		if err != nil {
			t.Fatal(err)
		}
		if math.IsInf(opt, 1) {
			continue
		}
		for k := 0; k < 5; k++ {
			prices := make([]float64, in.Periods())
			for i := range prices {
				prices[i] = float64(r.IntN(8)) / 2
			}
			l, _, err := decomp.Relaxed(ctx, p, prices, decomp.Pool{})
			if err != nil {
				t.Fatal(err)
			}
			if l > opt+1e-9 {
				t.Fatalf("trial %d: L(%v) = %v above the optimum %v", trial, prices, l, opt)
			}
		}
		res, err := decomp.Solve(ctx, p, decomp.Settings{Rounds: 60})
		if err != nil {
			t.Fatal(err)
		}
		if res.Bound > opt+1e-9 {
			t.Fatalf("trial %d: bound %v above the optimum %v", trial, res.Bound, opt)
		}
		if res.Plan != nil {
			if res.Plan.Value < opt-1e-9 {
				t.Fatalf("trial %d: plan %v below the optimum %v", trial, res.Plan.Value, opt)
			}
			if err := Verify(in, res.Plan.Detail.(*Schedule), oc); err != nil {
				t.Fatalf("trial %d: %v", trial, err)
			}
		} else if !math.IsInf(opt, 1) && trial%2 == 1 {
			t.Errorf("trial %d: overtime variant without a plan", trial)
		}
	}
}
