package scheduling

import (
	"bytes"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"pincer/internal/oracle"
)

// Source of the expected values: exhaustive search (ioBruteForce) on the
// same instance; CBC solves the exported time-indexed MIP.
func TestMPSAgainstCBCAndBruteForce(t *testing.T) {
	if _, err := exec.LookPath("cbc"); err != nil {
		t.Skip("cbc not installed (apt-get install coinor-cbc); the MPS oracle check is skipped")
	}
	for _, c := range []struct {
		name string
		cfg  GenerateConfig
	}{
		// The case: 10 jobs on 2 identical machines.
		{"10 jobs 2 machines", GenerateConfig{Jobs: 10, Machines: 2, TF: 0.6, RDD: 0.6, MaxProcessing: 8, Seed: 3}},
		// Release dates and eligibility over two classes (1 + 2 machines).
		{"7 jobs 2 classes releases", GenerateConfig{Jobs: 7, Machines: 2, Classes: 2, TF: 1, RDD: 0.2, MaxProcessing: 6,
			ReleaseFactor: 0.5, EligibleShare: 0.6, Seed: 5}},
		{"6 jobs weighted completion", GenerateConfig{Jobs: 6, Machines: 2, Classes: 2, MaxProcessing: 5,
			ReleaseFactor: 0.8, EligibleShare: 0.5, Objective: WeightedCompletion, Seed: 11}},
	} {
		t.Run(c.name, func(t *testing.T) {
			in := Generate(c.cfg)
			released, restricted := 0, 0
			for _, jb := range in.Jobs {
				released += min(jb.Release, 1)
				restricted += min(len(jb.Eligible), 1)
			}
			if c.cfg.ReleaseFactor > 0 && (released == 0 || restricted == 0) {
				t.Fatalf("the case should have release dates and eligibility, has %d and %d jobs with them", released, restricted)
			}
			want, s := ioBruteForce(t, in)
			if want == 0 {
				t.Fatal("the instance is trivial (optimum 0); pick tighter due dates")
			}
			if rep := Verify(in, s); !rep.Feasible || rep.Value != want {
				t.Fatalf("brute-force schedule does not verify: %+v (want value %d)", rep, want)
			}
			out := oracle.CBC(t, func(w io.Writer) error { return WriteMPS(w, in) }, 20)
			if !out.Optimal {
				t.Fatalf("cbc did not prove optimality:\n%s", out.Output)
			}
			if math.Abs(out.Objective-float64(want)) > 1e-6 {
				t.Fatalf("cbc optimum %v, brute force %d", out.Objective, want)
			}
			t.Logf("%s: optimum %d (cbc and brute force agree)", in.Name, want)
		})
	}
}

func TestMPSShapeAndLimit(t *testing.T) {
	in := &Instance{Name: "two jobs", Classes: []Class{{ID: "A", Machines: 1}, {ID: "B", Machines: 2}},
		Jobs: []Job{{ID: "a", Processing: 2, Weight: 3, Due: 1, Eligible: []int{0}}, {ID: "b", Processing: 1, Weight: 1, Due: 0, Release: 1}}}
	var buf bytes.Buffer
	if err := WriteMPS(&buf, in); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	// Horizons by hand (Instance.Horizons): class A, 1 machine: r = 1,
	// load 3 -> 4; class B, 2 machines: load 1, longest 1 -> 1 + 1 + 1 = 3.
	// Job a on A starts 0..2 (3 columns); b on A starts 1..3, on B 1..2.
	for _, want := range []string{"NAME two_jobs", " E job_1", " L cap_1_3", " L cap_2_2", "    x_1_1_0 obj 3", "    x_2_2_2 cap_2_2 1", "    rhs cap_2_0 2", " BV bnd x_2_1_3"} {
		if !strings.Contains(text, want) {
			t.Errorf("MPS lacks %q:\n%s", want, text)
		}
	}
	if strings.Contains(text, "x_1_2_") || strings.Contains(text, "cap_1_4") || strings.Contains(text, "x_2_2_3") {
		t.Errorf("MPS has a column or row outside the model:\n%s", text)
	}
	if cols, _ := MPSSize(in); cols != 3+3+2 {
		t.Errorf("MPSSize says %d columns, want 8", cols)
	}
	big := Generate(Benchmark5000(1))
	err := WriteMPS(io.Discard, big)
	if err == nil || !strings.Contains(err.Error(), "stops at 2000000 columns") {
		t.Fatalf("the 5,000-job instance was not refused clearly: %v", err)
	}
}

// ioCBCLinear solves a linear model with cbc and returns its optimum; it
// skips when cbc is absent.
func ioCBCLinear(t *testing.T, write func(io.Writer) error) float64 {
	t.Helper()
	bin, err := exec.LookPath("cbc")
	if err != nil {
		t.Skip("cbc not installed (apt-get install coinor-cbc); the LP oracle check is skipped")
	}
	path := filepath.Join(t.TempDir(), "lp.mps")
	var buf bytes.Buffer
	if err := write(&buf); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command(bin, path, "sec", "20", "solve").CombinedOutput()
	if err != nil {
		t.Fatalf("cbc: %v\n%s", err, out)
	}
	m := regexp.MustCompile(`(?m)^Optimal objective (\S+)`).FindSubmatch(out)
	if m == nil || !bytes.Contains(out, []byte("read with 0 errors")) {
		t.Fatalf("cbc gave no optimal LP objective:\n%s", out)
	}
	v, err := strconv.ParseFloat(string(m[1]), 64)
	if err != nil {
		t.Fatal(err)
	}
	return v
}

// The linear relaxation's optimum (cbc) can be no more than the optimum
// (exhaustive search), and on these instances it is positive.
func TestLPRelaxationBelowOptimum(t *testing.T) {
	for seed := uint64(1); seed <= 3; seed++ {
		in := Generate(GenerateConfig{Jobs: 8, Machines: 2, Classes: 2, TF: 0.8, RDD: 0.4, MaxProcessing: 6,
			ReleaseFactor: 0.4, EligibleShare: 0.4, Seed: seed})
		opt, _ := ioBruteForce(t, in)
		lp := ioCBCLinear(t, func(w io.Writer) error { return WriteLPRelaxationMPS(w, in) })
		if lp > float64(opt)+1e-6 || lp < 0 {
			t.Fatalf("seed %d: LP value %v, optimum %d", seed, lp, opt)
		}
		t.Logf("seed %d: LP %v <= optimum %d", seed, lp, opt)
	}
}

// A second reader of the same file: GLPK's glpsol (Debian glpk-utils)
// must read the free MPS and find the exhaustive-search optimum too.
func TestMPSAgainstGLPK(t *testing.T) {
	bin, err := exec.LookPath("glpsol")
	if err != nil {
		t.Skip("glpsol not installed (apt-get install glpk-utils); the second MPS reader is skipped")
	}
	in := Generate(GenerateConfig{Jobs: 8, Machines: 2, Classes: 2, TF: 1, RDD: 0.4, MaxProcessing: 7,
		ReleaseFactor: 0.3, EligibleShare: 0.5, Seed: 8})
	want, _ := ioBruteForce(t, in)
	dir := t.TempDir()
	for _, c := range []struct {
		file  string
		write func(io.Writer, *Instance) error
	}{{"mip.mps", WriteMPS}, {"lp.mps", WriteLPRelaxationMPS}} {
		var buf bytes.Buffer
		if err := c.write(&buf, in); err != nil {
			t.Fatal(err)
		}
		path := filepath.Join(dir, c.file)
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		out, err := exec.Command(bin, "--freemps", path, "--tmlim", "20", "-o", path+".out").CombinedOutput()
		if err != nil {
			t.Fatalf("glpsol: %v\n%s", err, out)
		}
		report, err := os.ReadFile(path + ".out")
		if err != nil {
			t.Fatal(err)
		}
		m := regexp.MustCompile(`Objective:\s+obj = (\S+)`).FindSubmatch(report)
		if m == nil || !bytes.Contains(report, []byte("OPTIMAL")) {
			t.Fatalf("glpsol found no optimum:\n%s\n%s", out, report)
		}
		v, _ := strconv.ParseFloat(string(m[1]), 64)
		if c.file == "mip.mps" && math.Abs(v-float64(want)) > 1e-6 {
			t.Fatalf("glpsol optimum %v, brute force %d", v, want)
		}
		if c.file == "lp.mps" && v > float64(want)+1e-6 {
			t.Fatalf("glpsol LP value %v above the optimum %d", v, want)
		}
		t.Logf("%s: glpsol %v, optimum %d", c.file, v, want)
	}
}
