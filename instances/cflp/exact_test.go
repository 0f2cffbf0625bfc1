package cflp

import (
	"context"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"

	"pincer/decomp"
)

func exactSearch(t *testing.T, m *Model, workers int) *decomp.SearchResult {
	t.Helper()
	br, err := m.Brancher()
	if err != nil {
		t.Fatal(err)
	}
	res, err := decomp.Search(context.Background(), m.ExactProblem, br, decomp.SearchSettings{Workers: workers, Seed: 1, Time: 30 * time.Second})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestExactBruteForce: on small generated instances, both relaxations,
// the exact search proves the optimum that trying every open set with
// gonum's simplex on its transport problem finds (brute force, outside
// reference), within the search's tolerance; the global bound is at most
// the optimum and the reported gap covers the difference; one and two
// workers give the same tree.
func TestExactBruteForce(t *testing.T) {
	for c := 0; c < 24; c++ {
		in, err := Generate(3+c%4, 4+c%5, 1.5+0.5*float64(c%3), uint64(100+c))
		if err != nil {
			t.Fatal(err)
		}
		want := bruteSplit(t, in)
		for _, relax := range []Relaxation{SiteRelaxation, AggregateRelaxation} {
			m := &Model{In: in, Opt: Options{Relaxation: relax}}
			res := exactSearch(t, m, 1)
			if !res.Proved || res.Plan == nil {
				t.Fatalf("case %d (%s): not proved: %+v", c, relax, res)
			}
			tol := 1e-6 * math.Max(1, want)
			if math.Abs(res.Plan.Value-want) > tol || res.Bound > want+tol || res.Gap > 1e-8 {
				t.Fatalf("case %d (%s): plan %v bound %v gap %v, brute-force optimum %v", c, relax, res.Plan.Value, res.Bound, res.Gap, want)
			}
			if two := exactSearch(t, m, 2); two.Tree != res.Tree || two.Plan.Value != res.Plan.Value {
				t.Fatalf("case %d: 2 workers %+v, 1 worker %+v", c, two.Tree, res.Tree)
			}
		}
	}
}

// TestExactCap41: the OR-Library instance cap41 (16 sites, 50 customers)
// is proved at its published split-demand optimum (reference.csv).
func TestExactCap41(t *testing.T) {
	dir := benchDir(t)
	path := filepath.Join(dir, "orlib", "cap41.txt")
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	in, err := ReadORLib(f, path, 0)
	if err != nil {
		t.Fatal(err)
	}
	const want = 1040444.375 // reference.csv, cap41
	for _, relax := range []Relaxation{SiteRelaxation, AggregateRelaxation} {
		res := exactSearch(t, &Model{In: in, Opt: Options{Relaxation: relax}}, 2)
		t.Logf("%s: plan %v bound %v proved %v, %d nodes, %v", relax, res.Plan.Value, res.Bound, res.Proved, res.Tree.Nodes, res.Elapsed)
		if !res.Proved || math.Abs(res.Plan.Value-want) > 1e-6*want {
			t.Fatalf("%s: plan %v proved %v, want %v", relax, res.Plan.Value, res.Proved, want)
		}
	}
}

// TestReducedCostFixingKeepsOptima: with the brute-force optimum as
// threshold, every site that reduced costs fix (site relaxation, at the
// prices of a short ascent) is fixed the way every optimal plan has it:
// forcing it the other way makes the optimum (brute force over the open
// sets with gonum's simplex) strictly worse.
func TestReducedCostFixingKeepsOptima(t *testing.T) {
	seen := 0
	for c := 0; c < 30; c++ {
		in, err := Generate(3+c%4, 4+c%5, 1.3+0.4*float64(c%4), uint64(500+c))
		if err != nil {
			t.Fatal(err)
		}
		want := bruteSplit(t, in)
		p, err := NewProblem(in, Options{Relaxation: SiteRelaxation})
		if err != nil {
			t.Fatal(err)
		}
		for _, rounds := range []int{5, 60} {
			res, err := decomp.SolveNode(context.Background(), p, decomp.NodeSettings{Rounds: rounds, KeepBest: true})
			if err != nil || !res.HasBound {
				t.Fatal(err)
			}
			fix, err := decomp.ReducedCostFixings(context.Background(), p, res.Prices, res.BestAnswers, res.Bound, want)
			if err != nil {
				t.Fatal(err)
			}
			for _, f := range fix {
				other := make([]siteFix, len(in.Sites))
				other[f.Block].y = 1 - f.Value
				for i := range other {
					if i != f.Block {
						other[i].y = -1
					}
				}
				fin, ok := fixedInstance(in, other)
				if !ok {
					continue
				}
				if alt := bruteSplit(t, fin); alt <= want*(1+1e-9) {
					t.Fatalf("case %d: site %d fixed to %v, but with it %v the optimum is %v (overall %v)", c, f.Block, f.Value, 1-f.Value, alt, want)
				}
				seen++
			}
		}
	}
	if seen < 20 {
		t.Fatalf("only %d fixings checked: the check is too weak", seen)
	}
	t.Logf("%d site fixings checked", seen)
}

// TestExactCBC: on generated facility instances larger than brute force
// reaches (12 to 20 sites, 40 to 60 customers), the exact search proves
// the split-demand optimum that CBC (Debian's coin-or package, an outside
// oracle) proves on the exported MPS model. CBC prints 8 decimals, so the
// comparison allows 1e-7 relative.
func TestExactCBC(t *testing.T) {
	if _, err := exec.LookPath("cbc"); err != nil {
		t.Skip("cbc not installed (apt-get install coinor-cbc); the oracle test is skipped")
	}
	if testing.Short() {
		t.Skip("-short: the cbc comparison of the exact mode is skipped")
	}
	for seed := uint64(1); seed <= 3; seed++ {
		in, err := Generate(8+4*int(seed), 30+10*int(seed), 1.6, 40+seed)
		if err != nil {
			t.Fatal(err)
		}
		opt := cbcOptimum(t, in, false)
		res := exactSearch(t, &Model{In: in}, 2)
		if !res.Proved || res.Plan == nil {
			t.Fatalf("seed %d: not proved in 30 s: %+v", seed, res)
		}
		tol := 1e-7 * math.Max(1, opt)
		if math.Abs(res.Plan.Value-opt) > tol || res.Bound > opt+tol {
			t.Errorf("seed %d: proved %v (bound %v), CBC optimum %v", seed, res.Plan.Value, res.Bound, opt)
		}
		t.Logf("seed %d: %d sites x %d customers: proved %.4f, CBC %.4f, %d nodes", seed, len(in.Sites), len(in.Customers), res.Plan.Value, opt, res.Tree.Nodes)
	}
}
