package decomp

import (
	"context"
	"errors"
	"time"
)

// NodeSettings shape a short dual ascent at a node of an exact search.
type NodeSettings struct {
	Prices  []float64 // warm start (projected); nil means the problem's own
	Fixings []Fixing  // added to Problem.Fixings for this node
	// Cutoff, when HasCutoff is set, is the value the node must beat (the
	// incumbent): the ascent stops as soon as the bound is strictly worse.
	// It is also the target of the steps. A caller whose plans have
	// integral values passes the incumbent minus one (plus one when
	// maximising), since only a strictly better plan is of interest and a
	// bound strictly beyond that proves none exists.
	Cutoff    float64
	HasCutoff bool
	Rounds    int       // round limit; 0 means 50
	Evaluator Evaluator // nil means Pool{}
	Method    Method    // nil means a fresh Subgradient
	// KeepBest asks for the block answers at the best bound's prices in
	// NodeResult.BestAnswers (a copy per improving round).
	KeepBest bool
}

// NodeResult is the outcome of SolveNode.
type NodeResult struct {
	Bound    float64   // best bound found (valid under the node's fixings)
	HasBound bool      // false when no round completed
	Prices   []float64 // prices of the best bound
	Answers  []Answer  // block answers of the last round
	// BestAnswers are the block answers at Prices (with KeepBest).
	BestAnswers []Answer
	// CutOff reports that the bound proved the node cannot beat Cutoff,
	// or holds no feasible plan (the bound passed the problem's
	// WorstPlanValue).
	CutOff     bool
	Infeasible bool // a block has no point under the fixings
	Rounds     int
}

// SolveNode runs a short dual ascent for a search node: warm prices, the
// node's fixings, a cutoff, no repair and no goroutines beyond the
// evaluator's. A block error wrapping ErrInfeasible makes the node
// infeasible (reported, not an error). It is the same round loop as
// Solve, with the cutoff as the plan limit.
func SolveNode(ctx context.Context, p *Problem, ns NodeSettings) (*NodeResult, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	q := *p
	q.Repair = nil
	q.Fixings = append(append([]Fixing(nil), p.Fixings...), ns.Fixings...)
	if ns.Prices != nil {
		q.Prices = ns.Prices
	}
	if ns.HasCutoff && (!q.HasWorstPlanValue || p.Sense.Better(ns.Cutoff, q.WorstPlanValue)) {
		// The cutoff is the plan limit of the node (the tighter of the two).
		q.WorstPlanValue, q.HasWorstPlanValue = ns.Cutoff, true
	}
	rounds := ns.Rounds
	if rounds <= 0 {
		rounds = 50
	}
	run := &runner{p: &q, s: withDefaults(Settings{Rounds: rounds, Gap: -1, StallRounds: 1 << 30, Evaluator: ns.Evaluator, Method: ns.Method}), start: time.Now(), cutoff: ns.Cutoff, hasCutoff: ns.HasCutoff, keep: ns.KeepBest}
	if err := run.begin(nil); err != nil {
		return nil, err
	}
	res, err := run.loop(ctx)
	if err != nil {
		if errors.Is(err, ErrInfeasible) {
			return &NodeResult{Infeasible: true}, nil
		}
		return nil, err
	}
	return &NodeResult{Bound: res.Bound, HasBound: res.HasBound, Prices: res.Prices, CutOff: res.Status == ProvedInfeasible,
		Rounds: res.Rounds, Answers: run.answers, BestAnswers: run.best}, nil
}
