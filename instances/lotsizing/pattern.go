package lotsizing

import (
	"context"
	"math"
	"math/rand/v2"
)

// pattern prices setup patterns exactly. With the setups fixed, the
// cheapest production plan is a minimum-cost flow (the transshipment view,
// after Hindi 1996 as we remember it): measured in capacity units, period t supplies its
// capacity left after setup times (free) and any overtime (at its cost);
// an item's lots are the nodes of its setups, each taking the net demand
// of the periods up to its next setup, linked by stock arcs costing
// h_i/b_i per capacity unit and period. Scaling item i by its unit time
// b_i keeps the network pure, so unit times need no generalised flow.
type pattern struct {
	in       *Instance
	pen      []float64   // cost per capacity unit beyond capacity
	overtime []float64   // the model's overtime cost per period, < 0 for none
	net      [][]float64 // demand net of the initial stock
	first    []int       // per item: first period with net demand (T if none)
	initHold float64     // holding cost of the initial stock, the same in every plan
	big      float64     // more than any flow
	g        netflow
	prodArc  [][]int // scratch: production arc of each setup, -1 for none
}

func newPattern(in *Instance, pen, overtime []float64) *pattern {
	n, T := len(in.Items), in.Periods()
	p := &pattern{in: in, pen: pen, overtime: overtime, net: make([][]float64, n), first: make([]int, n), prodArc: make([][]int, n), big: 1}
	for i, it := range in.Items {
		p.net[i] = make([]float64, T)
		p.prodArc[i] = make([]int, T)
		p.first[i] = T
		stock := it.InitialStock
		for t, d := range in.Demand[i] {
			use := math.Min(stock, d)
			stock -= use
			p.initHold += it.Holding * stock
			p.net[i][t] = d - use
			if p.net[i][t] > 0 && p.first[i] == T {
				p.first[i] = t
			}
			p.big += it.UnitTime * p.net[i][t]
		}
	}
	return p
}

// solve writes into x the cheapest production for the setups y and
// returns its cost with every setup of y paid and excess capacity priced
// at pen; +Inf when some net demand comes before every setup of its item.
func (p *pattern) solve(y [][]bool, x [][]float64) float64 {
	in := p.in
	T := in.Periods()
	for i := range y {
		if p.first[i] < T {
			s := 0
			for s < T && !y[i][s] {
				s++
			}
			if s > p.first[i] {
				return math.Inf(1)
			}
		}
	}
	g := &p.g
	g.reset(2 + T)
	const src, sink = 0, 1
	cost := p.initHold
	for t := 0; t < T; t++ {
		room := in.Capacity[t]
		for i, it := range in.Items {
			if y[i][t] {
				room -= it.SetupTime
				cost += it.SetupCost
			}
		}
		if room > 0 {
			g.arc(src, 2+t, room, 0)
		} else {
			cost += p.pen[t] * -room
		}
		g.arc(src, 2+t, p.big, p.pen[t])
	}
	need := 0.0
	for i, it := range in.Items {
		xi, ni, yi := x[i], p.net[i], y[i]
		for t := range xi {
			xi[t] = 0
			p.prodArc[i][t] = -1
		}
		if it.UnitTime == 0 {
			// No capacity used: every net demand comes from the latest setup.
			s := -1
			for t := 0; t < T; t++ {
				if yi[t] {
					s = t
				}
				if ni[t] > 0 {
					xi[s] += ni[t]
					cost += it.Holding * ni[t] * float64(t-s)
				}
			}
			continue
		}
		prev, prevT := -1, -1
		for t := 0; t < T; t++ {
			if !yi[t] {
				continue
			}
			v := len(g.head)
			g.head = append(g.head, -1)
			p.prodArc[i][t] = g.arc(2+t, v, p.big, 0)
			if prev >= 0 {
				g.arc(prev, v, p.big, it.Holding/it.UnitTime*float64(t-prevT))
			}
			d := 0.0
			for u := t; u < T && (u == t || !yi[u]); u++ {
				d += ni[u]
				cost += it.Holding * ni[u] * float64(u-t)
			}
			if d > 0 {
				g.arc(v, sink, it.UnitTime*d, 0)
				need += it.UnitTime * d
			}
			prev, prevT = v, t
		}
	}
	sent, fc := g.run(src, sink, need)
	if sent < need-1e-7*math.Max(1, need) {
		return math.Inf(1) // cannot happen: overtime arcs are unbounded
	}
	for i, it := range in.Items {
		if it.UnitTime == 0 {
			continue
		}
		for t, e := range p.prodArc[i] {
			if e >= 0 {
				if q := g.flowOn(e) / it.UnitTime; q > tol {
					x[i][t] = q
				}
			}
		}
	}
	return cost + fc
}

// patternSearch is a local search over setup patterns, each priced
// exactly by pattern.solve: drop a setup, add one, or move one to the
// neighbouring period; an iterated search kicks the best pattern with
// seeded random moves. Effort is counted in the work of the flow solves,
// so that it is reproducible and scales with the instance.
type patternSearch struct {
	p     *pattern
	y     [][]bool
	x, tx [][]float64
	cost  float64
	work  int // effort left, in arcs scanned by the flow solves (see netflow.work)
	rng   *rand.Rand
	order []int
}

func newPatternSearch(p *pattern, seed uint64) *patternSearch {
	n, T := len(p.in.Items), p.in.Periods()
	s := &patternSearch{p: p, y: make([][]bool, n), x: make([][]float64, n), tx: make([][]float64, n),
		rng: rand.New(rand.NewPCG(seed, 1996)), order: make([]int, n*T)}
	for i := range s.y {
		s.y[i] = make([]bool, T)
		s.x[i] = make([]float64, T)
		s.tx[i] = make([]float64, T)
	}
	for k := range s.order {
		s.order[k] = k
	}
	return s
}

// price solves pattern y into x and charges its work (at least one unit).
func (s *patternSearch) price(y [][]bool, x [][]float64) float64 {
	w := s.p.g.work
	c := s.p.solve(y, x)
	s.work -= 1 + s.p.g.work - w
	return c
}

// start sets the pattern to the setups of production x and prices it.
func (s *patternSearch) start(x [][]float64) {
	for i := range s.y {
		for t := range s.y[i] {
			s.y[i][t] = x[i][t] > tol
		}
	}
	s.cost = s.p.solve(s.y, s.x)
}

func (s *patternSearch) better(c float64) bool {
	if math.IsInf(s.cost, 1) {
		return !math.IsInf(c, 1)
	}
	return c < s.cost-1e-9*math.Max(1, math.Abs(s.cost))
}

// try prices the current (already changed) pattern and keeps it when it
// beats the current cost; it reports whether it did.
func (s *patternSearch) try() bool {
	c := s.price(s.y, s.tx)
	if s.better(c) {
		s.cost = c
		s.x, s.tx = s.tx, s.x
		return true
	}
	return false
}

// descend runs first-improvement descent until no move improves or the
// evaluation budget is spent.
func (s *patternSearch) descend(ctx context.Context) {
	T := s.p.in.Periods()
	for improved := true; improved && s.work > 0 && ctx.Err() == nil; {
		improved = false
		s.rng.Shuffle(len(s.order), func(a, b int) { s.order[a], s.order[b] = s.order[b], s.order[a] })
		for _, k := range s.order {
			if s.work <= 0 {
				return
			}
			if s.move(k/T, k%T) {
				improved = true
			}
		}
		if !improved && s.overloaded() {
			// Stuck over capacity: try giving setups to other items.
			for _, k := range s.order {
				if s.work <= 0 {
					return
				}
				if s.swap(k/T, k%T) {
					improved = true
				}
			}
		}
	}
}

// move tries the moves of setup (i,t) (add it, or drop it, or move it to
// period t-1 or t+1) and keeps the first that improves.
func (s *patternSearch) move(i, t int) bool {
	T := s.p.in.Periods()
	y := s.y[i]
	if !y[t] {
		y[t] = true
		if s.try() {
			return true
		}
		y[t] = false
		return false
	}
	y[t] = false
	if s.try() {
		return true
	}
	for _, u := range [2]int{t - 1, t + 1} {
		if u < 0 || u >= T || y[u] {
			continue
		}
		y[u] = true
		if s.try() {
			return true
		}
		y[u] = false
	}
	y[t] = true
	return false
}

// overloaded reports whether the current plan exceeds capacity where no
// overtime is allowed (hard[t] < 0).
func (s *patternSearch) overloaded() bool {
	in := s.p.in
	for t := range in.Capacity {
		if s.p.overtime[t] >= 0 {
			continue
		}
		load := 0.0
		for i, it := range in.Items {
			if s.y[i][t] {
				load += it.SetupTime + it.UnitTime*s.x[i][t]
			}
		}
		if load > in.Capacity[t]*(1+1e-9)+1e-9 {
			return true
		}
	}
	return false
}

// swap tries to give the setup (i,t) to another item in the same period
// (drop i's setup, set up j), keeping the first that improves. Only used
// while the plan is over capacity: with large setup times the slack of
// earlier periods is often too small for one more setup, but not for one
// setup in place of another.
func (s *patternSearch) swap(i, t int) bool {
	if !s.y[i][t] {
		return false
	}
	s.y[i][t] = false
	for j := range s.y {
		if j == i || s.y[j][t] || s.work <= 0 {
			continue
		}
		s.y[j][t] = true
		if s.try() {
			return true
		}
		s.y[j][t] = false
	}
	s.y[i][t] = true
	return false
}

// replan sets item i's setups to the optimum of its own lot-sizing
// problem with the other items' loads fixed: the Wagner-Whitin recursion
// over lots covering consecutive net demand, each lot paying its setup,
// its holding and the excess of its load over the capacity the other
// items leave, at the current penalty. Zero-inventory lots are not always
// optimal under capacity limits, so this is a kick of the iterated search
// (the flow then sets the quantities of all items), not an exact move.
func (s *patternSearch) replan(i int) {
	in := s.p.in
	T := in.Periods()
	it := &in.Items[i]
	net := s.p.net[i]
	room := make([]float64, T)
	for t := range room {
		room[t] = in.Capacity[t]
		for j, jt := range in.Items {
			if j != i && s.y[j][t] {
				room[t] -= jt.SetupTime + jt.UnitTime*s.x[j][t]
			}
		}
	}
	f := make([]float64, T+1)
	from := make([]int, T+1)
	for k := 1; k <= T; k++ {
		f[k], from[k] = math.Inf(1), -2
		if net[k-1] == 0 {
			f[k], from[k] = f[k-1], -1
		}
	}
	for j := 0; j < T; j++ {
		if math.IsInf(f[j], 1) {
			continue
		}
		hold, q := 0.0, 0.0
		for k := j + 1; k <= T; k++ {
			u := k - 1
			q += net[u]
			hold += it.Holding * net[u] * float64(u-j)
			c := f[j] + it.SetupCost + hold
			if e := it.SetupTime + it.UnitTime*q - room[j]; e > 0 {
				c += s.p.pen[j] * e
			}
			if c < f[k] {
				f[k], from[k] = c, j
			}
		}
	}
	for t := range s.y[i] {
		s.y[i][t] = false
		s.x[i][t] = 0
	}
	for k := T; k > 0; {
		j := from[k]
		if j == -1 {
			k--
			continue
		}
		if j < 0 {
			return // cannot happen: a lot from period 0 covers everything
		}
		s.y[i][j] = true
		for u := j; u < k; u++ {
			s.x[i][j] += net[u]
		}
		k = j
	}
}

// sweep re-plans every item once, in seeded random order, each against
// the loads the others have at that moment (block coordinate descent over
// items), prices the resulting pattern and keeps it when it improves. Its
// cost is n dynamic programs and one flow solve, so it suits large
// instances, where one descent pass prices n·T patterns.
func (s *patternSearch) sweep() bool {
	n := len(s.y)
	keepY, keepX, keepCost := cloneB(s.y), clone(s.x), s.cost
	for _, i := range s.rng.Perm(n) {
		s.replan(i)
	}
	if c := s.price(s.y, s.x); s.better(c) || math.IsInf(keepCost, 1) && !math.IsInf(c, 1) {
		s.cost = c
		return true
	}
	copyB(s.y, keepY)
	copyF(s.x, keepX)
	s.cost = keepCost
	return false
}

// iterate is the iterated search from the current pattern: kick the best
// pattern by two to four seeded random moves (add, drop or move a setup up
// to two periods), descend, and keep the outcome when it is no worse (so
// the search walks plateaus). It ends with the best pattern current.
func (s *patternSearch) iterate(ctx context.Context) {
	n, T := len(s.y), s.p.in.Periods()
	bestY, bestX, bestCost := cloneB(s.y), clone(s.x), s.cost
	for s.work > 0 && ctx.Err() == nil {
		m := 2 + s.rng.IntN(3)
		if s.rng.IntN(2) == 0 {
			s.replan(s.rng.IntN(n))
			m = 1
		}
		for ; m > 0; m-- {
			i, t := s.rng.IntN(n), s.rng.IntN(T)
			y := s.y[i]
			if !y[t] {
				y[t] = true
				continue
			}
			y[t] = false
			if u := t + s.rng.IntN(5) - 2; s.rng.IntN(2) == 0 && u >= 0 && u < T {
				y[u] = true
			}
		}
		s.cost = s.price(s.y, s.x)
		s.descend(ctx)
		if s.cost <= bestCost {
			bestCost = s.cost
			copyB(bestY, s.y)
			copyF(bestX, s.x)
		} else {
			s.cost = bestCost
			copyB(s.y, bestY)
			copyF(s.x, bestX)
		}
	}
}

func clone(x [][]float64) [][]float64 {
	c := make([][]float64, len(x))
	for i := range x {
		c[i] = append([]float64(nil), x[i]...)
	}
	return c
}

func cloneB(y [][]bool) [][]bool {
	c := make([][]bool, len(y))
	for i := range y {
		c[i] = append([]bool(nil), y[i]...)
	}
	return c
}

func copyF(dst, src [][]float64) {
	for i := range src {
		copy(dst[i], src[i])
	}
}

func copyB(dst, src [][]bool) {
	for i := range src {
		copy(dst[i], src[i])
	}
}
