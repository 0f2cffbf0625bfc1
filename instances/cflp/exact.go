package cflp

import (
	"context"
	"errors"
	"math"

	"pincer/decomp"
)

var _ decomp.Penalizer = (*siteBlock)(nil)

// Penalties implements decomp.Penalizer for a free site's y variable
// (variable 0), exactly: the block's value is the site value v when open
// and 0 when closed, so closing an open site costs −v and opening a closed
// one costs v. Sites with a status, or with fixings of their own, report
// nothing (always sound).
func (b *siteBlock) Penalties(_ context.Context, req *decomp.Request, ans *decomp.Answer, dst []decomp.Penalty) ([]decomp.Penalty, error) {
	if b.md.sites[b.i].status != Free || len(req.Fixed()) > 0 {
		return dst, nil
	}
	if err := b.md.evalFixed(b.i, &b.sc, req.Prices, b.md.binary(), nil); err != nil {
		return dst, err
	}
	v := b.sc.value
	tol := 1e-9 * (1 + math.Abs(v))
	if len(ans.Primal) > 0 {
		return append(dst, decomp.Penalty{Var: 0, Value: 0, Delta: math.Max(0, -v-tol)}), nil
	}
	return append(dst, decomp.Penalty{Var: 0, Value: 1, Delta: math.Max(0, v-tol)}), nil
}

// ExactProblem is the problem of the exact search (instances.Exact): the
// model's, with the repair's own site search off (the exact search takes
// its place) and a short local search at each node. Split demand only.
func (m *Model) ExactProblem() (*decomp.Problem, error) {
	if m.Opt.SingleSource {
		return nil, errors.New("cflp: the exact mode handles split demand only (not --single-source)")
	}
	opt := m.Opt
	opt.ExactSites = -1
	if opt.Moves == 0 {
		opt.Moves = 10
	}
	return NewProblem(m.In, opt)
}

// Brancher splits a node of the exact search on one site: open or closed.
func (m *Model) Brancher() (decomp.Brancher, error) {
	if m.Opt.SingleSource {
		return nil, errors.New("cflp: the exact mode handles split demand only (not --single-source)")
	}
	md, err := newModel(m.In, m.Opt)
	if err != nil {
		return nil, err
	}
	r := newRepairer(md)
	return &siteBrancher{md: md, r: r, plan: r.solutionPlan}, nil
}

// solutionPlan is the exact mode's plan of an open set: the exact
// allocation as a Solution, or nil when the set cannot serve the demand.
func (r *repairer) solutionPlan(open []bool) (*decomp.Plan, error) {
	sol, err := r.solution(open)
	if err != nil || sol == nil {
		return nil, err
	}
	use := make([]float64, len(r.md.in.Customers))
	for j := range use {
		use[j] = 1
	}
	return &decomp.Plan{Value: sol.Value, Use: use, Detail: sol}, nil
}

// siteBrancher branches on the free site whose value at the node's prices
// is closest to zero (the site the relaxation is least sure of: with the
// site relaxation |value| is the penalty of forcing it the other way),
// the child the answers prefer first; a closed child whose remaining
// sites cannot cover the demand holds no plan and is left out. A node with
// every site decided is solved by the exact allocation over its open
// sites. It serves both the exact mode and the repair's site search, which
// differ in the plans they build (plan).
type siteBrancher struct {
	md   *model
	r    *repairer
	plan func(open []bool) (*decomp.Plan, error)
}

func (b *siteBrancher) fixing(i int, v float64) decomp.Fixing {
	if b.md.relax == AggregateRelaxation {
		return decomp.Fixing{Block: 0, Var: i, Value: v}
	}
	return decomp.Fixing{Block: i, Var: 0, Value: v}
}

// Branch implements decomp.Brancher.
func (b *siteBrancher) Branch(in *decomp.BranchInput) (*decomp.Branching, error) {
	md := b.md
	fix := md.statusesUnder(in.Fixings)
	if err := b.r.siteValues(in.Prices); err != nil {
		return nil, err
	}
	pick := -1
	for i, f := range fix {
		if f == Free && (pick < 0 || math.Abs(b.r.score[i]) < math.Abs(b.r.score[pick])) {
			pick = i
		}
	}
	if pick < 0 {
		// Every site decided: the node's best plan is the exact allocation
		// over its open sites (none when they cannot serve the demand).
		set := make([]bool, len(fix))
		for i, f := range fix {
			set[i] = f == ForcedOpen
		}
		p, err := b.plan(set)
		if err != nil {
			return nil, err
		}
		return &decomp.Branching{Plan: p}, nil
	}
	open, shut := b.fixing(pick, 1), b.fixing(pick, 0)
	fix[pick] = ForcedClosed
	if !closedFeasible(md, fix) {
		return &decomp.Branching{Children: [][]decomp.Fixing{{open}}}, nil
	}
	if b.r.openOf(in.Answers, nil)[pick] {
		return &decomp.Branching{Children: [][]decomp.Fixing{{open}, {shut}}}, nil
	}
	return &decomp.Branching{Children: [][]decomp.Fixing{{shut}, {open}}}, nil
}
