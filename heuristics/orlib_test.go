package heuristics

import (
	"bufio"
	"context"
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"pincer/internal/benchdata"
	"strconv"
	"testing"
)

// benchmarksDir returns the shared benchmark folder, or skips the test.
func benchmarksDir(tb testing.TB) string { return filepath.Dir(benchdata.Dir(tb, "gap")) }

// readOrlib is a minimal reader for the OR-Library multi-instance GAP files
// (layout from shared/benchmarks/gap/SOURCES.md section 2.1): P, then P blocks
// of m n, the agent-major cost matrix, the agent-major use matrix and the m
// capacities. It is only meant for these tests.
func readOrlib(path string, maximise bool) ([]*Assignment, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return readBlocks(f, path, maximise, -1)
}

// readYagiura reads one of the single-instance files of yagiura/ (the same
// block without the leading count, SOURCES.md section 2.2).
func readYagiura(path string, maximise bool) (*Assignment, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	probs, err := readBlocks(f, path, maximise, 1)
	if err != nil {
		return nil, err
	}
	return probs[0], nil
}

// readBlocks reads count instance blocks from r; count < 0 means the count
// is the first token.
func readBlocks(r io.Reader, path string, maximise bool, count int) ([]*Assignment, error) {
	sc := bufio.NewScanner(r)
	sc.Split(bufio.ScanWords)
	tok := 0
	next := func() (int, error) {
		if !sc.Scan() {
			return 0, fmt.Errorf("%s: token %d: unexpected end of file", path, tok+1)
		}
		tok++
		v, err := strconv.Atoi(sc.Text())
		if err != nil {
			return 0, fmt.Errorf("%s: token %d: want an integer: %w", path, tok, err)
		}
		return v, nil
	}
	matrix := func(m, n int) ([][]float64, error) {
		out := make([][]float64, m)
		for i := range out {
			out[i] = make([]float64, n)
			for j := range out[i] {
				v, err := next()
				if err != nil {
					return nil, err
				}
				out[i][j] = float64(v)
			}
		}
		return out, nil
	}
	if count < 0 {
		c, err := next()
		if err != nil {
			return nil, err
		}
		count = c
	}
	var probs []*Assignment
	for q := 0; q < count; q++ {
		m, err := next()
		if err != nil {
			return nil, err
		}
		n, err := next()
		if err != nil {
			return nil, err
		}
		p := &Assignment{Maximise: maximise, Capacity: make([]float64, m)}
		if p.Cost, err = matrix(m, n); err != nil {
			return nil, err
		}
		if p.Weight, err = matrix(m, n); err != nil {
			return nil, err
		}
		for i := range p.Capacity {
			v, err := next()
			if err != nil {
				return nil, err
			}
			p.Capacity[i] = float64(v)
		}
		probs = append(probs, p)
	}
	if sc.Scan() {
		return nil, fmt.Errorf("%s: token %d: trailing data", path, tok+1)
	}
	return probs, sc.Err()
}

type refKey struct {
	file  string
	index int
	sense string
}

type refValue struct {
	name  string
	value float64
}

// readReference reads gap/reference.csv; only rows with status "optimal" or
// "best-known" are kept (the "bound" rows are lower bounds).
func readReference(path string) (map[refKey]refValue, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		return nil, err
	}
	out := make(map[refKey]refValue)
	for _, r := range rows[1:] {
		if r[7] != "optimal" && r[7] != "best-known" {
			continue
		}
		idx, err := strconv.Atoi(r[1])
		if err != nil {
			return nil, fmt.Errorf("%s: index %q: %w", path, r[1], err)
		}
		v, err := strconv.ParseFloat(r[6], 64)
		if err != nil {
			return nil, fmt.Errorf("%s: value %q: %w", path, r[6], err)
		}
		out[refKey{r[0], idx, r[3]}] = refValue{r[2], v}
	}
	return out, nil
}

// everyoneTakesAll is the trivial relaxed answer in which every resource took
// every item.
func everyoneTakesAll(p *Assignment) [][]int {
	m, n := p.Size()
	rel := make([][]int, m)
	for i := range rel {
		for j := 0; j < n; j++ {
			rel[i] = append(rel[i], j)
		}
	}
	return rel
}

func solveFromScratch(tb testing.TB, p *Assignment, s ImproveSettings, seed uint64) ([]int, float64) {
	tb.Helper()
	rng := rand.New(rand.NewPCG(seed, 1))
	asg, ok := Repair(context.Background(), p, everyoneTakesAll(p), nil, rng)
	if !ok {
		tb.Fatalf("Repair found no feasible assignment")
	}
	out, v := Improve(context.Background(), p, asg, s, rng)
	got, feas := p.Evaluate(out)
	if !feas || got != v {
		tb.Fatalf("Improve returned value %v, assignment evaluates to %v (feasible %v)", v, got, feas)
	}
	return out, v
}

func deviation(v, ref float64, maximise bool) float64 {
	if maximise {
		return (ref - v) / math.Abs(ref)
	}
	return (v - ref) / math.Abs(ref)
}

// TestORLibraryGap1to12 checks Improve on the 60 OR-Library gap1..gap12
// instances in both senses. Expected values: shared/benchmarks/gap/
// reference.csv, max = OR-Library's published optima, min = values of the
// compiled table of the GAP literature (also proved by CBC there).
func TestORLibraryGap1to12(t *testing.T) {
	dir := filepath.Join(benchmarksDir(t), "gap")
	ref, err := readReference(filepath.Join(dir, "reference.csv"))
	if err != nil {
		t.Skipf("GAP benchmarks not available: %v", err)
	}
	for _, sense := range []string{"max", "min"} {
		hits, total := 0, 0
		worst := 0.0
		for f := 1; f <= 12; f++ {
			file := fmt.Sprintf("orlib/gap%d.txt", f)
			probs, err := readOrlib(filepath.Join(dir, file), sense == "max")
			if err != nil {
				t.Fatal(err)
			}
			for q, p := range probs {
				r, ok := ref[refKey{file, q + 1, sense}]
				if !ok {
					t.Fatalf("%s #%d %s: no reference value", file, q+1, sense)
				}
				_, v := solveFromScratch(t, p, ImproveSettings{}, uint64(f*10+q))
				d := deviation(v, r.value, p.Maximise)
				if d < -1e-9 {
					t.Errorf("%s (%s): value %v beats the proven optimum %v", r.name, sense, v, r.value)
				}
				if d > 0.01 {
					t.Errorf("%s (%s): value %v is %.2f%% from the optimum %v, want <= 1%%", r.name, sense, v, 100*d, r.value)
				}
				worst = math.Max(worst, d)
				total++
				if d <= 1e-9 {
					hits++
				}
			}
		}
		t.Logf("%s: %d of %d instances at the optimum, worst deviation %.3f%%", sense, hits, total, 100*worst)
	}
}

// BenchmarkChuBeasley runs repair + Improve on gapa..gapd (minimisation) and
// reports the mean deviation from the best-known values of
// shared/benchmarks/gap/reference.csv per type.
func BenchmarkChuBeasley(b *testing.B) {
	dir := filepath.Join(benchmarksDir(b), "gap")
	ref, err := readReference(filepath.Join(dir, "reference.csv"))
	if err != nil {
		b.Skipf("GAP benchmarks not available: %v", err)
	}
	// tabu moves per item; PINCER_GAP_MOVES overrides the default
	moves := 100
	if s := os.Getenv("PINCER_GAP_MOVES"); s != "" {
		if v, err := strconv.Atoi(s); err == nil && v > 0 {
			moves = v
		}
	}
	for _, typ := range []string{"a", "b", "c", "d"} {
		b.Run(typ, func(b *testing.B) {
			file := "orlib/gap" + typ + ".txt"
			probs, err := readOrlib(filepath.Join(dir, file), false)
			if err != nil {
				b.Fatal(err)
			}
			var sum float64
			for it := 0; it < b.N; it++ {
				sum = 0
				for q, p := range probs {
					r := ref[refKey{file, q + 1, "min"}]
					_, n := p.Size()
					_, v := solveFromScratch(b, p, ImproveSettings{Moves: moves * n}, uint64(q))
					d := deviation(v, r.value, false)
					sum += d
					if it == 0 {
						b.Logf("%s: %v (best known %v, %+.3f%%)", r.name, v, r.value, 100*d)
					}
				}
			}
			b.ReportMetric(100*sum/float64(len(probs)), "%dev")
		})
	}
}

// TestRepairTight checks that Repair finds feasible assignments for the tight
// type C and D instances of gapc/gapd (capacity 0.8 times the mean load),
// from the trivial relaxation and from an empty one. Feasible assignments
// exist: reference.csv lists their optimal or best-known values.
func TestRepairTight(t *testing.T) {
	dir := filepath.Join(benchmarksDir(t), "gap")
	for _, typ := range []string{"c", "d"} {
		file := filepath.Join(dir, "orlib", "gap"+typ+".txt")
		probs, err := readOrlib(file, false)
		if err != nil {
			t.Skipf("GAP benchmarks not available: %v", err)
		}
		for q, p := range probs {
			m, _ := p.Size()
			for name, rel := range map[string][][]int{"all": everyoneTakesAll(p), "empty": make([][]int, m)} {
				asg, ok := Repair(context.Background(), p, rel, nil, rand.New(rand.NewPCG(uint64(q), 3)))
				if _, feas := p.Evaluate(asg); !ok || !feas {
					t.Errorf("gap%s #%d, relaxation %s: Repair failed (ok %v)", typ, q+1, name, ok)
				}
			}
		}
	}
}
