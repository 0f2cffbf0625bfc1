package decomp

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
)

// BoxstepMaxRows is the most coupling rows Boxstep takes. Its master LP
// grows with the rows and the cuts kept, and a dense simplex solve costs
// about (rows + cuts)⁴. Measured on the choice relaxation of the type D
// assignment instances (4 s runs, 2 cores): with 5 rows (d05100) boxstep
// reaches the dual optimum in 61 rounds where the subgradient rule is
// still 1e-6 short after 1400; with 20 rows (d20200) the two end level;
// with 40 rows (d401600) boxstep's bound is 20 % short and with 80 rows
// it manages 23 rounds. Past 30 rows it does not pay off.
const BoxstepMaxRows = 30

// Boxstep is a stabilised cutting-plane rule for problems with few
// coupling rows: the boxstep method of Marsten, Hogan & Blankenship
// (1975). Every round adds a cut of L (its value and projected
// subgradient, an outer model of L over sign-valid prices); the next prices
// maximise that model (minimise, when maximising) within a box of half-width
// Δ around the prices of the best bound, by a small LP solved with gonum's
// simplex. The box keeps steps short where the model is poor: it doubles
// when a better bound is found on its edge and halves after Patience rounds
// without a better bound. When the model's optimum inside the box is the
// best bound itself, no better prices exist (L is concave): the rule ends
// the run with Status MethodStopped.
//
// The zero value keeps the newest rows+10 cuts (at least 12, at most 60)
// and uses Patience = 4.
type Boxstep struct {
	Cuts     int // cuts kept (newest first); <= 0 means rows+10, within 12..60
	Patience int // rounds without a better bound before halving Δ; <= 0 means 4

	rows  int
	delta float64
	idle  int
	cut   []boxCut
}

type boxCut struct {
	value  float64   // dir·L at at
	at     []float64 // prices
	slope  []float64 // dir·subgradient
	offset float64   // value − slope·at, cached
}

// Init implements Method.
func (m *Boxstep) Init(_ Sense, rows []Row) {
	m.rows, m.delta, m.idle, m.cut = len(rows), 0, 0, nil
}

// Update implements Method.
func (m *Boxstep) Update(s *RoundState, prices []float64) (Step, error) {
	if m.rows > BoxstepMaxRows {
		return Step{}, fmt.Errorf("boxstep: %d coupling rows; this rule takes at most %d (use the subgradient rule)", m.rows, BoxstepMaxRows)
	}
	keep := m.Cuts
	if keep <= 0 {
		// The dense simplex costs about (rows + cuts)⁴ a solve: keep
		// the model small where rows are many.
		keep = min(60, max(12, m.rows+10))
	}
	patience := cmpOr(m.Patience, 4)
	dir := direction(s.Sense)
	c := boxCut{value: dir * s.Value, at: append([]float64(nil), prices...), slope: make([]float64, len(prices))}
	for r, g := range s.Subgradient {
		c.slope[r] = dir * g
	}
	c.offset = c.value - dot(c.slope, c.at)
	m.cut = append(m.cut, c)
	if len(m.cut) > keep {
		m.cut = append(m.cut[:0], m.cut[len(m.cut)-keep:]...)
	}
	center := s.BestPrices
	norm2 := dot(s.Subgradient, s.Subgradient)
	if m.delta == 0 {
		if norm2 == 0 {
			return Step{}, nil
		}
		// The first box: as far as one Polyak step would move a price.
		t := math.Abs(s.Target-s.Value) / norm2
		for _, g := range s.Subgradient {
			m.delta = math.Max(m.delta, t*math.Abs(g))
		}
		if !(m.delta > 0) || math.IsInf(m.delta, 0) {
			m.delta = 1
		}
	} else if s.Improved {
		m.idle = 0
		if onEdge(prices, s.BestPrices, m.delta) {
			m.delta *= 2
		}
	} else if m.idle++; m.idle >= patience {
		m.delta /= 2
		m.idle = 0
	}
	lo := make([]float64, m.rows)
	hi := make([]float64, m.rows)
	for r := range lo {
		lo[r], hi[r] = center[r]-m.delta, center[r]+m.delta
		switch PriceSign(s.Sense, s.Rows[r].Sense) {
		case 1:
			lo[r] = math.Max(lo[r], 0)
		case -1:
			hi[r] = math.Min(hi[r], 0)
		}
	}
	next, model, err := m.master(lo, hi)
	if err != nil {
		// The LP failed (numerically): take a plain Polyak step instead.
		if norm2 == 0 {
			return Step{}, nil
		}
		t := math.Abs(s.Target-s.Value) / norm2
		for r, g := range s.Subgradient {
			prices[r] += dir * t * g
		}
		return Step{Length: t}, nil
	}
	best := dir * s.Bound
	// The box surrounds the best prices within the sign-valid region and
	// the model lies above L there, so a model optimum no better than the
	// best bound makes those prices a local, hence (L being concave) a
	// global optimum of the dual.
	if model-best <= 1e-9*math.Max(1, math.Abs(best)) {
		copy(prices, center)
		return Step{Stop: true, Reason: "the cutting-plane model shows no better prices near the best bound (the dual is solved)"}, nil
	}
	length := 0.0
	for r := range prices {
		length = math.Max(length, math.Abs(next[r]-center[r]))
		prices[r] = next[r]
	}
	return Step{Length: length}, nil
}

// onEdge reports whether p lies on the edge of the box of half-width
// delta around c.
func onEdge(p, c []float64, delta float64) bool {
	for r := range p {
		if math.Abs(p[r]-c[r]) >= delta*(1-1e-6) {
			return true
		}
	}
	return false
}

// master maximises the cut model v <= offset_k + slope_k·λ over the box
// lo <= λ <= hi, in the standard form lp.Simplex takes: λ = lo + y with
// 0 <= y, y + s = hi − lo; v = v⁺ − v⁻; one slack per cut.
func (m *Boxstep) master(lo, hi []float64) ([]float64, float64, error) {
	n, k := m.rows, len(m.cut)
	cols := 2*n + 2 + k
	a := mat.NewDense(n+k, cols, nil)
	b := make([]float64, n+k)
	c := make([]float64, cols)
	vp, vn := 2*n, 2*n+1
	c[vp], c[vn] = -1, 1
	for r := 0; r < n; r++ {
		a.Set(r, r, 1)
		a.Set(r, n+r, 1)
		b[r] = hi[r] - lo[r]
	}
	for q, cut := range m.cut {
		row := n + q
		// v − slope·y + t = offset + slope·lo
		rhs := cut.offset + dot(cut.slope, lo)
		sign := 1.0
		if rhs < 0 {
			sign = -1
		}
		for r := 0; r < n; r++ {
			if cut.slope[r] != 0 {
				a.Set(row, r, -sign*cut.slope[r])
			}
		}
		a.Set(row, vp, sign)
		a.Set(row, vn, -sign)
		a.Set(row, 2*n+2+q, sign)
		b[row] = sign * rhs
	}
	opt, x, err := lp.Simplex(c, a, b, 1e-10, nil)
	if err != nil {
		return nil, 0, fmt.Errorf("boxstep master: %w", err)
	}
	next := make([]float64, n)
	for r := range next {
		next[r] = lo[r] + x[r]
		if math.IsNaN(next[r]) || math.IsInf(next[r], 0) {
			return nil, 0, errors.New("boxstep master: non-finite prices")
		}
	}
	return next, -opt, nil
}

const boxstepStateTag = "boxstep1"

// MarshalState implements StatefulMethod: Δ, the idle count and the cuts.
func (m *Boxstep) MarshalState() ([]byte, error) {
	b := append([]byte(nil), boxstepStateTag...)
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(m.delta))
	b = binary.LittleEndian.AppendUint64(b, uint64(m.idle))
	b = binary.LittleEndian.AppendUint64(b, uint64(len(m.cut)))
	for _, c := range m.cut {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(c.value))
		b = appendFloats(b, c.at)
		b = appendFloats(b, c.slope)
	}
	return b, nil
}

// UnmarshalState implements StatefulMethod.
func (m *Boxstep) UnmarshalState(data []byte) error {
	rest, ok := cutTag(data, boxstepStateTag)
	if !ok || len(rest) < 24 {
		return errors.New("decomp: not a boxstep rule's state")
	}
	delta := math.Float64frombits(binary.LittleEndian.Uint64(rest))
	idle := binary.LittleEndian.Uint64(rest[8:])
	k := binary.LittleEndian.Uint64(rest[16:])
	per := uint64(8 + 16*m.rows)
	if delta < 0 || math.IsNaN(delta) || math.IsInf(delta, 0) || idle > math.MaxInt32 || k > 1<<20 || uint64(len(rest)-24) != k*per {
		return errors.New("decomp: boxstep state does not fit this problem")
	}
	cuts := make([]boxCut, k)
	off := 24
	for q := range cuts {
		c := boxCut{value: math.Float64frombits(binary.LittleEndian.Uint64(rest[off:])), at: make([]float64, m.rows), slope: make([]float64, m.rows)}
		off += 8
		if err := readFloats(rest[off:], c.at); err != nil {
			return err
		}
		off += 8 * m.rows
		if err := readFloats(rest[off:], c.slope); err != nil {
			return err
		}
		off += 8 * m.rows
		if math.IsNaN(c.value) || math.IsInf(c.value, 0) {
			return errors.New("decomp: boxstep state holds a non-finite cut")
		}
		c.offset = c.value - dot(c.slope, c.at)
		cuts[q] = c
	}
	m.delta, m.idle, m.cut = delta, int(idle), cuts
	return nil
}
