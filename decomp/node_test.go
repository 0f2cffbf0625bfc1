package decomp_test

import (
	"context"
	"testing"

	"pincer/decomp"
	"pincer/subproblem"
)

// TestSolveNodeCutoff: the reference bound is a plain run's best bound;
// a cutoff below it (minimising) must end the node at once, and without
// a cutoff the node's bound must be at most that of the full run
// (same rule, same rounds).
func TestSolveNodeCutoff(t *testing.T) {
	p := smallRun(t)
	ref, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 30, Gap: -1})
	if err != nil {
		t.Fatal(err)
	}
	n, err := decomp.SolveNode(context.Background(), smallRun(t), decomp.NodeSettings{Rounds: 30})
	if err != nil {
		t.Fatal(err)
	}
	if n.CutOff || n.Infeasible || n.Bound != ref.Bound || len(n.Answers) != len(p.Blocks) {
		t.Fatalf("node without cutoff: %+v, run bound %v", n, ref.Bound)
	}
	c, err := decomp.SolveNode(context.Background(), smallRun(t), decomp.NodeSettings{Rounds: 30, Cutoff: ref.History[0].Value - 1, HasCutoff: true})
	if err != nil {
		t.Fatal(err)
	}
	if !c.CutOff || c.Rounds != 1 {
		t.Fatalf("cutoff below the first bound: cut off %v after %d rounds", c.CutOff, c.Rounds)
	}
}

// TestSolveNodeInfeasibleFixings: fixing every option of one block to 0
// leaves that block no point, so the node is infeasible (reported, not an
// error) and has no bound.
func TestSolveNodeInfeasibleFixings(t *testing.T) {
	p := smallRun(t)
	var fix []decomp.Fixing
	for o := range p.Blocks[5].(*subproblem.Choice).Options {
		fix = append(fix, decomp.Fixing{Block: 5, Var: o, Value: 0})
	}
	n, err := decomp.SolveNode(context.Background(), p, decomp.NodeSettings{Fixings: fix, Rounds: 20})
	if err != nil {
		t.Fatal(err)
	}
	if !n.Infeasible || n.HasBound || n.CutOff {
		t.Fatalf("every option of block 5 fixed to 0: %+v", n)
	}
	// One option left open: the node is feasible.
	n, err = decomp.SolveNode(context.Background(), p, decomp.NodeSettings{Fixings: fix[1:], Rounds: 20})
	if err != nil || n.Infeasible || !n.HasBound {
		t.Fatalf("one option left: %+v, %v", n, err)
	}
}

// slotProblem: three blocks choose between taking the one slot (cost 1)
// and not (cost 5); the best plan takes it once, value 11 (by hand), and
// no plan costs more than 15 (every block at its dearest option).
func slotProblem() *decomp.Problem {
	p := &decomp.Problem{Name: "slot", Sense: decomp.Minimise, Rows: []decomp.Row{{Name: "slot", Sense: decomp.LessEqual, RHS: 1}},
		WorstPlanValue: 15, HasWorstPlanValue: true}
	for range 3 {
		p.Blocks = append(p.Blocks, &subproblem.Choice{Options: []subproblem.Option{
			{Cost: 1, Use: []decomp.Entry{{Index: 0, Value: 1}}}, {Cost: 5}}})
	}
	return p
}

// TestSolveNodeBoundProvesInfeasible: with two blocks fixed to the slot
// every block still has a point, but the row cannot hold, so the bound
// grows past the worst plan value (here also the cutoff): the node is cut
// off (also without a cutoff, through the problem's WorstPlanValue), and a
// plain run of the same node stops proved infeasible. Without
// the fixings the bound stays at most 11 and nothing is cut off.
func TestSolveNodeBoundProvesInfeasible(t *testing.T) {
	fix := []decomp.Fixing{{Block: 0, Var: 0, Value: 1}, {Block: 1, Var: 0, Value: 1}}
	n, err := decomp.SolveNode(context.Background(), slotProblem(), decomp.NodeSettings{Fixings: fix, Cutoff: 15, HasCutoff: true, Rounds: 50})
	if err != nil {
		t.Fatal(err)
	}
	if !n.CutOff || n.Infeasible || !(n.Bound > 15) {
		t.Fatalf("slot taken twice: %+v", n)
	}
	// No cutoff: the problem's own worst plan value proves it.
	w, err := decomp.SolveNode(context.Background(), slotProblem(), decomp.NodeSettings{Fixings: fix, Rounds: 50})
	if err != nil {
		t.Fatal(err)
	}
	if !w.CutOff || !(w.Bound > 15) {
		t.Fatalf("slot taken twice, no cutoff: %+v", w)
	}
	p := slotProblem()
	p.Fixings = fix
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 50})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != decomp.ProvedInfeasible || res.Plan != nil {
		t.Fatalf("run with the slot taken twice: %s, plan %v", res.Status, res.Plan)
	}
	free, err := decomp.SolveNode(context.Background(), slotProblem(), decomp.NodeSettings{Cutoff: 15, HasCutoff: true, Rounds: 50})
	if err != nil {
		t.Fatal(err)
	}
	if free.CutOff || free.Infeasible || free.Bound > 11+1e-9 {
		t.Fatalf("without fixings: %+v (the optimum is 11)", free)
	}
}

// TestStopTheta: a rule that halves θ after every non-improving round and
// stops below 0.3 ends the run itself, with its reason.
func TestStopTheta(t *testing.T) {
	res, err := decomp.Solve(context.Background(), smallRun(t), decomp.Settings{Rounds: 300, Gap: -1,
		Method: &decomp.Subgradient{Theta: 1, Patience: 1, StopTheta: 0.3}})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != decomp.MethodStopped || res.Reason == "" || res.Rounds >= 300 {
		t.Fatalf("status %s (%q) after %d rounds", res.Status, res.Reason, res.Rounds)
	}
}
