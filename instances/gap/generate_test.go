package gap

import (
	"math"
	"os"
	"path/filepath"
	"reflect"
	"testing"
)

func TestGenerateDeterministic(t *testing.T) {
	for _, kind := range []byte("abcdeABCDE") {
		a, err := Generate(kind, 5, 40, 7)
		if err != nil {
			t.Fatal(err)
		}
		b, _ := Generate(kind, 5, 40, 7)
		c, _ := Generate(kind, 5, 40, 8)
		if !reflect.DeepEqual(a, b) {
			t.Errorf("type %c: same seed gave different instances", kind)
		}
		if reflect.DeepEqual(a.Cost, c.Cost) {
			t.Errorf("type %c: seeds 7 and 8 gave the same costs", kind)
		}
		if err := a.Validate(); err != nil {
			t.Errorf("type %c: %v", kind, err)
		}
	}
}

func TestGenerateRejects(t *testing.T) {
	for _, tc := range []struct {
		kind         byte
		agents, jobs int
	}{{'f', 5, 10}, {'a', 0, 10}, {'a', 5, -1}, {'c', 100000, 100000}} {
		if _, err := Generate(tc.kind, tc.agents, tc.jobs, 1); err == nil {
			t.Errorf("Generate(%q, %d, %d) accepted", tc.kind, tc.agents, tc.jobs)
		}
	}
}

// The capacity rules of Generate reproduce the capacities of every
// published instance exactly: types A and B in gapa and gapb (Chu & Beasley
// 1997, from OR-Library), and types C, D and E in yagiura/ (rule stated and
// checked in SOURCES.md 2.3).
func TestCapacityRulesMatchPublishedFiles(t *testing.T) {
	dir := gapBenchDir(t)
	checked := 0
	for _, kind := range []byte("ab") {
		for k := 1; k <= 6; k++ {
			in, err := ReadFile(filepath.Join(dir, "orlib", "gap"+string(kind)+".txt"), k)
			if err != nil {
				t.Fatal(err)
			}
			if got := typeCapacity(kind, in.Cost, in.Use); !reflect.DeepEqual(got, in.Capacity) {
				t.Errorf("%s: rule gives %v, file has %v", in.Name, got, in.Capacity)
			}
			checked++
		}
	}
	entries, err := os.ReadDir(filepath.Join(dir, "yagiura"))
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		in, err := ReadFile(filepath.Join(dir, "yagiura", e.Name()), 1)
		if err != nil {
			t.Fatal(err)
		}
		kind := e.Name()[0]
		if got := typeCapacity(kind, in.Cost, in.Use); !reflect.DeepEqual(got, in.Capacity) {
			t.Errorf("%s: rule gives %v, file has %v", e.Name(), got, in.Capacity)
		}
		checked++
	}
	t.Logf("capacity rule exact on %d published instances", checked)
}

type dataStats struct {
	minA, maxA, minC, maxC int64
	meanA                  float64
	fracA1                 float64 // share of pairs with a_ij = 1
	minSum, maxSum         int64   // range of c_ij + a_ij
	maxProd                int64   // largest c_ij * a_ij
}

func dataStatsOf(in *Instance) dataStats {
	s := dataStats{minA: math.MaxInt64, minC: math.MaxInt64, minSum: math.MaxInt64, maxA: math.MinInt64, maxC: math.MinInt64, maxSum: math.MinInt64}
	var ones, total int64
	var sum float64
	for i := range in.Use {
		for j, a := range in.Use[i] {
			c := in.Cost[i][j]
			s.minA, s.maxA = min(s.minA, a), max(s.maxA, a)
			s.minC, s.maxC = min(s.minC, c), max(s.maxC, c)
			s.minSum, s.maxSum = min(s.minSum, a+c), max(s.maxSum, a+c)
			s.maxProd = max(s.maxProd, a*c)
			if a == 1 {
				ones++
			}
			sum += float64(a)
			total++
		}
	}
	s.meanA = sum / float64(total)
	s.fracA1 = float64(ones) / float64(total)
	return s
}

// Generated data fall in the ranges SOURCES.md 2.3 states for the
// published files, and (with 32000 pairs, enough to hit every integer of
// the A-D ranges) reach both ends of them. Type E has no fixed range, so
// its use distribution is compared with the largest published E file.
func TestGenerateMatchesPublishedStatistics(t *testing.T) {
	type want struct{ minA, maxA, minC, maxC int64 }
	// Ranges from SOURCES.md 2.3 ("Data ranges seen").
	ranges := map[byte]want{'a': {5, 25, 10, 50}, 'b': {5, 25, 10, 50}, 'c': {5, 25, 10, 50}, 'd': {1, 100, 1, 120}}
	for kind, w := range ranges {
		in, err := Generate(kind, 40, 800, 3)
		if err != nil {
			t.Fatal(err)
		}
		s := dataStatsOf(in)
		if s.minA != w.minA || s.maxA != w.maxA || s.minC != w.minC || s.maxC != w.maxC {
			t.Errorf("type %c: a in %d..%d, c in %d..%d; published: a in %d..%d, c in %d..%d",
				kind, s.minA, s.maxA, s.minC, s.maxC, w.minA, w.maxA, w.minC, w.maxC)
		}
		if kind == 'd' && (s.minSum < 101 || s.maxSum > 121) {
			// SOURCES.md 1: c_ij + a_ij lies in 101..121 in type D.
			t.Errorf("type d: c+a in %d..%d, published 101..121", s.minSum, s.maxSum)
		}
	}
	e, err := Generate('e', 40, 800, 3)
	if err != nil {
		t.Fatal(err)
	}
	s := dataStatsOf(e)
	// SOURCES.md 1 and 2.3: type E has a_ij >= 1, c_ij in 0..1000 and
	// c_ij * a_ij <= 1000.
	if s.minA < 1 || s.minC < 0 || s.maxC > 1000 || s.maxProd > 1000 {
		t.Errorf("type e: a >= %d, c in %d..%d, max c*a %d", s.minA, s.minC, s.maxC, s.maxProd)
	}
	// Mean of floor(1 - 10 ln U) is 1 + e^-0.1/(1 - e^-0.1) = 10.508 and
	// P(a = 1) = 1 - e^-0.1 = 0.0952 (worked out by hand from the recipe).
	if math.Abs(s.meanA-10.508) > 0.3 || math.Abs(s.fracA1-0.0952) > 0.01 {
		t.Errorf("type e: mean a %.3f, share of a=1 %.4f; recipe gives 10.508 and 0.0952", s.meanA, s.fracA1)
	}
	dir := gapBenchDir(t)
	pub, err := ReadFile(filepath.Join(dir, "yagiura", "e801600"), 1)
	if err != nil {
		t.Skipf("published type E file absent: %v", err)
	}
	p := dataStatsOf(pub)
	if math.Abs(p.meanA-s.meanA) > 0.3 || math.Abs(p.fracA1-s.fracA1) > 0.01 {
		t.Errorf("type e: generated mean a %.3f, share a=1 %.4f; e801600 has %.3f, %.4f", s.meanA, s.fracA1, p.meanA, p.fracA1)
	}
	if p.maxProd > 1000 || p.minC < 0 {
		t.Errorf("e801600 breaks the stated c*a <= 1000 relation: %d", p.maxProd)
	}
	// The published A-D files have the same ranges as generated ones.
	for _, name := range []string{"a20200", "c801600", "d801600"} {
		in, err := ReadFile(filepath.Join(dir, "yagiura", name), 1)
		if err != nil {
			t.Fatal(err)
		}
		ps, w := dataStatsOf(in), ranges[name[0]]
		if ps.minA != w.minA || ps.maxA != w.maxA || ps.minC != w.minC || ps.maxC != w.maxC {
			t.Errorf("%s: a in %d..%d, c in %d..%d, not the stated ranges", name, ps.minA, ps.maxA, ps.minC, ps.maxC)
		}
	}
}

// Tightness as in the literature: B is 70 % of A, so at most as loose;
// C, D and E capacities are 80 % of an agent's average load per agent.
func TestGenerateTightness(t *testing.T) {
	a, _ := Generate('a', 10, 200, 5)
	b, _ := Generate('b', 10, 200, 5)
	if b.Capacity[0] > a.Capacity[0] || b.Capacity[0] < a.Capacity[0]*7/10-1 {
		t.Errorf("capacities A %d, B %d: B should be 70%% of A (same data, same seed)", a.Capacity[0], b.Capacity[0])
	}
	for _, kind := range []byte("cde") {
		in, _ := Generate(kind, 10, 200, 5)
		for i, row := range in.Use {
			var sum int64
			for _, u := range row {
				sum += u
			}
			if want := 8 * sum / 100; in.Capacity[i] < want || in.Capacity[i] > max(want, 1000) {
				t.Errorf("type %c agent %d: capacity %d, 0.8*sum/m = %d", kind, i+1, in.Capacity[i], want)
			}
		}
	}
}
