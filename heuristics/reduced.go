package heuristics

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"
)

// Pair bounds from a Lagrangian relaxation of the "every item exactly once"
// rows.
//
// With a price λ_j on item j's row, the relaxation splits into one 0-1
// knapsack per resource, K_i(λ) = min Σ_j (c_ij + λ_j) x_j subject to
// Σ_j w_ij x_j <= b_i, and L(λ) = Σ_i K_i(λ) − Σ_j λ_j bounds every plan
// (minimisation). Forcing x_ij = 1 (or 0) changes only resource i's
// knapsack, so
//
//	L(λ) − K_i(λ) + K_i(λ | x_ij fixed)
//
// bounds every plan that uses (or avoids) the pair. K_i(λ | x_ij fixed) is
// bounded from below by the linear relaxation of the fixed knapsack (the
// greedy fractional fill by profit per unit of weight, Dantzig 1957), which
// for every j at once costs one sort per resource: with the items of
// positive profit p_j = −(c_ij + λ_j) sorted by p_j/w_ij, the fill of
// capacity Q skipping item j at position r equals the fill of Q + w_ij
// minus p_j when the items before r weigh at most Q, and the fill of Q
// otherwise. Only the exact values K_h of the other resources enter the
// bound, so a K_i given too high (a heuristic value) cannot make it wrong
// for the pairs of resource i.
//
// A pair whose bound exceeds the value an improving plan must reach cannot
// be in such a plan: [Searcher.Restrict] forbids it for the searches
// (reduced-cost fixing, e.g. Fisher 1981 and, for this problem, Posta,
// Ferland & Michelon 2012).

// pairBounds keeps, per pair, the best lower bound (minimisation sense)
// seen on the plans using the pair (in) and avoiding it (out), over every
// set of prices given.
type pairBounds struct {
	in, out []float64 // [j*m+i]
	bound   float64   // best L seen
	have    bool

	// scratch
	order      []int
	pos        []int
	prof, wsum []float64 // prefix sums over order
	psum       []float64
	keys       []itemKey
}

// itemKey is an item with its profit per unit of weight, for sorting.
type itemKey struct {
	ratio float64
	j     int32
}

// AddItemPrices records the pair bounds of the Lagrangian relaxation that
// prices the "every item exactly once" rows at prices (one per item, in the
// sense of the assignment: the relaxed problem of resource i is to minimise,
// or maximise when the assignment maximises, Σ_j (Cost[i][j] + prices[j])
// x_j within its capacity). values[i] must be the exact optimum of that
// knapsack for every resource, as a block solver returns it. It returns the
// relaxation's bound L at these prices, in the assignment's sense.
//
// Bounds accumulate: each pair keeps the strongest bound over every call,
// which is valid since each call's bound is. The cost is one sort of the
// items per resource, O(m*n*log n).
func (sr *Searcher) AddItemPrices(prices, values []float64) (float64, error) {
	md := sr.base
	m, n := md.m, md.n
	if len(prices) != n || len(values) != m {
		return 0, fmt.Errorf("heuristics: %d prices and %d values, want %d and %d", len(prices), len(values), n, m)
	}
	for _, v := range prices {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("heuristics: price %v is not a finite number", v)
		}
	}
	for _, v := range values {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return 0, fmt.Errorf("heuristics: knapsack value %v is not a finite number", v)
		}
	}
	pb := sr.bounds
	if pb == nil {
		pb = &pairBounds{in: make([]float64, m*n), out: make([]float64, m*n),
			order: make([]int, 0, n), pos: make([]int, n),
			prof: make([]float64, n), wsum: make([]float64, n+1), psum: make([]float64, n+1)}
		for k := range pb.in {
			pb.in[k], pb.out[k] = math.Inf(-1), math.Inf(-1)
		}
		sr.bounds = pb
	}
	sign := sr.sign
	L := 0.0
	for _, v := range values {
		L += sign * v
	}
	for _, v := range prices {
		L -= sign * v
	}
	if !pb.have || L > pb.bound {
		pb.bound, pb.have = L, true
	}
	for i := 0; i < m; i++ {
		rest := L - sign*values[i] // L without resource i's knapsack
		pb.resource(md, i, prices, sign, rest)
	}
	return sign * L, nil
}

// resource computes the bounds of resource i's pairs.
func (pb *pairBounds) resource(md *model, i int, prices []float64, sign, rest float64) {
	m, n := md.m, md.n
	capa := md.limit[i] // a little above the capacity: only weakens the bounds
	order := pb.order[:0]
	for j := 0; j < n; j++ {
		k := j*m + i
		pb.pos[j] = -1
		c := md.cost[k]
		if c > maxFinite {
			pb.prof[j] = math.Inf(-1)
			continue
		}
		p := -(c + sign*prices[j])
		pb.prof[j] = p
		if p > 0 && md.weight[k] <= capa {
			order = append(order, j)
		}
	}
	// by profit per unit of weight, weightless items first; ties by item
	keys := pb.keys[:0]
	for _, j := range order {
		r := math.Inf(1)
		if w := md.weight[j*m+i]; w > 0 {
			r = pb.prof[j] / w
		}
		keys = append(keys, itemKey{r, int32(j)})
	}
	slices.SortFunc(keys, func(a, b itemKey) int {
		if a.ratio != b.ratio {
			if a.ratio > b.ratio {
				return -1
			}
			return 1
		}
		return cmp.Compare(a.j, b.j)
	})
	for q, e := range keys {
		order[q] = int(e.j)
	}
	pb.keys, pb.order = keys, order
	ws, ps := pb.wsum[:len(order)+1], pb.psum[:len(order)+1]
	ws[0], ps[0] = 0, 0
	for r, j := range order {
		pb.pos[j] = r
		ws[r+1] = ws[r] + md.weight[j*m+i]
		ps[r+1] = ps[r] + pb.prof[j]
	}
	// lp is the fractional fill of capacity q >= 0.
	lp := func(q float64) float64 {
		// largest r with ws[r] <= q
		r := sort.Search(len(ws), func(r int) bool { return ws[r] > q }) - 1
		v := ps[r]
		if r < len(order) {
			j := order[r]
			if w := md.weight[j*m+i]; w > 0 {
				v += (q - ws[r]) * pb.prof[j] / w
			}
		}
		return v
	}
	// without j
	lpWithout := func(j int, q float64) float64 {
		r := pb.pos[j]
		if r < 0 || ws[r] > q {
			return lp(q)
		}
		return lp(q+md.weight[j*m+i]) - pb.prof[j]
	}
	for j := 0; j < n; j++ {
		k := j*m + i
		w := md.weight[k]
		if md.cost[k] > maxFinite || w > capa {
			pb.in[k] = math.Inf(1) // no plan uses the pair
			continue
		}
		in := rest - (pb.prof[j] + lpWithout(j, capa-w))
		out := rest - lpWithout(j, capa)
		if in > pb.in[k] {
			pb.in[k] = in
		}
		if out > pb.out[k] {
			pb.out[k] = out
		}
	}
}

// PairBound returns the strongest bounds recorded by AddItemPrices on the
// value of plans that assign item j to resource i (with) and of plans that
// do not (without), in the assignment's sense (lower bounds when
// minimising, upper when maximising). Before any call, or for a pair out of
// range, both are the trivial bound (−Inf when minimising).
func (sr *Searcher) PairBound(i, j int) (with, without float64) {
	md := sr.base
	if sr.bounds == nil || i < 0 || i >= md.m || j < 0 || j >= md.n {
		return sr.sign * math.Inf(-1), sr.sign * math.Inf(-1)
	}
	k := j*md.m + i
	return sr.sign * sr.bounds.in[k], sr.sign * sr.bounds.out[k]
}

// Restrict narrows the searches of Improve and PlanSearch to the pairs
// that can still be part of a plan better than value: with step the least
// improvement that counts (1 for integral costs), a pair is forbidden when
// every plan using it is bounded (by AddItemPrices) to be worse than value
// − step, and item j is fixed to resource i when every plan avoiding the
// pair is. The pairs of incumbent (nil for none) stay allowed, so that the
// searches may start from it. Calls replace the previous restriction; with
// no bounds recorded it lifts it. It returns the number of allowed pairs
// and whether the bounds prove that no plan better than value − step exists
// (some item has no allowed pair left, counting the incumbent's as not
// allowed).
//
// An improving plan never uses a forbidden pair, so the searches lose
// nothing by ignoring them; they only spend their moves where a better plan
// can be.
//
// Restrict also ranks each item's allowed pairs by their bound, least
// first (ties to the lower resource), for the narrowed tasks of PlanSearch
// (SearchSettings.Focus).
func (sr *Searcher) Restrict(incumbent []int, value, step float64) (allowed int, proved bool) {
	md := sr.base
	m, n := md.m, md.n
	pb := sr.bounds
	if pb == nil || (incumbent != nil && len(incumbent) != n) {
		sr.active = nil
		return len(md.opt), false
	}
	t := sr.sign*value - step
	t += 1e-7 * (1 + math.Abs(t)) // rounding of the bounds
	if cap(sr.restricted) < m*n {
		sr.restricted = make([]float64, m*n)
	}
	cost := sr.restricted[:m*n]
	copy(cost, md.cost)
	if pb.bound > t {
		proved = true
	}
	for j := 0; j < n; j++ {
		fixedTo := -1
		for _, i32 := range md.allowed(j) {
			k := j*m + int(i32)
			if pb.out[k] > t {
				if fixedTo >= 0 {
					proved = true // two resources it must go to
				}
				fixedTo = int(i32)
			}
		}
		left := 0
		for _, i32 := range md.allowed(j) {
			i := int(i32)
			k := j*m + i
			if pb.in[k] > t || (fixedTo >= 0 && i != fixedTo) {
				cost[k] = math.Inf(1)
				continue
			}
			left++
		}
		if left == 0 {
			proved = true
		}
		if incumbent != nil {
			if i := incumbent[j]; i >= 0 && i < m && md.cost[j*m+i] <= maxFinite {
				cost[j*m+i] = md.cost[j*m+i]
			}
		}
	}
	rm := &model{m: m, n: n, cost: cost, weight: md.weight, limit: md.limit, opt: sr.ropt[:0], bits: sr.rbits}
	rm.index()
	sr.ropt, sr.rbits = rm.opt, rm.bits
	sr.active = rm
	// rank each item's allowed pairs by bound
	if cap(sr.ranked) < len(rm.opt) {
		sr.ranked = make([]int32, len(rm.opt))
	}
	sr.ranked = sr.ranked[:len(rm.opt)]
	for j := 0; j < n; j++ {
		keys := pb.keys[:0]
		for _, i32 := range rm.allowed(j) {
			keys = append(keys, itemKey{pb.in[j*m+int(i32)], i32})
		}
		slices.SortFunc(keys, func(a, b itemKey) int {
			if a.ratio != b.ratio {
				return cmp.Compare(a.ratio, b.ratio)
			}
			return cmp.Compare(a.j, b.j)
		})
		for q, e := range keys {
			sr.ranked[int(rm.ostart[j])+q] = e.j
		}
		pb.keys = keys
	}
	return len(rm.opt), proved
}

// narrow builds into buf the model of a narrowed task: every item keeps
// its focus allowed pairs of least bound (ranked by Restrict) and its pairs
// in the given plans. With no ranking (no Restrict since the bounds) or
// focus <= 0 it returns md itself.
func (sr *Searcher) narrow(md *model, focus int, buf *model, plans ...[]int) *model {
	if focus <= 0 || md != sr.active || len(sr.ranked) != len(md.opt) {
		return md
	}
	m, n := md.m, md.n
	if cap(buf.cost) < m*n {
		buf.cost = make([]float64, m*n)
	}
	cost := buf.cost[:m*n]
	for k := range cost {
		cost[k] = math.Inf(1)
	}
	for j := 0; j < n; j++ {
		r := sr.ranked[md.ostart[j]:md.ostart[j+1]]
		for q := 0; q < len(r) && q < focus; q++ {
			k := j*m + int(r[q])
			cost[k] = md.cost[k]
		}
		for _, p := range plans {
			if p != nil {
				k := j*m + p[j]
				cost[k] = md.cost[k]
			}
		}
	}
	*buf = model{m: m, n: n, cost: cost, weight: md.weight, limit: md.limit, opt: buf.opt[:0], bits: buf.bits}
	buf.index()
	return buf
}

// Allowed reports whether the current restriction (see Restrict) lets
// item j go to resource i.
func (sr *Searcher) Allowed(i, j int) bool {
	md := sr.model()
	if i < 0 || i >= md.m || j < 0 || j >= md.n {
		return false
	}
	return md.cost[j*md.m+i] <= maxFinite
}

// model is the model the searches work on: the restricted one if set.
func (sr *Searcher) model() *model {
	if sr.active != nil {
		return sr.active
	}
	return sr.base
}

// fits reports whether every pair of assign is allowed in md.
func (md *model) fits(assign []int) bool {
	if len(assign) != md.n {
		return false
	}
	for j, i := range assign {
		if i < 0 || i >= md.m || md.cost[j*md.m+i] > maxFinite {
			return false
		}
	}
	return true
}
