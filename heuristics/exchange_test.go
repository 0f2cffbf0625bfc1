package heuristics

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"pgregory.net/rapid"
)

// TestExchangeFindsCycle: three full resources of one item each, where the
// only improving move is the rotation of all three items (every shift
// overloads a resource and every swap costs more). Worked by hand: the
// plan costs 5+5+5 = 15 and the rotation 1+1+1 = 3, the swaps 26 each.
func TestExchangeFindsCycle(t *testing.T) {
	p := &Assignment{
		// resources A, B, C; items x, y, z
		Cost: [][]float64{
			{5, 20, 1},
			{1, 5, 20},
			{20, 1, 5},
		},
		Weight:   [][]float64{{10, 10, 10}, {10, 10, 10}, {10, 10, 10}},
		Capacity: []float64{10, 10, 10},
	}
	md := compile(p)
	s := newSearch(md.m, md.n)
	s.reset(context.Background(), md, []int{0, 1, 2}, rand.New(rand.NewPCG(1, 1)))
	s.descend(1 << 30)
	if s.cost != 15 {
		t.Fatalf("the descent moved the plan to cost %v; the test needs a plan no shift or swap improves", s.cost)
	}
	if !s.exchangeStep(false) {
		t.Fatal("no exchange found; the three-item rotation improves the plan from 15 to 3")
	}
	s.recompute()
	if want := []int{1, 2, 0}; s.asg[0] != want[0] || s.asg[1] != want[1] || s.asg[2] != want[2] || s.cost != 3 || s.over != 0 {
		t.Fatalf("after the exchange: assignment %v, cost %v, %d over; want %v at 3, none over", s.asg, s.cost, s.over, want)
	}
	if s.exchangeStep(false) {
		t.Fatalf("an exchange from the optimum (cost 3): %v", s.asg)
	}
}

// TestLocalExchangeStartsAtTouched: the local exchange search of the
// rotation case above finds nothing while no resource is marked, and the
// rotation once one of its resources is (a cycle can start at any of its
// items); it clears the marks either way.
func TestLocalExchangeStartsAtTouched(t *testing.T) {
	p := &Assignment{
		Cost:     [][]float64{{5, 20, 1}, {1, 5, 20}, {20, 1, 5}},
		Weight:   [][]float64{{10, 10, 10}, {10, 10, 10}, {10, 10, 10}},
		Capacity: []float64{10, 10, 10},
	}
	md := compile(p)
	s := newSearch(md.m, md.n)
	s.reset(context.Background(), md, []int{0, 1, 2}, rand.New(rand.NewPCG(1, 1)))
	s.untouch()
	if s.exchangeStep(true) {
		t.Fatalf("a local exchange with no resource marked: %v", s.asg)
	}
	s.touch(1)
	if !s.exchangeStep(true) {
		t.Fatal("no local exchange from resource B; the rotation through it improves 15 to 3")
	}
	s.recompute()
	if s.cost != 3 || s.over != 0 {
		t.Fatalf("after the local exchange: assignment %v, cost %v, %d over; want cost 3, none over", s.asg, s.cost, s.over)
	}
	// the rotation marked its three resources; the next search clears them
	if len(s.touchedList) != 3 || s.exchangeStep(true) || len(s.touchedList) != 0 {
		t.Fatalf("marks after the exchange: %v (want 3, then none and no exchange from the optimum)", s.touchedList)
	}
}

// TestExchangeFindsPath: a path exchange into the one resource with room.
// Item x (on A) is much cheaper on B, which is full with y; y costs a
// little more on C, which has room. Worked by hand: x to B does not fit, y
// to C alone costs more, the swap overloads A, x to C costs the same; x to
// B with y to C takes the plan from 9+5 = 14 to 1+6 = 7.
func TestExchangeFindsPath(t *testing.T) {
	p := &Assignment{
		// resources A, B, C; items x, y
		Cost:     [][]float64{{9, 9}, {1, 5}, {9, 6}},
		Weight:   [][]float64{{5, 20}, {10, 10}, {10, 10}},
		Capacity: []float64{10, 10, 10},
	}
	md := compile(p)
	s := newSearch(md.m, md.n)
	s.reset(context.Background(), md, []int{0, 1}, rand.New(rand.NewPCG(1, 1)))
	s.descend(1 << 30)
	if s.cost != 14 {
		t.Fatalf("the descent moved the plan to cost %v; the test needs a plan no shift or swap improves", s.cost)
	}
	if !s.exchangeStep(false) {
		t.Fatal("no exchange found; x to B and y to C improves the plan from 14 to 7")
	}
	s.recompute()
	if s.asg[0] != 1 || s.asg[1] != 2 || s.cost != 7 || s.over != 0 {
		t.Fatalf("after the exchange: assignment %v, cost %v, %d over; want [1 2] at 7", s.asg, s.cost, s.over)
	}
}

// TestExchangeProperties: on random small instances, from a feasible
// assignment (the optimum of a brute force over a perturbed copy, so that
// it is feasible but seldom optimal), every exchange step keeps the
// assignment feasible and lowers its cost, recomputed from the data; the
// polish never ends above its start and never below the true optimum.
func TestExchangeProperties(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := genInstance(t)
		p.Maximise = false
		opt, optV := bruteForce(p)
		if opt == nil {
			t.Skip("no feasible plan")
		}
		// a feasible start: shift random items while they fit
		md := compile(p)
		start := append([]int(nil), opt...)
		rng := rand.New(rand.NewPCG(rapid.Uint64().Draw(t, "seed"), 3))
		for k := 0; k < 3*md.n; k++ {
			j, i := rng.IntN(md.n), rng.IntN(md.m)
			trial := append([]int(nil), start...)
			trial[j] = i
			if _, ok := p.Evaluate(trial); ok {
				start = trial
			}
		}
		s := newSearch(md.m, md.n)
		s.reset(context.Background(), md, start, rng)
		prev, _ := p.Evaluate(start)
		for steps := 0; s.exchangeStep(false); steps++ {
			v, ok := p.Evaluate(s.asg)
			if !ok {
				t.Fatalf("step %d: infeasible assignment %v", steps, s.asg)
			}
			if !(v < prev) {
				t.Fatalf("step %d: cost %v, not below %v", steps, v, prev)
			}
			if v < optV-1e-9 {
				t.Fatalf("step %d: cost %v below the optimum %v", steps, v, optV)
			}
			prev = v
			if steps > 1000 {
				t.Fatal("more than 1000 improving steps on a tiny instance")
			}
		}
		s.reset(context.Background(), md, start, rng)
		before, _ := p.Evaluate(start)
		s.polish(false)
		v, ok := p.Evaluate(s.best)
		if !ok || v > before || v < optV-1e-9 || math.Abs(v-s.bestCost) > 1e-6 {
			t.Fatalf("polish: %v (feasible %v, recorded %v) from %v, optimum %v", v, ok, s.bestCost, before, optV)
		}
	})
}

// TestPlanSearchLargeFeasible: on a 20 x 300 type-D-like instance (large
// enough for the iterated local search of the tasks) the plan search
// returns a feasible plan no worse than the one offered, and the same
// plan with one worker and with two.
func TestPlanSearchLargeFeasible(t *testing.T) {
	p := typeDLike(20, 300, 5)
	run := func(workers int) ([]int, float64, float64) {
		sr, err := NewSearcher(p)
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(4, 4))
		a, ok := sr.Repair(context.Background(), everyoneTakesAll(p), nil, rng)
		if !ok {
			t.Fatal("Repair failed")
		}
		a, v0 := sr.Improve(context.Background(), a, ImproveSettings{Moves: 500}, rng)
		sr.Offer(a)
		got, v, ok := sr.PlanSearch(context.Background(), SearchSettings{Moves: 4000, Rounds: 2, Workers: workers}, 7)
		if !ok {
			t.Fatal("PlanSearch found no plan")
		}
		return got, v, v0
	}
	a1, v1, v0 := run(1)
	if check, ok := p.Evaluate(a1); !ok || check != v1 || v1 > v0 {
		t.Fatalf("plan search: value %v (recomputed %v, feasible %v) from an offered %v", v1, check, ok, v0)
	}
	a2, v2, _ := run(2)
	if v2 != v1 {
		t.Fatalf("two workers: %v, one worker: %v", v2, v1)
	}
	for j := range a1 {
		if a1[j] != a2[j] {
			t.Fatalf("two workers differ from one at item %d", j)
		}
	}
}
