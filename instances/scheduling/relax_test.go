package scheduling

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
)

// tinyInstance draws a small instance: 1 or 2 classes (1-2 machines in
// all when two is set), release dates, eligibility lists and either
// objective.
func tinyInstance(rng *rand.Rand, n int, two bool) *Instance {
	in := &Instance{Name: "tiny", Objective: Objective(rng.IntN(2))}
	switch {
	case !two:
		in.Classes = []Class{{ID: "A", Machines: 1}}
	case rng.IntN(2) == 0:
		in.Classes = []Class{{ID: "A", Machines: 2}}
	default:
		in.Classes = []Class{{ID: "A", Machines: 1}, {ID: "B", Machines: 1}}
	}
	for j := range n {
		jb := Job{ID: fmt.Sprint(j + 1), Processing: 1 + rng.IntN(4), Weight: rng.IntN(5), Due: rng.IntN(8)}
		if rng.IntN(2) == 0 {
			jb.Release = rng.IntN(5)
		}
		if len(in.Classes) == 2 && rng.IntN(3) == 0 {
			jb.Eligible = []int{rng.IntN(2)}
		}
		in.Jobs = append(in.Jobs, jb)
	}
	return in
}

// startWindow is a start window [lo, hi] and a fixed class (-1: free).
type startWindow struct{ lo, hi, class int }

// bruteForce is the optimum over every assignment of jobs to machines and
// every order on each machine, each job started as early as its release,
// its window and its machine allow (optimal for a fixed order, since both
// objectives are regular). With horizons set, schedules that complete a
// job past its class's horizon are left out. It returns +Inf when nothing
// is feasible. Source of truth for the relaxation and repair checks.
func bruteForce(in *Instance, win []startWindow, horizons []int) float64 {
	var mcls []int
	for k, c := range in.Classes {
		for range c.Machines {
			mcls = append(mcls, k)
		}
	}
	n := len(in.Jobs)
	used := make([]bool, n)
	best := math.Inf(1)
	var dfs func(g, t, done int, cost float64)
	dfs = func(g, t, done int, cost float64) {
		if cost >= best {
			return
		}
		if done == n {
			best = cost
			return
		}
		if g+1 < len(mcls) {
			dfs(g+1, 0, done, cost)
		}
		k := mcls[g]
		for j, jb := range in.Jobs {
			if used[j] || !in.EligibleOn(j, k) {
				continue
			}
			st := max(t, jb.Release)
			if win != nil {
				if win[j].class >= 0 && win[j].class != k {
					continue
				}
				st = max(st, win[j].lo)
				if st > win[j].hi {
					continue
				}
			}
			c := st + jb.Processing
			if horizons != nil && c > horizons[k] {
				continue
			}
			used[j] = true
			dfs(g, c, done+1, cost+float64(in.Cost(j, c)))
			used[j] = false
		}
	}
	dfs(0, 0, 0, 0)
	return best
}

// TestWeakDuality: at random non-negative slot prices, under random
// fixings of a job's class and start window, the relaxation never exceeds
// the brute-force optimum of the time-indexed model under the same
// fixings; without fixings that optimum is the unrestricted one (the
// horizons of Instance.Horizons lose nothing).
func TestWeakDuality(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 1))
	ctx := context.Background()
	checked, infeasible := 0, 0
	for c := range 300 {
		in := tinyInstance(rng, 2+rng.IntN(5), rng.IntN(2) == 0)
		p, err := NewProblem(in, Options{Moves: 2000})
		if err != nil {
			t.Fatal(err)
		}
		h := in.Horizons()
		free := bruteForce(in, nil, nil)
		if got := bruteForce(in, nil, h); got != free {
			t.Fatalf("case %d: optimum %v within the horizons %v, %v without", c, got, h, free)
		}
		var win []startWindow
		if c%2 == 1 {
			win = make([]startWindow, len(in.Jobs))
			K := len(in.Classes)
			for j := range win {
				win[j] = startWindow{0, math.MaxInt, -1}
				switch rng.IntN(4) {
				case 0:
					win[j].class = rng.IntN(K)
					p.Fixings = append(p.Fixings, decomp.Fixing{Block: j, Var: win[j].class, Value: 1})
				case 1:
					lo := rng.IntN(6)
					win[j].lo = lo
					p.Fixings = append(p.Fixings, decomp.Fixing{Block: j, Var: K + 1 + lo, Value: 0})
				case 2:
					hi := rng.IntN(6)
					win[j].hi = hi
					p.Fixings = append(p.Fixings, decomp.Fixing{Block: j, Var: K + 1 + hi + 1, Value: 1})
				}
			}
		}
		opt := bruteForce(in, win, h)
		for range 5 {
			prices := make([]float64, len(p.Rows))
			scale := rng.Float64() * 6
			for r := range prices {
				if rng.IntN(3) > 0 {
					prices[r] = math.Round(scale*rng.Float64()*4) / 4
				}
			}
			L, _, err := decomp.Relaxed(ctx, p, prices, nil)
			if math.IsInf(opt, 1) {
				// No schedule honours the fixings: either a block says
				// so, or the bound may be anything (the primal is empty).
				if err == nil {
					continue
				}
				infeasible++
				continue
			}
			if err != nil {
				t.Fatalf("case %d: %v", c, err)
			}
			if L > opt+1e-9 {
				t.Fatalf("case %d (%d fixings): bound %v above the brute-force optimum %v", c, len(p.Fixings), L, opt)
			}
			checked++
		}
	}
	if checked < 1000 || infeasible == 0 {
		t.Fatalf("%d checks, %d infeasible: the generator misses cases", checked, infeasible)
	}
}

// TestBruteForceRuns: on tiny instances (<= 8 jobs, 1-2 machines,
// releases, eligibility) a short run's bound never exceeds the brute-force
// optimum, its plan is a valid schedule (checked by Instance.Evaluate)
// whose value is never below it, and runs are the same for 1 and 2
// workers.
func TestBruteForceRuns(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 9))
	ctx := context.Background()
	atOpt, cases := 0, 60
	if testing.Short() {
		cases = 15
	}
	for c := range cases {
		in := tinyInstance(rng, 3+rng.IntN(6), rng.IntN(3) > 0)
		opt := bruteForce(in, nil, nil)
		var first *decomp.Result
		for _, workers := range []int{1, 2} {
			p, err := NewProblem(in, Options{})
			if err != nil {
				t.Fatal(err)
			}
			res, err := decomp.Solve(ctx, p, decomp.Settings{Rounds: 60, Workers: workers, Seed: 5})
			if err != nil {
				t.Fatal(err)
			}
			if res.Bound > opt+1e-6 {
				t.Fatalf("case %d: bound %v above the brute-force optimum %v", c, res.Bound, opt)
			}
			if res.Plan == nil {
				t.Fatalf("case %d: no plan", c)
			}
			v, err := in.Evaluate(res.Plan.Detail.(*Schedule))
			if err != nil {
				t.Fatalf("case %d: %v", c, err)
			}
			if float64(v) != res.Plan.Value || res.Plan.Value < opt {
				t.Fatalf("case %d: plan value %v, evaluated %v, brute-force optimum %v", c, res.Plan.Value, v, opt)
			}
			if first == nil {
				first = res
				if res.Plan.Value == opt {
					atOpt++
				}
			} else if res.Plan.Value != first.Plan.Value || res.Bound != first.Bound || res.Rounds != first.Rounds {
				t.Fatalf("case %d: 2 workers gave plan %v bound %v in %d rounds, 1 worker %v %v %d", c,
					res.Plan.Value, res.Bound, res.Rounds, first.Plan.Value, first.Bound, first.Rounds)
			}
		}
	}
	if atOpt < cases*9/10 {
		t.Errorf("only %d of %d tiny instances planned at the optimum", atOpt, cases)
	}
}
