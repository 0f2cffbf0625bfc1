package lotsizing

import (
	"context"
	"io"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"pincer/decomp"
	"pincer/internal/oracle"
)

// exactInstance is a tiny random instance of n items and T periods with
// tight capacity; with overtime, every other period allows it at a random
// cost.
func exactInstance(r *rand.Rand, n, T int, overtime bool) *Instance {
	in := &Instance{Name: "tiny-exact", Capacity: make([]float64, T)}
	for i := 0; i < n; i++ {
		in.Items = append(in.Items, Item{Name: string(rune('a' + i)), UnitTime: float64(1 + r.IntN(2)), SetupTime: float64(r.IntN(3)),
			SetupCost: float64(r.IntN(12)) + float64(r.IntN(4))/4, Holding: float64(r.IntN(3)) + float64(r.IntN(2))/2, InitialStock: float64(r.IntN(2))})
		d := make([]float64, T)
		for t := range d {
			d[t] = float64(r.IntN(4))
		}
		in.Demand = append(in.Demand, d)
	}
	for t := range in.Capacity {
		in.Capacity[t] = float64(3 + r.IntN(3*n))
	}
	if overtime {
		in.OvertimeCost = make([]float64, T)
		for t := range in.OvertimeCost {
			in.OvertimeCost[t] = -1
			if t%2 == 0 {
				in.OvertimeCost[t] = float64(r.IntN(6)) + 0.5
			}
		}
	}
	return in
}

// searchExact runs decomp.Search through the model's exact mode and
// fails the test when a global bound reported along the way passes opt.
func searchExact(t *testing.T, m *Model, opt float64, batch int, weak bool) *decomp.SearchResult {
	t.Helper()
	br, err := m.Brancher()
	if err != nil {
		t.Fatal(err)
	}
	tol := 1e-6 * math.Max(1, math.Abs(opt))
	s := decomp.SearchSettings{Workers: 1, Batch: batch, Seed: 1, Nodes: 20000}
	if weak {
		// Short ascents leave weak node bounds, so the tree grows deep
		// and the leaves, the brancher and the fixings all get used.
		s.RootRounds, s.NodeRounds = 4, 2
	}
	s.Progress = func(sp *decomp.SearchProgress) {
		if sp.Bound > opt+tol {
			t.Errorf("global bound %v passes the optimum %v after %d nodes", sp.Bound, opt, sp.Nodes)
		}
	}
	res, err := decomp.Search(context.Background(), m.ExactProblem, br, s)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// The exact search proves the optimum of every tiny random instance.
// Source of the expected value: brute force over every setup pattern,
// each priced by gonum's simplex on its production LP (bruteOptimum,
// independent of the blocks, the pattern flow and the repair).
func TestExactMatchesBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(13, 2026))
	shapes := [][2]int{{2, 3}, {2, 4}, {3, 3}, {3, 4}}
	proved, infeasible := 0, 0
	for trial := 0; trial < 24; trial++ {
		sh := shapes[trial%len(shapes)]
		if sh == [2]int{3, 4} && trial%8 != 3 {
			sh = [2]int{2, 4} // 4096 patterns per brute force: a few only
		}
		withOvertime := trial%3 == 1
		in := exactInstance(r, sh[0], sh[1], withOvertime)
		opt := Options{}
		if trial%3 == 2 {
			opt.OvertimeCost = 4.5 // the model's overtime in every period
		}
		oc := overtimeCosts(in, opt)
		t0 := time.Now()
		want := bruteOptimum(in, oc)
		t1 := time.Now()
		m := &Model{In: in, Opt: opt}
		res := searchExact(t, m, want, 1+trial%4, trial%2 == 1)
		t.Logf("trial %d %dx%d: optimum %v, brute force %v, search %v (%d nodes, %v)", trial, sh[0], sh[1], want, t1.Sub(t0), time.Since(t1), res.Tree.Nodes, res.Status)
		if !res.Proved {
			t.Fatalf("trial %d (%dx%d): not proved: %v after %d nodes", trial, sh[0], sh[1], res.Status, res.Tree.Nodes)
		}
		if math.IsInf(want, 1) {
			infeasible++
			if res.Plan != nil {
				t.Fatalf("trial %d: plan %v for an instance without one", trial, res.Plan.Value)
			}
			continue
		}
		if res.Plan == nil {
			t.Fatalf("trial %d: proved without a plan, brute force %v", trial, want)
		}
		tol := 1e-6 * math.Max(1, want)
		if math.Abs(res.Plan.Value-want) > tol {
			t.Fatalf("trial %d (%dx%d, overtime %v/%v): proved %v, brute force %v (%d nodes)", trial, sh[0], sh[1], withOvertime, opt.OvertimeCost, res.Plan.Value, want, res.Tree.Nodes)
		}
		if res.Bound > want+tol {
			t.Fatalf("trial %d: global bound %v above the optimum %v", trial, res.Bound, want)
		}
		sch, ok := res.Plan.Detail.(*Schedule)
		if !ok {
			t.Fatalf("trial %d: plan detail %T", trial, res.Plan.Detail)
		}
		if err := Verify(in, sch, oc); err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		proved++
	}
	t.Logf("%d proved at the brute-force optimum, %d proved infeasible", proved, infeasible)
	if proved < 12 {
		t.Errorf("only %d feasible instances: the test checks too little", proved)
	}
}

// A node with every setup decided is solved by the pattern flow: it holds
// a plan exactly when the production LP of its setups is feasible (gonum's
// simplex, patternOptimum), and the flow's cost is that LP's optimum.
func TestBrancherLeavesMatchLP(t *testing.T) {
	r := rand.New(rand.NewPCG(17, 2026))
	checked := 0
	for trial := 0; trial < 12; trial++ {
		in := exactInstance(r, 2, 3, trial%2 == 1)
		if trial%4 == 3 {
			// Overtime dearer than the repair's penalty for excess where
			// none is allowed: the leaves' hard penalty must stay above it.
			for t := range in.OvertimeCost {
				if in.OvertimeCost[t] >= 0 {
					in.OvertimeCost[t] = 1e5 * (1 + in.OvertimeCost[t])
				}
			}
		}
		oc := overtimeCosts(in, Options{})
		b := newSetupBrancher(in, oc)
		n, T := len(in.Items), in.Periods()
		for mask := 0; mask < 1<<(n*T); mask++ {
			on := func(i, t int) bool { return mask>>(i*T+t)&1 == 1 }
			var fix []decomp.Fixing
			for i := 0; i < n; i++ {
				for u := 0; u < T; u++ {
					v := 0.0
					if on(i, u) {
						v = 1
					}
					fix = append(fix, decomp.Fixing{Block: i, Var: u, Value: v})
				}
			}
			br, err := b.Branch(&decomp.BranchInput{Sense: decomp.Minimise, Fixings: fix, Answers: make([]decomp.Answer, n)})
			if err != nil {
				t.Fatal(err)
			}
			if len(br.Children) != 0 {
				t.Fatalf("trial %d mask %b: a node with every setup decided branched", trial, mask)
			}
			want := patternOptimum(in, oc, on)
			if br.Plan != nil {
				// A plan drops the setups it does not use: it must be
				// feasible, and no cheaper than the LP optimum of its own
				// setups (which are among the node's).
				sch := br.Plan.Detail.(*Schedule)
				if err := Verify(in, sch, oc); err != nil {
					t.Fatalf("trial %d mask %b: %v", trial, mask, err)
				}
				own := func(i, u int) bool { return sch.Setup[i][u] }
				for i := 0; i < n; i++ {
					for u := 0; u < T; u++ {
						if own(i, u) && !on(i, u) {
							t.Fatalf("trial %d mask %b: plan sets up item %d in period %d outside the node's setups", trial, mask, i, u)
						}
					}
				}
				if lo := patternOptimum(in, oc, own); br.Plan.Value < lo-1e-6*math.Max(1, lo) {
					t.Fatalf("trial %d mask %b: plan %v below the LP optimum %v of its setups", trial, mask, br.Plan.Value, lo)
				}
			}
			if math.IsInf(want, 1) {
				continue
			}
			if br.Plan == nil {
				t.Fatalf("trial %d mask %b: no plan, LP optimum %v", trial, mask, want)
			}
			for i := 0; i < n; i++ {
				for u := 0; u < T; u++ {
					b.y[i][u] = on(i, u)
				}
			}
			if got := b.pat.solve(b.y, b.x); math.Abs(got-want) > 1e-6*math.Max(1, want) {
				t.Fatalf("trial %d mask %b: flow %v, LP %v", trial, mask, got, want)
			}
			// Unused setups are not paid by the plan.
			if br.Plan.Value > want+1e-6*math.Max(1, want) {
				t.Fatalf("trial %d mask %b: plan %v above the LP optimum %v", trial, mask, br.Plan.Value, want)
			}
			checked++
		}
	}
	if checked == 0 {
		t.Fatal("no feasible pattern checked")
	}
}

// Source of the expected value: CBC on the exported MPS model of a small
// generated instance (skipped when cbc is not installed).
func TestExactMatchesCBC(t *testing.T) {
	if testing.Short() {
		t.Skip("CBC oracle skipped in -short mode")
	}
	for _, ot := range []float64{0, 3} {
		in, err := Generate(GenerateConfig{Items: 3, Periods: 6, Utilisation: 0.85, Seed: 4})
		if err != nil {
			t.Fatal(err)
		}
		opt := Options{OvertimeCost: ot}
		out := oracle.CBC(t, func(w io.Writer) error { return WriteMPS(w, in, opt) }, 10)
		if !out.Optimal {
			t.Fatalf("overtime %v: CBC did not prove its value %v", ot, out.Objective)
		}
		res := searchExact(t, &Model{In: in, Opt: opt}, out.Objective, 8, false)
		if !res.Proved || res.Plan == nil {
			t.Fatalf("overtime %v: %v after %d nodes, plan %v", ot, res.Status, res.Tree.Nodes, res.Plan)
		}
		if math.Abs(res.Plan.Value-out.Objective) > 1e-6*math.Max(1, out.Objective) {
			t.Fatalf("overtime %v: proved %v, CBC %v", ot, res.Plan.Value, out.Objective)
		}
		t.Logf("overtime %v: proved %v (CBC %v) in %d nodes", ot, res.Plan.Value, out.Objective, res.Tree.Nodes)
	}
}

// The search is the same tree for any worker count (decomp.Search merges
// in node order; the blocks, repair and brancher of each problem copy
// share nothing).
func TestExactWorkersAgree(t *testing.T) {
	in, err := Generate(GenerateConfig{Items: 4, Periods: 6, Utilisation: 0.8, Seed: 7})
	if err != nil {
		t.Fatal(err)
	}
	m := &Model{In: in}
	var first *decomp.SearchResult
	for _, w := range []int{1, 2} {
		br, err := m.Brancher()
		if err != nil {
			t.Fatal(err)
		}
		res, err := decomp.Search(context.Background(), m.ExactProblem, br, decomp.SearchSettings{Workers: w, Batch: 4, Seed: 3, Nodes: 400})
		if err != nil {
			t.Fatal(err)
		}
		if res.Plan == nil {
			t.Fatalf("workers %d: no plan", w)
		}
		if first == nil {
			first = res
			continue
		}
		if res.Plan.Value != first.Plan.Value || res.Bound != first.Bound || res.Tree.Nodes != first.Tree.Nodes || res.Status != first.Status {
			t.Fatalf("workers %d: plan %v bound %v nodes %d %v; workers 1: plan %v bound %v nodes %d %v", w,
				res.Plan.Value, res.Bound, res.Tree.Nodes, res.Status, first.Plan.Value, first.Bound, first.Tree.Nodes, first.Status)
		}
	}
	t.Logf("plan %v, bound %v, %d nodes, %v", first.Plan.Value, first.Bound, first.Tree.Nodes, first.Status)
}
