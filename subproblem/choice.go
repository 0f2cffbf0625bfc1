package subproblem

import (
	"context"
	"fmt"
	"math"

	"pincer/decomp"
)

// Option is one alternative of a Choice block: its own cost and its sparse
// use of the coupling rows (Index = row).
type Option struct {
	Cost float64
	Use  []decomp.Entry
}

// Choice is a block that picks exactly one of its options: a job choosing
// its agent, a job choosing its start slot, a customer choosing its site.
// Its exact optimum at given prices is the option with the best priced
// cost, found by scanning; ties go to the lowest option number so that
// answers are reproducible.
//
// Variables: the block has one binary variable per option, numbered like
// Options (variable k is 1 when option k is chosen). Answer.Primal holds
// the chosen option with value 1. Fixings follow the same numbering: an
// option fixed to 1 is the only one allowed, options fixed to 0 are left
// out. Two options fixed to 1, every option fixed to 0, or a value other
// than 0 or 1 leave no point, and Solve returns an error wrapping
// decomp.ErrInfeasible.
type Choice struct {
	Options []Option
}

// Solve implements decomp.Block.
func (c *Choice) Solve(_ context.Context, req *decomp.Request, ans *decomp.Answer) error {
	if len(c.Options) == 0 {
		return fmt.Errorf("choice block has no options")
	}
	fixed := req.Fixed()
	// only is the option fixed to 1 (-1: none); fixings are sorted by
	// variable, so the options fixed to 0 are skipped by walking them.
	only := -1
	for _, f := range fixed {
		if f.Var < 0 || f.Var >= len(c.Options) {
			return fmt.Errorf("choice block %d: fixing of variable %d, but the block has %d options", req.Block, f.Var, len(c.Options))
		}
		switch f.Value {
		case 0:
		case 1:
			if only >= 0 {
				return fmt.Errorf("choice block %d: options %d and %d both fixed to 1: %w", req.Block, only, f.Var, decomp.ErrInfeasible)
			}
			only = f.Var
		default:
			return fmt.Errorf("choice block %d: option %d fixed to %v, not 0 or 1: %w", req.Block, f.Var, f.Value, decomp.ErrInfeasible)
		}
	}
	best, bestValue := -1, 0.0
	next := 0 // next fixing to compare with (all fixings are 0 or 1 here)
	for k := range c.Options {
		for next < len(fixed) && fixed[next].Var < k {
			next++
		}
		if (only >= 0 && k != only) || (next < len(fixed) && fixed[next].Var == k && fixed[next].Value == 0) {
			continue
		}
		o := &c.Options[k]
		v := o.Cost
		for _, e := range o.Use {
			v += req.Prices[e.Index] * e.Value
		}
		if math.IsNaN(v) {
			return fmt.Errorf("choice block: option %d has priced cost NaN", k)
		}
		if best < 0 || req.Sense.Better(v, bestValue) {
			best, bestValue = k, v
		}
	}
	if best < 0 {
		return fmt.Errorf("choice block %d: every option fixed to 0: %w", req.Block, decomp.ErrInfeasible)
	}
	o := &c.Options[best]
	ans.Value = bestValue
	ans.Cost = o.Cost
	ans.Use = append(ans.Use[:0], o.Use...)
	ans.Primal = append(ans.Primal[:0], decomp.Entry{Index: best, Value: 1})
	return nil
}
