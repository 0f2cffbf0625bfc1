package cflp

import (
	"io"

	"pincer/internal/oracle"

	"context"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"pincer/decomp"
)

// solveORLib runs the engine on an instance until the plan is proved
// optimal (gap 1e-9) or the round limit.
func solveORLib(t testing.TB, in *Instance, opt Options, s decomp.Settings) *decomp.Result {
	t.Helper()
	p, err := NewProblem(in, opt)
	if err != nil {
		t.Fatal(err)
	}
	res, err := decomp.Solve(context.Background(), p, s)
	if err != nil {
		t.Fatal(err)
	}
	return res
}

// TestORLibSmallOptima checks cap41 … cap134 against the published optima
// (OR-Library capopt as listed in the benchmark folder's reference.csv,
// also proved by CBC there): the plan must reach the optimum to 1e-6
// relative, the bound must never exceed it, and the plan must pass Verify.
func TestORLibSmallOptima(t *testing.T) {
	refs := readReference(t)
	total := time.Duration(0)
	for _, ref := range refs {
		if !strings.HasPrefix(ref.name, "cap") || strings.HasPrefix(ref.name, "capa") ||
			strings.HasPrefix(ref.name, "capb") || strings.HasPrefix(ref.name, "capc") {
			continue
		}
		path := filepath.Join(benchDir(t), ref.file)
		if _, err := os.Stat(path); err != nil {
			t.Logf("%s absent, skipped", ref.file)
			continue
		}
		in := readORLibFile(t, filepath.Base(ref.file), 0)
		start := time.Now()
		res := solveORLib(t, in, Options{}, decomp.Settings{Gap: 1e-9, Rounds: 400, StallRounds: 60})
		el := time.Since(start)
		total += el
		if res.Plan == nil {
			t.Errorf("%s: no plan", ref.name)
			continue
		}
		sol := res.Plan.Detail.(*Solution)
		ver := Verify(in, sol.Flow, false)
		if !ver.Feasible || math.Abs(ver.Value-res.Plan.Value) > 1e-6*ver.Value {
			t.Errorf("%s: plan value %v, Verify says %v feasible=%v %v", ref.name, res.Plan.Value, ver.Value, ver.Feasible, ver.Problems)
		}
		rel := (res.Plan.Value - ref.value) / ref.value
		if math.Abs(rel) > 1e-6 {
			t.Errorf("%s: plan %.4f, published optimum %.3f (rel %.2e)", ref.name, res.Plan.Value, ref.value, rel)
		}
		if !res.ProvedOptimal && !sol.Optimal {
			t.Errorf("%s: plan not proved optimal (bound %.4f; the site branch and bound did not close)", ref.name, res.Bound)
		}
		if res.Bound > ref.value*(1+1e-9) {
			t.Errorf("%s: bound %.4f exceeds the published optimum %.3f", ref.name, res.Bound, ref.value)
		}
		t.Logf("%-7s plan %.3f bound %.3f ref %.3f rounds %d status %v %v", ref.name, res.Plan.Value, res.Bound, ref.value, res.Rounds, res.Status, el.Round(time.Millisecond))
	}
	t.Logf("total %v", total)
}

// cbcOptimum exports the instance as MPS and solves it with CBC (Debian's
// coin-or package, an outside oracle), returning its proved optimum.
func cbcOptimum(t *testing.T, in *Instance, single bool) float64 {
	t.Helper()
	o := oracle.CBC(t, func(w io.Writer) error { return WriteMPS(w, in, single) }, 600)
	if !o.Optimal {
		t.Fatalf("cbc did not prove optimality:\n%s", o.Output)
	}
	return o.Objective
}

// TestCBCOracle checks bound <= CBC optimum <= plan value on generated
// instances, split demand and single source. CBC prints 8 decimals, so
// the comparisons allow 1e-7 relative.
func TestCBCOracle(t *testing.T) {
	if _, err := exec.LookPath("cbc"); err != nil {
		t.Skip("cbc not installed (apt-get install coinor-cbc); the oracle test is skipped")
	}
	for seed := uint64(1); seed <= 6; seed++ {
		in, err := Generate(6+int(seed)%3, 15+int(seed), 1.6, seed)
		if err != nil {
			t.Fatal(err)
		}
		for _, single := range []bool{false, true} {
			opt := cbcOptimum(t, in, single)
			res := solveORLib(t, in, Options{SingleSource: single}, decomp.Settings{Gap: 1e-9, Rounds: 300, StallRounds: 100})
			tol := 1e-7 * opt
			if res.Bound > opt+tol {
				t.Errorf("seed %d single=%v: bound %v > CBC optimum %v", seed, single, res.Bound, opt)
			}
			if res.Plan == nil || res.Plan.Value < opt-tol {
				t.Errorf("seed %d single=%v: plan %v, CBC optimum %v", seed, single, res.Plan, opt)
				continue
			}
			if !single && res.Plan.Value > opt+tol {
				t.Errorf("seed %d: split plan %v above the CBC optimum %v", seed, res.Plan.Value, opt)
			}
			t.Logf("seed %d single=%v: bound %.4f CBC %.4f plan %.4f", seed, single, res.Bound, opt, res.Plan.Value)
		}
	}
}

// TestSiteSearchBruteForce: on small generated instances the repair's site
// search (an instance of decomp.Search) claims a proof only for the
// optimum that trying every open set with gonum's simplex finds (brute
// force, an outside reference), and claims one on most of them.
func TestSiteSearchBruteForce(t *testing.T) {
	proved := 0
	for c := 0; c < 20; c++ {
		in, err := Generate(3+c%5, 5+c%6, 1.4+0.4*float64(c%3), uint64(900+c))
		if err != nil {
			t.Fatal(err)
		}
		want := bruteSplit(t, in)
		for _, relax := range []Relaxation{SiteRelaxation, AggregateRelaxation} {
			res := solveORLib(t, in, Options{Relaxation: relax}, decomp.Settings{Rounds: 120, Gap: -1, StallRounds: 1000})
			if res.Plan == nil {
				t.Fatalf("case %d (%s): no plan", c, relax)
			}
			sol := res.Plan.Detail.(*Solution)
			tol := 1e-6 * math.Max(1, want)
			if res.Plan.Value < want-tol || res.Bound > want+tol {
				t.Fatalf("case %d (%s): plan %v bound %v, brute-force optimum %v", c, relax, res.Plan.Value, res.Bound, want)
			}
			if sol.Optimal {
				proved++
				if math.Abs(res.Plan.Value-want) > tol {
					t.Fatalf("case %d (%s): site search proved %v, brute-force optimum %v", c, relax, res.Plan.Value, want)
				}
			}
		}
	}
	if proved < 20 {
		t.Fatalf("the site search proved %d of 40 plans: the check is too weak", proved)
	}
	t.Logf("the site search proved %d of 40 plans", proved)
}
