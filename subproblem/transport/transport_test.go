package transport

import (
	"errors"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"pgregory.net/rapid"
)

// genProblem draws a small transportation problem. Integer data with small
// ranges makes ties and degenerate bases common; decimal mode draws
// quantities with two decimals; forbidden lanes, zero supplies, zero
// demands and balanced totals all occur.
func genProblem(decimal bool) *rapid.Generator[*Problem] {
	return rapid.Custom(func(t *rapid.T) *Problem {
		m := rapid.IntRange(2, 8).Draw(t, "sites")
		n := rapid.IntRange(2, 12).Draw(t, "customers")
		forbid := rapid.SampledFrom([]float64{0, 0.1, 0.4}).Draw(t, "forbid")
		qty := func(label string, hi int) float64 {
			if decimal {
				return float64(rapid.IntRange(0, hi*100).Draw(t, label)) / 100
			}
			return float64(rapid.IntRange(0, hi).Draw(t, label))
		}
		p := &Problem{
			Supply: make([]float64, m),
			Demand: make([]float64, n),
			Cost:   make([][]float64, m),
		}
		for j := range n {
			p.Demand[j] = qty("demand", 20)
		}
		for i := range m {
			p.Supply[i] = qty("supply", 60)
			p.Cost[i] = make([]float64, n)
			for j := range n {
				if rapid.Float64Range(0, 1).Draw(t, "u") < forbid {
					p.Cost[i][j] = math.Inf(1)
				} else if decimal {
					p.Cost[i][j] = float64(rapid.IntRange(-200, 5000).Draw(t, "cost")) / 100
				} else {
					p.Cost[i][j] = float64(rapid.IntRange(0, 9).Draw(t, "cost"))
				}
			}
		}
		if rapid.Bool().Draw(t, "balanced") {
			// Make total supply equal total demand where possible.
			sd, ss := 0.0, 0.0
			for _, d := range p.Demand {
				sd += d
			}
			for _, s := range p.Supply[1:] {
				ss += s
			}
			p.Supply[0] = max(0, sd-ss)
		}
		return p
	})
}

func sum(xs []float64) float64 {
	t := 0.0
	for _, x := range xs {
		t += x
	}
	return t
}

// TestAgainstSimplex compares optimum and infeasibility with gonum's
// lp.Simplex (outside oracle) and, for infeasible problems, the reported
// shortfall with the oracle's maximum shippable amount.
func TestAgainstSimplex(t *testing.T) {
	for _, tc := range []struct {
		name    string
		decimal bool
	}{{"integer", false}, {"decimal", true}} {
		t.Run(tc.name, func(t *testing.T) {
			rapid.Check(t, func(rt *rapid.T) {
				p := genProblem(tc.decimal).Draw(rt, "problem")
				compareWithOracle(rt, p)
			})
		})
	}
}

// TestAgainstSimplexSeeded is the same comparison on a fixed, seeded set
// of 300 problems, so that every run covers the same ground.
func TestAgainstSimplexSeeded(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for k := range 300 {
		p := randomProblem(rng, 2+rng.IntN(7), 2+rng.IntN(11), k%3 == 0)
		compareWithOracle(t, p)
		if t.Failed() {
			t.Fatalf("problem %d: %+v", k, p)
		}
	}
}

func randomProblem(rng *rand.Rand, m, n int, decimal bool) *Problem {
	p := &Problem{Supply: make([]float64, m), Demand: make([]float64, n), Cost: make([][]float64, m)}
	forbid := []float64{0, 0.1, 0.4}[rng.IntN(3)]
	for j := range n {
		if rng.IntN(6) > 0 {
			p.Demand[j] = float64(rng.IntN(20))
			if decimal {
				p.Demand[j] += float64(rng.IntN(100)) / 100
			}
		}
	}
	for i := range m {
		if rng.IntN(6) > 0 {
			p.Supply[i] = float64(rng.IntN(60))
		}
		p.Cost[i] = make([]float64, n)
		for j := range n {
			switch {
			case rng.Float64() < forbid:
				p.Cost[i][j] = math.Inf(1)
			case decimal:
				p.Cost[i][j] = float64(rng.IntN(5000)) / 100
			default:
				p.Cost[i][j] = float64(rng.IntN(10))
			}
		}
	}
	if rng.IntN(2) == 0 {
		p.Supply[0] = max(0, sum(p.Demand)-sum(p.Supply[1:]))
	}
	return p
}

func compareWithOracle(t tester, p *Problem) {
	t.Helper()
	want, feasible, err := lpOptimum(p)
	if err != nil {
		// lp.Simplex can fail on degenerate data (singular bases); such
		// an instance cannot be judged.
		t.Logf("oracle failed, instance not judged: %v", err)
		return
	}
	sol, err := Solve(p)
	if !feasible {
		var ie *InfeasibleError
		if !errors.As(err, &ie) || !errors.Is(err, ErrInfeasible) {
			t.Fatalf("oracle says infeasible, Solve returned %v, %v", sol, err)
		}
		shipped, oerr := lpMaxShipped(p)
		if oerr != nil {
			t.Logf("shortfall oracle failed: %v", oerr)
			return
		}
		wantShort := sum(p.Demand) - shipped
		if math.Abs(ie.Shortfall-wantShort) > 1e-6*max(1, wantShort) {
			t.Fatalf("shortfall %g, oracle %g", ie.Shortfall, wantShort)
		}
		return
	}
	if err != nil {
		t.Fatalf("oracle optimum %g, Solve error %v", want, err)
	}
	if math.Abs(sol.Cost-want) > 1e-6*max(1, math.Abs(want)) {
		t.Fatalf("cost %g, oracle %g", sol.Cost, want)
	}
	checkSolution(t, p, sol)
}

// TestWarmStart changes supplies and demands step by step and compares
// each warm re-solve with a cold solve of the same problem and with the
// lp.Simplex oracle.
func TestWarmStart(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		p := genProblem(rapid.Bool().Draw(rt, "decimal")).Draw(rt, "problem")
		s, err := NewSolver(p)
		if err != nil {
			rt.Fatal(err)
		}
		steps := rapid.IntRange(1, 12).Draw(rt, "steps")
		for k := range steps {
			if k > 0 {
				if rapid.Bool().Draw(rt, "site") {
					i := rapid.IntRange(0, len(p.Supply)-1).Draw(rt, "i")
					v := rapid.SampledFrom([]float64{0, 0, p.Supply[i] + 7, p.Supply[i] / 2, 30}).Draw(rt, "s")
					p.Supply[i] = v
					if err := s.SetSupply(i, v); err != nil {
						rt.Fatal(err)
					}
				} else {
					j := rapid.IntRange(0, len(p.Demand)-1).Draw(rt, "j")
					v := rapid.SampledFrom([]float64{0, p.Demand[j] + 3, p.Demand[j] / 2, 12.5}).Draw(rt, "d")
					p.Demand[j] = v
					if err := s.SetDemand(j, v); err != nil {
						rt.Fatal(err)
					}
				}
			}
			warm, werr := s.Solve()
			cold, cerr := Solve(p)
			if (werr == nil) != (cerr == nil) {
				rt.Fatalf("step %d: warm error %v, cold error %v", k, werr, cerr)
			}
			if cerr != nil {
				var we, ce *InfeasibleError
				if !errors.As(werr, &we) || !errors.As(cerr, &ce) {
					rt.Fatalf("step %d: unexpected errors %v, %v", k, werr, cerr)
				}
				if math.Abs(we.Shortfall-ce.Shortfall) > 1e-6*max(1, ce.Shortfall) {
					rt.Fatalf("step %d: shortfall warm %g cold %g", k, we.Shortfall, ce.Shortfall)
				}
				continue
			}
			if math.Abs(warm.Cost-cold.Cost) > 1e-9*max(1, math.Abs(cold.Cost)) {
				rt.Fatalf("step %d: warm cost %g, cold cost %g", k, warm.Cost, cold.Cost)
			}
			checkSolution(rt, p, warm)
			if want, ok, err := lpOptimum(p); err == nil && ok && math.Abs(want-warm.Cost) > 1e-6*max(1, math.Abs(want)) {
				rt.Fatalf("step %d: warm cost %g, oracle %g", k, warm.Cost, want)
			}
		}
	})
}

// TestInvalidInput checks that bad input gives an error, never a panic.
func TestInvalidInput(t *testing.T) {
	inf, nan := math.Inf(1), math.NaN()
	for name, p := range map[string]*Problem{
		"nil":            nil,
		"rows":           {Supply: []float64{1, 2}, Demand: []float64{1}, Cost: [][]float64{{1}}},
		"row length":     {Supply: []float64{1}, Demand: []float64{1, 1}, Cost: [][]float64{{1}}},
		"negative":       {Supply: []float64{-1}, Demand: []float64{1}, Cost: [][]float64{{1}}},
		"NaN demand":     {Supply: []float64{1}, Demand: []float64{nan}, Cost: [][]float64{{1}}},
		"infinite":       {Supply: []float64{inf}, Demand: []float64{1}, Cost: [][]float64{{1}}},
		"NaN cost":       {Supply: []float64{1}, Demand: []float64{1}, Cost: [][]float64{{nan}}},
		"-Inf cost":      {Supply: []float64{1}, Demand: []float64{1}, Cost: [][]float64{{-inf}}},
		"negative deman": {Supply: []float64{1}, Demand: []float64{-2}, Cost: [][]float64{{1}}},
	} {
		if _, err := Solve(p); err == nil || errors.Is(err, ErrInfeasible) {
			t.Errorf("%s: got %v, want an input error", name, err)
		}
	}
	s, err := NewSolver(&Problem{Supply: []float64{1}, Demand: []float64{1}, Cost: [][]float64{{1}}})
	if err != nil {
		t.Fatal(err)
	}
	for _, err := range []error{s.SetSupply(1, 1), s.SetSupply(-1, 1), s.SetSupply(0, nan), s.SetDemand(1, 0), s.SetDemand(0, -1)} {
		if err == nil {
			t.Error("bad SetSupply/SetDemand accepted")
		}
	}
}

// TestEdgeCases covers empty problems and infeasibility caused by
// forbidden lanes (the shortfall is worked out by hand beside each case).
func TestEdgeCases(t *testing.T) {
	inf := math.Inf(1)
	sol, err := Solve(&Problem{})
	if err != nil || sol.Cost != 0 || len(sol.Shipments) != 0 {
		t.Errorf("empty problem: %v, %v", sol, err)
	}
	sol, err = Solve(&Problem{Supply: []float64{3, 0}, Cost: [][]float64{{}, {}}})
	if err != nil || sol.Cost != 0 {
		t.Errorf("no customers: %v, %v", sol, err)
	}
	// Customer 1 can only be served by site 1, which holds 4 of its 10:
	// short by 6 although total supply 24 exceeds total demand 15.
	p := &Problem{
		Supply: []float64{20, 4},
		Demand: []float64{5, 10},
		Cost:   [][]float64{{1, inf}, {1, 1}},
	}
	_, err = Solve(p)
	var ie *InfeasibleError
	if !errors.As(err, &ie) || math.Abs(ie.Shortfall-6) > 1e-9 {
		t.Fatalf("got %v, want shortfall 6", err)
	}
	if !strings.Contains(err.Error(), "short by 6") {
		t.Errorf("message %q does not give the shortfall", err)
	}
	// Reopening the lane through a Solver built from the same data makes
	// it feasible: cost 5 + 10 = 15 (site 0 ships 5+6, site 1 ships 4).
	p.Cost[0][1] = 1
	sol, err = Solve(p)
	if err != nil || math.Abs(sol.Cost-15) > 1e-9 {
		t.Errorf("got %v, %v; want cost 15", sol, err)
	}
}

// TestNoPanicOnAnyFloat feeds arbitrary floats, including NaN, ±Inf and
// negatives, and requires an error or a checked solution.
func TestNoPanicOnAnyFloat(t *testing.T) {
	anyFloat := rapid.SampledFrom([]float64{0, 1, 2.5, 7, -1, math.NaN(), math.Inf(1), math.Inf(-1), 1e-300, 1e9})
	rapid.Check(t, func(rt *rapid.T) {
		m := rapid.IntRange(0, 4).Draw(rt, "m")
		n := rapid.IntRange(0, 4).Draw(rt, "n")
		p := &Problem{
			Supply: rapid.SliceOfN(anyFloat, m, m).Draw(rt, "supply"),
			Demand: rapid.SliceOfN(anyFloat, n, n).Draw(rt, "demand"),
		}
		for range m {
			p.Cost = append(p.Cost, rapid.SliceOfN(anyFloat, n, n).Draw(rt, "cost"))
		}
		sol, err := Solve(p)
		if err == nil {
			checkSolution(rt, p, sol)
		}
	})
}

// TestSkipDuals checks that SkipDuals changes nothing but the duals.
func TestSkipDuals(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for range 50 {
		p := randomProblem(rng, 2+rng.IntN(7), 2+rng.IntN(11), false)
		want, werr := Solve(p)
		s, err := NewSolver(p)
		if err != nil {
			t.Fatal(err)
		}
		s.SkipDuals = true
		got, gerr := s.Solve()
		if (werr == nil) != (gerr == nil) {
			t.Fatalf("errors differ: %v, %v", werr, gerr)
		}
		if werr != nil {
			continue
		}
		if got.Cost != want.Cost || len(got.Shipments) != len(want.Shipments) || got.SiteDual != nil || got.CustomerDual != nil {
			t.Fatalf("SkipDuals: %+v, plain: %+v", got, want)
		}
	}
}
