package cflp

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"pincer/decomp"
	"pincer/heuristics"
	"pincer/subproblem/transport"
)

// Solution is a plan of the facility location family, the Detail of the
// engine's plans.
type Solution struct {
	// Open[i] reports that site i is open (it ships something or is forced
	// open).
	Open []bool
	// Flow[i][j] is the quantity shipped from site i to customer j, in
	// demand units (the layout [WritePlanCSV] expects).
	Flow [][]float64
	// Load[i] is the quantity site i ships.
	Load []float64
	// CapacityPrice[i] >= 0 is what one more unit of capacity at site i
	// would save in serving cost, per unit of demand, with the same open
	// sites: the shadow price of the site's capacity in the split
	// allocation over the open sites (for a single-source plan, in the
	// split allocation over the same sites).
	CapacityPrice []float64
	// Optimal reports that a branch and bound over the site set closed
	// with this plan: it is optimal (within 1e-9 relative) even when the
	// engine's bound has not met it.
	Optimal bool
	// Value is Σ fixed costs of open sites + Σ Cost[i][j]·Flow[i][j]/d_j.
	Value float64
}

// repairer turns block answers into plans: open sites from the relaxation,
// completed greedily, allocated exactly, then improved by a local search
// over the site set.
type repairer struct {
	md   *model
	unit [][]float64 // cost per unit of demand, +Inf on forbidden lanes
	tp   *transport.Solver
	sup  []float64 // supplies currently set in tp
	// seen caches the value of every open set evaluated (NaN when the
	// demand cannot be met).
	seen  map[string]float64
	key   []byte
	sc    scratch
	score []float64 // site values at the current prices (lower = more attractive)
	ss    *singleSource
	// scoreAt are the prices of score (nil: none yet), so that the site
	// search's repair and brancher at one node price the sites once.
	scoreAt []float64
}

func newRepairer(shared *model) *repairer {
	// The repair may run while the blocks are evaluated, and its exact
	// search changes site statuses for a while: it gets its own copy of
	// the site list (the lanes themselves are read only and shared).
	md := new(model)
	*md = *shared
	md.sites = slices.Clone(shared.sites)
	in := md.in
	m, n := len(in.Sites), len(in.Customers)
	r := &repairer{md: md, unit: make([][]float64, m), sup: make([]float64, m),
		seen: map[string]float64{}, key: make([]byte, (m+7)/8), score: make([]float64, m)}
	for i := range r.unit {
		r.unit[i] = make([]float64, n)
		for j, c := range in.Customers {
			r.unit[i][j] = in.Cost[i][j] / c.Demand
		}
	}
	if md.opt.SingleSource {
		r.ss = newSingleSource(md)
	}
	return r
}

// exactEvery spaces the exact site searches made during the rounds.
const exactEvery = 100

// moves returns the local search budget of one repair.
func (r *repairer) moves(final bool) int {
	b := r.md.opt.Moves
	if b <= 0 {
		b = 6*len(r.md.sites) + 100
	}
	if final {
		b *= 10
	}
	return b
}

func (r *repairer) Repair(ctx context.Context, rin *decomp.RepairInput) (*decomp.Plan, error) {
	md := r.md
	m := len(md.sites)
	// Site values at the round's prices rank the moves.
	if err := r.siteValues(rin.Prices); err != nil {
		return nil, err
	}
	open := make([]bool, m)
	switch md.relax {
	case SiteRelaxation:
		for i, a := range rin.Answers {
			open[i] = len(a.Primal) > 0
		}
	default:
		for _, e := range rin.Answers[0].Primal {
			if e.Index < m {
				open[e.Index] = true
			}
		}
	}
	open, value, err := r.complete(open)
	if err != nil || open == nil {
		return nil, err
	}
	budget := r.moves(rin.Final)
	open, value, err = r.search(ctx, open, value, budget)
	if err != nil {
		return nil, err
	}
	if rin.Final && rin.Best != nil {
		// The last repair also polishes the best plan so far.
		best, ok := rin.Best.Detail.(*Solution)
		if !ok || best == nil {
			return nil, fmt.Errorf("cflp: best plan of type %T is not a facility solution", rin.Best.Detail)
		}
		bo, bv, err := r.search(ctx, slices.Clone(best.Open), best.Value, budget)
		if err != nil {
			return nil, err
		}
		if bv < value {
			open, value = bo, bv
		}
	}
	optimal := false
	// The exact search over site sets runs at the end and, now and then,
	// during the rounds (every exactEvery rounds), priced at the best
	// bound's prices, so that an instance it can close stops early.
	if (rin.Final || rin.Round%exactEvery == 0) && !md.opt.SingleSource {
		limit := md.opt.ExactSites
		if limit == 0 {
			limit = 64
		}
		if free := md.freeSites(); limit > 0 && free <= limit {
			prices := rin.BoundPrices
			if prices == nil {
				prices = rin.Prices
			}
			bo, bv, complete, err := r.branchAndBound(ctx, prices, open, value)
			if err != nil {
				return nil, err
			}
			if bv < value {
				open, value = bo, bv
			}
			optimal = complete
		}
	}
	sol, err := r.solution(open)
	if err != nil || sol == nil {
		return nil, err
	}
	sol.Optimal = optimal
	use := make([]float64, len(md.in.Customers))
	for j := range use {
		use[j] = 1
	}
	return &decomp.Plan{Value: sol.Value, Use: use, Detail: sol, ProvedOptimal: optimal}, nil
}

// evalFrac is eval with continuous shares, used to rank sites.
func (md *model) evalFrac(i int, sc *scratch, prices []float64) error {
	return md.eval(i, sc, prices, false)
}

func (md *model) freeSites() int {
	k := 0
	for _, s := range md.sites {
		if s.status == Free {
			k++
		}
	}
	return k
}

// complete forces statuses, adds sites (most attractive first) until the
// open capacity covers the demand and the allocation is feasible, and
// returns the open set with its value; nil when no open set works.
func (r *repairer) complete(open []bool) ([]bool, float64, error) {
	md := r.md
	capOpen := 0.0
	for i, s := range md.sites {
		switch s.status {
		case ForcedOpen:
			open[i] = true
		case ForcedClosed:
			open[i] = false
		}
		if open[i] {
			capOpen += s.capacity
		}
	}
	order := r.order(open, false, true)
	k := 0
	for capOpen < md.demand*(1-1e-12) && k < len(order) {
		open[order[k]] = true
		capOpen += md.sites[order[k]].capacity
		k++
	}
	for {
		v, err := r.evaluate(open)
		if err != nil {
			return nil, 0, err
		}
		if !math.IsNaN(v) {
			return open, v, nil
		}
		if k >= len(order) {
			return nil, 0, nil
		}
		open[order[k]] = true
		k++
	}
}

// order lists the free sites that are open (want = true) or closed, by
// increasing score (asc) or decreasing score.
func (r *repairer) order(open []bool, want, asc bool) []int {
	var out []int
	for i, s := range r.md.sites {
		if s.status == Free && open[i] == want {
			out = append(out, i)
		}
	}
	slices.SortStableFunc(out, func(a, b int) int {
		c := 0
		switch {
		case r.score[a] < r.score[b]:
			c = -1
		case r.score[a] > r.score[b]:
			c = 1
		}
		if !asc {
			c = -c
		}
		return c
	})
	return out
}

// move is a candidate change of the open set: close site drop and/or open
// site add (-1 for none), with an estimate of the change in cost.
type move struct {
	drop, add int
	est       float64
}

// search improves the open set by close, open and swap moves. Each pass
// estimates every move from the current allocation (closing a site sends
// its customers to their next cheapest open site; opening one takes the
// customers it would save most on, up to its capacity), then evaluates
// the moves exactly, most promising first, and accepts the first that
// lowers the cost. A pass evaluates at most perPass moves; the search
// stops when a pass finds nothing or after budget exact evaluations that
// were not in the cache.
func (r *repairer) search(ctx context.Context, open []bool, value float64, budget int) ([]bool, float64, error) {
	md := r.md
	m, n := len(md.sites), len(md.in.Customers)
	capOpen := 0.0
	for i, o := range open {
		if o {
			capOpen += md.sites[i].capacity
		}
	}
	need := md.demand * (1 - 1e-12)
	// Small instances get the whole neighbourhood each pass.
	perPass, side := budget, m
	if m*n > 20000 {
		perPass, side = 12, 12
	}
	for budget > 0 && ctx.Err() == nil {
		sol, err := r.allocate(open)
		if err != nil {
			return nil, 0, err
		}
		if sol == nil {
			break
		}
		moves := r.estimateMoves(open, sol, side)
		slices.SortStableFunc(moves, func(a, b move) int {
			switch {
			case a.est < b.est:
				return -1
			case a.est > b.est:
				return 1
			}
			return 0
		})
		improved := false
		tried := 0
		for _, mv := range moves {
			if tried >= perPass || budget <= 0 || ctx.Err() != nil {
				break
			}
			c := capOpen
			if mv.drop >= 0 {
				c -= md.sites[mv.drop].capacity
			}
			if mv.add >= 0 {
				c += md.sites[mv.add].capacity
			}
			if c < need {
				continue
			}
			setMove(open, mv, true)
			v, cached, err := r.evaluateCached(open)
			if err != nil {
				return nil, 0, err
			}
			if !cached {
				budget--
				tried++
			}
			if !math.IsNaN(v) && v < value-1e-9*math.Max(1, math.Abs(value)) {
				value, capOpen, improved = v, c, true
				break
			}
			setMove(open, mv, false)
		}
		if !improved {
			break
		}
	}
	return open, value, nil
}

func setMove(open []bool, mv move, apply bool) {
	if mv.drop >= 0 {
		open[mv.drop] = !apply
	}
	if mv.add >= 0 {
		open[mv.add] = apply
	}
}

// estimateMoves lists the close and open moves of every free site and the
// swaps among the side most promising of each, with estimated cost
// changes from the current allocation sol.
func (r *repairer) estimateMoves(open []bool, sol *transport.Solution, side int) []move {
	md := r.md
	m, n := len(md.sites), len(md.in.Customers)
	// Cheapest and second cheapest open site per customer, and the highest
	// unit cost each customer pays now.
	best1 := make([]int, n)
	best2 := make([]int, n)
	paid := make([]float64, n)
	for j := 0; j < n; j++ {
		best1[j], best2[j] = -1, -1
		for i := 0; i < m; i++ {
			if !open[i] || math.IsInf(r.unit[i][j], 1) {
				continue
			}
			u := r.unit[i][j]
			if best1[j] < 0 || u < r.unit[best1[j]][j] {
				best1[j], best2[j] = i, best1[j]
			} else if best2[j] < 0 || u < r.unit[best2[j]][j] {
				best2[j] = i
			}
		}
	}
	dropEst := make([]float64, m)
	for i := range dropEst {
		if open[i] {
			dropEst[i] = -md.sites[i].fixed
		}
	}
	for _, s := range sol.Shipments {
		j := s.Customer
		paid[j] = math.Max(paid[j], r.unit[s.Site][j])
		alt := best1[j]
		if alt == s.Site {
			alt = best2[j]
		}
		if alt < 0 {
			dropEst[s.Site] = math.Inf(1)
			continue
		}
		dropEst[s.Site] += s.Qty * (r.unit[alt][j] - r.unit[s.Site][j])
	}
	addEst := make([]float64, m)
	type gain struct{ save, qty float64 }
	var gains []gain
	for k := 0; k < m; k++ {
		if open[k] || md.sites[k].status != Free {
			continue
		}
		gains = gains[:0]
		for j, c := range md.in.Customers {
			if d := paid[j] - r.unit[k][j]; d > 0 {
				gains = append(gains, gain{d, c.Demand})
			}
		}
		slices.SortFunc(gains, func(a, b gain) int {
			switch {
			case a.save > b.save:
				return -1
			case a.save < b.save:
				return 1
			}
			return 0
		})
		room, est := md.sites[k].capacity, md.sites[k].fixed
		for _, g := range gains {
			q := math.Min(room, g.qty)
			est -= q * g.save
			if room -= q; room <= 0 {
				break
			}
		}
		addEst[k] = est
	}
	var drops, adds []int
	var moves []move
	for i, s := range md.sites {
		if s.status != Free {
			continue
		}
		if open[i] {
			drops = append(drops, i)
			moves = append(moves, move{drop: i, add: -1, est: dropEst[i]})
		} else {
			adds = append(adds, i)
			moves = append(moves, move{drop: -1, add: i, est: addEst[i]})
		}
	}
	byEst := func(est []float64) func(a, b int) int {
		return func(a, b int) int {
			switch {
			case est[a] < est[b]:
				return -1
			case est[a] > est[b]:
				return 1
			}
			return 0
		}
	}
	slices.SortStableFunc(drops, byEst(dropEst))
	slices.SortStableFunc(adds, byEst(addEst))
	for _, i := range drops[:min(side, len(drops))] {
		for _, k := range adds[:min(side, len(adds))] {
			moves = append(moves, move{drop: i, add: k, est: dropEst[i] + addEst[k]})
		}
	}
	return moves
}

// evaluateCached is evaluate with the cache of open sets.
func (r *repairer) evaluateCached(open []bool) (v float64, cached bool, err error) {
	clear(r.key)
	for i, o := range open {
		if o {
			r.key[i/8] |= 1 << (i % 8)
		}
	}
	if v, ok := r.seen[string(r.key)]; ok {
		return v, true, nil
	}
	v, err = r.evaluate(open)
	if err != nil {
		return 0, false, err
	}
	r.seen[string(r.key)] = v
	return v, false, nil
}

// evaluate returns the cost of the best allocation with the given open
// sites (their fixed costs included), or NaN when the demand cannot be met.
func (r *repairer) evaluate(open []bool) (float64, error) {
	if r.ss != nil {
		return r.ss.evaluate(open)
	}
	sol, err := r.allocate(open)
	if err != nil || sol == nil {
		return math.NaN(), err
	}
	fixed := 0.0
	for i, o := range open {
		if o {
			fixed += r.md.sites[i].fixed
		}
	}
	return fixed + sol.Cost, nil
}

// allocate solves the split allocation over the open sites with the warm
// transport solver; nil when the demand cannot be met.
func (r *repairer) allocate(open []bool) (*transport.Solution, error) {
	md := r.md
	if r.tp == nil {
		if err := r.newSolver(); err != nil {
			return nil, err
		}
	}
	for i, o := range open {
		s := 0.0
		if o {
			s = md.sites[i].capacity
		}
		if s != r.sup[i] {
			if err := r.tp.SetSupply(i, s); err != nil {
				return nil, fmt.Errorf("cflp: allocation: %w", err)
			}
			r.sup[i] = s
		}
	}
	sol, err := r.tp.Solve()
	if errors.Is(err, transport.ErrInfeasible) {
		return nil, nil
	}
	if err != nil {
		return nil, fmt.Errorf("cflp: allocation: %w", err)
	}
	return sol, nil
}

// newSolver sets up the warm transport solver with every supply zero.
func (r *repairer) newSolver() error {
	md := r.md
	p := &transport.Problem{Supply: make([]float64, len(md.sites)), Demand: make([]float64, len(md.in.Customers)), Cost: r.unit}
	for j, c := range md.in.Customers {
		p.Demand[j] = c.Demand
	}
	tp, err := transport.NewSolver(p)
	if err != nil {
		return fmt.Errorf("cflp: allocation: %w", err)
	}
	r.tp = tp
	return nil
}

// solution builds the plan of an open set.
func (r *repairer) solution(open []bool) (*Solution, error) {
	md := r.md
	in := md.in
	m, n := len(in.Sites), len(in.Customers)
	sol := &Solution{Open: make([]bool, m), Flow: make([][]float64, m), Load: make([]float64, m), CapacityPrice: make([]float64, m)}
	for i := range sol.Flow {
		sol.Flow[i] = make([]float64, n)
	}
	if r.ss != nil {
		assign, ok, err := r.ss.assign(open)
		if err != nil || !ok {
			return nil, err
		}
		for j, i := range assign {
			sol.Flow[i][j] = in.Customers[j].Demand
		}
	}
	// The split allocation gives the flows (split demand) and the capacity
	// prices (both variants).
	tsol, err := r.allocate(open)
	if err != nil {
		return nil, err
	}
	if tsol != nil {
		for i := range sol.CapacityPrice {
			if i < len(tsol.SiteDual) {
				sol.CapacityPrice[i] = math.Max(0, -tsol.SiteDual[i])
			}
		}
	}
	if r.ss == nil {
		if tsol == nil {
			return nil, nil
		}
		for _, s := range tsol.Shipments {
			sol.Flow[s.Site][s.Customer] += s.Qty
		}
	}
	for i := range sol.Flow {
		for j, q := range sol.Flow[i] {
			if q > 0 {
				sol.Load[i] += q
				sol.Value += in.Cost[i][j] * q / in.Customers[j].Demand
			}
		}
		sol.Open[i] = sol.Load[i] > 0 || in.Sites[i].Status == ForcedOpen
		if sol.Open[i] {
			sol.Value += in.Sites[i].FixedCost
		}
	}
	return sol, nil
}

// singleSource allocates customers to open sites one site each: a
// generalized assignment problem solved by the shared assignment
// heuristics, with the open sites as resources.
type singleSource struct {
	md    *model
	asg   *heuristics.Assignment
	moves int
	rng   *rand.Rand
}

func newSingleSource(md *model) *singleSource {
	in := md.in
	m, n := len(in.Sites), len(in.Customers)
	a := &heuristics.Assignment{Cost: make([][]float64, m), Weight: make([][]float64, m), Capacity: make([]float64, m)}
	for i := range a.Cost {
		a.Cost[i] = slices.Clone(in.Cost[i])
		a.Weight[i] = make([]float64, n)
		for j, c := range in.Customers {
			a.Weight[i][j] = c.Demand
		}
	}
	return &singleSource{md: md, asg: a, moves: 10*n + 200, rng: rand.New(rand.NewPCG(uint64(m), uint64(n)))}
}

// assign returns the best single-source assignment found for the open
// sites (customer -> site), or ok = false.
func (s *singleSource) assign(open []bool) ([]int, bool, error) {
	md := s.md
	for i, o := range open {
		s.asg.Capacity[i] = 0
		if o {
			s.asg.Capacity[i] = md.sites[i].capacity
		}
	}
	// The heuristics take the seed afresh for every open set, so that an
	// open set always gets the same allocation.
	rng := rand.New(rand.NewPCG(0x63666c70, uint64(len(open))))
	ctx := context.Background()
	asg, ok := heuristics.Repair(ctx, s.asg, nil, nil, rng)
	if !ok {
		return nil, false, nil
	}
	asg, v := heuristics.Improve(ctx, s.asg, asg, heuristics.ImproveSettings{Moves: s.moves}, rng)
	if math.IsInf(v, 0) {
		return nil, false, nil
	}
	return asg, true, nil
}

func (s *singleSource) evaluate(open []bool) (float64, error) {
	asg, ok, err := s.assign(open)
	if err != nil || !ok {
		return math.NaN(), err
	}
	v := 0.0
	for i, o := range open {
		if o {
			v += s.md.sites[i].fixed
		}
	}
	for j, i := range asg {
		v += s.md.in.Cost[i][j]
	}
	return v, nil
}

// branchAndBound searches the site set exhaustively with the engine's
// branch and bound (decomp.Search) on a problem of its own: the run's rows
// and relaxation over the repairer's copy of the model, the sites' y
// variables fixed by the nodes, each node bounded by a short dual ascent
// from its parent's prices (the root from prices) and cut off at the
// incumbent, which starts as the given open set. At each node the node's
// relaxed open set, completed under the node's fixings, is a candidate
// plan (nodeRepair); the node splits on the free site whose value is
// closest to zero (siteBrancher). The work is bounded by nodes and by
// dual ascent rounds, never by the clock, so the repair is reproducible.
// It returns the best open set found (the given one when nothing better
// is found or the budget runs out); complete reports that the search
// closed, which proves the returned open set optimal (within 1e-9
// relative).
func (r *repairer) branchAndBound(ctx context.Context, prices []float64, open []bool, value float64) (bestOpen []bool, best float64, complete bool, err error) {
	md := r.md
	m, n := len(md.sites), len(md.in.Customers)
	limit := md.opt.ExactNodes
	if limit <= 0 {
		limit = 20000
	}
	// Rounds are counted in site-customer cells, so that large instances
	// get fewer.
	work := md.opt.ExactWork
	if work <= 0 {
		work = 1e8
	}
	build := func() (*decomp.Problem, error) { return r.nodeProblem(), nil }
	br := &siteBrancher{md: md, r: r, plan: r.openSetPlan}
	sr, err := decomp.Search(ctx, build, br, decomp.SearchSettings{
		Nodes: limit, Rounds: max(1, int(work/float64(m*n))),
		// One worker and one node at a time: the search runs beside the
		// run's rounds, and depth first along the preferred children
		// until a dive ends.
		Workers: 1, Batch: 1,
		Prices: prices, Incumbent: &decomp.Plan{Value: value, Detail: slices.Clone(open)},
		RootRounds: rootRounds, NodeRounds: nodeRounds,
	})
	if err != nil {
		return nil, 0, false, fmt.Errorf("cflp: site search: %w", err)
	}
	bo, ok := sr.Plan.Detail.([]bool)
	if !ok {
		return nil, 0, false, fmt.Errorf("cflp: site search: plan of type %T is not an open set", sr.Plan.Detail)
	}
	return bo, sr.Plan.Value, sr.Proved, nil
}

// openSetPlan is the site search's plan of an open set: its value (the
// cached exact allocation) with the set as Detail, or nil when the set
// cannot serve the demand.
func (r *repairer) openSetPlan(open []bool) (*decomp.Plan, error) {
	v, _, err := r.evaluateCached(open)
	if err != nil || math.IsNaN(v) {
		return nil, err
	}
	return &decomp.Plan{Value: v, Detail: slices.Clone(open)}, nil
}

// nodeRepair is the site search's repair at a node: the node's relaxed
// open set, completed (most attractive sites first at the node's prices)
// under the node's fixings, allocated exactly. Its plans carry the open
// set as Detail.
type nodeRepair struct{ r *repairer }

func (nr nodeRepair) Repair(_ context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	r := nr.r
	fix := r.md.statusesUnder(in.Fixings)
	cand := r.openOf(in.Answers, nil)
	for i, f := range fix {
		switch f {
		case ForcedOpen:
			cand[i] = true
		case ForcedClosed:
			cand[i] = false
		}
	}
	if err := r.siteValues(in.Prices); err != nil {
		return nil, err
	}
	co, cv, err := r.completeFixed(cand, fix)
	if err != nil || co == nil {
		return nil, err
	}
	return &decomp.Plan{Value: cv, Detail: slices.Clone(co)}, nil
}

// siteValues sets r.score to the site values at prices (0 for sites
// forced closed), unless they are already those of equal prices.
func (r *repairer) siteValues(prices []float64) error {
	if r.scoreAt != nil && slices.Equal(r.scoreAt, prices) {
		return nil
	}
	r.scoreAt = r.scoreAt[:0]
	for i := range r.md.sites {
		r.score[i] = 0
		if r.md.sites[i].status == ForcedClosed {
			continue
		}
		if err := r.md.evalFrac(i, &r.sc, prices); err != nil {
			return err
		}
		r.score[i] = r.sc.value
	}
	r.scoreAt = append(r.scoreAt, prices...)
	return nil
}

// statusesUnder returns the sites' statuses with the y fixings among fix
// applied (other fixings are ignored).
func (md *model) statusesUnder(fix []decomp.Fixing) []SiteFixing {
	m := len(md.sites)
	out := make([]SiteFixing, m)
	for i := range md.sites {
		out[i] = md.sites[i].status
	}
	for _, f := range fix {
		i := -1
		if md.relax == AggregateRelaxation && f.Block == 0 && f.Var < m {
			i = f.Var
		} else if md.relax == SiteRelaxation && f.Var == 0 && f.Block < m {
			i = f.Block
		}
		if i < 0 {
			continue
		}
		out[i] = ForcedClosed
		if f.Value == 1 {
			out[i] = ForcedOpen
		}
	}
	return out
}

// Dual ascent rounds of the site search at the root and at other nodes.
const (
	rootRounds = 300
	nodeRounds = 60
)

// nodeProblem is the engine problem the site search re-solves: the run's
// rows and relaxation, with blocks of its own over the repairer's copy of
// the model, so that a search never touches the blocks the run's rounds
// are evaluating, and nodeRepair as its repair. Sites are fixed through
// the nodes' fixings, never through their statuses.
func (r *repairer) nodeProblem() *decomp.Problem {
	md := r.md
	p := &decomp.Problem{Name: md.in.Name + " site search", Sense: decomp.Minimise, Rows: demandRows(md.in)}
	if md.relax == AggregateRelaxation {
		p.Blocks = []decomp.Block{newAggregateBlock(md)}
	} else {
		for i := range md.sites {
			p.Blocks = append(p.Blocks, &siteBlock{md: md, i: i})
		}
	}
	p.Repair = nodeRepair{r}
	return p
}

// closedFeasible reports whether the sites not forced closed can cover the
// demand.
func closedFeasible(md *model, fix []SiteFixing) bool {
	c := 0.0
	for i, f := range fix {
		if f != ForcedClosed {
			c += md.sites[i].capacity
		}
	}
	return c >= md.demand*(1-1e-12)
}

// openOf reads the open sites from block answers into dst.
func (r *repairer) openOf(answers []decomp.Answer, dst []bool) []bool {
	m := len(r.md.sites)
	if dst == nil {
		dst = make([]bool, m)
	}
	clear(dst)
	if r.md.relax == SiteRelaxation {
		for i, a := range answers {
			dst[i] = len(a.Primal) > 0
		}
		return dst
	}
	for _, e := range answers[0].Primal {
		if e.Index < m {
			dst[e.Index] = true
		}
	}
	return dst
}

// completeFixed is complete under a node's fixed statuses: sites fixed
// closed never open, sites fixed open always do.
func (r *repairer) completeFixed(open []bool, fix []SiteFixing) ([]bool, float64, error) {
	saved := make([]SiteFixing, len(fix))
	for i := range r.md.sites {
		saved[i] = r.md.sites[i].status
		r.md.sites[i].status = fix[i]
	}
	defer func() {
		for i := range r.md.sites {
			r.md.sites[i].status = saved[i]
		}
	}()
	return r.complete(open)
}
