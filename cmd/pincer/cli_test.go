package main

import (
	"context"
	"encoding/json"
	"go/parser"
	"go/token"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"pincer/decomp"
)

// TestOnlyRegistryNamesFamilies parses the command line's sources: only
// registry.go may import a family package (pincer/instances/<family>).
func TestOnlyRegistryNamesFamilies(t *testing.T) {
	files, err := filepath.Glob("*.go")
	if err != nil || len(files) == 0 {
		t.Fatalf("no sources: %v", err)
	}
	fset := token.NewFileSet()
	named := 0
	for _, f := range files {
		af, err := parser.ParseFile(fset, f, nil, parser.ImportsOnly)
		if err != nil {
			t.Fatal(err)
		}
		for _, imp := range af.Imports {
			path, _ := strconv.Unquote(imp.Path.Value)
			if !strings.HasPrefix(path, "pincer/instances/") {
				continue
			}
			if f != "registry.go" {
				t.Errorf("%s imports family package %s; only registry.go may", f, path)
			}
			named++
		}
	}
	if named == 0 {
		t.Error("registry.go names no family")
	}
}

func TestVersion(t *testing.T) {
	for _, args := range [][]string{{"--version"}, {"version"}} {
		code, out, errs := runCLI(t, context.Background(), args...)
		if code != exitOK || !strings.HasPrefix(out, "pincer ") || !strings.Contains(out, "go1") {
			t.Errorf("%v: exit %d, out %q, err %q", args, code, out, errs)
		}
	}
}

// TestDashIsStdout: --report - prints the JSON report on stdout and moves
// the summary to stderr; no file named "-" appears.
func TestDashIsStdout(t *testing.T) {
	file, err := filepath.Abs(testdata("gap-c-5x30.txt"))
	if err != nil {
		t.Fatal(err)
	}
	t.Chdir(t.TempDir())
	code, out, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--rounds", "30",
		"--report", "-", file)
	if code != exitOK && code != exitNoPlan {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var m map[string]any
	if err := json.Unmarshal([]byte(out), &m); err != nil {
		t.Fatalf("stdout is not the report: %v\n%s", err, out)
	}
	if !strings.Contains(errs, "bound") {
		t.Errorf("summary not on stderr: %q", errs)
	}
	if _, err := os.Stat("-"); err == nil {
		t.Error(`a file named "-" was written`)
	}
	code, out, errs = runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--rounds", "30",
		"--plan", "-", file)
	if code != exitOK || !strings.HasPrefix(out, "job,agent,cost,use\n") {
		t.Errorf("--plan -: exit %d, stdout %q, stderr %q", code, out, errs)
	}
	code, out, _ = runCLI(t, context.Background(), "export", "mps", "--format", "gap-orlib", "-o", "-", file)
	if code != exitOK || !strings.Contains(out, "ROWS") {
		t.Errorf("export -o -: exit %d, %q", code, out)
	}
}

// TestUnwritableOutputBeforeSolving: a report, plan or export path that
// cannot be written stops the run before any solving, with exit 2 and the
// path in the message.
func TestUnwritableOutputBeforeSolving(t *testing.T) {
	dir := t.TempDir()
	bad := filepath.Join(dir, "no-such-folder", "x.json")
	for _, flag := range []string{"--report", "--plan"} {
		start := time.Now()
		code, out, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--time", "60s",
			"--gap", "0", flag, bad, testdata("gap-d-10x200.txt"))
		if code != exitBadInput || !strings.Contains(errs, bad) || strings.Contains(out, "plan value") {
			t.Errorf("%s: exit %d, stderr %q, stdout %q", flag, code, errs, out)
		}
		if d := time.Since(start); d > 20*time.Second {
			t.Errorf("%s: took %v, so it solved first", flag, d)
		}
	}
	code, _, errs := runCLI(t, context.Background(), "export", "mps", "--format", "gap-orlib", "-o", bad, testdata("gap-c-5x30.txt"))
	if code != exitBadInput || !strings.Contains(errs, bad) {
		t.Errorf("export: exit %d, %q", code, errs)
	}
	// A folder is not a file; an existing file is left as it was.
	keep := filepath.Join(dir, "keep.json")
	if err := os.WriteFile(keep, []byte("mine"), 0o644); err != nil {
		t.Fatal(err)
	}
	code, _, errs = runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--report", keep,
		"--plan", dir, testdata("gap-c-5x30.txt"))
	if code != exitBadInput || !strings.Contains(errs, dir) {
		t.Errorf("plan into a folder: exit %d, %q", code, errs)
	}
	if b, _ := os.ReadFile(keep); string(b) != "mine" {
		t.Errorf("the writability check changed %s: %q", keep, b)
	}
}

// TestGenFolderRefusesNonEmpty: gen cflp never writes into a non-empty
// folder without --force, and never deletes files it did not write.
func TestGenFolderRefusesNonEmpty(t *testing.T) {
	dir := t.TempDir()
	mine := filepath.Join(dir, "notes.txt")
	if err := os.WriteFile(mine, []byte("do not touch"), 0o644); err != nil {
		t.Fatal(err)
	}
	args := []string{"gen", "cflp", "--sites", "3", "--customers", "5", "-o", dir}
	code, _, errs := runCLI(t, context.Background(), args...)
	if code != exitBadInput || !strings.Contains(errs, dir) || !strings.Contains(errs, "--force") {
		t.Fatalf("exit %d, %q", code, errs)
	}
	if _, err := os.Stat(filepath.Join(dir, "sites.csv")); err == nil {
		t.Error("sites.csv written despite the refusal")
	}
	code, _, errs = runCLI(t, context.Background(), append(args, "--force")...)
	if code != exitOK {
		t.Fatalf("--force: exit %d, %q", code, errs)
	}
	if b, err := os.ReadFile(mine); err != nil || string(b) != "do not touch" {
		t.Errorf("foreign file changed: %q %v", b, err)
	}
	// Generated data carry at most two decimals.
	b, err := os.ReadFile(filepath.Join(dir, "customers.csv"))
	if err != nil {
		t.Fatal(err)
	}
	for _, line := range strings.Split(strings.TrimSpace(string(b)), "\n")[1:] {
		f := strings.Split(line, ",")
		if d := f[len(f)-1]; strings.Contains(d, ".") && len(d)-strings.Index(d, ".")-1 > 2 {
			t.Errorf("demand %s has more than two decimals", d)
		}
	}
	// An empty or missing folder is fine.
	code, _, errs = runCLI(t, context.Background(), "gen", "cflp", "--sites", "3", "--customers", "5", "-o", filepath.Join(dir, "new"))
	if code != exitOK {
		t.Errorf("new folder: exit %d, %q", code, errs)
	}
}

// TestFlagRanges: every out-of-range value exits 2 and says the range.
func TestFlagRanges(t *testing.T) {
	gapFile := testdata("gap-c-5x30.txt")
	scenario := t.TempDir()
	if code, _, errs := runCLI(t, context.Background(), "gen", "cflp", "--sites", "4", "--customers", "8", "--ratio", "3", "--seed", "2", "-o", scenario, "--force"); code != exitOK {
		t.Fatalf("gen cflp: exit %d: %s", code, errs)
	}
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"solve", "--format", "gap-orlib", "--index", "0", gapFile}, "at least 1"},
		{[]string{"solve", "--format", "cflp-orlib", "--index", "5", gapFile}, "1..4"},
		{[]string{"solve", "--format", "cflp-csv", "--index", "2", scenario}, "a scenario folder holds one instance"},
		{[]string{"solve", "--format", "gap-orlib", "--gap", "-1", gapFile}, "at least 0"},
		{[]string{"solve", "--format", "gap-orlib", "--top", "-1", gapFile}, "at least 0"},
		{[]string{"solve", "--format", "gap-orlib", "--workers", "0", gapFile}, "at least 1"},
		{[]string{"solve", "--format", "gap-orlib", "--sense", "up", gapFile}, "one of min, max"},
		{[]string{"solve", "--format", "gap-orlib", "--relax", "site", gapFile}, "one of knapsack, choice"},
		{[]string{"solve", "--format", "cflp-orlib", "--sense", "max", gapFile}, "one of min"},
		{[]string{"solve", "--format", "gap-orlib", "--history", "some", gapFile}, "one of summary, full"},
		{[]string{"gen", "gap", "--type", "f"}, "one of a, b, c, d, e"},
		{[]string{"gen", "gap", "--agents", "0"}, "at least 1"},
		{[]string{"gen", "cflp", "--ratio", "0.5", "-o", t.TempDir()}, "at least 1"},
		{[]string{"solve", "--format", "gap-orlib", "--single-source", gapFile}, "does not apply to --format gap-orlib"},
		{[]string{"demo", "--scenario", "orders", "--single-source"}, "does not apply to --scenario orders"},
	}
	for _, c := range cases {
		code, _, errs := runCLI(t, context.Background(), c.args...)
		if code != exitBadInput || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q, want 2 and %q", c.args, code, errs, c.want)
		}
	}
}

func TestWrongFormatHint(t *testing.T) {
	code, _, errs := runCLI(t, context.Background(), "solve", "--format", "cflp-orlib", "--quiet", testdata("gap-c-5x30.txt"))
	if code != exitBadInput || !strings.Contains(errs, "parses as --format gap-orlib") {
		t.Errorf("exit %d, %q", code, errs)
	}
}

func TestCompletionValues(t *testing.T) {
	cases := []struct {
		args []string
		want []string
	}{
		{[]string{"__complete", "solve", "--format", ""}, []string{"gap-orlib", "cflp-orlib", "cflp-csv"}},
		{[]string{"__complete", "solve", "--format", "gap-orlib", "--sense", ""}, []string{"min", "max"}},
		{[]string{"__complete", "solve", "--format", "gap-orlib", "--relax", ""}, []string{"knapsack", "choice"}},
		{[]string{"__complete", "solve", "--format", "cflp-csv", "--relax", ""}, []string{"site-aggregate", "site"}},
		{[]string{"__complete", "gen", "gap", "--type", ""}, []string{"a", "b", "c", "d", "e"}},
	}
	for _, c := range cases {
		code, out, errs := runCLI(t, context.Background(), c.args...)
		if code != exitOK {
			t.Fatalf("%v: exit %d %s", c.args, code, errs)
		}
		lines := strings.Split(out, "\n")
		for _, w := range c.want {
			found := false
			for _, l := range lines {
				found = found || l == w
			}
			if !found {
				t.Errorf("%v: no %q in %q", c.args, w, out)
			}
		}
	}
}

// TestDemoReportOnlyWhenAsked: the demo writes no report unless --report
// names one; names of the workshops reach the report and plan.
func TestDemoReportOnlyWhenAsked(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	code, out, errs := runCLI(t, context.Background(), "demo", "--quiet", "--rounds", "20", "--report", "")
	if code != exitOK && code != exitNoPlan {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("demo wrote %v with --report ''", entries)
	}
	if strings.Contains(out, "Report written") {
		t.Error("summary claims a report")
	}
	code, _, errs = runCLI(t, context.Background(), "demo", "--quiet", "--rounds", "20", "--report", "r.json")
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	m := readReport(t, "r.json")
	fam := m["family"].(map[string]any)
	res := fam["resources"].([]any)
	if name, _ := res[0].(map[string]any)["name"].(string); name != "Ashcombe" {
		t.Errorf("first workshop named %q, want Ashcombe", name)
	}
	plan := m["plan"].([]any)
	if n, _ := plan[0].(map[string]any)["agent_name"].(string); n == "" {
		t.Error("plan lacks workshop names")
	}
}

// TestProgressWhenNotTerminal: log lines carry elapsed seconds and the gap,
// and a final line closes the run.
func TestProgressWhenNotTerminal(t *testing.T) {
	code, _, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--rounds", "30", testdata("gap-c-5x30.txt"))
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{"seconds=", "gap=", "finished", "stop="} {
		if !strings.Contains(errs, want) {
			t.Errorf("progress lacks %q:\n%s", want, errs)
		}
	}
}

func TestThinHistory(t *testing.T) {
	h := make([]decomp.RoundRecord, 20000)
	bound := 0.0
	for k := range h {
		if k%97 == 0 { // 207 improvements
			bound++
		}
		h[k] = decomp.RoundRecord{Round: k + 1, Bound: bound, PlanValue: math.NaN()}
	}
	got := thinHistory(h, maxHistory)
	if len(got) > maxHistory+210 || len(got) < maxHistory/2 {
		t.Fatalf("kept %d rounds", len(got))
	}
	if got[0].Round != 1 || got[len(got)-1].Round != len(h) {
		t.Error("first or last round dropped")
	}
	kept := map[int]bool{}
	for _, r := range got {
		kept[r.Round] = true
	}
	for k := 1; k < len(h); k++ {
		if h[k].Bound != h[k-1].Bound && !kept[h[k].Round] {
			t.Fatalf("improvement at round %d dropped", h[k].Round)
		}
	}
	if short := h[:50]; len(thinHistory(short, maxHistory)) != 50 {
		t.Error("short history thinned")
	}
}

// TestRoundedBoundWording: an integral objective's bound is shown with its
// rounding, and proved optimality says why.
func TestRoundedBoundWording(t *testing.T) {
	if r, ok := roundedBound(338.23, true, decomp.Minimise); !ok || r != 339 {
		t.Errorf("min: %v %v", r, ok)
	}
	if r, ok := roundedBound(338.23, true, decomp.Maximise); !ok || r != 338 {
		t.Errorf("max: %v %v", r, ok)
	}
	if _, ok := roundedBound(338.23, false, decomp.Minimise); ok {
		t.Error("rounded a fractional objective")
	}
	if r, ok := roundedBound(339.0000000001, true, decomp.Minimise); ok && r != 339 {
		t.Errorf("noise above an integer rounds to %v", r)
	}
}

func TestRoundNumberJSON(t *testing.T) {
	b, err := json.Marshal([]any{rnum(1862.9699999999998), num(1862.9699999999998), rnum(math.NaN())})
	if err != nil || string(b) != "[1862.97,1862.9699999999998,null]" {
		t.Errorf("%s %v", b, err)
	}
}
