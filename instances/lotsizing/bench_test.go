package lotsizing

import (
	"context"
	"fmt"
	"os"
	"path/filepath"
	"testing"

	"pincer/decomp"
	"pincer/internal/benchdata"
)

// BenchmarkReference runs every optimal row of reference.csv (source: the
// shared folder's reference.csv) for a fixed round budget and reports the
// mean and max deviation of the plan from the optimum and the mean bound
// gap, in percent. PINCER_SEED sets the repair seed (default 1).
func BenchmarkReference(b *testing.B) {
	dir := benchdata.Dir(b, "lotsizing")
	refs := readReference(b, dir)
	seed := uint64(1)
	if s := os.Getenv("PINCER_SEED"); s != "" {
		fmt.Sscan(s, &seed)
	}
	for k := 0; k < b.N; k++ {
		sumDev, maxDev, sumGap, count := 0.0, 0.0, 0.0, 0
		for _, ref := range refs {
			fh, err := os.Open(filepath.Join(dir, "ttm", ref.file))
			if err != nil {
				b.Fatal(err)
			}
			in, err := ReadTTM(fh, ref.file)
			fh.Close()
			if err != nil {
				b.Fatal(err)
			}
			p, err := NewProblem(in, Options{})
			if err != nil {
				b.Fatal(err)
			}
			res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 300, Gap: -1, Seed: seed})
			if err != nil {
				b.Fatal(err)
			}
			if res.Plan == nil {
				b.Logf("%s: no plan", ref.file)
				continue
			}
			dev := (res.Plan.Value - ref.value) / ref.value
			b.Logf("%s: plan %v bound %.1f reference %v: deviation %.2f%%, bound gap %.2f%%", ref.file, res.Plan.Value, res.Bound, ref.value, 100*dev, 100*(ref.value-res.Bound)/ref.value)
			sumDev += dev
			maxDev = max(maxDev, dev)
			sumGap += (ref.value - res.Bound) / ref.value
			count++
		}
		b.ReportMetric(100*sumDev/float64(count), "mean-dev-%")
		b.ReportMetric(100*maxDev, "max-dev-%")
		b.ReportMetric(100*sumGap/float64(count), "mean-gap-%")
		b.ReportMetric(float64(len(refs)-count), "no-plan")
	}
}
