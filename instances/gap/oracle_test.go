package gap

import (
	"io"

	"pincer/internal/oracle"

	"context"
	"fmt"
	"math"
	"os/exec"
	"testing"
	"time"

	"pincer/decomp"
)

// cbcOptimum solves the exported model with the outside MIP solver cbc
// under a CPU limit of limit seconds and returns the objective and whether
// cbc proved it optimal.
func cbcOptimum(t *testing.T, in *Instance, maximise bool, limit int) (obj float64, optimal bool) {
	t.Helper()
	o := oracle.CBC(t, func(w io.Writer) error { return WriteMPS(w, in, maximise) }, limit)
	return o.Objective, o.Optimal
}

// TestAgainstCBC compares pincer with the optimum that cbc proves on 20
// generated instances (minimisation, knapsack relaxation, 3 s per run).
// Expected values: cbc's reported optimal objective (outside solver). The
// checks are weak duality (bound <= optimum, any Lagrangian bound), primal
// feasibility (optimum <= plan value, plan re-checked by Verify), and plan
// quality (within 1 % of the optimum: the product's target).
func TestAgainstCBC(t *testing.T) {
	if testing.Short() {
		t.Skip("cbc comparison takes about a minute; skipped in -short mode")
	}
	if _, err := exec.LookPath("cbc"); err != nil {
		t.Skipf("cbc is not on PATH (Debian package coinor-cbc); skipping the oracle comparison: %v", err)
	}
	// The cases are the 20 generated instances of the cbc comparison: types
	// C and D, 5 x 30 up to 10 x 60, fixed seeds. The type D instances are the
	// small ones (5 x 30) whose seeds cbc proves within about ten CPU seconds
	// on the project machine; larger type D instances take cbc minutes (it did
	// not prove 5 x 40, 6 x 36, 8 x 30 or 10 x 30 within 30 s there).
	cases := [...]struct {
		kind byte
		m, n int
		seed uint64
	}{
		{'c', 5, 30, 1}, {'c', 5, 40, 2}, {'c', 5, 50, 3}, {'c', 5, 60, 4},
		{'c', 6, 36, 13}, {'c', 7, 42, 14}, {'c', 8, 32, 5}, {'c', 8, 40, 6},
		{'c', 8, 48, 7}, {'c', 8, 56, 8}, {'c', 9, 54, 15}, {'c', 10, 30, 9},
		{'c', 10, 40, 10}, {'c', 10, 45, 16}, {'c', 10, 50, 11}, {'c', 10, 60, 12},
		{'d', 5, 30, 1}, {'d', 5, 30, 4}, {'d', 5, 30, 8}, {'d', 5, 30, 12},
	}
	start := time.Now()
	t.Cleanup(func() {
		t.Logf("cbc comparison: %d instances, wall time %v", len(cases), time.Since(start).Round(time.Millisecond))
	})
	for _, c := range cases {
		name := fmt.Sprintf("%c%dx%d-s%d", c.kind, c.m, c.n, c.seed)
		t.Run(name, func(t *testing.T) {
			t.Parallel() // at most GOMAXPROCS (-parallel) at once
			in, err := Generate(c.kind, c.m, c.n, c.seed)
			if err != nil {
				t.Fatal(err)
			}
			t0 := time.Now()
			opt, optimal := cbcOptimum(t, in, false, 60)
			cbcWall := time.Since(t0)
			if !optimal {
				t.Fatalf("cbc did not prove optimality within 60 CPU seconds (incumbent %v); the oracle gives no answer", opt)
			}
			p, err := NewProblem(in, Options{})
			if err != nil {
				t.Fatal(err)
			}
			// One evaluation worker: the subtests already run in parallel.
			res, err := decomp.Solve(context.Background(), p, decomp.Settings{
				Time: 3 * time.Second, Seed: 1, Evaluator: decomp.Pool{Workers: 1},
			})
			if err != nil {
				t.Fatal(err)
			}
			if res.Plan == nil {
				t.Fatalf("no plan (bound %v, status %s)", res.Bound, res.Status)
			}
			plan := res.Plan.Value
			t.Logf("cbc optimum %.0f (%v)  bound %.3f  plan %.0f  (+%.2f %%)  %s after %d rounds, %v",
				opt, cbcWall.Round(time.Millisecond), res.Bound, plan, 100*(plan-opt)/opt, res.Status, res.Rounds, res.Elapsed.Round(time.Millisecond))
			tol := 1e-6 * math.Max(1, math.Abs(opt))
			if res.Bound > opt+tol {
				t.Errorf("bound %.6f passes the cbc optimum %.0f", res.Bound, opt)
			}
			if plan < opt-tol {
				t.Errorf("plan value %.0f is below the cbc optimum %.0f", plan, opt)
			}
			if plan > opt*1.01+tol {
				t.Errorf("plan value %.0f is %.2f %% above the cbc optimum %.0f; want within 1 %%", plan, 100*(plan-opt)/opt, opt)
			}
			v := Verify(in, res.Plan.Detail.([]int), false)
			if !v.Feasible || float64(v.Value) != plan {
				t.Errorf("Verify: feasible %v, value %d, problems %v; plan value %.0f", v.Feasible, v.Value, v.Problems, plan)
			}
		})
	}
}
