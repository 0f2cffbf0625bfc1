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
// answers are reproducible. Answer.Primal holds the chosen option with
// value 1.
type Choice struct {
	Options []Option
}

// Solve implements decomp.Block.
func (c *Choice) Solve(_ context.Context, req *decomp.Request, ans *decomp.Answer) error {
	if len(c.Options) == 0 {
		return fmt.Errorf("choice block has no options")
	}
	best, bestValue := -1, 0.0
	for k := range c.Options {
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
	o := &c.Options[best]
	ans.Value = bestValue
	ans.Cost = o.Cost
	ans.Use = append(ans.Use[:0], o.Use...)
	ans.Primal = append(ans.Primal[:0], decomp.Entry{Index: best, Value: 1})
	return nil
}
