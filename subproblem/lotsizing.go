package subproblem

import (
	"context"
	"fmt"
	"math"

	"pincer/decomp"
)

// LotSizing is a single-item uncapacitated lot-sizing block whose use of a
// shared resource is priced: one item over periods t = 0..T-1 with demand
// d_t, setups y_t in {0,1}, production x_t >= 0 and end-of-period
// inventory s_t >= 0 (no backlog), s_{t-1} + x_t − s_t = d_t with
// s_{-1} = InitialStock, and x_t > 0 only when y_t = 1.
//
// Own cost is SetupCost·Σ y_t + Holding·Σ s_t. Period t uses the coupling
// row Rows[t] (a capacity row; -1 for none) by SetupTime·y_t + UnitTime·x_t,
// so at price λ_t a setup costs SetupCost + λ_t·SetupTime and a unit costs
// λ_t·UnitTime. Solve is the dynamic program of Wagner & Whitin (1958) in
// O(T²): with non-negative priced costs some optimal plan produces only when
// inventory is empty, each lot covering the net demand of consecutive
// periods. Fixed setups that produce nothing are allowed (they pay the
// setup); the DP charges them once and lets them start lots for free.
//
// Variables (Answer.Primal and fixings): Var t is the setup y_t, Var T+t the
// production x_t and Var 2T+t the inventory s_t (t 0-based). Only setups may
// be fixed, to 0 or 1. The block is a cost-minimising block over <= rows:
// it needs req.Sense = Minimise and non-negative prices on its rows.
type LotSizing struct {
	Demand       []float64
	InitialStock float64
	SetupCost    float64
	SetupTime    float64
	UnitTime     float64
	Holding      float64
	Rows         []int // coupling row of each period, -1 for none

	// scratch, reused between rounds
	net, f, setupPrice, unitPrice []float64
	from                          []int
	fix                           []int8
}

// Validate checks the block's data.
func (b *LotSizing) Validate() error {
	if len(b.Demand) == 0 {
		return fmt.Errorf("lot-sizing block: no periods")
	}
	if len(b.Rows) != len(b.Demand) {
		return fmt.Errorf("lot-sizing block: %d rows for %d periods", len(b.Rows), len(b.Demand))
	}
	for t, d := range b.Demand {
		if !(d >= 0) || math.IsInf(d, 0) {
			return fmt.Errorf("lot-sizing block: demand %v in period %d is not a finite non-negative number", d, t)
		}
	}
	for _, v := range []struct {
		name string
		x    float64
	}{{"initial stock", b.InitialStock}, {"setup cost", b.SetupCost}, {"setup time", b.SetupTime}, {"unit time", b.UnitTime}, {"holding cost", b.Holding}} {
		if !(v.x >= 0) || math.IsInf(v.x, 0) {
			return fmt.Errorf("lot-sizing block: %s %v is not a finite non-negative number", v.name, v.x)
		}
	}
	return nil
}

// Solve implements decomp.Block.
func (b *LotSizing) Solve(_ context.Context, req *decomp.Request, ans *decomp.Answer) error {
	T := len(b.Demand)
	if err := b.Validate(); err != nil {
		return err
	}
	if req.Sense != decomp.Minimise {
		return fmt.Errorf("lot-sizing block %d: a cost block needs a minimising problem", req.Block)
	}
	b.net = grow(b.net, T)
	b.f = grow(b.f, T+1)
	b.setupPrice = grow(b.setupPrice, T)
	b.unitPrice = grow(b.unitPrice, T)
	if cap(b.from) < T+1 {
		b.from = make([]int, T+1)
		b.fix = make([]int8, T)
	}
	b.from, b.fix = b.from[:T+1], b.fix[:T]
	for t := range b.fix {
		b.fix[t] = -1
	}
	for _, fx := range req.Fixed() {
		if fx.Var < 0 || fx.Var >= T {
			return fmt.Errorf("lot-sizing block %d: variable %d cannot be fixed (only setups 0..%d)", req.Block, fx.Var, T-1)
		}
		switch fx.Value {
		case 0:
			b.fix[fx.Var] = 0
		case 1:
			b.fix[fx.Var] = 1
		default:
			return fmt.Errorf("lot-sizing block %d: setup %d fixed to %v, want 0 or 1", req.Block, fx.Var, fx.Value)
		}
	}
	// Net demand after the initial stock: holding the initial stock until
	// it is used up costs the same in every plan, so the DP ignores it.
	stock := b.InitialStock
	for t, d := range b.Demand {
		use := math.Min(stock, d)
		b.net[t] = d - use
		stock -= use
	}
	for t := 0; t < T; t++ {
		lam := 0.0
		if r := b.Rows[t]; r >= 0 {
			lam = req.Prices[r]
			if !(lam >= 0) {
				return fmt.Errorf("lot-sizing block %d: price %v of row %d is not non-negative", req.Block, lam, r)
			}
		}
		b.setupPrice[t] = b.SetupCost + lam*b.SetupTime
		b.unitPrice[t] = lam * b.UnitTime
	}
	// f[k]: cheapest cover of the net demand of periods 0..k-1 ending with
	// no stock. from[k] = j >= 0: a lot made in j covers j..k-1;
	// from[k] = -1: period k-1 has no net demand and is left uncovered.
	inf := math.Inf(1)
	b.f[0] = 0
	for k := 1; k <= T; k++ {
		b.f[k], b.from[k] = inf, -2
		if b.net[k-1] == 0 && b.f[k-1] < inf {
			b.f[k], b.from[k] = b.f[k-1], -1
		}
	}
	for j := 0; j < T; j++ {
		if b.f[j] == inf || b.fix[j] == 0 {
			continue
		}
		c := b.f[j]
		if b.fix[j] != 1 {
			c += b.setupPrice[j]
		}
		for k := j + 1; k <= T; k++ {
			u := k - 1
			c += b.net[u] * (b.unitPrice[j] + b.Holding*float64(u-j))
			if c < b.f[k] {
				b.f[k], b.from[k] = c, j
			}
		}
	}
	if b.f[T] == inf {
		return fmt.Errorf("lot-sizing block %d: the setup fixings leave demand unmet: %w", req.Block, decomp.ErrInfeasible)
	}
	// Trace the lots back.
	ans.Use, ans.Primal = ans.Use[:0], ans.Primal[:0]
	x := b.unitPrice // reuse as production (unit prices no longer needed after the DP)
	setups := b.setupPrice
	for t := 0; t < T; t++ {
		x[t] = 0
		setups[t] = 0
		if b.fix[t] == 1 {
			setups[t] = 1
		}
	}
	for k := T; k > 0; {
		j := b.from[k]
		if j == -1 {
			k--
			continue
		}
		q := 0.0
		for u := j; u < k; u++ {
			q += b.net[u]
		}
		x[j] = q
		setups[j] = 1
		k = j
	}
	priced := 0.0
	inv := b.InitialStock
	nSetups := 0
	for t := 0; t < T; t++ {
		if setups[t] == 1 {
			nSetups++
			ans.Primal = append(ans.Primal, decomp.Entry{Index: t, Value: 1})
		}
	}
	for t := 0; t < T; t++ {
		if x[t] > 0 {
			ans.Primal = append(ans.Primal, decomp.Entry{Index: T + t, Value: x[t]})
		}
	}
	holding := 0.0
	for t := 0; t < T; t++ {
		inv += x[t] - b.Demand[t]
		if inv < 0 {
			inv = 0 // rounding only: lots cover net demand exactly
		}
		if inv > 0 {
			ans.Primal = append(ans.Primal, decomp.Entry{Index: 2*T + t, Value: inv})
		}
		holding += b.Holding * inv
		use := b.SetupTime*setups[t] + b.UnitTime*x[t]
		if r := b.Rows[t]; r >= 0 && use != 0 {
			ans.Use = append(ans.Use, decomp.Entry{Index: r, Value: use})
			priced += req.Prices[r] * use
		}
	}
	ans.Cost = b.SetupCost*float64(nSetups) + holding
	ans.Value = ans.Cost + priced
	return nil
}

func grow(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	return s[:n]
}
