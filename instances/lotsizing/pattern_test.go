package lotsizing

import (
	"math"
	"math/rand/v2"
	"testing"
)

// The repair prices a setup pattern by a min-cost flow; the oracle is
// gonum's simplex on the production LP of the same pattern
// (patternOptimum), for every pattern of random tiny instances, with unit
// times 0, 1 or 2, setup times, initial stock and per-period overtime
// costs (or none, priced by the repair's large penalty).
func TestPatternSolveMatchesLP(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 1996))
	for trial := 0; trial < 40; trial++ {
		in := tinyInstance(r, false)
		in.Items[0].UnitTime = float64(r.IntN(3))
		T := in.Periods()
		overtime := make([]float64, T)
		pen := make([]float64, T)
		for t := range overtime {
			overtime[t], pen[t] = -1, 1e6
			if trial%2 == 1 {
				overtime[t] = float64(r.IntN(5))
				pen[t] = overtime[t]
			}
		}
		p := newPattern(in, pen, overtime)
		s := newPatternSearch(p, 1)
		n := len(in.Items)
		for mask := 0; mask < 1<<(n*T); mask++ {
			on := func(i, t int) bool { return mask>>(i*T+t)&1 == 1 }
			for i := range s.y {
				for u := range s.y[i] {
					s.y[i][u] = on(i, u)
				}
			}
			got := p.solve(s.y, s.x)
			want := patternOptimum(in, overtime, on)
			if math.IsInf(want, 1) {
				if !math.IsInf(got, 1) && got < 1e5 {
					t.Fatalf("trial %d mask %b: flow %v for an infeasible pattern", trial, mask, got)
				}
				continue
			}
			if math.Abs(got-want) > 1e-6*math.Max(1, want) {
				t.Fatalf("trial %d mask %b: flow %v, LP %v", trial, mask, got, want)
			}
			// The flow's production is a plan of that cost or less (unused
			// setups are not paid by the plan).
			ot := overtime
			if trial%2 == 0 {
				ot = nil
			}
			sch := scheduleOf(in, s.x, overtimeOrNone(ot, T))
			if sch == nil {
				t.Fatalf("trial %d mask %b: flow production is no plan", trial, mask)
			}
			if err := Verify(in, sch, ot); err != nil {
				t.Fatalf("trial %d mask %b: %v", trial, mask, err)
			}
			if sch.Cost > got+1e-6*math.Max(1, got) {
				t.Fatalf("trial %d mask %b: plan %v above the flow's %v", trial, mask, sch.Cost, got)
			}
		}
	}
}

func overtimeOrNone(ot []float64, T int) []float64 {
	if ot != nil {
		return ot
	}
	none := make([]float64, T)
	for t := range none {
		none[t] = -1
	}
	return none
}
