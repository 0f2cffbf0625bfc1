package main

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestWarmStart: a run warm-started from an earlier report starts at that
// report's bound (its first round is evaluated at the report's prices,
// which carry 10 significant digits), and reports where its prices came
// from; a report of another instance, a file that is not a report and a
// warm start beside --resume are refused with exit 2.
func TestWarmStart(t *testing.T) {
	file := testdata("gap-c-5x30.txt")
	dir := t.TempDir()
	first := filepath.Join(dir, "first.json")
	code, _, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--rounds", "80", "--report", first, file)
	if code != exitOK && code != exitNoPlan {
		t.Fatalf("first run: exit %d: %s", code, errs)
	}
	var a struct {
		Bound float64 `json:"bound"`
	}
	readJSON(t, first, &a)

	second := filepath.Join(dir, "second.json")
	code, _, errs = runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--rounds", "5", "--warm-start", first, "--report", second, file)
	if code != exitOK && code != exitNoPlan {
		t.Fatalf("warm run: exit %d: %s", code, errs)
	}
	var b struct {
		History []struct {
			Value float64 `json:"value"`
		} `json:"history"`
		WarmStart *warmJSON `json:"warm_start"`
	}
	readJSON(t, second, &b)
	if b.WarmStart == nil || b.WarmStart.RowsMatched == 0 || b.WarmStart.RowsMissing != 0 {
		t.Fatalf("warm_start %+v, want every row matched", b.WarmStart)
	}
	if len(b.History) == 0 || math.Abs(b.History[0].Value-a.Bound) > 1e-6*math.Max(1, math.Abs(a.Bound)) {
		t.Fatalf("warm run's first round %v, earlier bound %v", b.History, a.Bound)
	}

	junk := filepath.Join(dir, "junk.json")
	if err := os.WriteFile(junk, []byte("{\"rows\": 3}"), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{"--warm-start", first, testdata("gap-d-10x200.txt")}, "the report is of instance"},
		{[]string{"--warm-start", junk, file}, "not a pincer JSON report"},
		{[]string{"--warm-start", first, "--resume", first, file}, "give one of them"},
		{[]string{"--warm-start", filepath.Join(dir, "none.json"), file}, "none.json"},
	} {
		args := append([]string{"solve", "--format", "gap-orlib", "--quiet", "--rounds", "3"}, tc.args...)
		code, _, errs := runCLI(t, context.Background(), args...)
		if code != exitBadInput || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d, stderr %q; want exit %d and %q", tc.args, code, errs, exitBadInput, tc.want)
		}
	}
}

func readJSON(t *testing.T, path string, v any) {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, v); err != nil {
		t.Fatalf("%s: %v", path, err)
	}
}

// TestPrimalAverageReport: --primal-average with the volume rule puts one
// entry per block in the report, each a convex combination (the choice
// relaxation's blocks pick one agent per job); without the volume rule the
// flag is refused.
func TestPrimalAverageReport(t *testing.T) {
	path := filepath.Join(t.TempDir(), "r.json")
	code, _, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--relax", "choice", "--rule", "volume",
		"--primal-average", "--rounds", "100", "--quiet", "--report", path, testdata("gap-c-5x30.txt"))
	if code != exitOK && code != exitNoPlan {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		PrimalAverage []struct {
			Block int `json:"block"`
			Vars  []struct {
				Value float64 `json:"value"`
			} `json:"vars"`
		} `json:"primal_average"`
	}
	readJSON(t, path, &r)
	if len(r.PrimalAverage) != 30 {
		t.Fatalf("%d blocks in primal_average, want 30 (one per job)", len(r.PrimalAverage))
	}
	for _, b := range r.PrimalAverage {
		sum := 0.0
		for _, v := range b.Vars {
			sum += v.Value
		}
		if math.Abs(sum-1) > 1e-4 {
			t.Fatalf("block %d: weights sum to %v", b.Block, sum)
		}
	}
	code, _, errs = runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--primal-average", "--rounds", "3", testdata("gap-c-5x30.txt"))
	if code != exitBadInput || !strings.Contains(errs, "needs --rule volume") {
		t.Fatalf("--primal-average without volume: exit %d, %q", code, errs)
	}
}
