package subproblem

import (
	"errors"
	"flag"
	"math"
	"math/rand/v2"
	"os"
	"testing"

	"pgregory.net/rapid"
)

// TestMain raises rapid's default number of cases per property to a few
// thousand, unless the caller chose one with -rapid.checks or RAPID_CHECKS.
func TestMain(m *testing.M) {
	flag.Parse()
	chosen := os.Getenv("RAPID_CHECKS") != ""
	flag.Visit(func(f *flag.Flag) {
		if f.Name == "rapid.checks" {
			chosen = true
		}
	})
	if !chosen {
		if err := flag.Set("rapid.checks", "3000"); err != nil {
			panic(err)
		}
	}
	os.Exit(m.Run())
}

// bruteKnapsack enumerates all 2^n subsets (the outside reference for small
// instances) and returns the best value of a subset that fits.
func bruteKnapsack(profit []float64, weight []int64, capacity int64) float64 {
	n := len(profit)
	best := 0.0
	for mask := 0; mask < 1<<n; mask++ {
		r := capacity
		v := 0.0
		ok := true
		for j := range n {
			if mask&(1<<j) == 0 {
				continue
			}
			// r stays within [-capacity, capacity] until the break: no overflow.
			if r -= weight[j]; r < 0 {
				ok = false
				break
			}
			v += profit[j]
		}
		if ok && v > best {
			best = v
		}
	}
	return best
}

// refDP is an independent textbook dynamic program over the capacity (value
// only), used as the reference for medium instances.
func refDP(profit []float64, weight []int64, capacity int64) float64 {
	f := make([]float64, capacity+1)
	for j, p := range profit {
		if p <= 0 {
			continue
		}
		w := weight[j]
		for c := capacity; c >= w; c-- {
			f[c] = math.Max(f[c], f[c-w]+p)
		}
	}
	return f[capacity]
}

// checkSolution verifies that take is feasible, respects the sign rules,
// and that the returned value is its profit and matches want.
func checkSolution(t interface {
	Helper()
	Fatalf(string, ...any)
}, profit []float64, weight []int64, capacity int64, take []bool, got, want float64) {
	t.Helper()
	r := capacity
	v := 0.0
	for j, in := range take {
		if profit[j] > 0 && weight[j] == 0 && !in {
			t.Fatalf("item %d has profit %v and zero weight but is not taken", j, profit[j])
		}
		if !in {
			continue
		}
		if profit[j] <= 0 {
			t.Fatalf("item %d with profit %v taken", j, profit[j])
		}
		if r -= weight[j]; r < 0 {
			t.Fatalf("chosen items exceed capacity %d", capacity)
		}
		v += profit[j]
	}
	if v != got {
		t.Fatalf("returned value %v but chosen items sum to %v", got, v)
	}
	if math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) {
		t.Fatalf("value %v, reference optimum %v", got, want)
	}
}

// genInstance draws a small instance with mixed signs, zero weights, ties
// and capacities from 0 to above the total weight.
func genInstance(t *rapid.T) ([]float64, []int64, int64) {
	n := rapid.IntRange(0, 12).Draw(t, "n")
	integral := rapid.Bool().Draw(t, "integral")
	profit := make([]float64, n)
	weight := make([]int64, n)
	var total int64
	for j := range n {
		if integral {
			// Small integers make equal profits and ratios common.
			profit[j] = float64(rapid.IntRange(-5, 10).Draw(t, "p"))
		} else {
			profit[j] = rapid.Float64Range(-50, 100).Draw(t, "p")
		}
		weight[j] = int64(rapid.IntRange(0, 20).Draw(t, "w"))
		total += weight[j]
	}
	capacity := int64(rapid.IntRange(0, int(total)+5).Draw(t, "c"))
	return profit, weight, capacity
}

func TestKnapsackMatchesEnumeration(t *testing.T) {
	var k Knapsack // shared on purpose: scratch reuse across sizes
	// c compacts its decision log after every core step.
	c := Knapsack{testNodeLimit: 1}
	rapid.Check(t, func(t *rapid.T) {
		k := &k
		if rapid.Bool().Draw(t, "compact") {
			k = &c
		}
		profit, weight, capacity := genInstance(t)
		take := make([]bool, len(profit))
		got, err := k.Solve(profit, weight, capacity, take)
		if err != nil {
			t.Fatalf("Solve: %v", err)
		}
		// Reference: brute-force enumeration of all subsets.
		checkSolution(t, profit, weight, capacity, take, got, bruteKnapsack(profit, weight, capacity))
	})
}

func TestKnapsackHugeWeights(t *testing.T) {
	var k Knapsack
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 12).Draw(t, "n")
		profit := make([]float64, n)
		weight := make([]int64, n)
		for j := range n {
			profit[j] = rapid.Float64Range(-1, 10).Draw(t, "p")
			weight[j] = rapid.Int64Range(0, math.MaxInt64).Draw(t, "w")
			if rapid.Bool().Draw(t, "near") {
				weight[j] = math.MaxInt64 - rapid.Int64Range(0, 100).Draw(t, "d")
			}
		}
		capacity := rapid.Int64Range(0, math.MaxInt64).Draw(t, "c")
		if rapid.Bool().Draw(t, "maxcap") {
			capacity = math.MaxInt64
		}
		take := make([]bool, n)
		got, err := k.Solve(profit, weight, capacity, take)
		if err != nil {
			t.Fatalf("Solve: %v", err)
		}
		// Reference: brute-force enumeration of all subsets.
		checkSolution(t, profit, weight, capacity, take, got, bruteKnapsack(profit, weight, capacity))
	})
}

// TestKnapsackMediumMatchesDynamicProgram uses sizes where the partial
// sorting partitions, with many equal efficiencies (integer profits,
// profit = weight + constant) as well as random ones.
func TestKnapsackMediumMatchesDynamicProgram(t *testing.T) {
	var k Knapsack
	// c compacts its decision log after every core step.
	c := Knapsack{testNodeLimit: 1}
	rapid.Check(t, func(t *rapid.T) {
		k := &k
		if rapid.Bool().Draw(t, "compact") {
			k = &c
		}
		n := rapid.IntRange(0, 90).Draw(t, "n")
		kind := rapid.IntRange(0, 2).Draw(t, "kind")
		profit := make([]float64, n)
		weight := make([]int64, n)
		var total int64
		for j := range n {
			w := int64(rapid.IntRange(0, 30).Draw(t, "w"))
			switch kind {
			case 0:
				profit[j] = float64(rapid.IntRange(-10, 30).Draw(t, "p"))
			case 1:
				profit[j] = float64(w + 5)
			default:
				profit[j] = rapid.Float64Range(-20, 60).Draw(t, "p")
			}
			weight[j] = w
			total += w
		}
		capacity := int64(rapid.IntRange(0, int(total)+3).Draw(t, "c"))
		take := make([]bool, n)
		got, err := k.Solve(profit, weight, capacity, take)
		if err != nil {
			t.Fatalf("Solve: %v", err)
		}
		// Reference: independent dynamic program over the capacity.
		checkSolution(t, profit, weight, capacity, take, got, refDP(profit, weight, capacity))
	})
}

// genMedium draws an n-item instance of the given kind with weights 1..100.
func genMedium(rng *rand.Rand, n int, kind string) ([]float64, []int64) {
	profit := make([]float64, n)
	weight := make([]int64, n)
	for j := range n {
		w := int64(1 + rng.IntN(100))
		weight[j] = w
		switch kind {
		case "uncorrelated":
			profit[j] = 1 + 99*rng.Float64()
		case "weak":
			profit[j] = float64(w) + 20*rng.Float64() - 10
		case "strong": // integer profits, heavy ties in ratio ordering
			profit[j] = float64(w + 10)
		case "gap": // priced assignment costs, c + w in 110..121
			c := float64(110+rng.IntN(12)) - float64(w)
			profit[j] = 55 + 10*rng.Float64() - c
		case "mixed":
			profit[j] = 200*rng.Float64() - 100
		}
	}
	return profit, weight
}

func TestKnapsackMatchesDynamicProgram(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	var k Knapsack
	for _, kind := range []string{"uncorrelated", "weak", "strong", "gap", "mixed"} {
		for rep := range 30 {
			const n = 200
			profit, weight := genMedium(rng, n, kind)
			var total int64
			for _, w := range weight {
				total += w
			}
			capacity := int64(rng.Float64() * float64(total) * 0.6)
			take := make([]bool, n)
			got, err := k.Solve(profit, weight, capacity, take)
			if err != nil {
				t.Fatalf("%s #%d: Solve: %v", kind, rep, err)
			}
			// Reference: independent dynamic program over the capacity.
			checkSolution(t, profit, weight, capacity, take, got, refDP(profit, weight, capacity))
		}
	}
}

func TestKnapsackDeterministic(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	profit, weight := genMedium(rng, 300, "strong")
	var a, b Knapsack
	ta := make([]bool, 300)
	tb := make([]bool, 300)
	// Warm b up on another instance so its scratch differs from a's.
	p2, w2 := genMedium(rng, 50, "gap")
	if _, err := b.Solve(p2, w2, 500, make([]bool, 50)); err != nil {
		t.Fatal(err)
	}
	va, err := a.Solve(profit, weight, 4000, ta)
	if err != nil {
		t.Fatal(err)
	}
	vb, err := b.Solve(profit, weight, 4000, tb)
	if err != nil {
		t.Fatal(err)
	}
	if va != vb {
		t.Fatalf("values differ: %v vs %v", va, vb)
	}
	for j := range ta {
		if ta[j] != tb[j] {
			t.Fatalf("choices differ at item %d", j)
		}
	}
}

func TestKnapsackErrors(t *testing.T) {
	var k Knapsack
	cases := []struct {
		name     string
		profit   []float64
		weight   []int64
		capacity int64
		take     []bool
	}{
		{"weight length", []float64{1, 2}, []int64{1}, 3, make([]bool, 2)},
		{"take length", []float64{1, 2}, []int64{1, 1}, 3, make([]bool, 1)},
		{"negative capacity", []float64{1}, []int64{1}, -1, make([]bool, 1)},
		{"negative weight", []float64{1}, []int64{-2}, 3, make([]bool, 1)},
		{"NaN profit", []float64{math.NaN()}, []int64{1}, 3, make([]bool, 1)},
		{"Inf profit", []float64{math.Inf(1)}, []int64{1}, 3, make([]bool, 1)},
		{"-Inf profit", []float64{math.Inf(-1)}, []int64{1}, 3, make([]bool, 1)},
	}
	for _, c := range cases {
		_, err := k.Solve(c.profit, c.weight, c.capacity, c.take)
		if !errors.Is(err, ErrInvalidInput) {
			t.Errorf("%s: got error %v, want ErrInvalidInput", c.name, err)
		}
	}
}

// TestKnapsackHandExample checks a small instance solved by hand (from
// memory of the usual textbook exercise style): capacity 10, items
// (profit, weight) = (10,5) (40,4) (30,6) (50,3); the best is items 1 and 3
// with profit 90 and weight 7.
func TestKnapsackHandExample(t *testing.T) {
	var k Knapsack
	take := make([]bool, 4)
	v, err := k.Solve([]float64{10, 40, 30, 50}, []int64{5, 4, 6, 3}, 10, take)
	if err != nil {
		t.Fatal(err)
	}
	want := []bool{false, true, false, true}
	if v != 90 {
		t.Fatalf("value %v, want 90", v)
	}
	for j := range want {
		if take[j] != want[j] {
			t.Fatalf("take = %v, want %v", take, want)
		}
	}
}
