package decomp

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"sort"
)

// Every rule here moves prices by a step along a direction and leaves the
// projection onto valid signs to the engine, so any step keeps the bound
// valid: the bound is L at sign-valid prices, whatever rule chose them.

// projectDirection zeroes the components of d that would push a price
// already at zero out of its valid sign (dir is +1 when minimising, −1
// when maximising: the sign of the price move along d).
func projectDirection(sense Sense, rows []Row, prices, d []float64, dir float64) {
	for r := range rows {
		sign := float64(PriceSign(sense, rows[r].Sense))
		if sign != 0 && prices[r] == 0 && sign*dir*d[r] < 0 {
			d[r] = 0
		}
	}
}

func dot(a, b []float64) float64 {
	s := 0.0
	for i := range a {
		s += a[i] * b[i]
	}
	return s
}

func direction(s Sense) float64 {
	if s == Maximise {
		return -1
	}
	return 1
}

// Deflected is the subgradient rule with a deflected direction
//
//	d_k = g_k + β_k d_{k−1},  β_k = −γ g_kᵀd_{k−1} / ||d_{k−1}||² when that is positive, else 0
//
// (Camerini, Fratta & Maffioli 1975, with their γ = 1.5), which damps the
// zig-zag of plain subgradient steps, and a Polyak-type step
// t = θ·|target − L| / ||d_k||² whose θ is halved after Patience rounds
// without a better bound, as in [Subgradient]. The zero value uses θ = 1,
// Patience = 20 and γ = 1.5.
type Deflected struct {
	Theta    float64 // starting θ; <= 0 means 1
	Patience int     // non-improving rounds before halving θ; <= 0 means 20
	MinTheta float64 // θ never drops below this; <= 0 means 1e-6
	Gamma    float64 // deflection factor in (0, 2]; <= 0 means 1.5

	theta float64
	idle  int
	prev  []float64 // d_{k−1}: the move the prices made, per unit step
	last  []float64 // the prices the last step started from
	tLast float64   // the last step length, 0 when none
	d     []float64
}

// Init implements Method.
func (m *Deflected) Init(_ Sense, rows []Row) {
	m.theta = m.Theta
	if m.theta <= 0 {
		m.theta = 1
	}
	m.idle = 0
	m.prev = make([]float64, len(rows))
	m.last = make([]float64, len(rows))
	m.tLast = 0
	m.d = make([]float64, len(rows))
}

// Update implements Method.
func (m *Deflected) Update(s *RoundState, prices []float64) (Step, error) {
	patience := cmpOr(m.Patience, 20)
	minTheta := m.MinTheta
	if minTheta <= 0 {
		minTheta = 1e-6
	}
	gamma := m.Gamma
	if gamma <= 0 {
		gamma = 1.5
	}
	if gamma > 2 {
		return Step{}, fmt.Errorf("deflected subgradient: γ = %v, want at most 2", gamma)
	}
	if s.Improved {
		m.idle = 0
	} else if m.idle++; m.idle >= patience {
		m.theta = math.Max(m.theta/2, minTheta)
		m.idle = 0
	}
	g := s.Subgradient
	// The direction the prices really moved, after the engine's
	// projection onto valid signs, is what deflection must remember.
	if m.tLast > 0 {
		for r := range m.prev {
			m.prev[r] = (prices[r] - m.last[r]) / m.tLast
		}
	}
	beta := 0.0
	if pn := dot(m.prev, m.prev); pn > 0 {
		if gd := dot(g, m.prev); gd < 0 {
			beta = -gamma * gd / pn
		}
	}
	for r := range m.d {
		m.d[r] = g[r] + beta*m.prev[r]
	}
	dir := direction(s.Sense)
	projectDirection(s.Sense, s.Rows, prices, m.d, dir)
	norm2 := dot(m.d, m.d)
	if norm2 == 0 {
		clear(m.prev)
		m.tLast = 0
		return Step{}, nil
	}
	t := m.theta * math.Abs(s.Target-s.Value) / norm2
	copy(m.last, prices)
	for r, d := range m.d {
		prices[r] += dir * t * d
	}
	m.tLast = dir * t
	return Step{Length: t}, nil
}

// deflectedStateTag marks the state layout. Layout 1 lacked the last
// step (its start and length), so a resumed run remembered the move
// before last and drifted from the uninterrupted one; it is refused.
const deflectedStateTag = "deflect2"

// MarshalState implements StatefulMethod: θ, the idle count, the last
// direction and the last step (the prices it started from and its
// length), from which the next round measures the move the prices made.
func (m *Deflected) MarshalState() ([]byte, error) {
	b := append([]byte(nil), deflectedStateTag...)
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(m.theta))
	b = binary.LittleEndian.AppendUint64(b, uint64(m.idle))
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(m.tLast))
	b = appendFloats(b, m.prev)
	return appendFloats(b, m.last), nil
}

// UnmarshalState implements StatefulMethod.
func (m *Deflected) UnmarshalState(data []byte) error {
	rest, ok := cutTag(data, deflectedStateTag)
	if !ok || len(rest) != 24+16*len(m.prev) {
		return errors.New("decomp: not a deflected subgradient rule's state for this problem (or one of an older layout)")
	}
	theta := math.Float64frombits(binary.LittleEndian.Uint64(rest))
	idle := binary.LittleEndian.Uint64(rest[8:])
	tLast := math.Float64frombits(binary.LittleEndian.Uint64(rest[16:]))
	if !(theta > 0) || math.IsInf(theta, 0) || idle > math.MaxInt32 || math.IsNaN(tLast) || math.IsInf(tLast, 0) {
		return fmt.Errorf("decomp: deflected subgradient state out of range (θ %v, idle %d, last step %v)", theta, idle, tLast)
	}
	n := 8 * len(m.prev)
	if err := readFloats(rest[24:24+n], m.prev); err != nil {
		return err
	}
	if err := readFloats(rest[24+n:], m.last); err != nil {
		return err
	}
	m.theta, m.idle, m.tLast = theta, int(idle), tLast
	return nil
}

// PrimalAverager is a price rule that builds an approximate primal
// (fractional) solution as it goes, such as [Volume]. The engine hands a
// copy to every repair (RepairInput.Primal).
type PrimalAverager interface {
	// AveragePrimal returns a fresh copy of the averaged block primal
	// answers, per block in block order, or nil before the first round.
	AveragePrimal() [][]Entry
}

// Volume is the volume algorithm of Barahona & Anbil (2000). Besides the
// prices it keeps a running average ū of the blocks' summed row use,
// ū ← α·u + (1 − α)·ū, which approximates the use of a primal (fractional)
// optimum. Trial prices are taken from the best prices π̄ along ū − rhs:
//
//	π = π̄ + f·|target − L(π̄)| / ||ū − rhs||² · (ū − rhs)
//
// and π̄ moves to π only when π gives a better bound. The step factor f
// follows the paper's colour rule (constants from memory): a round that
// improves the bound and still ascends along the new subgradient is green
// and raises f by 10 % (at most 2); Patience red rounds in a row (no
// improvement) shrink it by a third. α is the value in [AlphaMin, α_max]
// that makes α·g + (1 − α)·(ū − rhs) shortest, α_max = 0.1 halved with f's
// shrinks. The zero value uses f = 0.1 and Patience = 20.
type Volume struct {
	Factor   float64 // starting step factor f; <= 0 means 0.1
	Patience int     // red rounds in a row before shrinking f; <= 0 means 20
	AlphaMin float64 // smallest averaging weight; <= 0 means 1e-3

	f, alphaMax float64
	red         int
	started     bool
	avg         []float64 // ū − rhs
	g           []float64
	primal      [][]Entry // x̄ per block, sorted by variable
	merge       []Entry
}

// primalFloor drops averaged primal values below it, keeping x̄ sparse.
const primalFloor = 1e-6

// averagePrimal folds this round's block answers into x̄ with weight α.
func (m *Volume) averagePrimal(answers []Answer, alpha float64) {
	if len(m.primal) != len(answers) {
		m.primal = make([][]Entry, len(answers))
		alpha = 1
	}
	for k, a := range answers {
		cur := a.Primal
		sorted := true
		for i := 1; i < len(cur); i++ {
			if cur[i].Index <= cur[i-1].Index {
				sorted = false
				break
			}
		}
		if !sorted {
			cur = append([]Entry(nil), cur...)
			sort.Slice(cur, func(i, j int) bool { return cur[i].Index < cur[j].Index })
		}
		old := m.primal[k]
		m.merge = m.merge[:0]
		i, j := 0, 0
		for i < len(old) || j < len(cur) {
			var e Entry
			switch {
			case j == len(cur) || (i < len(old) && old[i].Index < cur[j].Index):
				e = Entry{Index: old[i].Index, Value: (1 - alpha) * old[i].Value}
				i++
			case i == len(old) || cur[j].Index < old[i].Index:
				e = Entry{Index: cur[j].Index, Value: alpha * cur[j].Value}
				j++
			default:
				e = Entry{Index: cur[j].Index, Value: alpha*cur[j].Value + (1-alpha)*old[i].Value}
				i++
				j++
			}
			if math.Abs(e.Value) >= primalFloor {
				m.merge = append(m.merge, e)
			}
		}
		m.primal[k] = append(old[:0], m.merge...)
	}
}

// AveragePrimal implements PrimalAverager: x̄, averaged with the same
// weights as ū.
func (m *Volume) AveragePrimal() [][]Entry {
	if m.primal == nil {
		return nil
	}
	n := 0
	for _, p := range m.primal {
		n += len(p)
	}
	slab := make([]Entry, 0, n) // one allocation for every block's copy
	out := make([][]Entry, len(m.primal))
	for k, p := range m.primal {
		start := len(slab)
		slab = append(slab, p...)
		out[k] = slab[start:len(slab):len(slab)]
	}
	return out
}

// Init implements Method.
func (m *Volume) Init(_ Sense, rows []Row) {
	m.f = m.Factor
	if m.f <= 0 {
		m.f = 0.1
	}
	m.alphaMax, m.red, m.started, m.primal = 0.1, 0, false, nil
	m.avg = make([]float64, len(rows))
	m.g = make([]float64, len(rows))
}

// AverageViolation returns ū − rhs, the running average of the blocks'
// summed use minus the right-hand sides: the row violation of the
// approximate primal solution the rule builds (near zero or of the valid
// sign on every row when the prices are near optimal).
func (m *Volume) AverageViolation() []float64 { return append([]float64(nil), m.avg...) }

// Update implements Method.
func (m *Volume) Update(s *RoundState, prices []float64) (Step, error) {
	patience := cmpOr(m.Patience, 20)
	alphaMin := m.AlphaMin
	if alphaMin <= 0 {
		alphaMin = 1e-3
	}
	// The round's own violation, unprojected: u − rhs.
	for r := range m.g {
		m.g[r] = -s.Rows[r].RHS
	}
	for _, a := range s.Answers {
		for _, e := range a.Use {
			m.g[e.Index] += e.Value
		}
	}
	dir := direction(s.Sense)
	if !m.started {
		copy(m.avg, m.g)
		m.averagePrimal(s.Answers, 1)
		m.started = true
	} else {
		// Colour of the round just evaluated (its prices were the trial).
		if s.Improved {
			m.red = 0
			if dir*dot(m.g, m.avg) > 0 {
				m.f = math.Min(1.1*m.f, 2)
			}
		} else if m.red++; m.red >= patience {
			m.f *= 0.66
			m.alphaMax = math.Max(m.alphaMax/2, alphaMin)
			m.red = 0
		}
		// α minimising ||α g + (1−α) v||, clipped to [αmin, αmax].
		diff2 := 0.0
		vd := 0.0
		for r := range m.g {
			d := m.g[r] - m.avg[r]
			diff2 += d * d
			vd += m.avg[r] * d
		}
		alpha := m.alphaMax
		if diff2 > 0 {
			alpha = math.Min(m.alphaMax, math.Max(alphaMin, -vd/diff2))
		}
		for r := range m.avg {
			m.avg[r] = alpha*m.g[r] + (1-alpha)*m.avg[r]
		}
		m.averagePrimal(s.Answers, alpha)
	}
	copy(prices, s.BestPrices)
	copy(m.g, m.avg)
	projectDirection(s.Sense, s.Rows, prices, m.g, dir)
	norm2 := dot(m.g, m.g)
	if norm2 == 0 {
		return Step{}, nil
	}
	t := m.f * math.Abs(s.Target-s.Bound) / norm2
	for r, d := range m.g {
		prices[r] += dir * t * d
	}
	return Step{Length: t}, nil
}

const volumeStateTag = "volume02"

// MarshalState implements StatefulMethod.
func (m *Volume) MarshalState() ([]byte, error) {
	b := append([]byte(nil), volumeStateTag...)
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(m.f))
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(m.alphaMax))
	b = binary.LittleEndian.AppendUint64(b, uint64(m.red))
	started := uint64(0)
	if m.started {
		started = 1
	}
	b = binary.LittleEndian.AppendUint64(b, started)
	b = appendFloats(b, m.avg)
	b = binary.LittleEndian.AppendUint64(b, uint64(len(m.primal)))
	for _, p := range m.primal {
		b = binary.LittleEndian.AppendUint64(b, uint64(len(p)))
		for _, e := range p {
			b = binary.LittleEndian.AppendUint64(b, uint64(e.Index))
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(e.Value))
		}
	}
	return b, nil
}

// UnmarshalState implements StatefulMethod.
func (m *Volume) UnmarshalState(data []byte) error {
	rest, ok := cutTag(data, volumeStateTag)
	fixed := 32 + 8*len(m.avg)
	if !ok || len(rest) < fixed+8 {
		return errors.New("decomp: not a volume rule's state for this problem")
	}
	f := math.Float64frombits(binary.LittleEndian.Uint64(rest))
	amax := math.Float64frombits(binary.LittleEndian.Uint64(rest[8:]))
	red := binary.LittleEndian.Uint64(rest[16:])
	started := binary.LittleEndian.Uint64(rest[24:])
	if !(f > 0) || math.IsInf(f, 0) || !(amax > 0) || amax > 1 || red > math.MaxInt32 || started > 1 {
		return fmt.Errorf("decomp: volume state out of range (f %v, α max %v)", f, amax)
	}
	if err := readFloats(rest[32:fixed], m.avg); err != nil {
		return err
	}
	rest = rest[fixed:]
	nb := binary.LittleEndian.Uint64(rest)
	rest = rest[8:]
	if nb > uint64(len(rest))/8 {
		return errors.New("decomp: volume state truncated")
	}
	var primal [][]Entry
	if nb > 0 {
		primal = make([][]Entry, nb)
	}
	for k := range primal {
		if len(rest) < 8 {
			return errors.New("decomp: volume state truncated")
		}
		n := binary.LittleEndian.Uint64(rest)
		rest = rest[8:]
		if n > uint64(len(rest))/16 {
			return errors.New("decomp: volume state truncated")
		}
		p := make([]Entry, n)
		for i := range p {
			idx := binary.LittleEndian.Uint64(rest)
			v := math.Float64frombits(binary.LittleEndian.Uint64(rest[8:]))
			rest = rest[16:]
			if idx > math.MaxInt32 || math.IsNaN(v) || math.IsInf(v, 0) {
				return errors.New("decomp: volume state holds a bad primal entry")
			}
			p[i] = Entry{Index: int(idx), Value: v}
		}
		primal[k] = p
	}
	if len(rest) != 0 {
		return errors.New("decomp: volume state has trailing bytes")
	}
	m.f, m.alphaMax, m.red, m.started, m.primal = f, amax, int(red), started == 1, primal
	return nil
}

func cmpOr(v, def int) int {
	if v <= 0 {
		return def
	}
	return v
}

func cutTag(data []byte, tag string) ([]byte, bool) {
	if len(data) < len(tag) || string(data[:len(tag)]) != tag {
		return nil, false
	}
	return data[len(tag):], true
}

func appendFloats(b []byte, v []float64) []byte {
	for _, x := range v {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(x))
	}
	return b
}

func readFloats(data []byte, into []float64) error {
	for i := range into {
		x := math.Float64frombits(binary.LittleEndian.Uint64(data[8*i:]))
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("decomp: rule state holds a non-finite number at %d", i)
		}
		into[i] = x
	}
	return nil
}

// Rules lists the names NewMethod accepts; the first is the default.
func Rules() []string { return []string{"subgradient", "deflected", "volume", "boxstep"} }

// NewMethod returns a fresh price-update rule by name (see Rules):
// "subgradient" ([Subgradient]), "deflected" ([Deflected]), "volume"
// ([Volume]) or "boxstep" ([Boxstep], for few coupling rows), each with
// its zero-value settings.
func NewMethod(name string) (Method, error) {
	switch name {
	case "subgradient", "":
		return &Subgradient{}, nil
	case "deflected":
		return &Deflected{}, nil
	case "volume":
		return &Volume{}, nil
	case "boxstep":
		return &Boxstep{}, nil
	}
	return nil, fmt.Errorf("decomp: unknown price rule %q (want one of %v)", name, Rules())
}
