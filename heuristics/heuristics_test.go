package heuristics

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"pgregory.net/rapid"
)

// bruteForce enumerates every assignment of a tiny instance and returns an
// optimal feasible one (nil when none exists). It is the outside reference of
// the property tests and shares no code with the package.
func bruteForce(p *Assignment) (best []int, value float64) {
	m, n := len(p.Capacity), len(p.Cost[0])
	asg := make([]int, n)
	for {
		load := make([]float64, m)
		v, ok := 0.0, true
		for j, i := range asg {
			c := p.Cost[i][j]
			if math.IsInf(c, 0) {
				ok = false
				break
			}
			v += c
			load[i] += p.Weight[i][j]
		}
		for i := range load {
			if load[i] > p.Capacity[i] {
				ok = false
			}
		}
		if ok && (best == nil || (p.Maximise && v > value) || (!p.Maximise && v < value)) {
			best, value = append([]int(nil), asg...), v
		}
		j := 0
		for ; j < n; j++ {
			asg[j]++
			if asg[j] < m {
				break
			}
			asg[j] = 0
		}
		if j == n {
			return best, value
		}
	}
}

// check recomputes feasibility and value of assign directly from the data.
func check(t *rapid.T, p *Assignment, assign []int, value float64) {
	m, n := len(p.Capacity), len(p.Cost[0])
	if len(assign) != n {
		t.Fatalf("assignment has %d entries, want %d", len(assign), n)
	}
	load := make([]float64, m)
	v := 0.0
	for j, i := range assign {
		if i < 0 || i >= m || math.IsInf(p.Cost[i][j], 0) {
			t.Fatalf("item %d on resource %d: not an allowed pair", j, i)
		}
		v += p.Cost[i][j]
		load[i] += p.Weight[i][j]
	}
	for i := range load {
		if load[i] > p.Capacity[i] {
			t.Fatalf("resource %d: load %v above capacity %v", i, load[i], p.Capacity[i])
		}
	}
	if !math.IsNaN(value) && v != value {
		t.Fatalf("reported value %v, true value %v", value, v)
	}
}

func genInstance(t *rapid.T) *Assignment {
	m := rapid.IntRange(2, 4).Draw(t, "m")
	n := rapid.IntRange(4, 9).Draw(t, "n")
	if m == 4 && n > 8 {
		n = 8
	}
	p := &Assignment{Maximise: rapid.Bool().Draw(t, "max"), Capacity: make([]float64, m)}
	total := 0.0
	for i := 0; i < m; i++ {
		p.Cost = append(p.Cost, make([]float64, n))
		p.Weight = append(p.Weight, make([]float64, n))
		for j := 0; j < n; j++ {
			p.Cost[i][j] = float64(rapid.IntRange(0, 30).Draw(t, "c"))
			if rapid.IntRange(0, 9).Draw(t, "forbid") == 0 {
				p.Cost[i][j] = math.Inf(1)
			}
			p.Weight[i][j] = float64(rapid.IntRange(0, 12).Draw(t, "w"))
			total += p.Weight[i][j]
		}
	}
	// capacities around 0.5 to 1.3 times the mean load, so that tight and
	// infeasible instances both occur
	for i := range p.Capacity {
		p.Capacity[i] = math.Floor(total / float64(m*m) * rapid.Float64Range(0.5, 1.3).Draw(t, "cap"))
	}
	return p
}

func genRelaxed(t *rapid.T, p *Assignment) ([][]int, [][]float64) {
	m, n := p.Size()
	rel := make([][]int, m)
	for i := range rel {
		for j := 0; j < n; j++ {
			if rapid.Bool().Draw(t, "take") {
				rel[i] = append(rel[i], j)
			}
		}
	}
	if rapid.Bool().Draw(t, "nilPriced") {
		return rel, nil
	}
	priced := make([][]float64, m)
	mult := make([]float64, n)
	for j := range mult {
		mult[j] = rapid.Float64Range(-10, 10).Draw(t, "u")
	}
	for i := range priced {
		priced[i] = make([]float64, n)
		for j := range priced[i] {
			priced[i][j] = p.Cost[i][j] + mult[j]
		}
	}
	return rel, priced
}

func better(p *Assignment, a, b float64) bool {
	if p.Maximise {
		return a > b
	}
	return a < b
}

// TestRepairAndImproveProperties checks Repair and Improve against brute
// force enumeration on tiny random instances.
func TestRepairAndImproveProperties(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := genInstance(t)
		rel, priced := genRelaxed(t, p)
		seed := rapid.Uint64().Draw(t, "seed")
		rng := rand.New(rand.NewPCG(seed, 7))
		opt, optVal := bruteForce(p)

		asg, ok := Repair(context.Background(), p, rel, priced, rng)
		if opt == nil && ok {
			t.Fatalf("Repair returned %v but brute force finds no feasible assignment", asg)
		}
		if ok {
			check(t, p, asg, math.NaN())
			in, _ := p.Evaluate(asg)
			out, v := Improve(context.Background(), p, asg, ImproveSettings{Moves: 50}, rng)
			check(t, p, out, v)
			if better(p, in, v) {
				t.Fatalf("Improve worsened %v to %v", in, v)
			}
			if better(p, v, optVal) {
				t.Fatalf("Improve value %v beats the brute-force optimum %v", v, optVal)
			}
		}

		// Improve from an arbitrary, possibly over-capacity, allowed assignment
		m, n := p.Size()
		start := make([]int, n)
		for j := range start {
			start[j] = rapid.IntRange(0, m-1).Draw(t, "start")
			if math.IsInf(p.Cost[start[j]][j], 0) {
				return // forbidden start: covered by TestImproveBadInput
			}
		}
		out, v := Improve(context.Background(), p, start, ImproveSettings{Moves: 50}, rng)
		if math.IsInf(v, 0) {
			if v != p.worst() {
				fv, ff := p.Evaluate(out)
				t.Fatalf("value %v is not the worst of the sense (out %v start %v eval %v %v, p %+v)", v, out, start, fv, ff, p)
			}
			return
		}
		if opt == nil {
			t.Fatalf("Improve found value %v but brute force finds no feasible assignment", v)
		}
		check(t, p, out, v)
	})
}

// TestImproveReachesOptimum runs a long Improve on 200 tiny random instances
// and compares with brute force. Improve is a heuristic, so it cannot be
// required to reach the optimum every time (a tabu search can cycle among
// assignments away from it within its budget); it must in at least 90%.
func TestImproveReachesOptimum(t *testing.T) {
	hits, cases := 0, 0
	for seed := uint64(0); cases < 200; seed++ {
		r := rand.New(rand.NewPCG(seed, 99))
		m, n := 2+r.IntN(3), 5+r.IntN(4)
		p := &Assignment{Maximise: seed%2 == 0, Capacity: make([]float64, m)}
		total := 0.0
		for i := 0; i < m; i++ {
			p.Cost = append(p.Cost, make([]float64, n))
			p.Weight = append(p.Weight, make([]float64, n))
			for j := 0; j < n; j++ {
				p.Cost[i][j] = float64(r.IntN(40))
				if r.IntN(10) == 0 {
					p.Cost[i][j] = math.Inf(1)
				}
				p.Weight[i][j] = float64(1 + r.IntN(15))
				total += p.Weight[i][j]
			}
		}
		for i := range p.Capacity {
			p.Capacity[i] = math.Floor(total / float64(m*m) * (0.8 + 0.4*r.Float64()))
		}
		opt, optVal := bruteForce(p)
		asg, ok := Repair(context.Background(), p, everyoneTakesAll(p), nil, r)
		if opt == nil || !ok {
			continue
		}
		cases++
		_, v := Improve(context.Background(), p, asg, ImproveSettings{Moves: 2000, Stall: 100}, r)
		if v == optVal {
			hits++
		}
	}
	t.Logf("optimum reached on %d of %d instances", hits, cases)
	if hits < cases*9/10 {
		t.Errorf("optimum reached on %d of %d instances, want >= 90%%", hits, cases)
	}
}

// TestRepairTightInfeasible: a hand-made instance with no feasible
// assignment (total weight 3 per item, 3 items, total capacity 8, checked by
// hand) must give ok=false; the same with capacity 9 must succeed.
func TestRepairTightInfeasible(t *testing.T) {
	p := &Assignment{
		Cost:     [][]float64{{1, 2, 3}, {3, 2, 1}},
		Weight:   [][]float64{{3, 3, 3}, {3, 3, 3}},
		Capacity: []float64{4, 4},
	}
	if asg, ok := Repair(context.Background(), p, everyoneTakesAll(p), nil, rand.New(rand.NewPCG(1, 2))); ok {
		t.Fatalf("Repair returned %v for an instance with no feasible assignment", asg)
	}
	p.Capacity = []float64{6, 3}
	asg, ok := Repair(context.Background(), p, everyoneTakesAll(p), nil, rand.New(rand.NewPCG(1, 2)))
	if !ok {
		t.Fatal("Repair failed on a feasible instance")
	}
	// by hand: resource 1 takes one item, resource 0 two; best is item 2 on 1: 1+2+1 = 4
	out, v := Improve(context.Background(), p, asg, ImproveSettings{}, rand.New(rand.NewPCG(1, 2)))
	if v != 4 {
		t.Fatalf("Improve value %v (assignment %v), want 4", v, out)
	}
}

// TestImproveBadInput: malformed input and forbidden pairs give back the
// input with the worst value of the sense.
func TestImproveBadInput(t *testing.T) {
	p := &Assignment{
		Cost:     [][]float64{{1, math.Inf(1)}, {2, 2}},
		Weight:   [][]float64{{1, 1}, {1, 1}},
		Capacity: []float64{2, 2},
		Maximise: true,
	}
	rng := rand.New(rand.NewPCG(3, 4))
	for _, in := range [][]int{{0, 0}, {0}, {0, 5}, {-1, 1}} {
		out, v := Improve(context.Background(), p, in, ImproveSettings{}, rng)
		if !math.IsInf(v, -1) || len(out) != len(in) {
			t.Errorf("Improve(%v) = %v, %v; want a copy of the input and -Inf", in, out, v)
		}
	}
	if _, ok := Repair(context.Background(), &Assignment{Cost: [][]float64{{1}}, Weight: [][]float64{{1, 2}}, Capacity: []float64{1}}, nil, nil, rng); ok {
		t.Error("Repair accepted a ragged instance")
	}
}

// TestImproveCancelled: a cancelled context still returns a feasible
// assignment at least as good as the input.
func TestImproveCancelled(t *testing.T) {
	p := &Assignment{
		Cost:     [][]float64{{4, 1, 3}, {2, 5, 1}},
		Weight:   [][]float64{{1, 1, 1}, {1, 1, 1}},
		Capacity: []float64{2, 2},
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	out, v := Improve(ctx, p, []int{0, 1, 1}, ImproveSettings{Moves: 1 << 30}, rand.New(rand.NewPCG(5, 6)))
	// input value 4+5+1 = 10; the descent alone reaches the optimum 2+1+1 = 4 (by hand)
	if got, ok := p.Evaluate(out); !ok || got != v || v > 10 {
		t.Fatalf("cancelled Improve returned %v (value %v, evaluates to %v, feasible %v)", out, v, got, ok)
	}
}

// TestImproveNoForbiddenMoves: every item has one allowed resource and item
// 1 cannot fit on its own (weight 1, capacity 0), so no feasible assignment
// exists (by hand); Improve once swapped items onto forbidden pairs here.
func TestImproveNoForbiddenMoves(t *testing.T) {
	inf := math.Inf(1)
	p := &Assignment{
		Cost:     [][]float64{{inf, inf, 0, 0, 0, 0}, {0, 0, inf, inf, inf, inf}},
		Weight:   [][]float64{{0, 0, 0, 0, 0, 0}, {0, 1, 0, 0, 0, 0}},
		Capacity: []float64{0, 0},
		Maximise: true,
	}
	out, v := Improve(context.Background(), p, []int{1, 1, 0, 0, 0, 0}, ImproveSettings{}, rand.New(rand.NewPCG(1, 1)))
	if !math.IsInf(v, -1) {
		t.Fatalf("Improve returned %v with value %v, want -Inf", out, v)
	}
}
