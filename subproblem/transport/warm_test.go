package transport

import (
	"errors"
	"math/rand/v2"
	"reflect"
	"testing"
)

// TestWarmFlowsRestore: a Solver that has gone through a chain of open and
// close changes, and a fresh Solver given its WarmFlows, give identical
// solutions (shipments, cost and duals, bit for bit) on the next changes,
// as a resumed run needs.
func TestWarmFlowsRestore(t *testing.T) {
	p := planarProblem(3, 30, 200, 30, 0)
	total := 0.0
	for _, d := range p.Demand {
		total += d
	}
	capacity := total / 12
	rng := rand.New(rand.NewPCG(5, 9))
	a, err := NewSolver(p)
	if err != nil {
		t.Fatal(err)
	}
	open := make([]bool, len(p.Supply))
	set := func(s *Solver) {
		for i, o := range open {
			v := 0.0
			if o {
				v = capacity
			}
			if err := s.SetSupply(i, v); err != nil {
				t.Fatal(err)
			}
		}
	}
	for i := 0; i < 20; i++ {
		open[i] = true
	}
	for step := 0; step < 40; step++ {
		open[rng.IntN(len(open))] = !open[rng.IntN(len(open))]
		set(a)
		if _, err := a.Solve(); err != nil && !errors.Is(err, ErrInfeasible) {
			t.Fatal(err)
		}
	}
	b, err := NewSolver(p)
	if err != nil {
		t.Fatal(err)
	}
	if err := b.SetWarmFlows(a.WarmFlows()); err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(a.WarmFlows(), b.WarmFlows()) {
		t.Fatal("restored flows read back differently")
	}
	for step := 0; step < 30; step++ {
		i := rng.IntN(len(open))
		open[i] = !open[i]
		set(a)
		set(b)
		sa, ea := a.Solve()
		sb, eb := b.Solve()
		if (ea == nil) != (eb == nil) {
			t.Fatalf("step %d: errors %v and %v", step, ea, eb)
		}
		if !reflect.DeepEqual(sa, sb) {
			t.Fatalf("step %d: the restored solver's solution differs", step)
		}
	}
	if err := b.SetWarmFlows([]Shipment{{Site: 99, Customer: 0, Qty: 1}}); err == nil {
		t.Error("a flow from a site out of range was accepted")
	}
}
