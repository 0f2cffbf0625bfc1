package decomp_test

import (
	"context"
	"fmt"

	"pincer/decomp"
	"pincer/subproblem"
)

// pickRepair accepts the relaxed choices when they respect the rows.
type pickRepair struct {
	blocks []*subproblem.Choice
	rows   []decomp.Row
}

func (r pickRepair) Repair(_ context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	use := make([]float64, len(r.rows))
	value := 0.0
	for k, a := range in.Answers {
		o := r.blocks[k].Options[a.Primal[0].Index]
		value += o.Cost
		for _, e := range o.Use {
			use[e.Index] += e.Value
		}
	}
	for i, row := range r.rows {
		if use[i] > row.RHS {
			return nil, nil
		}
	}
	return &decomp.Plan{Value: value, Use: use}, nil
}

// Three jobs each pick one of two machines; machine A is cheaper but
// holds only two jobs. Pricing A's capacity row moves one job to B.
// Any price from 2 to 3 per slot on A is dual optimal here (worked by hand:
// the cheapest move to B costs 2, the next 3).
func Example() {
	rows := []decomp.Row{{Name: "machine A", Sense: decomp.LessEqual, RHS: 2}}
	a := []decomp.Entry{{Index: 0, Value: 1}}
	jobs := []*subproblem.Choice{
		{Options: []subproblem.Option{{Cost: 3, Use: a}, {Cost: 5}}},
		{Options: []subproblem.Option{{Cost: 2, Use: a}, {Cost: 6}}},
		{Options: []subproblem.Option{{Cost: 4, Use: a}, {Cost: 7}}},
	}
	p := &decomp.Problem{Name: "three jobs", Sense: decomp.Minimise, Rows: rows, IntegralObjective: true}
	for _, j := range jobs {
		p.Blocks = append(p.Blocks, j)
	}
	p.Repair = pickRepair{blocks: jobs, rows: rows}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 100})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("plan %.0f, bound %.0f, proved %v (%s)\n", res.Plan.Value, res.Bound, res.ProvedOptimal, res.Status)
	fmt.Printf("%s: price %.0f, binding %v\n", res.Rows[0].Name, res.Rows[0].Price, res.Rows[0].Binding)
	// Output:
	// plan 11, bound 11, proved true (integer-closed)
	// machine A: price 3, binding true
}
