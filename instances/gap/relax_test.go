package gap

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"pgregory.net/rapid"

	"pincer/decomp"
	"pincer/heuristics"
)

// bruteForce enumerates every feasible assignment of a tiny instance: the
// outside reference for the bound checks (weak duality, common practice:
// any feasible point's value lies beyond every Lagrangian bound).
func bruteForce(in *Instance, maximise bool) (best int64, ok bool) {
	load := make([]int64, in.Agents)
	var rec func(j int, v int64)
	rec = func(j int, v int64) {
		if j == in.Jobs {
			if !ok || (maximise && v > best) || (!maximise && v < best) {
				best, ok = v, true
			}
			return
		}
		for i := 0; i < in.Agents; i++ {
			if load[i]+in.Use[i][j] <= in.Capacity[i] {
				load[i] += in.Use[i][j]
				rec(j+1, v+in.Cost[i][j])
				load[i] -= in.Use[i][j]
			}
		}
	}
	rec(0, 0)
	return best, ok
}

func randomTiny(rng *rand.Rand) *Instance {
	m := 2 + rng.IntN(3)
	n := 4 + rng.IntN(6)
	in := &Instance{Name: "tiny", Agents: m, Jobs: n, Cost: make([][]int64, m), Use: make([][]int64, m), Capacity: make([]int64, m)}
	for i := 0; i < m; i++ {
		in.Cost[i] = make([]int64, n)
		in.Use[i] = make([]int64, n)
		var sum int64
		for j := 0; j < n; j++ {
			in.Cost[i][j] = int64(rng.IntN(30))
			in.Use[i][j] = int64(1 + rng.IntN(12))
			sum += in.Use[i][j]
		}
		// From loose to very tight (often infeasible).
		in.Capacity[i] = int64(float64(sum) * (0.2 + 0.8*rng.Float64()) * 2 / float64(m))
	}
	return in
}

func randomPrices(rng *rand.Rand, p *decomp.Problem) []float64 {
	prices := make([]float64, len(p.Rows))
	for r, row := range p.Rows {
		mag := rng.Float64() * 40
		switch decomp.PriceSign(p.Sense, row.Sense) {
		case 1:
			prices[r] = mag
		case -1:
			prices[r] = -mag
		default:
			prices[r] = mag - 20
		}
	}
	return prices
}

// checkTiny runs the weak-duality checks on one instance and returns a
// description of the first failure.
// fataler is what checkTiny needs of testing.T and rapid.T.
type fataler interface {
	Fatalf(string, ...any)
	Fatal(...any)
}

func checkTiny(t fataler, in *Instance, maximise bool, relax Relaxation, rng *rand.Rand) {
	opt, feasible := bruteForce(in, maximise)
	p, err := NewProblem(in, Options{Maximise: maximise, Relaxation: relax,
		Improve: heuristics.ImproveSettings{Moves: 60, Stall: 20}, FinalImprove: heuristics.ImproveSettings{Moves: 200, Stall: 50}})
	if err != nil {
		// Only a job that fits no agent is refused; then no plan exists.
		if feasible {
			t.Fatalf("NewProblem refused a feasible instance: %v", err)
		}
		return
	}
	valid := func(b float64) bool {
		if !feasible {
			return true
		}
		if maximise {
			return b >= float64(opt)-1e-7
		}
		return b <= float64(opt)+1e-7
	}
	for k := 0; k < 3; k++ {
		prices := randomPrices(rng, p)
		l, _, err := decomp.Relaxed(context.Background(), p, prices, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !valid(l) {
			t.Fatalf("%s/%s: L=%v at random prices passes the optimum %d\n%+v", relax, sense(maximise), l, opt, in)
		}
	}
	var bad *decomp.RoundRecord
	obs := decomp.ObserverFunc(func(pr *decomp.Progress) {
		if bad == nil && (!valid(pr.Record.Value) || !valid(pr.Record.Bound)) {
			r := pr.Record
			bad = &r
		}
	})
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 25, Observer: obs, RepairEvery: 3, Evaluator: decomp.Pool{Workers: 1}})
	if err != nil {
		t.Fatal(err)
	}
	if bad != nil {
		t.Fatalf("%s/%s: round %d: L=%v bound=%v passes the optimum %d\n%+v", relax, sense(maximise), bad.Round, bad.Value, bad.Bound, opt, in)
	}
	if res.Plan != nil {
		if !feasible {
			t.Fatalf("plan for an infeasible instance")
		}
		v := Verify(in, res.Plan.Detail.([]int), maximise)
		if !v.Feasible || float64(v.Value) != res.Plan.Value {
			t.Fatalf("plan infeasible or misvalued: %+v vs %v", v, res.Plan.Value)
		}
		if (maximise && v.Value > opt) || (!maximise && v.Value < opt) {
			t.Fatalf("plan %d beats the optimum %d", v.Value, opt)
		}
		if res.ProvedOptimal && v.Value != opt {
			t.Fatalf("proof claimed for %d, optimum %d", v.Value, opt)
		}
	}
}

func sense(maximise bool) string {
	if maximise {
		return "max"
	}
	return "min"
}

// TestWeakDualityTiny runs 10,000 random tiny instances (2-4 agents, 4-9
// jobs) over both senses and both relaxations against brute force.
func TestWeakDualityTiny(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	cases := 10000
	if testing.Short() {
		cases = 1000
	}
	for c := 0; c < cases; c++ {
		in := randomTiny(rng)
		checkTiny(t, in, c%2 == 1, Relaxation((c/2)%2), rng)
	}
}

// TestWeakDualityRapid is the same check with shrinking on failure.
func TestWeakDualityRapid(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		seed := rapid.Uint64().Draw(rt, "seed")
		rng := rand.New(rand.NewPCG(seed, 3))
		in := randomTiny(rng)
		checkTiny(rt, in, rapid.Bool().Draw(rt, "max"), Relaxation(rapid.IntRange(0, 1).Draw(rt, "relax")), rng)
	})
}

func TestStartPricesAreFiniteAndBoundValid(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for c := 0; c < 200; c++ {
		in := randomTiny(rng)
		for _, mx := range []bool{false, true} {
			p, err := NewProblem(in, Options{Maximise: mx})
			if err != nil {
				continue
			}
			for _, v := range p.Prices {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					t.Fatalf("start price %v", v)
				}
			}
		}
	}
}
