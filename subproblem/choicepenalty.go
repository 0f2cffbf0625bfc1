package subproblem

import (
	"context"
	"fmt"
	"math"

	"pincer/decomp"
)

var _ decomp.Penalizer = (*Choice)(nil)

// Penalties implements decomp.Penalizer exactly: at req's prices, forcing
// the chosen option (ans) to 0 costs the difference to the best other
// allowed option (+Inf when there is none), and forcing another allowed
// option to 1 costs the difference of its priced cost to the chosen one's.
// Options fixed by req are left out.
func (c *Choice) Penalties(_ context.Context, req *decomp.Request, ans *decomp.Answer, dst []decomp.Penalty) ([]decomp.Penalty, error) {
	if len(ans.Primal) != 1 {
		return dst, fmt.Errorf("choice block %d: answer with %d chosen options, want 1", req.Block, len(ans.Primal))
	}
	chosen := ans.Primal[0].Index
	fixed := req.Fixed()
	sg := 1.0 // worse is higher when minimising
	if req.Sense == decomp.Maximise {
		sg = -1
	}
	for _, f := range fixed {
		if f.Value == 1 {
			return dst, nil // the block has a single point: nothing is free
		}
	}
	priced := func(k int) float64 {
		o := &c.Options[k]
		v := o.Cost
		for _, e := range o.Use {
			v += req.Prices[e.Index] * e.Value
		}
		return sg * v
	}
	best := priced(chosen)
	second := math.Inf(1)
	next := 0
	for k := range c.Options {
		for next < len(fixed) && fixed[next].Var < k {
			next++
		}
		if next < len(fixed) && fixed[next].Var == k {
			continue // fixed to 0
		}
		if k == chosen {
			continue
		}
		v := priced(k)
		second = math.Min(second, v)
		dst = append(dst, decomp.Penalty{Var: k, Value: 1, Delta: math.Max(0, v-best)})
	}
	dst = append(dst, decomp.Penalty{Var: chosen, Value: 0, Delta: math.Max(0, second-best)})
	return dst, nil
}
