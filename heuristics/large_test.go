package heuristics

import (
	"context"
	"math"
	"math/rand/v2"
	"path/filepath"
	"runtime"
	"testing"
	"time"
)

// typeDLike builds an m x n minimisation instance by the type-D recipe of
// Laguna et al. 1995 as we recall it (from memory): a_ij uniform in 1..100,
// c_ij = 111 - a_ij + a uniform integer in -10..10, b_i = 0.8 * sum_j a_ij / m.
// The recipe matches the data ranges of the shared type D files (SOURCES.md:
// c_ij + a_ij within 101..121).
func typeDLike(m, n int, seed uint64) *Assignment {
	r := rand.New(rand.NewPCG(seed, 0x640))
	p := &Assignment{Capacity: make([]float64, m)}
	for i := 0; i < m; i++ {
		cost, use := make([]float64, n), make([]float64, n)
		sum := 0.0
		for j := 0; j < n; j++ {
			a := float64(1 + r.IntN(100))
			use[j] = a
			cost[j] = 111 - a + float64(r.IntN(21)-10)
			sum += a
		}
		p.Cost = append(p.Cost, cost)
		p.Weight = append(p.Weight, use)
		p.Capacity[i] = math.Floor(0.8 * sum / float64(m))
	}
	return p
}

// TestCancelPrompt: on a 20 x 600 type-D-like instance, Repair and Improve
// with huge budgets return soon after the context is cancelled, and
// Improve's result is feasible. (This instance needs the feasibility phase:
// regret insertion alone leaves items over on such tight capacities.)
func TestCancelPrompt(t *testing.T) {
	if testing.Short() {
		t.Skip("short mode")
	}
	p := typeDLike(20, 600, 1)
	sr, err := NewSearcher(p)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 1))
	asg, ok := sr.Repair(context.Background(), everyoneTakesAll(p), nil, rng)
	if !ok {
		t.Fatal("Repair found no feasible assignment")
	}
	ctx, cancel := context.WithTimeout(context.Background(), 100*time.Millisecond)
	defer cancel()
	t0 := time.Now()
	out, v := sr.Improve(ctx, asg, ImproveSettings{Moves: 1 << 30}, rng)
	if d := time.Since(t0); d > 600*time.Millisecond {
		t.Errorf("Improve returned %v after start, want about 100ms", d)
	}
	if got, feas := p.Evaluate(out); !feas || got != v {
		t.Errorf("cancelled Improve: value %v, evaluates to %v (feasible %v)", v, got, feas)
	}
	// an already cancelled context stops Repair at once
	done, cancel2 := context.WithCancel(context.Background())
	cancel2()
	t0 = time.Now()
	sr.Repair(done, make([][]int, 20), nil, rng)
	if d := time.Since(t0); d > 300*time.Millisecond {
		t.Errorf("Repair with a cancelled context took %v", d)
	}
}

// TestSearcherDeterministic: the same seed gives the same result, through
// the Searcher (reused) and through the package functions.
func TestSearcherDeterministic(t *testing.T) {
	p := typeDLike(10, 150, 2)
	run := func(sr *Searcher) []int {
		rng := rand.New(rand.NewPCG(9, 9))
		var a []int
		var ok bool
		if sr == nil {
			a, ok = Repair(context.Background(), p, everyoneTakesAll(p), nil, rng)
		} else {
			a, ok = sr.Repair(context.Background(), everyoneTakesAll(p), nil, rng)
		}
		if !ok {
			t.Fatal("Repair failed")
		}
		if sr == nil {
			a, _ = Improve(context.Background(), p, a, ImproveSettings{Moves: 3000}, rng)
		} else {
			a, _ = sr.Improve(context.Background(), a, ImproveSettings{Moves: 3000}, rng)
		}
		return a
	}
	sr, err := NewSearcher(p)
	if err != nil {
		t.Fatal(err)
	}
	ref := run(nil)
	for k := 0; k < 2; k++ {
		got := run(sr)
		for j := range ref {
			if got[j] != ref[j] {
				t.Fatalf("run %d differs from the first at item %d", k, j)
			}
		}
	}
}

// benchLarge reports, for one instance, the time of the first Repair (to a
// feasible assignment), the value after a default Improve, its deviation
// from ref when ref > 0, and the heap obtained from the system.
func benchLarge(b *testing.B, p *Assignment, ref float64) {
	for it := 0; it < b.N; it++ {
		t0 := time.Now()
		sr, err := NewSearcher(p)
		if err != nil {
			b.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(1, 1))
		m, _ := p.Size()
		asg, ok := sr.Repair(context.Background(), make([][]int, m), nil, rng)
		if !ok {
			b.Fatal("Repair found no feasible assignment")
		}
		tFeas := time.Since(t0)
		v0, _ := p.Evaluate(asg)
		out, v := sr.Improve(context.Background(), asg, ImproveSettings{}, rng)
		tAll := time.Since(t0)
		if got, feas := p.Evaluate(out); !feas || got != v {
			b.Fatalf("Improve value %v, evaluates to %v (feasible %v)", v, got, feas)
		}
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		b.ReportMetric(tFeas.Seconds(), "s-feasible")
		b.ReportMetric(tAll.Seconds(), "s-total")
		b.ReportMetric(v, "value")
		b.ReportMetric(float64(ms.Sys)/(1<<20), "MB-sys")
		if ref > 0 {
			b.ReportMetric(100*deviation(v, ref, false), "%dev")
		}
		b.Logf("repair %v (value %v), repair+improve %v (value %v)", tFeas, v0, tAll, v)
	}
}

// BenchmarkLarge runs Repair from an empty relaxation then a default
// Improve on instances of growing size: a generated 20 x 600 (the demo
// size), Yagiura's d801600 and e801600 (optimal values 97034 and 176820 from
// shared/benchmarks/gap/reference.csv) and a generated 100 x 10,000.
func BenchmarkLarge(b *testing.B) {
	b.Run("gen20x600", func(b *testing.B) { benchLarge(b, typeDLike(20, 600, 1), 0) })
	for _, c := range []struct {
		name string
		ref  float64
	}{{"d801600", 97034}, {"e801600", 176820}} {
		b.Run(c.name, func(b *testing.B) {
			p, err := readYagiura(filepath.Join(benchmarksDir(b), "gap", "yagiura", c.name), false)
			if err != nil {
				b.Skipf("GAP benchmarks not available: %v", err)
			}
			benchLarge(b, p, c.ref)
		})
	}
	b.Run("gen100x10000", func(b *testing.B) { benchLarge(b, typeDLike(100, 10000, 3), 0) })
}
