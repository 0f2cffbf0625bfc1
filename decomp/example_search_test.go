package decomp_test

import (
	"context"
	"fmt"

	"pincer/decomp"
	"pincer/subproblem"
)

// slotBrancher splits a node whose answers put two jobs in one slot: the
// first job found in an over-full slot either takes that slot or not.
// Answers that fit are a plan whose value is the node's bound, so the node
// is solved.
type slotBrancher struct{ rows []decomp.Row }

func (b slotBrancher) Branch(in *decomp.BranchInput) (*decomp.Branching, error) {
	use := make([]float64, len(b.rows))
	cost := 0.0
	for _, a := range in.Answers {
		cost += a.Cost
		for _, e := range a.Use {
			use[e.Index] += e.Value
		}
	}
	for r := range b.rows {
		if use[r] <= b.rows[r].RHS {
			continue
		}
		for k, a := range in.Answers {
			if len(a.Use) > 0 && a.Use[0].Index == r {
				opt := a.Primal[0].Index
				return &decomp.Branching{Children: [][]decomp.Fixing{
					{{Block: k, Var: opt, Value: 0}}, // the job leaves the slot
					{{Block: k, Var: opt, Value: 1}}, // the job keeps it
				}}, nil
			}
		}
	}
	return &decomp.Branching{Plan: &decomp.Plan{Value: cost, Use: use}}, nil
}

// Three jobs each take one of two morning slots or the afternoon slot;
// each slot holds one job. Both jobs 1 and 2 want the first morning slot.
// The search proves the cheapest timetable.
func ExampleSearch() {
	rows := []decomp.Row{
		{Name: "morning 1", Sense: decomp.LessEqual, RHS: 1},
		{Name: "morning 2", Sense: decomp.LessEqual, RHS: 1},
		{Name: "afternoon", Sense: decomp.LessEqual, RHS: 1},
	}
	job := func(costs ...float64) decomp.Block {
		c := &subproblem.Choice{}
		for slot, v := range costs {
			c.Options = append(c.Options, subproblem.Option{Cost: v, Use: []decomp.Entry{{Index: slot, Value: 1}}})
		}
		return c
	}
	build := func() (*decomp.Problem, error) {
		return &decomp.Problem{Name: "timetable", Sense: decomp.Minimise, Rows: rows, IntegralObjective: true,
			Blocks: []decomp.Block{job(1, 4, 6), job(2, 3, 9), job(5, 6, 2)}}, nil
	}
	res, err := decomp.Search(context.Background(), build, slotBrancher{rows}, decomp.SearchSettings{Workers: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("plan %v, bound %v, proved %v\n", res.Plan.Value, res.Bound, res.Proved)
	// Output: plan 6, bound 6, proved true
}
