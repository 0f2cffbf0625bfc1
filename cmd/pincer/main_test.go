package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"reflect"
	"strconv"
	"strings"
	"testing"
	"time"
)

// The files in ../../testdata were made with `pincer gen gap`; these tests
// check the command line's mechanics (exit codes, files, determinism), not
// solution quality, which the family packages test against published values
// and reference solvers.

func testdata(name string) string { return filepath.Join("..", "..", "testdata", name) }

func runCLI(t *testing.T, ctx context.Context, args ...string) (code int, stdout, stderr string) {
	t.Helper()
	var out, errb bytes.Buffer
	code = run(ctx, args, &out, &errb)
	return code, out.String(), errb.String()
}

func readReport(t *testing.T, path string) map[string]any {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("report not written: %v", err)
	}
	var m map[string]any
	if err := json.Unmarshal(b, &m); err != nil {
		t.Fatalf("report is not JSON: %v", err)
	}
	return m
}

func TestSolveWritesReportAndPlan(t *testing.T) {
	dir := t.TempDir()
	rep, plan := filepath.Join(dir, "run.json"), filepath.Join(dir, "plan.csv")
	code, out, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--time", "20s",
		"--quiet", "--report", rep, "--plan", plan, testdata("gap-c-5x30.txt"))
	if code != exitOK {
		t.Fatalf("exit %d, stderr %s", code, errs)
	}
	for _, want := range []string{"plan value", "bound", "gap", "proved", "stop", "rounds", "decision support"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q:\n%s", want, out)
		}
	}
	m := readReport(t, rep)
	for _, key := range []string{"report_version", "format", "file", "index", "sense", "plan_value", "bound", "gap",
		"proved_optimal", "stop", "rounds", "seconds", "workers", "seed", "rows", "history", "plan"} {
		if _, ok := m[key]; !ok {
			t.Errorf("report lacks key %q", key)
		}
	}
	if m["plan_value"] == nil {
		t.Fatal("no plan value")
	}
	if pv, b := m["plan_value"].(float64), m["bound"].(float64); b > pv+1e-9 {
		t.Fatalf("lower bound %v above plan value %v", b, pv)
	}
	// The plan file verifies, by the independent path, to the reported value.
	code, out, errs = runCLI(t, context.Background(), "verify", "--format", "gap-orlib", testdata("gap-c-5x30.txt"), plan)
	if code != exitOK || !strings.Contains(out, "feasible  yes") {
		t.Fatalf("verify exit %d: %s %s", code, out, errs)
	}
}

func TestVerifyRejectsInfeasiblePlan(t *testing.T) {
	dir := t.TempDir()
	plan := filepath.Join(dir, "plan.csv")
	// Every job on agent 1 overloads it (capacity is about 0.8 * sum / 5).
	var b strings.Builder
	b.WriteString("job,agent,cost,use\n")
	for j := 1; j <= 30; j++ {
		b.WriteString(strconv.Itoa(j) + ",1,," + "\n")
	}
	if err := os.WriteFile(plan, []byte(b.String()), 0o644); err != nil {
		t.Fatal(err)
	}
	code, out, _ := runCLI(t, context.Background(), "verify", "--format", "gap-orlib", testdata("gap-c-5x30.txt"), plan)
	if code != exitNoPlan || !strings.Contains(out, "over capacity") {
		t.Fatalf("exit %d, output %s", code, out)
	}
}

func TestBadInputExitsTwo(t *testing.T) {
	dir := t.TempDir()
	cases := map[string]string{
		"truncated.txt":    "1\n2 3\n1 2 3\n4 5 6\n1 1 1\n1 1\n",
		"negative.txt":     "1\n2 2\n1 2\n3 4\n1 1\n1 1\n5 -3\n",
		"nonnumber.txt":    "1\n2 2\n1 2\n3 x\n1 1\n1 1\n5 5\n",
		"wrongcounts.txt":  "1\n2 2\n1 2\n3 4\n1 1\n1 1\n5 5 7 8\n",
		"emptyfile.txt":    "",
		"zerocounts.txt":   "1\n0 2\n",
		"badheader.txt":    "3\n2 2\n1 2\n3 4\n1 1\n1 1\n5 5\n",
		"negativeuse.txt":  "2 2\n1 2\n3 4\n1 -1\n1 1\n5 5\n",
		"hugeheader.txt":   "1\n100000 100000\n1 2\n",
		"floatnumbers.txt": "1\n2 2\n1.5 2\n3 4\n1 1\n1 1\n5 5\n",
	}
	for name, content := range cases {
		path := filepath.Join(dir, name)
		if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
			t.Fatal(err)
		}
		code, _, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--time", "2s", path)
		if code != exitBadInput {
			t.Errorf("%s: exit %d, want %d; stderr %s", name, code, exitBadInput, errs)
			continue
		}
		if !strings.Contains(errs, name) || !strings.Contains(errs, "expected") {
			t.Errorf("%s: message does not name the file and what was expected: %s", name, errs)
		}
	}
	code, _, _ := runCLI(t, context.Background(), "solve", "--format", "nope", testdata("gap-c-5x30.txt"))
	if code != exitBadInput {
		t.Errorf("unknown format: exit %d", code)
	}
	code, _, _ = runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--index", "4", testdata("gap-c-5x30.txt"))
	if code != exitBadInput {
		t.Errorf("index out of range: exit %d", code)
	}
	code, _, _ = runCLI(t, context.Background(), "solve", "--format", "gap-orlib", filepath.Join(dir, "missing.txt"))
	if code != exitBadInput {
		t.Errorf("missing file: exit %d", code)
	}
	code, _, _ = runCLI(t, context.Background(), "solve", "--bogus-flag")
	if code != exitBadInput {
		t.Errorf("unknown flag: exit %d", code)
	}
}

// normalise drops what legitimately differs between runs: timings and the
// worker count itself.
func normalise(m map[string]any) {
	delete(m, "seconds")
	delete(m, "workers")
	if h, ok := m["history"].([]any); ok {
		for _, r := range h {
			delete(r.(map[string]any), "seconds")
		}
	}
}

func TestSameSeedSameReportAnyWorkers(t *testing.T) {
	dir := t.TempDir()
	var ref map[string]any
	for _, w := range []string{"1", "2", "8"} {
		rep := filepath.Join(dir, "run"+w+".json")
		code, _, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--time", "0",
			"--rounds", "40", "--gap", "0", "--seed", "9", "--workers", w, "--report", rep, testdata("gap-d-10x200.txt"))
		if code != exitOK && code != exitNoPlan {
			t.Fatalf("workers %s: exit %d: %s", w, code, errs)
		}
		m := readReport(t, rep)
		normalise(m)
		if ref == nil {
			ref = m
			continue
		}
		if !reflect.DeepEqual(ref, m) {
			t.Fatalf("--workers %s gives a different report than --workers 1", w)
		}
	}
}

func TestInterruptWritesReportAndPlan(t *testing.T) {
	dir := t.TempDir()
	rep, plan := filepath.Join(dir, "run.json"), filepath.Join(dir, "plan.csv")
	// Cancel like Ctrl-C does (a deadline would count as a time limit).
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	timer := time.AfterFunc(1500*time.Millisecond, cancel)
	defer timer.Stop()
	code, _, errs := runCLI(t, ctx, "solve", "--format", "gap-orlib", "--quiet", "--time", "60s", "--gap", "0",
		"--stall", "1000000000", "--report", rep, "--plan", plan, testdata("gap-d-10x200.txt"))
	if code != exitInterrupted {
		t.Fatalf("exit %d, want %d: %s", code, exitInterrupted, errs)
	}
	m := readReport(t, rep)
	if m["stop"] != "interrupted" {
		t.Fatalf("stop %v", m["stop"])
	}
	if m["plan_value"] == nil {
		t.Fatal("interrupted run kept no plan")
	}
	if _, err := os.Stat(plan); err != nil {
		t.Fatalf("plan not written: %v", err)
	}
}

func TestExportMPS(t *testing.T) {
	out := filepath.Join(t.TempDir(), "model.mps")
	code, _, errs := runCLI(t, context.Background(), "export", "mps", "--format", "gap-orlib", testdata("gap-c-5x30.txt"), "-o", out)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	b, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	for _, section := range []string{"ROWS", "COLUMNS", "RHS", "ENDATA"} {
		if !bytes.Contains(b, []byte(section)) {
			t.Errorf("MPS lacks %s", section)
		}
	}
}

func TestDemoRuns(t *testing.T) {
	rep := filepath.Join(t.TempDir(), "demo.json")
	code, out, errs := runCLI(t, context.Background(), "demo", "--quiet", "--time", "4s", "--report", rep)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "One more hour at") {
		t.Fatalf("demo does not explain prices:\n%s", out)
	}
	readReport(t, rep)
}
