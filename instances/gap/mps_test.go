package gap

import (
	"bufio"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
)

// solveWithOracle runs an outside MIP solver (used here only as an oracle) on the
// exported model and returns its optimal objective and the plan it found.
func solveWithOracle(t *testing.T, solver string, in *Instance, maximise bool) (obj float64, assign []int) {
	t.Helper()
	bin, err := exec.LookPath(solver)
	if err != nil {
		t.Skipf("%s not installed (apt-get install coinor-cbc glpk-utils): %v", solver, err)
	}
	dir := t.TempDir()
	model := filepath.Join(dir, "model.mps")
	f, err := os.Create(model)
	if err != nil {
		t.Fatal(err)
	}
	if err := WriteMPS(f, in, maximise); err != nil {
		t.Fatal(err)
	}
	if err := f.Close(); err != nil {
		t.Fatal(err)
	}
	sol := filepath.Join(dir, "sol.txt")
	var cmd *exec.Cmd
	if solver == "cbc" {
		cmd = exec.Command(bin, model, "solve", "solu", sol)
	} else {
		cmd = exec.Command(bin, "--freemps", model, "-w", sol)
	}
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("%s: %v\n%s", solver, err, out)
	}
	text := string(out)
	if strings.Contains(text, "No match") || strings.Contains(text, "invalid") ||
		(solver == "cbc" && !strings.Contains(text, "read with 0 errors")) {
		t.Fatalf("%s complained about the model:\n%s", solver, out)
	}
	sf, err := os.Open(sol)
	if err != nil {
		t.Fatal(err)
	}
	defer sf.Close()
	assign = make([]int, in.Jobs)
	for j := range assign {
		assign[j] = -1
	}
	set := func(i, j int) {
		if assign[j] != -1 {
			t.Fatalf("%s: job %d assigned twice", solver, j+1)
		}
		assign[j] = i
	}
	sc := bufio.NewScanner(sf)
	first := true
	for sc.Scan() {
		fields := strings.Fields(sc.Text())
		if solver == "cbc" {
			// "Optimal - objective value V", then "idx name value cost".
			if first {
				if !strings.HasPrefix(sc.Text(), "Optimal") {
					t.Fatalf("cbc: %s", sc.Text())
				}
				obj, err = strconv.ParseFloat(fields[len(fields)-1], 64)
				if err != nil {
					t.Fatal(err)
				}
				first = false
				continue
			}
			v, _ := strconv.ParseFloat(fields[2], 64)
			var i, j int
			if _, err := fmt.Sscanf(fields[1], "x_%d_%d", &i, &j); err != nil || v < 0.5 {
				continue
			}
			set(i-1, j-1)
			continue
		}
		// glpsol: "s mip ROWS COLS STATUS OBJ" and "j COL VALUE", columns in
		// the order written (agent-major).
		switch fields[0] {
		case "s":
			if fields[4] != "o" {
				t.Fatalf("glpsol: status %q, want o (optimal)", fields[4])
			}
			obj, err = strconv.ParseFloat(fields[5], 64)
			if err != nil {
				t.Fatal(err)
			}
		case "j":
			k, _ := strconv.Atoi(fields[1])
			v, _ := strconv.ParseFloat(fields[2], 64)
			if v > 0.5 {
				set((k-1)/in.Jobs, (k-1)%in.Jobs)
			}
		}
	}
	return obj, assign
}

// The expected optima of gap1 instance 1 (c515-1) are 336 when maximised
// (OR-Library table of optima, as copied into the shared reference.csv) and
// 261 when minimised (reference.csv: published compilation value, also
// proved with an outside solver there).
func TestWriteMPSSolvesGap1(t *testing.T) {
	dir := gapBenchDir(t)
	in, err := ReadFile(filepath.Join(dir, "orlib", "gap1.txt"), 1)
	if err != nil {
		t.Fatal(err)
	}
	want := map[bool]int64{true: 336, false: 261}
	for _, r := range readGapReference(t, dir) {
		if r.file == "orlib/gap1.txt" && r.index == 1 && r.value != want[r.sense == "max"] {
			t.Fatalf("reference.csv gives %d for %s, test expects %d", r.value, r.sense, want[r.sense == "max"])
		}
	}
	for _, solver := range []string{"cbc", "glpsol"} {
		for _, maximise := range []bool{true, false} {
			obj, assign := solveWithOracle(t, solver, in, maximise)
			if maximise {
				obj = -obj // costs were negated in the file
			}
			if obj != float64(want[maximise]) {
				t.Errorf("%s, maximise=%v: optimum %v, want %d", solver, maximise, obj, want[maximise])
			}
			v := Verify(in, assign, maximise)
			if !v.Feasible || v.Value != want[maximise] {
				t.Errorf("%s, maximise=%v: plan verifies as %+v, want feasible with value %d", solver, maximise, v, want[maximise])
			}
		}
	}
}

// On small generated instances the optimum of the exported model equals
// the one found by enumerating every assignment.
func TestWriteMPSMatchesBruteForce(t *testing.T) {
	for k, kind := range []byte("abcde") {
		in, err := Generate(kind, 3, 7, uint64(k+1))
		if err != nil {
			t.Fatal(err)
		}
		maximise := k%2 == 0
		best, ok := enumerateOptimum(in, maximise)
		if !ok {
			t.Logf("type %c seed %d infeasible, skipped", kind, k+1)
			continue
		}
		obj, assign := solveWithOracle(t, "glpsol", in, maximise)
		if maximise {
			obj = -obj
		}
		if obj != float64(best) {
			t.Errorf("type %c maximise=%v: solver optimum %v, enumeration %d", kind, maximise, obj, best)
		}
		if v := Verify(in, assign, maximise); !v.Feasible || v.Value != best {
			t.Errorf("type %c: solver plan verifies as %+v, want value %d", kind, v, best)
		}
	}
}

func TestWriteMPSRejectsInvalid(t *testing.T) {
	in := &Instance{Agents: 1, Jobs: 1, Cost: [][]int64{{1}}, Use: [][]int64{{-1}}, Capacity: []int64{1}}
	if err := WriteMPS(new(strings.Builder), in, false); err == nil {
		t.Error("negative use accepted")
	}
}
