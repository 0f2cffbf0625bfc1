package scheduling

import (
	"context"
	"encoding/csv"
	"flag"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"pincer/decomp"
	"pincer/internal/benchdata"
)

var (
	wtSets    = flag.String("wt.sets", "wt40,wt50", "BenchmarkPublished: OR-Library weighted tardiness files to run")
	wtSeconds = flag.Float64("wt.seconds", 2, "BenchmarkPublished: seconds per instance")
	wtFirst   = flag.Int("wt.first", ORLibInstances, "BenchmarkPublished: run instances 1..this of each file")
	wtWorkers = flag.Int("wt.workers", 2, "BenchmarkPublished: worker budget per run")
)

// reference is one row of wt_reference_values.csv.
type reference struct {
	value   float64
	optimal bool
}

// references reads the published values (shared benchmark folder,
// orlib-wt/wt_reference_values.csv, from OR-Library's wtopt40/wtopt50 and
// wtbest100b files; see its SOURCES.md), keyed by file ("wt40") and
// 1-based instance.
func references(tb testing.TB) (string, map[string]map[int]reference) {
	dir := filepath.Join(benchdata.Dir(tb, "scheduling"), "orlib-wt")
	f, err := os.Open(filepath.Join(dir, "wt_reference_values.csv"))
	if err != nil {
		tb.Skipf("wt_reference_values.csv absent: %v", err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		tb.Fatal(err)
	}
	out := map[string]map[int]reference{}
	for _, rec := range recs[1:] {
		set := "wt" + rec[0]
		k, err1 := strconv.Atoi(rec[1])
		v, err2 := strconv.ParseFloat(rec[4], 64)
		if err1 != nil || err2 != nil {
			tb.Fatalf("bad reference row %v", rec)
		}
		if out[set] == nil {
			out[set] = map[int]reference{}
		}
		out[set][k] = reference{value: v, optimal: rec[5] == "optimal"}
	}
	return dir, out
}

// checkPublished solves one instance and checks it against its published
// value: the plan (a schedule checked by Instance.Evaluate) is never below
// an optimal value, and the bound is never above the value (optimal or
// best known, both are values of feasible schedules).
func checkPublished(tb testing.TB, dir, set string, k int, ref reference, s decomp.Settings) *decomp.Result {
	tb.Helper()
	in, err := ReadORLibFile(filepath.Join(dir, set+".txt"), k, 1)
	if err != nil {
		tb.Fatal(err)
	}
	p, err := NewProblem(in, Options{})
	if err != nil {
		tb.Fatal(err)
	}
	res, err := decomp.Solve(context.Background(), p, s)
	if err != nil {
		tb.Fatal(err)
	}
	if res.Bound > ref.value+1e-6 {
		tb.Errorf("%s #%d: bound %v above the published value %v", set, k, res.Bound, ref.value)
	}
	if res.Plan == nil {
		tb.Fatalf("%s #%d: no plan", set, k)
	}
	v, err := in.Evaluate(res.Plan.Detail.(*Schedule))
	if err != nil || float64(v) != res.Plan.Value {
		tb.Fatalf("%s #%d: plan value %v, evaluated %v (%v)", set, k, res.Plan.Value, v, err)
	}
	if ref.optimal && res.Plan.Value < ref.value {
		tb.Errorf("%s #%d: plan %v below the published optimum %v", set, k, res.Plan.Value, ref.value)
	}
	return res
}

// TestPublishedSample runs a sample of wt40 and wt50 (both due-date
// extremes, the instance marked best known) for a fixed number of rounds.
func TestPublishedSample(t *testing.T) {
	dir, refs := references(t)
	sample := map[string][]int{"wt40": {1, 19, 63, 125}, "wt50": {11, 88}}
	if testing.Short() {
		sample = map[string][]int{"wt40": {1}}
	}
	for set, ks := range sample {
		for _, k := range ks {
			ref, ok := refs[set][k]
			if !ok {
				t.Fatalf("no reference value for %s #%d", set, k)
			}
			res := checkPublished(t, dir, set, k, ref, decomp.Settings{Rounds: 100, Gap: -1, Workers: 2, Seed: 1})
			t.Logf("%s #%d: plan %v bound %.1f published %v", set, k, res.Plan.Value, res.Bound, ref.value)
		}
	}
}

// BenchmarkPublished runs every instance of the wt40 and wt50 files
// (flags -wt.sets, -wt.first, -wt.seconds, -wt.workers) under a time limit
// and reports how many plans reach the published value, the mean
// deviation from it and the mean gap between plan and bound.
//
//	go test -run '^$' -bench Published -benchtime 1x ./instances/scheduling
func BenchmarkPublished(b *testing.B) {
	dir, refs := references(b)
	for _, set := range strings.Split(*wtSets, ",") {
		b.Run(set, func(b *testing.B) {
			for range b.N {
				at, count := 0, 0
				dev, gap := 0.0, 0.0
				for k := 1; k <= *wtFirst; k++ {
					ref, ok := refs[set][k]
					if !ok {
						b.Skipf("no reference values for %s", set)
					}
					res := checkPublished(b, dir, set, k, ref, decomp.Settings{
						Time: time.Duration(*wtSeconds * float64(time.Second)), Workers: *wtWorkers, Seed: 1})
					count++
					if res.Plan.Value <= ref.value {
						at++
					} else {
						b.Logf("%s #%d: plan %v, published %v, bound %.1f", set, k, res.Plan.Value, ref.value, res.Bound)
					}
					dev += (res.Plan.Value - ref.value) / math.Max(1, ref.value)
					gap += res.Gap
				}
				b.ReportMetric(float64(at), "at-published")
				b.ReportMetric(float64(count), "instances")
				b.ReportMetric(100*dev/float64(count), "mean-dev-%")
				b.ReportMetric(100*gap/float64(count), "mean-gap-%")
			}
		})
	}
}
