package main

import (
	"context"
	"encoding/csv"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"pincer/internal/benchdata"
)

// lotsizingReference reads the reference optimum of file from the shared
// reference.csv (values published by Belvaux and Wolsey 2000 for the
// Trigeiro-Thomas-McClain test set; see the benchmarks' SOURCES.md).
func lotsizingReference(t *testing.T, dir, file string) float64 {
	t.Helper()
	f, err := os.Open(filepath.Join(dir, "reference.csv"))
	if err != nil {
		t.Skipf("no reference.csv: %v", err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatalf("reference.csv: %v", err)
	}
	for _, r := range rows[1:] {
		if r[0] == file {
			v, err := strconv.ParseFloat(r[4], 64)
			if err != nil {
				t.Fatalf("reference.csv value of %s: %v", file, err)
			}
			return v
		}
	}
	t.Skipf("%s not in reference.csv", file)
	return 0
}

func TestLotSizingTTMBoundBelowReference(t *testing.T) {
	dir := benchdata.Dir(t, "lotsizing")
	// g53.dat (tr12-15): optimum 74634, Belvaux and Wolsey (2000) via
	// reference.csv; CBC reproduced it (see SOURCES.md).
	const file = "g53.dat"
	opt := lotsizingReference(t, dir, file)
	out := t.TempDir()
	rep, plan := filepath.Join(out, "run.json"), filepath.Join(out, "schedule.csv")
	code, stdout, errs := runCLI(t, context.Background(), "solve", "--format", "lotsizing-ttm", "--rounds", "50",
		"--quiet", "--report", rep, "--plan", plan, filepath.Join(dir, "ttm", file))
	if code != exitOK {
		t.Fatalf("exit %d: %s %s", code, stdout, errs)
	}
	m := readReport(t, rep)
	b, ok := m["bound"].(float64)
	if !ok {
		t.Fatalf("report has no bound: %v", m["bound"])
	}
	if b > opt+1e-6*opt {
		t.Fatalf("lower bound %v above the published optimum %v", b, opt)
	}
	if pv, ok := m["plan_value"].(float64); ok && pv < opt-1e-6*opt {
		t.Fatalf("plan value %v below the published optimum %v", pv, opt)
	}
	periods, err := os.ReadFile(filepath.Join(out, "schedule-periods.csv"))
	if err != nil {
		t.Fatalf("period table not written: %v", err)
	}
	if lines := strings.Count(string(periods), "\n"); lines != 16 || !strings.HasPrefix(string(periods), "period,load,capacity,slack,overtime,shadow_price\n") {
		t.Fatalf("period table has %d lines, want header + 15:\n%s", lines, periods)
	}
}

func TestLotSizingBadCSVFolderExitsTwo(t *testing.T) {
	dir := t.TempDir()
	files := map[string]string{
		"items.csv":    "id,name,unit_time,setup_time,setup_cost,holding_cost\nA,alpha,1,10,50,1\nB,beta,2,5,80,2\n",
		"demand.csv":   "item,period,quantity\nA,1,10\nB,2,lots\n",
		"capacity.csv": "period,capacity\n1,100\n2,100\n",
	}
	for name, body := range files {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(body), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	code, _, errs := runCLI(t, context.Background(), "solve", "--format", "lotsizing-csv", "--quiet", "--rounds", "5", dir)
	if code != exitBadInput {
		t.Fatalf("exit %d, want %d: %s", code, exitBadInput, errs)
	}
	// The fault is the third field of line 3 of demand.csv.
	if !strings.Contains(errs, "demand.csv:3:") || !strings.Contains(errs, "expected") {
		t.Fatalf("message does not name file, line and what was expected: %s", errs)
	}
}

func TestLotSizingDemoRuns(t *testing.T) {
	rep := filepath.Join(t.TempDir(), "plant.json")
	code, out, errs := runCLI(t, context.Background(), "demo", "--scenario", "plant", "--rounds", "40", "--quiet", "--report", rep)
	if code != exitOK {
		t.Fatalf("exit %d: %s %s", code, out, errs)
	}
	if !strings.Contains(out, "line hour") || !strings.Contains(out, "decision support") {
		t.Fatalf("demo does not explain the line-hour prices:\n%s", out)
	}
	readReport(t, rep)
}
