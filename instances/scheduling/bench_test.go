package scheduling

import (
	"context"
	"flag"
	"fmt"
	"math/rand/v2"
	"strconv"
	"testing"
	"time"

	"pincer/decomp"
)

var largeSeconds = flag.Float64("large.seconds", 10, "BenchmarkLargeRun: seconds per run")

// largeInstance is an invented test instance: jobs on 20 machines in
// three classes (8, 7 and 5 machines), processing times 1..100, weights
// 1..10, release dates over the first half of the average machine load,
// due dates a random slack after release plus processing, and each job
// eligible on one to three classes.
func largeInstance(n int, seed uint64) *Instance {
	rng := rand.New(rand.NewPCG(seed, 2024))
	in := &Instance{Name: fmt.Sprintf("large%d", n), Classes: []Class{{ID: "A", Machines: 8}, {ID: "B", Machines: 7}, {ID: "C", Machines: 5}}}
	ps := make([]int, n)
	sum := 0
	for j := range ps {
		ps[j] = 1 + rng.IntN(100)
		sum += ps[j]
	}
	load := sum / 20
	for j := range n {
		jb := Job{ID: strconv.Itoa(j + 1), Processing: ps[j], Weight: 1 + rng.IntN(10), Release: rng.IntN(load/2 + 1)}
		jb.Due = jb.Release + jb.Processing + rng.IntN(load/2+1)
		switch rng.IntN(3) {
		case 0:
			jb.Eligible = []int{rng.IntN(3)}
		case 1:
			a := rng.IntN(3)
			b := (a + 1 + rng.IntN(2)) % 3
			jb.Eligible = []int{min(a, b), max(a, b)}
		}
		in.Jobs = append(in.Jobs, jb)
	}
	return in
}

// BenchmarkLargeEvaluation is one evaluation of the relaxation (shared
// prefix sums, every job block, reduction) of 5,000 jobs on 20 machines
// at the starting prices, with 1 and 2 workers.
func BenchmarkLargeEvaluation(b *testing.B) {
	in := largeInstance(5000, 1)
	p, err := NewProblem(in, Options{})
	if err != nil {
		b.Fatal(err)
	}
	prices := p.Prices
	if prices == nil {
		prices = make([]float64, len(p.Rows))
	}
	b.Logf("%d jobs, %d slot rows", len(in.Jobs), len(p.Rows))
	for _, w := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", w), func(b *testing.B) {
			for range b.N {
				if _, _, err := decomp.Relaxed(context.Background(), p, prices, decomp.Pool{Workers: w}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkLargeRepair is one repair of the 5,000-job instance from the
// answers at the starting prices (list scheduling plus the first round's
// local-search budget).
func BenchmarkLargeRepair(b *testing.B) {
	in := largeInstance(5000, 1)
	p, err := NewProblem(in, Options{})
	if err != nil {
		b.Fatal(err)
	}
	prices := p.Prices
	if prices == nil {
		prices = make([]float64, len(p.Rows))
	}
	_, ans, err := decomp.Relaxed(context.Background(), p, prices, nil)
	if err != nil {
		b.Fatal(err)
	}
	b.ResetTimer()
	var v float64
	for range b.N {
		plan, err := p.Repair.Repair(context.Background(), &decomp.RepairInput{Round: 1, Answers: ans, Seed: 1})
		if err != nil {
			b.Fatal(err)
		}
		v = plan.Value
	}
	b.ReportMetric(v, "plan")
}

// BenchmarkLargeRun solves the 5,000-job instance under a time limit
// (-large.seconds) with 1 and 2 workers and reports the time to build the
// problem, the time to the first plan, rounds per second and the final
// gap.
//
//	go test -run '^$' -bench LargeRun -benchtime 1x ./instances/scheduling
func BenchmarkLargeRun(b *testing.B) {
	in := largeInstance(5000, 1)
	for _, w := range []int{1, 2} {
		b.Run(fmt.Sprintf("workers=%d", w), func(b *testing.B) {
			for range b.N {
				start := time.Now()
				p, err := NewProblem(in, Options{})
				if err != nil {
					b.Fatal(err)
				}
				build := time.Since(start)
				var first time.Duration
				obs := decomp.ObserverFunc(func(pr *decomp.Progress) {
					if pr.HasPlan && first == 0 {
						first = time.Since(start)
					}
				})
				res, err := decomp.Solve(context.Background(), p, decomp.Settings{
					Time: time.Duration(*largeSeconds * float64(time.Second)), Workers: w, Seed: 1, Observer: obs})
				if err != nil {
					b.Fatal(err)
				}
				if res.Plan == nil {
					b.Fatal("no plan")
				}
				if _, err := in.Evaluate(res.Plan.Detail.(*Schedule)); err != nil {
					b.Fatal(err)
				}
				b.ReportMetric(build.Seconds(), "build-s")
				b.ReportMetric(first.Seconds(), "first-plan-s")
				b.ReportMetric(float64(res.Rounds)/res.Elapsed.Seconds(), "rounds/s")
				b.ReportMetric(100*res.Gap, "gap-%")
				b.Logf("workers %d: plan %.0f bound %.0f gap %.2f%% in %d rounds, %.1f s; build %.2f s, first plan at %.2f s",
					w, res.Plan.Value, res.Bound, 100*res.Gap, res.Rounds, res.Elapsed.Seconds(), build.Seconds(), first.Seconds())
			}
		})
	}
}
