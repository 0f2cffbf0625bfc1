package cflp

import (
	"context"
	"fmt"
	"math"

	"golang.org/x/sync/errgroup"

	"pincer/decomp"
	"pincer/subproblem"
)

// Relaxation chooses the relaxed problem the engine prices.
//
// Both price the demand rows Σ_i x_ij = 1 (free prices λ_j), so that each
// site's part of the problem is a knapsack over its customers at priced
// costs c_ij + λ_j; its value v_i = f_i + (knapsack optimum) is what opening
// the site is worth at these prices.
type Relaxation int8

const (
	// AggregateRelaxation (the default) keeps the aggregate capacity row
	// Σ_i s_i y_i >= Σ_j d_j in the relaxed problem: the site values are
	// combined by a covering knapsack over the sites (Cornuéjols, Sridharan
	// & Thizy 1991; Beasley 1993, both from memory). It is one engine block
	// that owns every site and solves the site knapsacks in parallel. At the
	// same prices its value is never below the site relaxation's (up to the
	// rounding of non-decimal capacities, see [ResolveRelaxation]), and the
	// covering knapsack over m sites costs little next to the m site
	// knapsacks, so it is the default.
	AggregateRelaxation Relaxation = iota
	// SiteRelaxation has one block per site: the site opens when its value
	// is negative (or it is forced open).
	SiteRelaxation
)

// String returns "site-aggregate" or "site".
func (r Relaxation) String() string {
	if r == SiteRelaxation {
		return "site"
	}
	return "site-aggregate"
}

// ParseRelaxation reads "site-aggregate" (or "") or "site".
func ParseRelaxation(s string) (Relaxation, error) {
	switch s {
	case "site-aggregate", "":
		return AggregateRelaxation, nil
	case "site":
		return SiteRelaxation, nil
	}
	return 0, fmt.Errorf("cflp: unknown relaxation %q (want site-aggregate or site)", s)
}

// Options configure the engine problem built from an instance. The zero
// value is split demand, the aggregate relaxation and default search
// budgets.
type Options struct {
	// SingleSource makes x_ij binary: each customer is served by one site.
	SingleSource bool
	Relaxation   Relaxation
	// Moves bounds the site moves (each an exact re-allocation) of the local
	// search in one repair; 0 means 6 per site plus 100. The last repair of a
	// run gets ten times as many.
	Moves int
	// ExactSites is the largest number of free sites for which the last
	// repair runs a branch and bound over the site set to prove the plan
	// optimal (split demand only); 0 means 64, negative disables it.
	ExactSites int
	// ExactNodes bounds the nodes of that branch and bound; 0 means 20000.
	ExactNodes int
	// ExactWork bounds its subgradient iterations times sites times
	// customers; 0 means 1e8 (about a second on one core).
	ExactWork float64
}

// maxScale is the largest power of ten by which decimals are scaled to
// integers for the exact 0-1 knapsacks.
const maxScale = 1e6

// integralScale returns the smallest power of ten s <= 10^6 such that every
// value times s is an integer (within a relative 1e-9) of at most 2^50, or
// ok = false.
func integralScale(vals ...[]float64) (scale float64, ok bool) {
	for s := 1.0; s <= maxScale; s *= 10 {
		ok = true
	loop:
		for _, vs := range vals {
			for _, v := range vs {
				w := v * s
				if math.Abs(w-math.Round(w)) > 1e-9*math.Max(1, math.Abs(w)) || w > 1<<50 {
					ok = false
					break loop
				}
			}
		}
		if ok {
			return s, true
		}
	}
	return 0, false
}

// ResolveRelaxation returns the relaxation NewProblem will use for the
// requested one, and a note on how it is solved. The covering knapsack of
// the aggregate relaxation weighs sites by capacity: when capacities are
// decimals with at most 6 places it is exact; otherwise it uses capacities
// rounded down on a grid of 10^-6 of the largest one, which keeps every
// open set that covers the demand feasible, so the bound stays valid (it
// may be slightly weaker).
func ResolveRelaxation(in *Instance, r Relaxation) (Relaxation, string) {
	if r != AggregateRelaxation {
		return r, ""
	}
	caps := make([]float64, len(in.Sites))
	for i, s := range in.Sites {
		caps[i] = s.Capacity
	}
	if _, ok := integralScale(caps); !ok {
		return r, "site capacities are not decimals with at most 6 places; the covering knapsack rounds them down to 1e-6 of the largest, a valid but slightly weaker bound"
	}
	return r, ""
}

// coverScale returns the factor by which capacities are scaled to the
// integer weights of the covering knapsack (see ResolveRelaxation).
func coverScale(caps []float64) float64 {
	if s, ok := integralScale(caps); ok {
		return s
	}
	top := 0.0
	for _, c := range caps {
		top = math.Max(top, c)
	}
	if top <= 0 {
		return 1
	}
	return 1e6 / top
}

// site is one candidate site as the relaxation sees it: its allowed lanes
// and their costs and weights.
type site struct {
	lanes    []int32   // allowed customers
	cost     []float64 // c_ij on the lanes
	weight   []float64 // d_j on the lanes
	iweight  []int64   // d_j scaled to integers (single source with an exact scale)
	fixed    float64
	capacity float64
	icap     int64 // scaled capacity (single source with an exact scale)
	status   SiteFixing
}

// scratch is the working space of one site evaluation.
type scratch struct {
	ks     subproblem.Knapsack
	idx    []int32 // lanes with a negative priced cost
	profit []float64
	wf     []float64
	wi     []int64
	x      []float64
	take   []bool
	// fixedIn lists the lanes (Index = lane) with a positive fixed share.
	fixedIn []decomp.Entry
	// Result of the last evaluation: the site value and the shares served
	// (customer, share).
	value float64
	cost  float64 // f_i + Σ c_ij x_ij
	serve []decomp.Entry
}

// model is the data shared by blocks and repair.
type model struct {
	in       *Instance
	opt      Options
	relax    Relaxation
	sites    []site
	demand   float64 // total demand
	capScale float64 // scale making capacities integral (aggregate relaxation)
	// knap01 is true when single-source site knapsacks are solved as 0-1
	// knapsacks (demands and capacities integral after scaling).
	knap01 bool
}

func newModel(in *Instance, opt Options) (*model, error) {
	if err := in.Validate(); err != nil {
		return nil, err
	}
	md := &model{in: in, opt: opt, demand: in.TotalDemand()}
	md.relax, _ = ResolveRelaxation(in, opt.Relaxation)
	if opt.Relaxation != AggregateRelaxation && opt.Relaxation != SiteRelaxation {
		return nil, fmt.Errorf("cflp: unknown relaxation %d", opt.Relaxation)
	}
	caps := make([]float64, len(in.Sites))
	for i, s := range in.Sites {
		caps[i] = s.Capacity
	}
	if md.relax == AggregateRelaxation {
		md.capScale = coverScale(caps)
	}
	dem := make([]float64, len(in.Customers))
	for j, c := range in.Customers {
		dem[j] = c.Demand
	}
	var ssScale float64
	if opt.SingleSource {
		ssScale, md.knap01 = integralScale(dem, caps)
	}
	md.sites = make([]site, len(in.Sites))
	for i, s := range in.Sites {
		st := site{fixed: s.FixedCost, capacity: s.Capacity, status: s.Status}
		for j, c := range in.Cost[i] {
			if math.IsInf(c, 1) || (opt.SingleSource && dem[j] > s.Capacity*(1+1e-12)) {
				continue
			}
			st.lanes = append(st.lanes, int32(j))
			st.cost = append(st.cost, c)
			st.weight = append(st.weight, dem[j])
			if md.knap01 {
				st.iweight = append(st.iweight, int64(math.Round(dem[j]*ssScale)))
			}
		}
		if md.knap01 {
			st.icap = int64(math.Floor(s.Capacity*ssScale + 0.5))
		}
		md.sites[i] = st
	}
	return md, nil
}

// eval computes site i's value at the prices: f_i plus the least priced
// cost Σ (c_ij + λ_j) x_ij over the knapsack Σ d_j x_ij <= s_i, with x
// continuous (split demand, or single source without an exact integer
// scale) or binary. The result is left in sc.
func (md *model) eval(i int, sc *scratch, prices []float64, binary bool) error {
	return md.evalFixed(i, sc, prices, binary, nil)
}

// evalFixed is eval with some shares fixed: fix lists (Var = customer j,
// Value = x_ij) sorted by customer. A fixed share is served as given (its
// demand comes off the capacity, its priced cost is added); the knapsack
// decides the rest. A positive share on a lane the site cannot serve, a
// share outside [0, 1] (or not 0 or 1 with single source), or fixed shares
// over the capacity leave no point: the error wraps decomp.ErrInfeasible.
// With no fixings the arithmetic is eval's own.
func (md *model) evalFixed(i int, sc *scratch, prices []float64, binary bool, fix []decomp.Fixing) error {
	st := &md.sites[i]
	sc.idx = sc.idx[:0]
	sc.profit = sc.profit[:0]
	sc.fixedIn = sc.fixedIn[:0]
	var usedF, fixedPriced float64
	var usedI int64
	id := md.in.Sites[i].ID
	next := 0
	for k, j := range st.lanes {
		if len(fix) > 0 {
			for ; next < len(fix) && fix[next].Var < int(j); next++ {
				if fix[next].Value != 0 {
					return fmt.Errorf("cflp: site %q cannot serve customer %d, fixed to %v: %w", id, fix[next].Var, fix[next].Value, decomp.ErrInfeasible)
				}
			}
			if next < len(fix) && fix[next].Var == int(j) {
				v := fix[next].Value
				next++
				if !(v >= 0 && v <= 1) || (md.opt.SingleSource && v != 0 && v != 1) {
					return fmt.Errorf("cflp: site %q: share of customer %d fixed to %v: %w", id, j, v, decomp.ErrInfeasible)
				}
				if v > 0 {
					sc.fixedIn = append(sc.fixedIn, decomp.Entry{Index: k, Value: v})
					usedF += st.weight[k] * v
					if binary {
						usedI += st.iweight[k]
					}
					fixedPriced += (st.cost[k] + prices[j]) * v
				}
				continue
			}
		}
		if p := -(st.cost[k] + prices[j]); p > 0 {
			sc.idx = append(sc.idx, int32(k))
			sc.profit = append(sc.profit, p)
		}
	}
	for ; next < len(fix); next++ {
		if fix[next].Value != 0 {
			return fmt.Errorf("cflp: site %q cannot serve customer %d, fixed to %v: %w", id, fix[next].Var, fix[next].Value, decomp.ErrInfeasible)
		}
	}
	roomI, roomF := st.icap-usedI, st.capacity-usedF
	if len(sc.fixedIn) > 0 {
		if (binary && roomI < 0) || roomF < -1e-9*math.Max(1, st.capacity) {
			return fmt.Errorf("cflp: site %q: fixed shares need %v of capacity %v: %w", id, usedF, st.capacity, decomp.ErrInfeasible)
		}
		roomF = math.Max(0, roomF)
	}
	n := len(sc.idx)
	sc.serve = sc.serve[:0]
	sc.value, sc.cost = st.fixed, st.fixed
	if len(sc.fixedIn) > 0 {
		sc.value += fixedPriced
	}
	if n == 0 && len(sc.fixedIn) == 0 {
		return nil
	}
	sc.x = grow(sc.x, n)
	if n > 0 {
		var best float64
		var err error
		if binary {
			sc.wi = sc.wi[:0]
			for _, k := range sc.idx {
				sc.wi = append(sc.wi, st.iweight[k])
			}
			if cap(sc.take) < n {
				sc.take = make([]bool, n)
			}
			sc.take = sc.take[:n]
			best, err = sc.ks.Solve(sc.profit, sc.wi, roomI, sc.take)
			for k, t := range sc.take {
				sc.x[k] = 0
				if t {
					sc.x[k] = 1
				}
			}
		} else {
			sc.wf = sc.wf[:0]
			for _, k := range sc.idx {
				sc.wf = append(sc.wf, st.weight[k])
			}
			best, err = sc.ks.SolveFractional(sc.profit, sc.wf, roomF, sc.x)
		}
		if err != nil {
			return fmt.Errorf("cflp: site %q knapsack: %w", id, err)
		}
		sc.value -= best
	}
	// Shares in lane order: the fixed ones merged with the knapsack's.
	f := 0
	for k, x := range sc.x[:n] {
		lane := sc.idx[k]
		for ; f < len(sc.fixedIn) && sc.fixedIn[f].Index < int(lane); f++ {
			sc.serveLane(st, sc.fixedIn[f].Index, sc.fixedIn[f].Value)
		}
		if x > 0 {
			sc.serveLane(st, int(lane), x)
		}
	}
	for ; f < len(sc.fixedIn); f++ {
		sc.serveLane(st, sc.fixedIn[f].Index, sc.fixedIn[f].Value)
	}
	return nil
}

// serveLane records share x of the site's lane k.
func (sc *scratch) serveLane(st *site, k int, x float64) {
	sc.serve = append(sc.serve, decomp.Entry{Index: int(st.lanes[k]), Value: x})
	sc.cost += st.cost[k] * x
}

func grow(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	return s[:n]
}

// binary reports whether site knapsacks are 0-1 knapsacks.
func (md *model) binary() bool { return md.opt.SingleSource && md.knap01 }

// opens reports whether site i opens in the site relaxation given its value.
func (md *model) opens(i int, v float64) bool {
	switch md.sites[i].status {
	case ForcedOpen:
		return true
	case ForcedClosed:
		return false
	}
	return v < 0
}

// NewProblem builds the engine problem of an instance: one coupling row per
// customer (Σ_i x_ij = 1), the blocks of the chosen relaxation (see
// [ResolveRelaxation] for when the aggregate relaxation falls back to the
// site relaxation), starting prices and the repair. The plan's Detail is a
// *[Solution].
//
// Block answers list the site's own variables in Primal: in the site
// relaxation, index 0 is y_i and 1+j is x_ij; in the aggregate relaxation
// (one block), index i is y_i and m + i·n + j is x_ij.
func NewProblem(in *Instance, opt Options) (*decomp.Problem, error) {
	md, err := newModel(in, opt)
	if err != nil {
		return nil, err
	}
	p := &decomp.Problem{Name: in.Name, Sense: decomp.Minimise, Plans: decomp.GobPlans[*Solution]{}}
	p.Rows = demandRows(in)
	switch md.relax {
	case SiteRelaxation:
		p.Blocks = make([]decomp.Block, len(in.Sites))
		for i := range p.Blocks {
			p.Blocks[i] = &siteBlock{md: md, i: i}
		}
	default:
		p.Blocks = []decomp.Block{newAggregateBlock(md)}
	}
	p.Prices = startPrices(md)
	p.Repair = newRepairer(md)
	return p, nil
}

// demandRows are the coupling rows: Σ_i x_ij = 1 for every customer j.
func demandRows(in *Instance) []decomp.Row {
	rows := make([]decomp.Row, len(in.Customers))
	for j, c := range in.Customers {
		rows[j] = decomp.Row{Name: "demand " + c.ID, Sense: decomp.Equal, RHS: 1}
	}
	return rows
}

// startPrices sets λ_j to minus the cheapest cost of serving customer j
// with the site's fixed cost spread over its capacity: a customer then
// looks attractive only to sites that serve it about as cheaply as any.
func startPrices(md *model) []float64 {
	in := md.in
	prices := make([]float64, len(in.Customers))
	for j, c := range in.Customers {
		best := math.Inf(1)
		for i, s := range in.Sites {
			if s.Status == ForcedClosed || !in.Allowed(i, j) || s.Capacity <= 0 {
				continue
			}
			share := math.Min(1, c.Demand/s.Capacity)
			best = math.Min(best, in.Cost[i][j]+s.FixedCost*share)
		}
		if !math.IsInf(best, 1) {
			prices[j] = -best
		}
	}
	return prices
}

// siteBlock is one site in the site relaxation.
//
// Variables: 0 is y_i (1 when the site opens), 1+j is x_ij, the share of
// customer j (0-based, over all customers) served by the site; Answer.Primal
// lists y_i = 1 and the positive shares of an open site, nothing for a
// closed one. Shares are binary with single source, in [0, 1] otherwise.
// Fixings use the same numbering: y_i fixed to 1 opens the site whatever
// its value, y_i fixed to 0 closes it; a share fixed to a positive value
// opens it and is served as fixed (see evalFixed), the knapsack deciding
// the other shares. Contradictions (y_i fixed against the site's forced
// status or a positive fixed share, shares over the capacity or on lanes
// the site cannot serve) give an error wrapping decomp.ErrInfeasible.
type siteBlock struct {
	md  *model
	i   int
	sc  scratch
	fix []decomp.Fixing // customer fixings of this Solve (Var = customer)
}

func (b *siteBlock) Solve(_ context.Context, req *decomp.Request, ans *decomp.Answer) error {
	ans.Value, ans.Cost = 0, 0
	ans.Use = ans.Use[:0]
	ans.Primal = ans.Primal[:0]
	status := b.md.sites[b.i].status
	fixed := req.Fixed()
	var mustOpen, mustClose bool
	if len(fixed) > 0 {
		n := len(b.md.in.Customers)
		b.fix = b.fix[:0]
		for _, f := range fixed {
			if f.Var < 0 || f.Var > n {
				return fmt.Errorf("cflp: site block %d: fixing of variable %d, but the block has %d", req.Block, f.Var, n+1)
			}
			if f.Var > 0 {
				b.fix = append(b.fix, decomp.Fixing{Var: f.Var - 1, Value: f.Value})
				mustOpen = mustOpen || f.Value != 0
				continue
			}
			switch f.Value {
			case 0:
				mustClose = true
			case 1:
				mustOpen = true
			default:
				return fmt.Errorf("cflp: site block %d: y fixed to %v, not 0 or 1: %w", req.Block, f.Value, decomp.ErrInfeasible)
			}
		}
		mustOpen = mustOpen || status == ForcedOpen
		mustClose = mustClose || status == ForcedClosed
		if mustOpen && mustClose {
			return fmt.Errorf("cflp: site block %d: the fixings (and the site's status %v) both open and close it: %w", req.Block, status, decomp.ErrInfeasible)
		}
	}
	if status == ForcedClosed || mustClose {
		return nil
	}
	var fix []decomp.Fixing
	if len(fixed) > 0 {
		fix = b.fix
	}
	if err := b.md.evalFixed(b.i, &b.sc, req.Prices, b.md.binary(), fix); err != nil {
		return err
	}
	if !mustOpen && !b.md.opens(b.i, b.sc.value) {
		return nil
	}
	ans.Value, ans.Cost = b.sc.value, b.sc.cost
	ans.Primal = append(ans.Primal, decomp.Entry{Index: 0, Value: 1})
	for _, e := range b.sc.serve {
		ans.Use = append(ans.Use, e)
		ans.Primal = append(ans.Primal, decomp.Entry{Index: 1 + e.Index, Value: e.Value})
	}
	return nil
}

// aggregateBlock owns every site: it evaluates the site knapsacks in
// parallel (on req.Workers goroutines), then chooses the open sites by a
// covering knapsack.
//
// Variables: with m sites and n customers, i (0 <= i < m) is y_i and
// m + i·n + j is x_ij, the share of customer j served by site i; Answer.Primal
// lists the open sites' y_i = 1 first, then their positive shares. Fixings
// use the same numbering and mean for each site what they mean for a
// siteBlock; a site that must open counts towards covering the demand, and
// when the sites allowed to open cannot cover the demand the error wraps
// decomp.ErrInfeasible.
type aggregateBlock struct {
	md     *model
	sc     []scratch
	open   []bool
	value  []float64 // site values of the last Solve
	use    []float64
	ks     subproblem.Knapsack
	cand   []int
	profit []float64
	weight []int64
	take   []bool
	// Fixings of the current Solve, per site: customer fixings
	// (Var = customer), must open, must stay closed.
	fix            [][]decomp.Fixing
	mustOpen, shut []bool
}

func newAggregateBlock(md *model) *aggregateBlock {
	m := len(md.sites)
	return &aggregateBlock{md: md, sc: make([]scratch, m), open: make([]bool, m), value: make([]float64, m),
		use: make([]float64, len(md.in.Customers))}
}

func (b *aggregateBlock) Solve(ctx context.Context, req *decomp.Request, ans *decomp.Answer) error {
	md := b.md
	m := len(md.sites)
	fixed := req.Fixed()
	var fix [][]decomp.Fixing
	if len(fixed) > 0 {
		if err := b.splitFixings(req.Block, fixed); err != nil {
			return err
		}
		fix = b.fix
	}
	if err := b.evalAll(ctx, req.Prices, req.Workers, fix); err != nil {
		return err
	}
	// Open every site forced open or with a non-positive value; the
	// covering knapsack decides among the others if capacity is short.
	covered := 0.0
	b.cand = b.cand[:0]
	for i := range md.sites {
		b.open[i] = false
		switch {
		case md.sites[i].status == ForcedClosed || (fix != nil && b.shut[i]):
		case md.sites[i].status == ForcedOpen || b.value[i] <= 0 || (fix != nil && b.mustOpen[i]):
			b.open[i] = true
			covered += md.sites[i].capacity
		default:
			b.cand = append(b.cand, i)
		}
	}
	short := md.demand - covered
	if fix != nil && short > 1e-9*math.Max(1, md.demand) && len(b.cand) == 0 {
		return fmt.Errorf("cflp: aggregate block: the sites allowed to open under the fixings cover %v of demand %v: %w", covered, md.demand, decomp.ErrInfeasible)
	}
	if short > 1e-9*math.Max(1, md.demand) && len(b.cand) > 0 {
		// Close as much value as possible among the candidates while the
		// open capacity still covers the shortfall:
		// max Σ v_i w_i  s.t.  Σ s_i w_i <= Σ_cand s_i − short.
		// Weights are capacities scaled and rounded down (exact when the
		// scale makes them integers); the room is rounded up a little. Both
		// keep every covering choice feasible, so the knapsack can only be
		// looser and the relaxed value stays a valid bound.
		sc := md.capScale
		candCap := 0.0
		b.profit, b.weight = b.profit[:0], b.weight[:0]
		for _, i := range b.cand {
			c := md.sites[i].capacity * sc
			w := int64(math.Floor(c + 1e-9*math.Max(1, c)))
			b.profit = append(b.profit, b.value[i])
			b.weight = append(b.weight, w)
			candCap += md.sites[i].capacity
		}
		t := (candCap - short) * sc
		room := math.Floor(t + 1e-7*math.Max(1, math.Abs(t)))
		if room < 0 {
			if fix != nil {
				return fmt.Errorf("cflp: aggregate block: the sites allowed to open under the fixings cover %v of demand %v: %w", covered+candCap, md.demand, decomp.ErrInfeasible)
			}
			room = -1 // even opening every candidate is short: open them all
		}
		if cap(b.take) < len(b.cand) {
			b.take = make([]bool, len(b.cand))
		}
		b.take = b.take[:len(b.cand)]
		if room >= 0 {
			if _, err := b.ks.Solve(b.profit, b.weight, int64(room), b.take); err != nil {
				return fmt.Errorf("cflp: covering knapsack: %w", err)
			}
		} else {
			clear(b.take)
		}
		for k, i := range b.cand {
			b.open[i] = !b.take[k]
		}
	}
	ans.Value, ans.Cost = 0, 0
	ans.Use = ans.Use[:0]
	ans.Primal = ans.Primal[:0]
	clear(b.use)
	n := len(md.in.Customers)
	for i := 0; i < m; i++ {
		if !b.open[i] {
			continue
		}
		ans.Value += b.sc[i].value
		ans.Cost += b.sc[i].cost
		ans.Primal = append(ans.Primal, decomp.Entry{Index: i, Value: 1})
	}
	for i := 0; i < m; i++ {
		if !b.open[i] {
			continue
		}
		for _, e := range b.sc[i].serve {
			b.use[e.Index] += e.Value
			ans.Primal = append(ans.Primal, decomp.Entry{Index: m + i*n + e.Index, Value: e.Value})
		}
	}
	for j, u := range b.use {
		if u != 0 {
			ans.Use = append(ans.Use, decomp.Entry{Index: j, Value: u})
		}
	}
	return nil
}

// evalAll evaluates every site that is not forced closed, on up to
// workers goroutines (none of its own when workers <= 1). Each site has
// its own scratch, so the result is the same for any worker count.
func (b *aggregateBlock) evalAll(ctx context.Context, prices []float64, workers int, fix [][]decomp.Fixing) error {
	md := b.md
	m := len(md.sites)
	one := func(i int) error {
		var f []decomp.Fixing
		if fix != nil {
			f = fix[i]
		}
		if md.sites[i].status == ForcedClosed || (fix != nil && b.shut[i]) {
			b.value[i] = 0
			b.sc[i].serve = b.sc[i].serve[:0]
			return nil
		}
		if err := md.evalFixed(i, &b.sc[i], prices, md.binary(), f); err != nil {
			return err
		}
		b.value[i] = b.sc[i].value
		return nil
	}
	if workers <= 1 || m < 8 {
		for i := 0; i < m; i++ {
			if err := one(i); err != nil {
				return err
			}
		}
		return nil
	}
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(workers)
	chunk := max(1, m/(4*workers))
	for lo := 0; lo < m; lo += chunk {
		hi := min(lo+chunk, m)
		g.Go(func() error {
			if err := gctx.Err(); err != nil {
				return err
			}
			for i := lo; i < hi; i++ {
				if err := one(i); err != nil {
					return err
				}
			}
			return nil
		})
	}
	return g.Wait()
}

// splitFixings sorts the block's fixings into per-site customer fixings and
// must-open and must-close marks, and rejects contradictions.
func (b *aggregateBlock) splitFixings(block int, fixed []decomp.Fixing) error {
	md := b.md
	m, n := len(md.sites), len(md.in.Customers)
	if b.fix == nil {
		b.fix = make([][]decomp.Fixing, m)
		b.mustOpen = make([]bool, m)
		b.shut = make([]bool, m)
	}
	for i := range m {
		b.fix[i] = b.fix[i][:0]
		b.mustOpen[i] = md.sites[i].status == ForcedOpen
		b.shut[i] = md.sites[i].status == ForcedClosed
	}
	for _, f := range fixed {
		switch {
		case f.Var < 0 || f.Var >= m+m*n:
			return fmt.Errorf("cflp: aggregate block %d: fixing of variable %d, but the block has %d", block, f.Var, m+m*n)
		case f.Var < m:
			switch f.Value {
			case 0:
				b.shut[f.Var] = true
			case 1:
				b.mustOpen[f.Var] = true
			default:
				return fmt.Errorf("cflp: aggregate block %d: y of site %q fixed to %v, not 0 or 1: %w", block, md.in.Sites[f.Var].ID, f.Value, decomp.ErrInfeasible)
			}
		default:
			i, j := (f.Var-m)/n, (f.Var-m)%n
			b.fix[i] = append(b.fix[i], decomp.Fixing{Var: j, Value: f.Value})
			if f.Value != 0 {
				b.mustOpen[i] = true
			}
		}
	}
	for i := range m {
		if b.mustOpen[i] && b.shut[i] {
			return fmt.Errorf("cflp: aggregate block %d: the fixings (and status %v) both open and close site %q: %w", block, md.sites[i].status, md.in.Sites[i].ID, decomp.ErrInfeasible)
		}
	}
	return nil
}
