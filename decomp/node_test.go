package decomp_test

import (
	"context"
	"testing"

	"pincer/decomp"
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
