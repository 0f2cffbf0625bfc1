package heuristics

import (
	"context"
	"math/rand/v2"
	"path/filepath"
	"testing"
	"time"
)

// BenchmarkSearchQuality measures the plan search alone, without prices:
// Repair from an empty relaxation, then Improve with a fixed budget of
// moves, on the large type D and E files of the shared yagiura folder
// (optimal or best-known values from shared/benchmarks/gap/reference.csv).
// It reports the deviation from the reference, so that a change of the
// search can be judged at equal effort (moves), apart from the engine's
// price rounds:
//
//	go test -run '^$' -bench SearchQuality -benchtime 1x ./heuristics
func BenchmarkSearchQuality(b *testing.B) {
	for _, c := range []struct {
		name string
		ref  float64
	}{{"d40400", 24356}, {"d401600", 97105}, {"d801600", 97034},
		{"e40400", 44561}, {"e401600", 178293}, {"e801600", 176820}} {
		b.Run(c.name, func(b *testing.B) {
			p, err := readYagiura(filepath.Join(benchmarksDir(b), "gap", "yagiura", c.name), false)
			if err != nil {
				b.Skipf("GAP benchmarks not available: %v", err)
			}
			for it := 0; it < b.N; it++ {
				sr, err := NewSearcher(p)
				if err != nil {
					b.Fatal(err)
				}
				rng := rand.New(rand.NewPCG(1, 1))
				m, n := p.Size()
				asg, ok := sr.Repair(context.Background(), make([][]int, m), nil, rng)
				if !ok {
					b.Fatal("Repair found no feasible assignment")
				}
				t0 := time.Now()
				out, v := sr.Improve(context.Background(), asg, ImproveSettings{Moves: 40 * n}, rng)
				if got, feas := p.Evaluate(out); !feas || got != v {
					b.Fatalf("Improve value %v, evaluates to %v (feasible %v)", v, got, feas)
				}
				b.ReportMetric(time.Since(t0).Seconds(), "s")
				b.ReportMetric(100*deviation(v, c.ref, false), "%dev")
			}
		})
	}
}
