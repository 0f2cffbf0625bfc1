package scheduling

import (
	"context"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
)

// TestSearchBookkeeping: after list scheduling, descents and kicks on
// random instances (one or several classes, with and without release
// dates), the value the search keeps incrementally equals the value
// recomputed from scratch and the value Instance.Evaluate gives the plan.
func TestSearchBookkeeping(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	ctx := context.Background()
	for c := range 40 {
		in := largeInstance(30+rng.IntN(60), uint64(c))
		switch c % 3 {
		case 0: // one machine, no release dates: the fast insertion path
			in.Classes = []Class{{ID: "M", Machines: 1}}
			for j := range in.Jobs {
				in.Jobs[j].Release, in.Jobs[j].Eligible = 0, nil
			}
		case 1: // two machines of one class
			in.Classes = []Class{{ID: "M", Machines: 2}}
			for j := range in.Jobs {
				in.Jobs[j].Eligible = nil
			}
		}
		p, err := NewProblem(in, Options{Moves: 20000})
		if err != nil {
			t.Fatal(err)
		}
		prices := p.Prices
		if prices == nil {
			prices = make([]float64, len(p.Rows))
		}
		_, ans, err := decomp.Relaxed(ctx, p, prices, nil)
		if err != nil {
			t.Fatal(err)
		}
		rep := p.Repair.(*repairer)
		s := rep.newSearch(uint64(c), 200000)
		s.listSchedule(ans)
		for range 10 {
			s.kick()
			s.descend(ctx)
			if s.val != s.total() {
				t.Fatalf("case %d: kept value %d, recomputed %d", c, s.val, s.total())
			}
		}
		plan := s.plan()
		v, err := in.Evaluate(plan.Detail.(*Schedule))
		if err != nil || float64(v) != plan.Value || v != s.val {
			t.Fatalf("case %d: plan %v, evaluated %v (%v), kept %d", c, plan.Value, v, err, s.val)
		}
	}
}
