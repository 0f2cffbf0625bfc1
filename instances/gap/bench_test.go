package gap

import (
	"bufio"
	"context"
	"flag"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"pincer/decomp"
)

// benchReference returns the reference value of a named instance in the
// given sense from the shared reference.csv: the optimum, or the best-known
// plan value where no optimum is published (the "bound" rows are skipped).
func benchReference(b *testing.B, dir, name, sense string) float64 {
	b.Helper()
	for _, r := range readGapReference(b, dir) {
		if r.name == name && r.sense == sense && r.status != "bound" {
			return float64(r.value)
		}
	}
	b.Fatalf("reference.csv has no %s value for %s", sense, name)
	return 0
}

// deviation is 100 (value − ref) / ref: how far a minimisation value lies
// above the reference (negative for a bound below it).
func deviation(value, ref float64) float64 { return 100 * (value - ref) / ref }

// BenchmarkChuBeasley solves the 24 instances of gapa..gapd (Chu & Beasley
// 1997; minimisation) with a 10 s limit each and reports, per type, the
// mean and largest deviation of the plan and of the bound from the
// reference values of the shared reference.csv (published optima or best
// known values, SOURCES.md 5.2). One operation is one pass over the six
// instances of a type (about a minute).
func BenchmarkChuBeasley(b *testing.B) {
	dir := gapBenchDir(b)
	for _, kind := range []string{"a", "b", "c", "d"} {
		b.Run(kind, func(b *testing.B) {
			file := filepath.Join(dir, "orlib", "gap"+kind+".txt")
			var planDev, boundDev []float64
			for b.Loop() {
				planDev, boundDev = planDev[:0], boundDev[:0]
				for k := 1; k <= 6; k++ {
					in, err := ReadFile(file, k)
					if err != nil {
						b.Fatal(err)
					}
					name := fmt.Sprintf("%s%02d%d", kind, in.Agents, in.Jobs)
					ref := benchReference(b, dir, name, "min") // reference.csv (published value)
					p, err := NewProblem(in, Options{})
					if err != nil {
						b.Fatal(err)
					}
					res, err := decomp.Solve(context.Background(), p, decomp.Settings{Time: 10 * time.Second, Seed: 1})
					if err != nil {
						b.Fatal(err)
					}
					pd := math.Inf(1)
					if res.Plan != nil {
						pd = deviation(res.Plan.Value, ref)
						if v := Verify(in, res.Plan.Detail.([]int), false); !v.Feasible || float64(v.Value) != res.Plan.Value {
							b.Fatalf("%s: plan fails Verify: %v", name, v.Problems)
						}
					}
					bd := deviation(res.Bound, ref)
					planDev, boundDev = append(planDev, pd), append(boundDev, bd)
					plan := math.NaN()
					if res.Plan != nil {
						plan = res.Plan.Value
					}
					b.Logf("%s: reference %.0f  plan %.0f (%+.3f %%)  bound %.3f (%+.3f %%)  %s, %d rounds, %v",
						name, ref, plan, pd, res.Bound, bd, res.Status, res.Rounds, res.Elapsed.Round(time.Millisecond))
				}
			}
			pMean, pMax := meanMax(planDev)
			bMean, bMin := meanMin(boundDev)
			b.ReportMetric(pMean, "plan-mean-%")
			b.ReportMetric(pMax, "plan-max-%")
			b.ReportMetric(bMean, "bound-mean-%")
			b.ReportMetric(bMin, "bound-worst-%")
			b.Logf("type %s: plan above reference mean %.3f %% max %.3f %%; bound vs reference mean %.3f %% worst %.3f %%",
				strings.ToUpper(kind), pMean, pMax, bMean, bMin)
		})
	}
}

func meanMax(xs []float64) (mean, hi float64) {
	hi = math.Inf(-1)
	for _, x := range xs {
		mean += x
		hi = math.Max(hi, x)
	}
	return mean / float64(len(xs)), hi
}

func meanMin(xs []float64) (mean, lo float64) {
	lo = math.Inf(1)
	for _, x := range xs {
		mean += x
		lo = math.Min(lo, x)
	}
	return mean / float64(len(xs)), lo
}

// BenchmarkYagiuraLarge solves d20200 and e20200 (Yagiura's collection,
// minimisation) at 10 s and 60 s and reports the plan's and the bound's
// deviation from the reference values of reference.csv (d20200: best known
// 12244; e20200: optimum 22379). It takes about 2.5 minutes and runs only
// when the -bench pattern names it (e.g. -bench=YagiuraLarge).
func BenchmarkYagiuraLarge(b *testing.B) {
	if f := flag.Lookup("test.bench"); f == nil || !strings.Contains(f.Value.String(), "Yagiura") {
		b.Skip("long benchmark: run with -bench=YagiuraLarge")
	}
	dir := gapBenchDir(b)
	for _, name := range []string{"d20200", "e20200"} {
		for _, limit := range []time.Duration{10 * time.Second, 60 * time.Second} {
			b.Run(fmt.Sprintf("%s/%v", name, limit), func(b *testing.B) {
				in, err := ReadFile(filepath.Join(dir, "yagiura", name), 1)
				if err != nil {
					b.Fatal(err)
				}
				ref := benchReference(b, dir, name, "min") // reference.csv
				var res *decomp.Result
				for b.Loop() {
					p, err := NewProblem(in, Options{})
					if err != nil {
						b.Fatal(err)
					}
					res, err = decomp.Solve(context.Background(), p, decomp.Settings{Time: limit, Seed: 1})
					if err != nil {
						b.Fatal(err)
					}
				}
				pd := math.Inf(1)
				plan := math.NaN()
				if res.Plan != nil {
					plan, pd = res.Plan.Value, deviation(res.Plan.Value, ref)
				}
				bd := deviation(res.Bound, ref)
				b.ReportMetric(pd, "plan-%")
				b.ReportMetric(bd, "bound-%")
				b.Logf("%s at %v: reference %.0f  plan %.0f (%+.3f %%)  bound %.3f (%+.3f %%)  %s, %d rounds",
					name, limit, ref, plan, pd, res.Bound, bd, res.Status, res.Rounds)
			})
		}
	}
}

// BenchmarkRoundRate measures rounds per second on a generated type D
// instance of 80 agents and 1600 jobs (knapsack relaxation) with one and
// with two evaluation workers, without repair (block evaluation only) and
// with the family's repair, and reports the speed-up of two workers.
func BenchmarkRoundRate(b *testing.B) {
	in, err := Generate('d', 80, 1600, 1)
	if err != nil {
		b.Fatal(err)
	}
	for _, withRepair := range []bool{false, true} {
		label := "no-repair"
		if withRepair {
			label = "repair"
		}
		b.Run(label, func(b *testing.B) {
			// Block evaluation alone is fast, so it gets many rounds; with
			// repair (every 5th round) a few rounds already take seconds.
			rounds := 300
			if withRepair {
				rounds = 10
			}
			rate := func(workers int) float64 {
				p, err := NewProblem(in, Options{})
				if err != nil {
					b.Fatal(err)
				}
				if !withRepair {
					p.Repair = nil
				}
				// The run is interrupted after the last measured round so
				// that the final repair (not a round) is cut short; the rate
				// is taken from the elapsed time of that round.
				ctx, cancel := context.WithCancel(context.Background())
				defer cancel()
				stop := decomp.ObserverFunc(func(pr *decomp.Progress) {
					if pr.Record.Round >= rounds {
						cancel()
					}
				})
				res, err := decomp.Solve(ctx, p, decomp.Settings{
					Gap: -1, StallRounds: 10 * rounds, Seed: 1, Observer: stop,
					Evaluator: decomp.Pool{Workers: workers}, FinalRepairTime: time.Millisecond,
				})
				if err != nil {
					b.Fatal(err)
				}
				if res.Rounds != rounds {
					b.Fatalf("%d rounds made, want %d (%s)", res.Rounds, rounds, res.Status)
				}
				return float64(rounds) / res.History[rounds-1].Elapsed.Seconds()
			}
			var r1, r2 float64
			for b.Loop() {
				r1, r2 = rate(1), rate(2)
			}
			b.ReportMetric(r1, "rounds/s-1w")
			b.ReportMetric(r2, "rounds/s-2w")
			b.ReportMetric(r2/r1, "speedup")
			b.Logf("d 80x1600 %s: %.2f rounds/s with 1 worker, %.2f with 2 (speed-up %.2f)", label, r1, r2, r2/r1)
		})
	}
}

// BenchmarkHuge runs a generated type C instance of 100 agents and 10,000
// jobs for 20 s and reports the result and the process's peak resident
// memory (VmHWM of /proc/self/status; it covers the whole test binary, so
// run this benchmark alone for a clean figure).
func BenchmarkHuge(b *testing.B) {
	in, err := Generate('c', 100, 10000, 1)
	if err != nil {
		b.Fatal(err)
	}
	var res *decomp.Result
	for b.Loop() {
		p, err := NewProblem(in, Options{})
		if err != nil {
			b.Fatal(err)
		}
		res, err = decomp.Solve(context.Background(), p, decomp.Settings{Time: 20 * time.Second, Seed: 1})
		if err != nil {
			b.Fatal(err)
		}
	}
	hwm := peakRSS(b)
	b.ReportMetric(hwm/1024, "peak-RSS-MiB")
	plan := math.NaN()
	if res.Plan != nil {
		plan = res.Plan.Value
		if v := Verify(in, res.Plan.Detail.([]int), false); !v.Feasible || float64(v.Value) != plan {
			b.Fatalf("plan fails Verify: %v", v.Problems)
		}
	}
	b.ReportMetric(100*res.Gap, "gap-%")
	b.Logf("c 100x10000: bound %.3f  plan %.0f  gap %.3f %%  %s after %d rounds, %v; peak RSS %.0f MiB",
		res.Bound, plan, 100*res.Gap, res.Status, res.Rounds, res.Elapsed.Round(time.Millisecond), hwm/1024)
}

// peakRSS returns VmHWM from /proc/self/status in KiB (NaN when absent).
func peakRSS(b *testing.B) float64 {
	f, err := os.Open("/proc/self/status")
	if err != nil {
		b.Logf("peak RSS unavailable: %v", err)
		return math.NaN()
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if rest, ok := strings.CutPrefix(sc.Text(), "VmHWM:"); ok {
			fields := strings.Fields(rest)
			if len(fields) > 0 {
				if v, err := strconv.ParseFloat(fields[0], 64); err == nil {
					return v
				}
			}
		}
	}
	return math.NaN()
}

// BenchmarkCheckpoint10e6 measures the checkpoint of a run on a generated
// type C instance of 100 agents and 10,000 jobs (10^6 pairs): 30 rounds
// are made (repair every 5), the state at the last round boundary is
// kept, and each iteration writes it to a file (encode, write, fsync,
// rename). It reports the file's size; ns/op is the write time.
func BenchmarkCheckpoint10e6(b *testing.B) {
	in, err := Generate('c', 100, 10000, 1)
	if err != nil {
		b.Fatal(err)
	}
	p, err := NewProblem(in, Options{})
	if err != nil {
		b.Fatal(err)
	}
	path := filepath.Join(b.TempDir(), "run.ckpt")
	write := func(st *decomp.State) error {
		return decomp.WriteCheckpointFile(path, &decomp.Checkpoint{InstanceHash: "bench", Settings: "bench", State: st}, p.Plans)
	}
	var state *decomp.State
	s := decomp.Settings{Rounds: 30, Seed: 1, Gap: -1, CheckpointEvery: 30, Checkpoint: func(st *decomp.State) error {
		if state == nil {
			// Kept beyond the call for the benchmark only (the run's
			// last repair may still change its plan, which does not
			// matter for a size and time figure).
			state = st
		}
		return nil
	}}
	if _, err := decomp.Solve(context.Background(), p, s); err != nil {
		b.Fatal(err)
	}
	if state == nil {
		b.Fatal("no checkpoint")
	}
	for b.Loop() {
		if err := write(state); err != nil {
			b.Fatal(err)
		}
	}
	st, err := os.Stat(path)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportMetric(float64(st.Size())/(1<<20), "MiB")
	start := time.Now()
	if _, err := decomp.ReadCheckpointFile(path, p.Plans); err != nil {
		b.Fatal(err)
	}
	b.Logf("checkpoint after %d rounds: %.2f MiB (repairer state %d bytes), read back in %v", state.Round, float64(st.Size())/(1<<20), len(state.Repair), time.Since(start).Round(time.Microsecond))
}
