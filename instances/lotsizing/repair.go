package lotsizing

import (
	"context"
	"math"

	"pincer/decomp"
)

// Schedule is a production plan: per item and period the setup, the
// quantity made and the stock at the end of the period; per period the
// load, the overtime used and the plan's cost.
type Schedule struct {
	Setup      [][]bool    `json:"setup"`
	Production [][]float64 `json:"production"`
	Inventory  [][]float64 `json:"inventory"`
	Load       []float64   `json:"load"`
	Overtime   []float64   `json:"overtime"`
	Cost       float64     `json:"cost"`
}

// repairer keeps scratch space of its own; the engine never runs two
// repairs at once.
type repairer struct {
	in       *Instance
	overtime []float64
	moves    int
	work     int // pattern-search work of an early repair (see budget)
	// firstPlanWork is the extra work a repair may spend on each attempt
	// to remove excess capacity while the run has no plan.
	firstPlanWork int
	pen           []float64 // cost per capacity unit beyond capacity (a large penalty where no overtime)
	pat           *pattern
	// nodeWork, when positive, is the budget of every repair but the
	// first in the exact search, whatever the round: there the round is
	// the node number, which would make late nodes' repairs ever dearer.
	nodeWork int
}

const tol = 1e-9

// state is a plan under local search. Setups are implied by production.
type state struct {
	in   *Instance
	pen  []float64 // cost per capacity unit beyond capacity
	x    [][]float64
	load []float64
}

func (s *state) excessCost(t int, load float64) float64 {
	if e := load - s.in.Capacity[t]; e > tol {
		return s.pen[t] * e
	}
	return 0
}

// inventory of item i at the end of period u.
func (s *state) stock(i int) []float64 {
	T := s.in.Periods()
	inv := make([]float64, T)
	v := s.in.Items[i].InitialStock
	for u := 0; u < T; u++ {
		v += s.x[i][u] - s.in.Demand[i][u]
		inv[u] = v
	}
	return inv
}

// delta is the cost change of moving q units of item i from t to t2
// (incremental: one item, two periods); ok is false when the move breaks
// the demand of item i (forward moves need stock in t..t2-1).
func (s *state) delta(i, t, t2 int, q float64, inv []float64) (float64, bool) {
	it := &s.in.Items[i]
	if t2 > t {
		for u := t; u < t2; u++ {
			if inv[u] < q-tol {
				return 0, false
			}
		}
	}
	d := it.Holding * q * float64(t-t2)
	lt, lt2 := s.load[t]-it.UnitTime*q, s.load[t2]+it.UnitTime*q
	if q >= s.x[i][t]-tol {
		d -= it.SetupCost
		lt -= it.SetupTime
	}
	if s.x[i][t2] <= tol {
		d += it.SetupCost
		lt2 += it.SetupTime
	}
	d += s.excessCost(t, lt) - s.excessCost(t, s.load[t]) + s.excessCost(t2, lt2) - s.excessCost(t2, s.load[t2])
	return d, true
}

func (s *state) apply(i, t, t2 int, q float64) {
	it := &s.in.Items[i]
	if q >= s.x[i][t]-tol {
		q = s.x[i][t]
		s.load[t] -= it.SetupTime
	}
	if s.x[i][t2] <= tol {
		s.load[t2] += it.SetupTime
	}
	s.x[i][t] -= q
	s.x[i][t2] += q
	s.load[t] -= it.UnitTime * q
	s.load[t2] += it.UnitTime * q
}

// search runs first-improvement local search over lot moves (backward and
// forward, whole lots = merge or drop a setup, partial lots = split),
// trying quantities that empty the lot, clear the source's excess or fill
// the target's slack. It evaluates at most budget candidates.
func (s *state) search(ctx context.Context, budget int) {
	n, T := len(s.in.Items), s.in.Periods()
	improved := true
	for improved && budget > 0 {
		improved = false
		if ctx.Err() != nil {
			return
		}
		for i := 0; i < n && budget > 0; i++ {
			it := &s.in.Items[i]
			inv := s.stock(i)
			for t := T - 1; t >= 0 && budget > 0; t-- {
				if s.x[i][t] <= tol {
					continue
				}
				for t2 := 0; t2 < T && budget > 0; t2++ {
					if t2 == t || s.x[i][t] <= tol {
						continue
					}
					qs := [3]float64{s.x[i][t], math.Inf(1), math.Inf(1)}
					if it.UnitTime > 0 {
						if e := s.load[t] - s.in.Capacity[t]; e > tol {
							qs[1] = e / it.UnitTime
						}
						room := s.in.Capacity[t2] - s.load[t2]
						if s.x[i][t2] <= tol {
							room -= it.SetupTime
						}
						if room > tol {
							qs[2] = room / it.UnitTime
						}
					}
					bestD, bestQ := -1e-7, 0.0
					for _, q := range qs {
						if math.IsInf(q, 1) || q <= tol {
							continue
						}
						q = math.Min(q, s.x[i][t])
						budget--
						if d, ok := s.delta(i, t, t2, q, inv); ok && d < bestD {
							bestD, bestQ = d, q
						}
					}
					if bestQ > 0 {
						s.apply(i, t, t2, bestQ)
						inv = s.stock(i)
						improved = true
					}
				}
			}
		}
	}
}

func (r *repairer) Repair(ctx context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	inst := r.in
	n, T := len(inst.Items), inst.Periods()
	if r.pen == nil {
		big := 1.0
		for _, it := range inst.Items {
			big += it.SetupCost + it.Holding*float64(T)
		}
		big *= 1000
		r.pen = make([]float64, T)
		for t := range r.pen {
			r.pen[t] = r.overtime[t]
			if r.pen[t] < 0 {
				r.pen[t] = big
			}
		}
		r.pat = newPattern(inst, append([]float64(nil), r.pen...), r.overtime)
	}
	// The relaxed plan, made capacity-feasible by priced lot moves.
	s := &state{in: inst, pen: r.pen, x: make([][]float64, n), load: make([]float64, T)}
	for i := 0; i < n; i++ {
		s.x[i] = make([]float64, T)
		for _, e := range in.Answers[i].Primal {
			if e.Index >= T && e.Index < 2*T {
				s.x[i][e.Index-T] = e.Value
			}
		}
	}
	s.recomputeLoad()
	s.search(ctx, r.moves)
	// Its setup pattern, priced exactly and improved by descent.
	budget := r.budget(in)
	ps := newPatternSearch(r.pat, in.Seed)
	r.softPenalty(1)
	ps.start(s.x)
	ps.work = budget / 4
	ps.descend(ctx)
	// Strategic oscillation: excess capacity where no overtime is allowed
	// is priced softly first, so that the descent can trade it against
	// setups and stock, then ever harder until none is left (or the
	// penalty is the hard one). Until a first plan exists each step may
	// go on longer: a plan found early steers the rest of the run.
	for k := 1; k <= 12 && !r.feasible(ps.x) && ctx.Err() == nil; k++ {
		r.softPenalty(math.Pow(3, float64(k)))
		ps.cost = ps.price(ps.y, ps.x)
		if in.Best == nil {
			ps.work += r.firstWork(in)
		} else {
			ps.work += budget / 16
		}
		ps.descend(ctx)
	}
	r.softPenalty(math.Inf(1))
	ps.cost = ps.price(ps.y, ps.x)
	// Re-plan every item against the others' loads while that improves
	// (cheap: one flow solve per sweep).
	for k := 0; k < 4 && ps.sweep(); k++ {
	}
	if in.Best == nil && !r.feasible(ps.x) {
		// No plan yet: a forward construction with capacity look-ahead is
		// the other start.
		keepY, keepX, keepCost := cloneB(ps.y), clone(ps.x), ps.cost
		ps.start(construct(inst, r.pat.net))
		ps.work += r.firstWork(in)
		ps.descend(ctx)
		if keepCost < ps.cost {
			copyB(ps.y, keepY)
			copyF(ps.x, keepX)
			ps.cost = keepCost
		}
	}
	// The iterated search continues from the better of that pattern and
	// the best plan so far, so the effort of earlier repairs carries over.
	if in.Best != nil {
		if b, ok := in.Best.Detail.(*Schedule); ok && len(b.Production) == n {
			keepY, keepX, keepCost := cloneB(ps.y), clone(ps.x), ps.cost
			ps.start(b.Production)
			if keepCost < ps.cost {
				copyB(ps.y, keepY)
				copyF(ps.x, keepX)
				ps.cost = keepCost
			}
		}
	}
	for k := 0; k < 4 && ps.sweep(); k++ {
	}
	ps.work += budget - budget/4
	ps.iterate(ctx)
	sch := scheduleOf(inst, ps.x, r.overtime)
	if sch == nil {
		return nil, nil
	}
	use := make([]float64, T)
	for t := range use {
		use[t] = sch.Load[t] - sch.Overtime[t]
	}
	return &decomp.Plan{Value: sch.Cost, Use: use, Detail: sch}, nil
}

// softPenalty prices excess capacity in the pattern search at factor
// times the largest holding cost per capacity unit and period, capped at
// the hard penalty, in periods without overtime; periods with overtime
// keep its cost.
func (r *repairer) softPenalty(factor float64) {
	h := 0.0
	for _, it := range r.in.Items {
		if it.UnitTime > 0 {
			h = math.Max(h, it.Holding/it.UnitTime)
		}
	}
	for t, c := range r.pen {
		r.pat.pen[t] = c
		if r.overtime[t] < 0 {
			r.pat.pen[t] = math.Min(c, factor*math.Max(h, 1e-3))
		}
	}
}

// feasible reports whether production x is a plan (no excess capacity
// where no overtime is allowed).
func (r *repairer) feasible(x [][]float64) bool {
	return scheduleOf(r.in, x, r.overtime) != nil
}

// budget is the work (arcs scanned by flow solves, see netflow.work) of
// one repair's pattern search: a base of about the work of the five rounds
// between repairs (200000 plus 3·n·T², times Options.Effort), times
// 1 + round/10, so that the first rounds, which move the bound most, run
// fast and a long run spends ever more of its time improving the best
// plan; the last repair does four times more. In the exact search
// (nodeWork set) the root's repair (round 0) gets the base and every
// other node nodeWork.
func (r *repairer) budget(in *decomp.RepairInput) int {
	if r.nodeWork > 0 {
		if in.Round == 0 {
			return r.work
		}
		return r.nodeWork
	}
	b := r.work * (1 + min(in.Round, 100000)/10)
	if in.Final {
		b *= 4
	}
	return b
}

// firstWork is the extra work of each attempt to reach a first plan:
// firstPlanWork, but only nodeWork at the exact search's nodes past the
// root, where a node without a plan in sight (an infeasible one, say)
// must stay cheap.
func (r *repairer) firstWork(in *decomp.RepairInput) int {
	if r.nodeWork > 0 && in.Round > 0 {
		return r.nodeWork
	}
	return r.firstPlanWork
}

func (s *state) clone() [][]float64 {
	c := make([][]float64, len(s.x))
	for i := range s.x {
		c[i] = append([]float64(nil), s.x[i]...)
	}
	return c
}

// total is the plan's cost with excess capacity priced at the penalties.
func (s *state) total() float64 {
	c := 0.0
	for i, it := range s.in.Items {
		inv := s.stock(i)
		for t := range inv {
			if s.x[i][t] > tol {
				c += it.SetupCost
			}
			c += it.Holding * math.Max(inv[t], 0)
		}
	}
	for t := range s.load {
		c += s.excessCost(t, s.load[t])
	}
	return c
}

func (s *state) recomputeLoad() {
	for t := range s.load {
		s.load[t] = 0
		for i, it := range s.in.Items {
			if s.x[i][t] > tol {
				s.load[t] += it.SetupTime + it.UnitTime*s.x[i][t]
			}
		}
	}
}

// scheduleOf builds a Schedule from production quantities, or nil when
// demand is unmet or capacity is exceeded where no overtime is allowed.
func scheduleOf(in *Instance, x [][]float64, overtime []float64) *Schedule {
	n, T := len(in.Items), in.Periods()
	sch := &Schedule{Setup: make([][]bool, n), Production: make([][]float64, n), Inventory: make([][]float64, n), Load: make([]float64, T), Overtime: make([]float64, T)}
	for i, it := range in.Items {
		sch.Setup[i] = make([]bool, T)
		sch.Production[i] = make([]float64, T)
		sch.Inventory[i] = make([]float64, T)
		v := it.InitialStock
		for t := 0; t < T; t++ {
			q := x[i][t]
			if q <= tol {
				q = 0
			}
			v += q - in.Demand[i][t]
			if v < -1e-7 {
				return nil
			}
			v = math.Max(v, 0)
			sch.Production[i][t], sch.Inventory[i][t] = q, v
			if q > 0 {
				sch.Setup[i][t] = true
				sch.Cost += it.SetupCost
				sch.Load[t] += it.SetupTime + it.UnitTime*q
			}
			sch.Cost += it.Holding * v
		}
	}
	for t := 0; t < T; t++ {
		e := sch.Load[t] - in.Capacity[t]
		if e > 1e-7*math.Max(1, in.Capacity[t]) {
			if overtime[t] < 0 {
				return nil
			}
			sch.Overtime[t] = e
			sch.Cost += overtime[t] * e
		}
	}
	return sch
}
