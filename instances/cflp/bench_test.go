package cflp

import (
	"context"
	"os"
	"strconv"
	"testing"
	"time"

	"pincer/decomp"
)

// benchSeconds reads the run time of the long benchmarks from
// $PINCER_CFLP_SECONDS (default 60).
func benchSeconds() time.Duration {
	if s, err := strconv.Atoi(os.Getenv("PINCER_CFLP_SECONDS")); err == nil && s > 0 {
		return time.Duration(s) * time.Second
	}
	return 60 * time.Second
}

// BenchmarkCapa solves capa1 … capa4 for benchSeconds each and reports the
// gap of the plan to the published optimum (reference.csv).
func BenchmarkCapa(b *testing.B) {
	refs := readReference(b)
	for _, ref := range refs {
		if len(ref.name) != 5 || ref.name[:4] != "capa" {
			continue
		}
		idx := int(ref.name[4] - '0')
		b.Run(ref.name, func(b *testing.B) {
			in := readORLibFile(b, "capa.txt", idx)
			for b.Loop() {
				var first1 time.Duration
				obs := decomp.ObserverFunc(func(p *decomp.Progress) {
					r := p.Record
					if first1 == 0 && r.PlanValue == r.PlanValue && (r.PlanValue-ref.value)/ref.value <= 0.01 {
						first1 = r.Elapsed
					}
				})
				res := solveORLib(b, in, Options{}, decomp.Settings{Gap: 1e-9, Time: benchSeconds(), StallRounds: 1 << 30, Observer: obs})
				b.ReportMetric((res.Plan.Value-ref.value)/ref.value*100, "%gap-to-opt")
				b.ReportMetric((ref.value-res.Bound)/ref.value*100, "%bound-gap")
				b.ReportMetric(float64(res.Rounds), "rounds")
				b.ReportMetric(first1.Seconds(), "s-to-1%")
				b.Logf("%s plan %.3f bound %.3f published %.3f rounds %d in %v", ref.name, res.Plan.Value, res.Bound, ref.value, res.Rounds, res.Elapsed)
			}
		})
	}
}

// BenchmarkGenerated measures the time per round, the time until the plan
// is within 1% of the bound, and the gap after benchSeconds on generated
// instances.
func BenchmarkGenerated(b *testing.B) {
	for _, size := range []struct{ m, n int }{{200, 2000}, {1000, 1000}} {
		b.Run(strconv.Itoa(size.m)+"x"+strconv.Itoa(size.n), func(b *testing.B) {
			in, err := Generate(size.m, size.n, 3, 1)
			if err != nil {
				b.Fatal(err)
			}
			for b.Loop() {
				var first1 time.Duration
				obs := decomp.ObserverFunc(func(p *decomp.Progress) {
					r := p.Record
					if first1 == 0 && r.PlanValue == r.PlanValue && (r.PlanValue-r.Bound)/r.PlanValue <= 0.01 {
						first1 = r.Elapsed
					}
				})
				res := solveORLib(b, in, Options{}, decomp.Settings{Gap: 1e-9, Time: benchSeconds(), StallRounds: 1 << 30, Observer: obs})
				b.ReportMetric(res.Elapsed.Seconds()/float64(res.Rounds)*1000, "ms/round")
				b.ReportMetric(first1.Seconds(), "s-to-1%")
				b.ReportMetric(res.Gap*100, "%gap")
				b.Logf("plan %.3f bound %.3f gap %.4f%% rounds %d in %v", res.Plan.Value, res.Bound, res.Gap*100, res.Rounds, res.Elapsed)
				_ = context.Background
			}
		})
	}
}
