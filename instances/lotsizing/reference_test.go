package lotsizing

import (
	"context"
	"encoding/csv"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"

	"pincer/decomp"
	"pincer/internal/benchdata"
)

// Source of the expected values: reference.csv of the shared lot-sizing
// benchmark folder (published optima and CBC-proved optima, see its
// SOURCES.md).
func TestReferenceValues(t *testing.T) {
	dir := benchdata.Dir(t, "lotsizing")
	f, err := os.Open(filepath.Join(dir, "reference.csv"))
	if err != nil {
		t.Skipf("reference.csv absent: %v", err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	rounds := 100
	if testing.Short() {
		rounds = 40
	}
	sumDev, maxDev, sumGap, count := 0.0, 0.0, 0.0, 0
	for _, rec := range recs[1:] {
		if rec[5] != "optimal" {
			continue
		}
		want, _ := strconv.ParseFloat(rec[4], 64)
		n, _ := strconv.Atoi(rec[2])
		if testing.Short() && n > 6 {
			continue
		}
		if n > 12 {
			continue // the 24-item files are left to the benchmark
		}
		fh, err := os.Open(filepath.Join(dir, "ttm", rec[0]))
		if err != nil {
			t.Fatal(err)
		}
		in, err := ReadTTM(fh, rec[0])
		fh.Close()
		if err != nil {
			t.Fatal(err)
		}
		p, err := NewProblem(in, Options{})
		if err != nil {
			t.Fatal(err)
		}
		res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: rounds, Gap: -1})
		if err != nil {
			t.Fatal(err)
		}
		if res.Bound > want*(1+1e-9)+1e-6 {
			t.Errorf("%s: bound %v above the optimum %v", rec[0], res.Bound, want)
		}
		if res.Plan == nil {
			t.Logf("%s: no plan without overtime found in %d rounds", rec[0], rounds)
			continue
		}
		if err := Verify(in, res.Plan.Detail.(*Schedule), nil); err != nil {
			t.Errorf("%s: %v", rec[0], err)
		}
		if res.Plan.Value < want*(1-1e-9)-1e-6 {
			t.Errorf("%s: plan %v below the optimum %v", rec[0], res.Plan.Value, want)
		}
		dev := (res.Plan.Value - want) / want
		gap := (want - res.Bound) / want
		t.Logf("%s: plan %.1f bound %.1f optimum %v: deviation %.2f%%, bound gap %.2f%%", rec[0], res.Plan.Value, res.Bound, want, 100*dev, 100*gap)
		sumDev += dev
		sumGap += gap
		maxDev = max(maxDev, dev)
		count++
	}
	if count > 0 {
		t.Logf("%d instances: mean deviation %.2f%%, max %.2f%%, mean bound gap %.2f%%", count, 100*sumDev/float64(count), 100*maxDev, 100*sumGap/float64(count))
	}
}

type reference struct {
	file  string
	items int
	value float64
}

// readReference returns the optimal rows of reference.csv.
func readReference(tb testing.TB, dir string) []reference {
	f, err := os.Open(filepath.Join(dir, "reference.csv"))
	if err != nil {
		tb.Skipf("reference.csv absent: %v", err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		tb.Fatal(err)
	}
	var out []reference
	for _, rec := range recs[1:] {
		if strings.TrimSpace(rec[5]) != "optimal" {
			continue
		}
		v, err1 := strconv.ParseFloat(rec[4], 64)
		n, err2 := strconv.Atoi(rec[2])
		if err1 != nil || err2 != nil {
			tb.Fatalf("reference.csv row %v: %v %v", rec, err1, err2)
		}
		out = append(out, reference{rec[0], n, v})
	}
	return out
}
