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
	return &siteBrancher{md: md, r: newRepairer(md)}, nil
}

// siteBrancher branches on the free site whose forcing the other way
// costs least (the site the relaxation is least sure of), the child the
// answers prefer first. A node with every site decided is solved by the
// exact allocation over its open sites.
type siteBrancher struct {
	md *model
	r  *repairer
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
	m := len(md.sites)
	open := b.r.openOf(in.Answers, nil)
	decided := make([]int8, m) // 1 open, -1 closed, 0 free
	for i, s := range md.sites {
		switch s.status {
		case ForcedOpen:
			decided[i] = 1
		case ForcedClosed:
			decided[i] = -1
		}
	}
	for _, f := range in.Fixings {
		i := -1
		if md.relax == AggregateRelaxation && f.Block == 0 && f.Var < m {
			i = f.Var
		} else if md.relax == SiteRelaxation && f.Var == 0 {
			i = f.Block
		}
		if i >= 0 {
			decided[i] = -1
			if f.Value == 1 {
				decided[i] = 1
			}
		}
	}
	pick, best := -1, math.Inf(1)
	for i := 0; i < m; i++ {
		if decided[i] != 0 {
			continue
		}
		d := 0.0
		if in.Penalties != nil && md.relax == SiteRelaxation {
			for _, p := range in.Penalties[i] {
				if p.Var == 0 {
					d = p.Delta
				}
			}
		}
		if pick < 0 || d < best {
			pick, best = i, d
		}
	}
	if pick < 0 {
		// Every site decided: the node's best plan is the exact allocation
		// over its open sites (none when they cannot serve the demand).
		set := make([]bool, m)
		for i, d := range decided {
			set[i] = d == 1
		}
		sol, err := b.r.solution(set)
		if err != nil || sol == nil {
			return &decomp.Branching{}, err
		}
		use := make([]float64, len(md.in.Customers))
		for j := range use {
			use[j] = 1
		}
		return &decomp.Branching{Plan: &decomp.Plan{Value: sol.Value, Use: use, Detail: sol}}, nil
	}
	first, second := b.fixing(pick, 0), b.fixing(pick, 1)
	if open[pick] {
		first, second = second, first
	}
	return &decomp.Branching{Children: [][]decomp.Fixing{{first}, {second}}}, nil
}
