package scheduling

import (
	"context"
	"fmt"
	"math"

	"pincer/decomp"
	"pincer/subproblem"
)

// Options configure the engine problem; the zero value gives the default
// repair effort.
type Options struct {
	// Moves is the local-search budget of the first repair, in work units
	// (one unit = one job position evaluated by a move); later repairs get
	// more (see the repairer). 0 means 3000 per job, at least 200,000.
	Moves int
}

// Layout returns the slot-row layout of in (class k, slot t is row
// Offsets[k]+t, over the safe horizons of Instance.Horizons).
func Layout(in *Instance) *subproblem.SlotLayout {
	h := in.Horizons()
	off, _ := SlotRows(h)
	return &subproblem.SlotLayout{Offsets: off, Horizons: h}
}

// NewProblem builds the engine problem of the time-indexed model: one
// capacity row per class and slot ("class K slot T", LessEqual, RHS m_k:
// at most m_k jobs of class k in process in slot t), one
// subproblem.TimeIndexed block per job (block j is job j; its variables
// are numbered as documented on that type, with classes indexed like
// in.Classes), the per-round prefix sums of the slot prices as shared
// data, and the list-scheduling and local-search repair.
//
// Pricing the capacity rows leaves one shortest-path-like choice per job
// whose constraint matrix (one start among the allowed ones) has the
// integrality property, so the best bound of this relaxation equals the
// time-indexed linear programming bound.
func NewProblem(in *Instance, opt Options) (*decomp.Problem, error) {
	if err := in.Validate(); err != nil {
		return nil, err
	}
	lay := Layout(in)
	p := &decomp.Problem{
		Name: in.Name, Sense: decomp.Minimise, IntegralObjective: true,
		Plans: decomp.GobPlans[*Schedule]{},
	}
	p.Rows = make([]decomp.Row, 0, lay.Rows())
	for k, c := range in.Classes {
		for t := 0; t < lay.Horizons[k]; t++ {
			p.Rows = append(p.Rows, decomp.Row{Name: fmt.Sprintf("class %s slot %d", c.ID, t), Sense: decomp.LessEqual, RHS: float64(c.Machines)})
		}
	}
	all := make([]int, len(in.Classes))
	for k := range all {
		all[k] = k
	}
	blocks := make([]subproblem.TimeIndexed, len(in.Jobs))
	p.Blocks = make([]decomp.Block, len(in.Jobs))
	for j, jb := range in.Jobs {
		b := &blocks[j]
		*b = subproblem.TimeIndexed{Layout: lay, Processing: jb.Processing, Release: jb.Release, Due: jb.Due, Classes: all}
		if jb.Eligible != nil {
			b.Classes = jb.Eligible
		}
		if in.Objective == WeightedCompletion {
			b.Flow = float64(jb.Weight)
		} else {
			b.Tardy = float64(jb.Weight)
		}
		p.Blocks[j] = b
	}
	p.Share = func(req *decomp.Request) (any, error) { return subproblem.NewSlotPrefix(req.Prices, lay) }
	moves := opt.Moves
	if moves <= 0 {
		moves = max(200_000, 3000*len(in.Jobs))
	}
	rep := newRepairer(in, lay, moves)
	p.Repair = rep
	prices, err := startPrices(p, rep)
	if err != nil {
		return nil, err
	}
	p.Prices = prices
	return p, nil
}

// startPrices derives starting prices from a quick schedule (list
// scheduling by release date and weight per unit of processing, then one
// local-search descent): the slot values of search.slotValues, scaled by
// the best of a few factors as judged by the relaxation itself. The price
// rule starts there instead of at zero, which for time-indexed models
// saves the thousands of rounds the subgradient would need to build up
// the early slots' prices. It returns nil (start at zero) when zero
// prices do at least as well.
func startPrices(p *decomp.Problem, rep *repairer) ([]float64, error) {
	ctx := context.Background()
	s := rep.newSearch(1, rep.moves)
	s.listSchedule(nil)
	s.descend(ctx)
	base := s.slotValues()
	ev := decomp.Pool{Workers: 1}
	best, bestL := []float64(nil), math.Inf(-1)
	if L, _, err := decomp.Relaxed(ctx, p, make([]float64, len(base)), ev); err == nil {
		bestL = L
	} else {
		return nil, fmt.Errorf("scheduling: starting prices: %w", err)
	}
	for _, theta := range []float64{0.8, 1, 1.2} {
		pr := make([]float64, len(base))
		for i, x := range base {
			pr[i] = theta * x
		}
		L, _, err := decomp.Relaxed(ctx, p, pr, ev)
		if err != nil {
			return nil, fmt.Errorf("scheduling: starting prices: %w", err)
		}
		if L > bestL {
			best, bestL = pr, L
		}
	}
	return best, nil
}
