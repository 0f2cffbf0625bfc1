package scheduling

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"testing"
	"time"

	"pincer/decomp"
	"pincer/internal/oracle"
)

// writeTimeIndexedMPS writes the time-indexed model of in in free MPS,
// written here independently of the family's own export: a variable
// x_j_k_s per job, eligible class and start (release <= s, s+p_j <= H_k),
// one assignment row per job (= 1) and one capacity row per class and
// slot (<= m_k). With integer set the variables are binary.
func writeTimeIndexedMPS(w io.Writer, in *Instance, integer bool) error {
	bw := bufio.NewWriter(w)
	h := in.Horizons()
	fmt.Fprintln(bw, "NAME timeindexed")
	fmt.Fprintln(bw, "ROWS")
	fmt.Fprintln(bw, " N cost")
	for j := range in.Jobs {
		fmt.Fprintf(bw, " E a%d\n", j)
	}
	for k := range in.Classes {
		for t := 0; t < h[k]; t++ {
			fmt.Fprintf(bw, " L c%d_%d\n", k, t)
		}
	}
	fmt.Fprintln(bw, "COLUMNS")
	if integer {
		fmt.Fprintln(bw, " M1 'MARKER' 'INTORG'")
	}
	var names []string
	for j, jb := range in.Jobs {
		for k := range in.Classes {
			if !in.EligibleOn(j, k) {
				continue
			}
			for s := jb.Release; s+jb.Processing <= h[k]; s++ {
				x := fmt.Sprintf("x%d_%d_%d", j, k, s)
				names = append(names, x)
				fmt.Fprintf(bw, " %s cost %d a%d 1\n", x, in.Cost(j, s+jb.Processing), j)
				for t := s; t < s+jb.Processing; t++ {
					fmt.Fprintf(bw, " %s c%d_%d 1\n", x, k, t)
				}
			}
		}
	}
	if integer {
		fmt.Fprintln(bw, " M2 'MARKER' 'INTEND'")
	}
	fmt.Fprintln(bw, "RHS")
	for j := range in.Jobs {
		fmt.Fprintf(bw, " rhs a%d 1\n", j)
	}
	for k, c := range in.Classes {
		for t := 0; t < h[k]; t++ {
			fmt.Fprintf(bw, " rhs c%d_%d %d\n", k, t, c.Machines)
		}
	}
	fmt.Fprintln(bw, "BOUNDS")
	for _, x := range names {
		fmt.Fprintf(bw, " UP bnd %s 1\n", x)
	}
	fmt.Fprintln(bw, "ENDATA")
	return bw.Flush()
}

// cbcLP solves the linear relaxation of the model with cbc and returns
// its optimal value.
func cbcLP(t *testing.T, in *Instance) float64 {
	bin, err := exec.LookPath("cbc")
	if err != nil {
		t.Skipf("cbc not installed (apt-get install coinor-cbc); the oracle check is skipped: %v", err)
	}
	path := filepath.Join(t.TempDir(), "lp.mps")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := writeTimeIndexedMPS(f, in, false); err != nil {
		t.Fatal(err)
	}
	f.Close()
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	out, err := exec.CommandContext(ctx, bin, path, "initialSolve").CombinedOutput()
	if err != nil {
		t.Fatalf("cbc: %v\n%s", err, out)
	}
	m := regexp.MustCompile(`Optimal - objective value (\S+)`).FindSubmatch(out)
	if m == nil {
		t.Fatalf("cbc printed no optimal LP value:\n%s", out)
	}
	v, err := strconv.ParseFloat(string(m[1]), 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// generatedSmall draws 10 jobs for 2 machines (one class of two, or two
// classes of one with eligibility), with release dates.
func generatedSmall(seed uint64, twoClasses bool) *Instance {
	rng := rand.New(rand.NewPCG(seed, 77))
	in := &Instance{Name: fmt.Sprintf("small%d", seed), Classes: []Class{{ID: "A", Machines: 2}}}
	if twoClasses {
		in.Classes = []Class{{ID: "A", Machines: 1}, {ID: "B", Machines: 1}}
	}
	for j := range 10 {
		jb := Job{ID: strconv.Itoa(j + 1), Processing: 1 + rng.IntN(7), Weight: 1 + rng.IntN(9), Due: rng.IntN(20), Release: rng.IntN(8)}
		if twoClasses && rng.IntN(3) == 0 {
			jb.Eligible = []int{rng.IntN(2)}
		}
		in.Jobs = append(in.Jobs, jb)
	}
	return in
}

// TestCBCOracle: on small generated instances the Lagrangian bound never
// exceeds the time-indexed LP value computed by cbc (the two are equal at
// the dual optimum, since each job block has the integrality property, so
// a bound above it is a bug), and the plan is never below cbc's MIP
// optimum. Source of the expected values: cbc on the model written by
// writeTimeIndexedMPS.
func TestCBCOracle(t *testing.T) {
	if testing.Short() {
		t.Skip("cbc oracle skipped in -short mode")
	}
	for _, c := range []struct {
		seed uint64
		two  bool
	}{{1, false}, {2, true}, {3, false}} {
		for _, obj := range []Objective{WeightedTardiness, WeightedCompletion} {
			in := generatedSmall(c.seed, c.two)
			in.Objective = obj
			lp := cbcLP(t, in)
			mip := oracle.CBC(t, func(w io.Writer) error { return writeTimeIndexedMPS(w, in, true) }, 20)
			p, err := NewProblem(in, Options{})
			if err != nil {
				t.Fatal(err)
			}
			res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 400, Gap: -1, Seed: 1})
			if err != nil {
				t.Fatal(err)
			}
			tol := 1e-6 * math.Max(1, math.Abs(lp))
			if res.Bound > lp+tol {
				t.Errorf("%s %s: bound %v above the LP value %v", in.Name, obj, res.Bound, lp)
			}
			if mip.Optimal && res.Plan.Value < mip.Objective-tol {
				t.Errorf("%s %s: plan %v below the MIP optimum %v", in.Name, obj, res.Plan.Value, mip.Objective)
			}
			if lp > mip.Objective+tol {
				t.Errorf("%s %s: LP %v above MIP %v: the oracle models differ", in.Name, obj, lp, mip.Objective)
			}
			t.Logf("%s %s: bound %.3f LP %.3f MIP %v (optimal %v) plan %v", in.Name, obj, res.Bound, lp, mip.Objective, mip.Optimal, res.Plan.Value)
		}
	}
}
