package main

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestSchedulingFolder: a generated jobs folder solves end to end; the
// plan written verifies independently (verify recomputes tardiness and
// checks overlaps, releases and eligibility), the Gantt chart is written,
// the summary names the busiest windows, and a folder with an unknown
// eligible class exits 2 naming the file, line and column.
func TestSchedulingFolder(t *testing.T) {
	dir := t.TempDir()
	folder := filepath.Join(dir, "jobs")
	code, _, errs := runCLI(t, context.Background(), "gen", "scheduling", "--jobs", "30", "--machines", "3", "--classes", "2",
		"--release-factor", "0.3", "--eligible-share", "0.3", "--seed", "7", "-o", folder)
	if code != exitOK {
		t.Fatalf("gen: exit %d: %s", code, errs)
	}
	plan := filepath.Join(dir, "schedule.csv")
	gantt := filepath.Join(dir, "schedule.svg")
	code, out, errs := runCLI(t, context.Background(), "solve", "--format", "jobs-csv", "--rounds", "150", "--quiet",
		"--plan", plan, "--gantt", gantt, folder)
	if code != exitOK {
		t.Fatalf("solve: exit %d: %s", code, errs)
	}
	if !strings.Contains(out, "one more machine of class") {
		t.Errorf("summary lacks the busiest windows:\n%s", out)
	}
	if st, err := os.Stat(gantt); err != nil || st.Size() == 0 {
		t.Errorf("no Gantt chart: %v", err)
	}
	code, out, errs = runCLI(t, context.Background(), "verify", "--format", "jobs-csv", folder, plan)
	if code != exitOK || !strings.Contains(out, "feasible  yes") {
		t.Errorf("verify: exit %d\n%s\n%s", code, out, errs)
	}
	code, _, errs = runCLI(t, context.Background(), "solve", "--format", "jobs-csv", "--rounds", "5", "--quiet",
		filepath.Join("..", "..", "instances", "scheduling", "testdata", "bad-eligible"))
	if code != exitBadInput || !strings.Contains(errs, "jobs.csv:3:") {
		t.Errorf("bad eligible class: exit %d, %q; want exit 2 naming jobs.csv line 3", code, errs)
	}
	code, _, errs = runCLI(t, context.Background(), "solve", "--format", "jobs-csv", "--machines", "3", folder)
	if code != exitBadInput || !strings.Contains(errs, "--machines 3") {
		t.Errorf("--machines with a folder: exit %d, %q", code, errs)
	}
}
