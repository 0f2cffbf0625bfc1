package cflp

import (
	"bufio"
	"bytes"
	"errors"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
)

// solveCBC runs cbc on the model and returns its status word, objective
// value and the non-zero column values it prints.
func solveCBC(t *testing.T, in *Instance, singleSource bool) (status string, obj float64, vals map[string]float64) {
	t.Helper()
	if _, err := exec.LookPath("cbc"); err != nil {
		t.Skip("cbc not installed")
	}
	dir := t.TempDir()
	model, sol := filepath.Join(dir, "m.mps"), filepath.Join(dir, "s.txt")
	writeModel(t, model, in, singleSource)
	if out, err := exec.Command("cbc", model, "solve", "solu", sol).CombinedOutput(); err != nil {
		t.Fatalf("cbc: %v\n%s", err, out)
	}
	data, err := os.ReadFile(sol)
	if err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(string(data)), "\n")
	// First line: "<status> - objective value <v>", e.g. "Optimal" or
	// "Integer infeasible".
	status, value, _ := strings.Cut(lines[0], " - objective value ")
	obj, _ = strconv.ParseFloat(strings.TrimSpace(value), 64)
	vals = map[string]float64{}
	for _, l := range lines[1:] {
		f := strings.Fields(l)
		if len(f) == 4 {
			vals[f[1]], _ = strconv.ParseFloat(f[2], 64)
		}
	}
	return status, obj, vals
}

// solveGLPK runs glpsol on the model and returns its objective value and
// the column values, named by the order in which columns first appear.
func solveGLPK(t *testing.T, in *Instance, singleSource bool) (obj float64, vals map[string]float64) {
	t.Helper()
	if _, err := exec.LookPath("glpsol"); err != nil {
		t.Skip("glpsol not installed")
	}
	dir := t.TempDir()
	model, sol := filepath.Join(dir, "m.mps"), filepath.Join(dir, "s.txt")
	writeModel(t, model, in, singleSource)
	if out, err := exec.Command("glpsol", "--freemps", model, "-w", sol).CombinedOutput(); err != nil {
		t.Fatalf("glpsol: %v\n%s", err, out)
	}
	names := columnOrder(t, model)
	data, err := os.ReadFile(sol)
	if err != nil {
		t.Fatal(err)
	}
	vals = map[string]float64{}
	for _, l := range strings.Split(string(data), "\n") {
		f := strings.Fields(l)
		switch {
		case len(f) >= 6 && f[0] == "s" && f[1] == "mip":
			if f[4] != "o" {
				t.Fatalf("glpsol status %q, want o (optimal)", f[4])
			}
			obj, _ = strconv.ParseFloat(f[5], 64)
		case len(f) == 3 && f[0] == "j":
			k, _ := strconv.Atoi(f[1])
			vals[names[k-1]], _ = strconv.ParseFloat(f[2], 64)
		}
	}
	return obj, vals
}

func writeModel(t *testing.T, path string, in *Instance, singleSource bool) {
	t.Helper()
	var b bytes.Buffer
	if err := WriteMPS(&b, in, singleSource); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
}

// columnOrder lists the column names of an MPS file in order of first
// appearance.
func columnOrder(t *testing.T, path string) []string {
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	var names []string
	seen := map[string]bool{}
	in := false
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		l := sc.Text()
		switch {
		case l == "COLUMNS":
			in = true
		case l == "RHS":
			in = false
		case in && !strings.HasPrefix(l, "*"):
			name := strings.Fields(l)[0]
			if name != "MARKER" && !seen[name] {
				seen[name] = true
				names = append(names, name)
			}
		}
	}
	return names
}

// planFrom turns solver values of the X columns into quantities.
func planFrom(t *testing.T, in *Instance, vals map[string]float64) [][]float64 {
	nm, err := newMPSNames(len(in.Sites), len(in.Customers))
	if err != nil {
		t.Fatal(err)
	}
	flow := make([][]float64, len(in.Sites))
	for i := range flow {
		flow[i] = make([]float64, len(in.Customers))
		for j, c := range in.Customers {
			flow[i][j] = vals[nm.pair('X', i, j)] * c.Demand
		}
	}
	return flow
}

func TestWriteMPSCBCcap41(t *testing.T) {
	in := readORLibFile(t, "cap41.txt", 0)
	status, obj, vals := solveCBC(t, in, false)
	// Published optimum of cap41, reference.csv (OR-Library capopt).
	const want = 1040444.375
	if status != "Optimal" || math.Abs(obj-want) > 1e-3 {
		t.Fatalf("cbc: %s %v, want Optimal %v", status, obj, want)
	}
	// The solver's plan, checked by Verify, has the same value.
	v := Verify(in, planFrom(t, in, vals), false)
	if !v.Feasible || math.Abs(v.Value-want) > 1e-2 {
		t.Errorf("Verify of cbc's plan: feasible %v value %v problems %v, want %v", v.Feasible, v.Value, v.Problems, want)
	}
}

func TestWriteMPSCBCSingleSourceInfeasible(t *testing.T) {
	// SOURCES.md section 1: single source is infeasible for cap41, a
	// customer demands 12912 and sites hold 5000.
	in := readORLibFile(t, "cap41.txt", 0)
	status, _, _ := solveCBC(t, in, true)
	if !strings.Contains(strings.ToLower(status), "infeasible") {
		t.Errorf("cbc status %q, want infeasible", status)
	}
}

func TestWriteMPSGLPKcap71(t *testing.T) {
	in := readORLibFile(t, "cap71.txt", 0)
	obj, vals := solveGLPK(t, in, false)
	// Published optimum of cap71, reference.csv (OR-Library capopt).
	const want = 932615.75
	if math.Abs(obj-want) > 1e-3 {
		t.Fatalf("glpsol: %v, want %v", obj, want)
	}
	v := Verify(in, planFrom(t, in, vals), false)
	if !v.Feasible || math.Abs(v.Value-want) > 1e-2 {
		t.Errorf("Verify of glpsol's plan: feasible %v value %v problems %v", v.Feasible, v.Value, v.Problems)
	}
}

// bruteSplit finds the split-demand optimum by trying every set of open
// sites allowed by the statuses and solving the transport problem of each
// with gonum's simplex.
func bruteSplit(t *testing.T, in *Instance) float64 {
	m, n := len(in.Sites), len(in.Customers)
	best := math.Inf(1)
	for mask := 0; mask < 1<<m; mask++ {
		fixed, ok := 0.0, true
		for i, s := range in.Sites {
			open := mask&(1<<i) != 0
			if (s.Status == ForcedOpen && !open) || (s.Status == ForcedClosed && open) {
				ok = false
			}
			if open {
				fixed += s.FixedCost
			}
		}
		if !ok {
			continue
		}
		// Columns: x_ij of open sites and allowed lanes, then one slack per
		// open site. Rows: demand (Σ_i x_ij = 1), capacity (Σ_j d_j x_ij + slack = s_i).
		type lane struct{ i, j int }
		var lanes []lane
		var open []int
		for i := 0; i < m; i++ {
			if mask&(1<<i) != 0 {
				open = append(open, i)
				for j := 0; j < n; j++ {
					if in.Allowed(i, j) {
						lanes = append(lanes, lane{i, j})
					}
				}
			}
		}
		if len(open) == 0 {
			continue
		}
		cols := len(lanes) + len(open)
		A := mat.NewDense(n+len(open), cols, nil)
		b := make([]float64, n+len(open))
		c := make([]float64, cols)
		served := make([]bool, n)
		for k, l := range lanes {
			c[k] = in.Cost[l.i][l.j]
			A.Set(l.j, k, 1)
			served[l.j] = true
			for r, i := range open {
				if i == l.i {
					A.Set(n+r, k, in.Customers[l.j].Demand)
				}
			}
		}
		for r, i := range open {
			A.Set(n+r, len(lanes)+r, 1)
			b[n+r] = in.Sites[i].Capacity
		}
		for j := range b[:n] {
			b[j] = 1
			if !served[j] {
				ok = false
			}
		}
		if !ok {
			continue
		}
		f, _, err := lp.Simplex(c, A, b, 1e-10, nil)
		if errors.Is(err, lp.ErrInfeasible) {
			continue
		}
		if err != nil {
			t.Fatalf("simplex on mask %b: %v", mask, err)
		}
		best = min(best, fixed+f)
	}
	return best
}

// bruteSingle finds the single-source optimum by trying every assignment of
// customers to sites.
func bruteSingle(in *Instance) float64 {
	m, n := len(in.Sites), len(in.Customers)
	assign := make([]int, n)
	best := math.Inf(1)
	for {
		load := make([]float64, m)
		used := make([]bool, m)
		cost, ok := 0.0, true
		for j, i := range assign {
			if !in.Allowed(i, j) || in.Sites[i].Status == ForcedClosed {
				ok = false
				break
			}
			load[i] += in.Customers[j].Demand
			used[i] = true
			cost += in.Cost[i][j]
		}
		for i, s := range in.Sites {
			if load[i] > s.Capacity {
				ok = false
			}
			if used[i] || s.Status == ForcedOpen {
				cost += s.FixedCost
			}
		}
		if ok {
			best = min(best, cost)
		}
		k := 0
		for k < n && assign[k] == m-1 {
			assign[k] = 0
			k++
		}
		if k == n {
			return best
		}
		assign[k]++
	}
}

// oracleInstance is a small generated instance with forced sites and
// forbidden lanes and tight capacities.
func oracleInstance(t *testing.T, seed uint64) *Instance {
	in, err := Generate(5, 7, 1.8, seed)
	if err != nil {
		t.Fatal(err)
	}
	in.Sites[0].Status = ForcedOpen
	in.Sites[3].Status = ForcedClosed
	in.Cost[1][2] = math.Inf(1)
	in.Cost[2][2] = math.Inf(1)
	in.Cost[4][5] = math.Inf(1)
	if err := in.Validate(); err != nil {
		t.Fatal(err)
	}
	return in
}

func TestWriteMPSAgainstBruteForce(t *testing.T) {
	for seed := uint64(1); seed <= 4; seed++ {
		in := oracleInstance(t, seed)
		want := bruteSplit(t, in)
		status, obj, vals := solveCBC(t, in, false)
		if status != "Optimal" || math.Abs(obj-want) > 1e-6*want {
			t.Errorf("seed %d split: cbc %s %v, brute force with gonum simplex %v", seed, status, obj, want)
		}
		if v := Verify(in, planFrom(t, in, vals), false); !v.Feasible || math.Abs(v.Value-want) > 1e-5*want {
			t.Errorf("seed %d split: Verify of cbc's plan %v %v %v, want %v", seed, v.Feasible, v.Value, v.Problems, want)
		}
		gobj, _ := solveGLPK(t, in, false)
		if math.Abs(gobj-want) > 1e-6*want {
			t.Errorf("seed %d split: glpsol %v, brute force %v", seed, gobj, want)
		}

		want = bruteSingle(in)
		status, obj, vals = solveCBC(t, in, true)
		if math.IsInf(want, 1) {
			if !strings.Contains(strings.ToLower(status), "infeasible") {
				t.Errorf("seed %d single source: cbc %s, brute force finds no assignment", seed, status)
			}
			continue
		}
		if status != "Optimal" || math.Abs(obj-want) > 1e-6*want {
			t.Errorf("seed %d single source: cbc %s %v, brute force %v", seed, status, obj, want)
		}
		if v := Verify(in, planFrom(t, in, vals), true); !v.Feasible || math.Abs(v.Value-want) > 1e-5*want {
			t.Errorf("seed %d single: Verify of cbc's plan %v %v %v, want %v", seed, v.Feasible, v.Value, v.Problems, want)
		}
	}
}

func TestWriteMPSLayout(t *testing.T) {
	// 100 sites × 1000 customers need base-36 pair names; every name fits
	// in 8 characters and every field starts at its fixed-layout column.
	in, err := Generate(100, 1000, 2, 1)
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := WriteMPS(&b, in, false); err != nil {
		t.Fatal(err)
	}
	section := ""
	lines := 0
	for _, l := range strings.Split(strings.TrimSuffix(b.String(), "\n"), "\n") {
		if strings.HasPrefix(l, "*") {
			continue
		}
		if l[0] != ' ' {
			section = strings.Fields(l)[0]
			continue
		}
		lines++
		for k, start := range mpsColumns() {
			if len(l) < start {
				break
			}
			if l[start-2] != ' ' {
				t.Fatalf("%s line %q: no blank before column %d", section, l, start)
			}
			end := len(l)
			if k+1 < len(mpsColumns()) {
				end = min(end, mpsColumns()[k+1]-1)
			}
			if f := strings.TrimSpace(l[start-1 : end]); strings.Contains(f, " ") || (k == 3 || k == 5) && len(f) > 12 || (k == 1 || k == 2 || k == 4) && len(f) > 8 {
				t.Fatalf("%s line %q: field %d %q out of place", section, l, k+1, f)
			}
		}
	}
	// Rows: 1000 demand + 100 capacity + 100000 linking + aggregate + cost;
	// columns: 100000·4 + 100·(3 + 1000) entries + 2 markers; rhs 1001;
	// bounds 100100.
	if want := 101102 + 400000 + 100300 + 2 + 1001 + 100100; lines != want {
		t.Errorf("%d data lines, want %d", lines, want)
	}
	if _, err := exec.LookPath("cbc"); err == nil {
		dir := t.TempDir()
		path := filepath.Join(dir, "big.mps")
		if err := os.WriteFile(path, b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		out, _ := exec.Command("cbc", path, "quit").CombinedOutput()
		if !bytes.Contains(out, []byte("read with 0 errors")) || !bytes.Contains(out, []byte("101101 rows, 100100 columns and 400200 elements")) {
			t.Errorf("cbc did not read the file cleanly:\n%s", out)
		}
	}
}

// TestWriteMPSCBCAllSmall solves the 37 small OR-Library instances through
// the MPS export and checks the published optima of reference.csv, and
// Verify on each solver plan.
func TestWriteMPSCBCAllSmall(t *testing.T) {
	if testing.Short() {
		t.Skip("37 solver runs; skipped with -short")
	}
	for _, ref := range readReference(t) {
		if strings.HasPrefix(ref.name, "capa") || strings.HasPrefix(ref.name, "capb") || strings.HasPrefix(ref.name, "capc") {
			continue
		}
		in := readORLibFile(t, filepath.Base(ref.file), 0)
		status, obj, vals := solveCBC(t, in, false)
		// The published values are rounded to 3 decimals.
		if status != "Optimal" || math.Abs(obj-ref.value) > 1e-3 {
			t.Errorf("%s: cbc %s %v, published %v", ref.name, status, obj, ref.value)
		}
		if v := Verify(in, planFrom(t, in, vals), false); !v.Feasible || math.Abs(v.Value-ref.value) > 1e-2 {
			t.Errorf("%s: Verify of cbc's plan: %v %v %v, published %v", ref.name, v.Feasible, v.Value, v.Problems, ref.value)
		}
	}
}
