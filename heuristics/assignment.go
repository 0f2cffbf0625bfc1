package heuristics

import (
	"fmt"
	"math"
)

// Assignment is a capacitated assignment problem: every item goes to exactly
// one resource, and the items given to a resource must not use more than its
// capacity.
//
// An infinite cost (of either sign) marks a forbidden pair. NaN costs and
// negative or non-finite weights are invalid.
type Assignment struct {
	Cost     [][]float64 // [resource][item] cost (profit when Maximise); ±Inf forbids the pair
	Weight   [][]float64 // [resource][item] use of the resource's capacity, >= 0
	Capacity []float64   // [resource]
	Maximise bool        // costs are profits and the value is to be maximised
}

// Size returns the number of resources and items.
func (p *Assignment) Size() (resources, items int) {
	resources = len(p.Capacity)
	if resources > 0 && len(p.Cost) > 0 {
		items = len(p.Cost[0])
	}
	return resources, items
}

// Validate reports whether the matrices are well formed.
func (p *Assignment) Validate() error {
	m, n := p.Size()
	if len(p.Cost) != m || len(p.Weight) != m {
		return fmt.Errorf("heuristics: %d capacities but %d cost rows and %d weight rows", m, len(p.Cost), len(p.Weight))
	}
	for i := 0; i < m; i++ {
		if len(p.Cost[i]) != n || len(p.Weight[i]) != n {
			return fmt.Errorf("heuristics: resource %d: %d costs and %d weights, want %d of each", i, len(p.Cost[i]), len(p.Weight[i]), n)
		}
		if c := p.Capacity[i]; math.IsNaN(c) {
			return fmt.Errorf("heuristics: resource %d: capacity is NaN", i)
		}
		for j := 0; j < n; j++ {
			if math.IsNaN(p.Cost[i][j]) {
				return fmt.Errorf("heuristics: resource %d, item %d: cost is NaN", i, j)
			}
			if w := p.Weight[i][j]; !(w >= 0) || math.IsInf(w, 1) {
				return fmt.Errorf("heuristics: resource %d, item %d: weight %v, want a finite number >= 0", i, j, w)
			}
		}
	}
	return nil
}

// Evaluate returns the value of a complete assignment (assign[j] = resource
// of item j) and whether it is feasible: every item placed on an allowed pair
// and no capacity exceeded (up to a relative tolerance of 1e-9). The value is
// only meaningful when the assignment is feasible.
func (p *Assignment) Evaluate(assign []int) (value float64, feasible bool) {
	m, n := p.Size()
	if len(assign) != n || len(p.Cost) != m || len(p.Weight) != m {
		return math.NaN(), false
	}
	load := make([]float64, m)
	feasible = true
	for j, i := range assign {
		if i < 0 || i >= m || len(p.Cost[i]) != n || len(p.Weight[i]) != n {
			return math.NaN(), false
		}
		c := p.Cost[i][j]
		if math.IsInf(c, 0) || math.IsNaN(c) {
			feasible = false
		}
		value += c
		load[i] += p.Weight[i][j]
	}
	for i, l := range load {
		if l > p.Capacity[i]+tolerance(p.Capacity[i]) {
			feasible = false
		}
	}
	return value, feasible
}

// worst is the value reported when no feasible assignment is known.
func (p *Assignment) worst() float64 {
	if p.Maximise {
		return math.Inf(-1)
	}
	return math.Inf(1)
}

func tolerance(capacity float64) float64 {
	return 1e-9 * (1 + math.Abs(capacity))
}

// model is the flat, minimisation-sense form of an Assignment that the
// searches work on.
type model struct {
	m, n   int
	cost   []float64 // [j*m+i] item-major, minimisation sense, +Inf forbidden
	weight []float64 // [j*m+i]
	limit  []float64 // m, capacity plus tolerance
	// opt[ostart[j]:ostart[j+1]] lists, ascending, the resources item j
	// may go to (finite cost); the moves loop over these lists only.
	opt    []int32
	ostart []int32
	// bits[j*words:(j+1)*words] is the set of item j's allowed resources,
	// for the membership tests of the swap moves (a look-up in this small
	// array instead of the cost array, which is 64 times larger and missed
	// the cache on the 1600-item files)
	bits  []uint64
	words int
}

// may reports whether item j may go to resource i.
func (md *model) may(j, i int) bool { return hasBit(md.bits[j*md.words:], i) }

// allowed lists the resources item j may go to, ascending.
func (md *model) allowed(j int) []int32 { return md.opt[md.ostart[j]:md.ostart[j+1]] }

// index builds the allowed lists from the costs.
func (md *model) index() {
	md.ostart = make([]int32, md.n+1)
	md.opt = md.opt[:0]
	md.words = (md.m + 63) / 64
	if cap(md.bits) < md.n*md.words {
		md.bits = make([]uint64, md.n*md.words)
	}
	md.bits = md.bits[:md.n*md.words]
	clear(md.bits)
	for j := 0; j < md.n; j++ {
		for i := 0; i < md.m; i++ {
			if md.cost[j*md.m+i] <= maxFinite {
				md.opt = append(md.opt, int32(i))
				setBit(md.bits[j*md.words:], i)
			}
		}
		md.ostart[j+1] = int32(len(md.opt))
	}
}

// compile flattens p, which must be valid.
func compile(p *Assignment) *model {
	m, n := p.Size()
	md := &model{
		m: m, n: n,
		cost:   make([]float64, m*n),
		weight: make([]float64, m*n),
		limit:  make([]float64, m),
	}
	sign := 1.0
	if p.Maximise {
		sign = -1
	}
	for i := 0; i < m; i++ {
		md.limit[i] = p.Capacity[i] + tolerance(p.Capacity[i])
		for j := 0; j < n; j++ {
			k := j*m + i
			md.weight[k] = p.Weight[i][j]
			if c := p.Cost[i][j]; math.IsInf(c, 0) {
				md.cost[k] = math.Inf(1)
			} else {
				md.cost[k] = sign * c
			}
		}
	}
	md.index()
	return md
}

// withPriced returns a model sharing base's weights and limits whose costs
// are the priced ones (in the sense of the assignment; sign -1 when it
// maximises) on allowed pairs, base's costs where priced is not finite. It
// reuses buf when it is large enough.
func withPriced(base *model, priced [][]float64, sign float64, buf []float64) (*model, error) {
	m, n := base.m, base.n
	if len(priced) != m {
		return nil, fmt.Errorf("heuristics: %d priced rows, want %d", len(priced), m)
	}
	for i := range priced {
		if len(priced[i]) != n {
			return nil, fmt.Errorf("heuristics: priced row %d has %d entries, want %d", i, len(priced[i]), n)
		}
	}
	if cap(buf) < m*n {
		buf = make([]float64, m*n)
	}
	md := &model{m: m, n: n, cost: buf[:m*n], weight: base.weight, limit: base.limit, opt: base.opt, ostart: base.ostart, bits: base.bits, words: base.words}
	for i := 0; i < m; i++ {
		row := priced[i]
		for j := 0; j < n; j++ {
			k := j*m + i
			c, q := base.cost[k], row[j]
			if c <= maxFinite && !math.IsInf(q, 0) && !math.IsNaN(q) {
				c = sign * q
			}
			md.cost[k] = c
		}
	}
	return md, nil
}
