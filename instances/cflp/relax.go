package cflp

import (
	"context"
	"fmt"
	"math"
	"runtime"

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
	status   Status
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
	st := &md.sites[i]
	sc.idx = sc.idx[:0]
	sc.profit = sc.profit[:0]
	for k, j := range st.lanes {
		if p := -(st.cost[k] + prices[j]); p > 0 {
			sc.idx = append(sc.idx, int32(k))
			sc.profit = append(sc.profit, p)
		}
	}
	n := len(sc.idx)
	sc.serve = sc.serve[:0]
	sc.value, sc.cost = st.fixed, st.fixed
	if n == 0 {
		return nil
	}
	sc.x = grow(sc.x, n)
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
		best, err = sc.ks.Solve(sc.profit, sc.wi, st.icap, sc.take)
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
		best, err = sc.ks.SolveFractional(sc.profit, sc.wf, st.capacity, sc.x)
	}
	if err != nil {
		return fmt.Errorf("cflp: site %q knapsack: %w", md.in.Sites[i].ID, err)
	}
	sc.value -= best
	for k, x := range sc.x[:n] {
		if x > 0 {
			lane := sc.idx[k]
			sc.serve = append(sc.serve, decomp.Entry{Index: int(st.lanes[lane]), Value: x})
			sc.cost += st.cost[lane] * x
		}
	}
	return nil
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
	n := len(in.Customers)
	p := &decomp.Problem{Name: in.Name, Sense: decomp.Minimise}
	p.Rows = make([]decomp.Row, n)
	for j, c := range in.Customers {
		p.Rows[j] = decomp.Row{Name: "demand " + c.ID, Sense: decomp.Equal, RHS: 1}
	}
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
type siteBlock struct {
	md *model
	i  int
	sc scratch
}

func (b *siteBlock) Solve(_ context.Context, req *decomp.Request, ans *decomp.Answer) error {
	ans.Value, ans.Cost = 0, 0
	ans.Use = ans.Use[:0]
	ans.Primal = ans.Primal[:0]
	if b.md.sites[b.i].status == ForcedClosed {
		return nil
	}
	if err := b.md.eval(b.i, &b.sc, req.Prices, b.md.binary()); err != nil {
		return err
	}
	if !b.md.opens(b.i, b.sc.value) {
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
// parallel, then chooses the open sites by a covering knapsack.
type aggregateBlock struct {
	md      *model
	sc      []scratch
	open    []bool
	value   []float64 // site values of the last Solve
	use     []float64
	ks      subproblem.Knapsack
	cand    []int
	profit  []float64
	weight  []int64
	take    []bool
	workers int
}

func newAggregateBlock(md *model) *aggregateBlock {
	m := len(md.sites)
	return &aggregateBlock{md: md, sc: make([]scratch, m), open: make([]bool, m), value: make([]float64, m),
		use: make([]float64, len(md.in.Customers)), workers: runtime.GOMAXPROCS(0)}
}

func (b *aggregateBlock) Solve(ctx context.Context, req *decomp.Request, ans *decomp.Answer) error {
	md := b.md
	m := len(md.sites)
	if err := b.evalAll(ctx, req.Prices); err != nil {
		return err
	}
	// Open every site forced open or with a non-positive value; the
	// covering knapsack decides among the others if capacity is short.
	covered := 0.0
	b.cand = b.cand[:0]
	for i := range md.sites {
		b.open[i] = false
		switch {
		case md.sites[i].status == ForcedClosed:
		case md.sites[i].status == ForcedOpen || b.value[i] <= 0:
			b.open[i] = true
			covered += md.sites[i].capacity
		default:
			b.cand = append(b.cand, i)
		}
	}
	if short := md.demand - covered; short > 1e-9*math.Max(1, md.demand) && len(b.cand) > 0 {
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
// GOMAXPROCS goroutines.
func (b *aggregateBlock) evalAll(ctx context.Context, prices []float64) error {
	md := b.md
	m := len(md.sites)
	one := func(i int) error {
		if md.sites[i].status == ForcedClosed {
			b.value[i] = 0
			b.sc[i].serve = b.sc[i].serve[:0]
			return nil
		}
		if err := md.eval(i, &b.sc[i], prices, md.binary()); err != nil {
			return err
		}
		b.value[i] = b.sc[i].value
		return nil
	}
	if b.workers <= 1 || m < 8 {
		for i := 0; i < m; i++ {
			if err := one(i); err != nil {
				return err
			}
		}
		return nil
	}
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(b.workers)
	chunk := max(1, m/(4*b.workers))
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
