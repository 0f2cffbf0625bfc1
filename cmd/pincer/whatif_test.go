package main

import (
	"context"
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"pincer/internal/benchdata"
)

// TestWhatifCapacity: on OR-Library cap41 (split demand, proved optimal
// within the run) a small capacity change of a binding site moves the
// re-solved optimum by what the shadow price predicts when the change
// stays within the price's range: the change of +100 units is checked to
// match price x change (the LP sensitivity argument: the split-demand
// problem with its open sites fixed is a transportation LP, and the
// site's capacity price holds over an interval). Closing a site may only
// make the plan worse; every row reports a plan and a bound.
func TestWhatifCapacity(t *testing.T) {
	file := filepath.Join(benchdata.Dir(t, "cflp"), "orlib", "cap41.txt")
	out := filepath.Join(t.TempDir(), "whatif.csv")
	code, stdout, errs := runCLI(t, context.Background(), "whatif", "--format", "cflp-orlib", "--time", "20s",
		"--rhs", "3=+100", "--close", "3", "--csv", out, file)
	if code != exitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if !strings.Contains(stdout, "predicted change") || !strings.Contains(stdout, "decision support") {
		t.Errorf("table lacks its header or caution:\n%s", stdout)
	}
	f, err := os.Open(out)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(recs) != 3 {
		t.Fatalf("%d CSV lines, want a header and 2 changes", len(recs))
	}
	col := func(r []string, name string) float64 {
		for k, h := range recs[0] {
			if h == name {
				v, err := strconv.ParseFloat(r[k], 64)
				if err != nil {
					t.Fatalf("column %s: %v", name, err)
				}
				return v
			}
		}
		t.Fatalf("no column %s", name)
		return 0
	}
	raise := recs[1]
	if pred, got := col(raise, "predicted_change"), col(raise, "plan_change"); pred >= 0 || math.Abs(pred-got) > 1e-6*math.Abs(pred) {
		t.Errorf("raising a binding site's capacity: predicted %v, re-solved %v", pred, got)
	}
	if got := col(recs[2], "plan_change"); got < 0 {
		t.Errorf("closing a site improved the proved optimum by %v", -got)
	}
}

// TestWhatifRefuses: bad changes exit 2 naming what is wrong.
func TestWhatifRefuses(t *testing.T) {
	file := testdata("gap-c-5x30.txt")
	for _, tc := range []struct {
		args []string
		want string
	}{
		{[]string{file}, "no change given"},
		{[]string{"--rhs", "agent 1", file}, "NAME=CHANGE"},
		{[]string{"--rhs", "agent 1=40", file}, "starts with + or -"},
		{[]string{"--rhs", "agent 9=+4", file}, "no agent"},
		{[]string{"--rhs", "agent 1=+0.5", file}, "whole number"},
		{[]string{"--close", "agent 1", file}, "no parts"},
	} {
		args := append([]string{"whatif", "--format", "gap-orlib", "--rounds", "5"}, tc.args...)
		code, _, errs := runCLI(t, context.Background(), args...)
		if code != exitBadInput || !strings.Contains(errs, tc.want) {
			t.Errorf("%v: exit %d, stderr %q; want exit 2 and %q", tc.args, code, errs, tc.want)
		}
	}
}
