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
// scheduling by release date and weight per unit of processing, then a
// short iterated local search of twice the first repair's budget): the
// slot values of search.slotValues, scaled by the best factor of a small
// search judged by the relaxation itself. Per-class values are tried at
// 1, 0.7 and 1.25, then one step further out on the better side; with
// several classes the pooled values are also tried, from 1 down by
// factors of about 2.5 until the bound falls again. The price rule starts
// there instead of at zero, which for time-indexed models saves the
// thousands of rounds the subgradient would need to build up the slots'
// prices. It returns nil (start at zero) when zero prices do at least as
// well.
func startPrices(p *decomp.Problem, rep *repairer) ([]float64, error) {
	ctx := context.Background()
	s := rep.newSearch(1, 2*rep.moves)
	s.listSchedule(nil)
	s.iterate(ctx)
	quick := s.snapshot()
	rep.quick = &quick
	ev := decomp.Pool{Workers: 1}
	zero, _, err := decomp.Relaxed(ctx, p, make([]float64, len(p.Rows)), ev)
	if err != nil {
		return nil, fmt.Errorf("scheduling: starting prices: %w", err)
	}
	best, bestL := []float64(nil), zero
	// try evaluates theta·base and keeps it when it beats the best so
	// far; it returns the bound.
	try := func(base []float64, theta float64) (float64, error) {
		pr := make([]float64, len(base))
		for i, x := range base {
			pr[i] = theta * x
		}
		L, _, err := decomp.Relaxed(ctx, p, pr, ev)
		if err != nil {
			return 0, fmt.Errorf("scheduling: starting prices: %w", err)
		}
		if L > bestL {
			best, bestL = pr, L
		}
		return L, nil
	}
	base := s.slotValues(false)
	at1, err := try(base, 1)
	if err != nil {
		return nil, err
	}
	low, err := try(base, 0.7)
	if err != nil {
		return nil, err
	}
	high, err := try(base, 1.25)
	if err != nil {
		return nil, err
	}
	switch {
	case high > at1 && high >= low:
		_, err = try(base, 1.6)
	case low > at1:
		_, err = try(base, 0.5)
	default:
		if _, err = try(base, 0.85); err == nil {
			_, err = try(base, 1.1)
		}
	}
	if err != nil {
		return nil, err
	}
	if len(rep.in.Classes) > 1 {
		pooled := s.slotValues(true)
		prev := math.Inf(-1)
		for _, theta := range []float64{1, 0.4, 0.16, 0.064, 0.025, 0.01} {
			L, err := try(pooled, theta)
			if err != nil {
				return nil, err
			}
			if L < prev && prev > zero {
				break // past the peak
			}
			prev = L
		}
	}
	return best, nil
}
