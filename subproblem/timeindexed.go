package subproblem

import (
	"context"
	"errors"
	"fmt"
	"math"

	"pincer/decomp"
)

// SlotLayout is the row layout of time-indexed capacity rows: class k has
// Horizons[k] slots, and slot t of class k is coupling row Offsets[k]+t.
// Blocks share one layout and never modify it.
type SlotLayout struct {
	Offsets  []int
	Horizons []int
}

// Rows is the number of slot rows of the layout.
func (l *SlotLayout) Rows() int {
	n := 0
	for _, h := range l.Horizons {
		n += h
	}
	return n
}

// validate checks the layout's shape.
func (l *SlotLayout) validate() error {
	if l == nil || len(l.Offsets) != len(l.Horizons) || len(l.Horizons) == 0 {
		return errors.New("slot layout: want one offset per class and at least one class")
	}
	for k, h := range l.Horizons {
		if h < 0 || l.Offsets[k] < 0 {
			return fmt.Errorf("slot layout: class %d has offset %d and horizon %d", k, l.Offsets[k], h)
		}
	}
	return nil
}

// SlotPrefix holds, per class of a layout, the prefix sums of the slot
// prices of one evaluation: Sums(k)[t] = Σ_{u<t} λ_{k,u}, so the price of
// occupying slots s..e−1 of class k is Sums(k)[e] − Sums(k)[s]. It is
// computed once per evaluation (see NewSlotPrefix, meant for
// decomp.Problem.Share) and read by every TimeIndexed block of the round.
type SlotPrefix struct {
	layout *SlotLayout
	sums   []float64 // class k's sums start at Offsets[k] + k
	nonNeg []bool    // every price of class k is >= 0
}

// NewSlotPrefix computes the per-class prefix sums of prices (indexed like
// the problem's rows) for layout. It is O(rows).
func NewSlotPrefix(prices []float64, layout *SlotLayout) (*SlotPrefix, error) {
	if err := layout.validate(); err != nil {
		return nil, err
	}
	sp := &SlotPrefix{layout: layout, nonNeg: make([]bool, len(layout.Horizons))}
	size := 0
	for k, h := range layout.Horizons {
		if end := layout.Offsets[k] + h; end > len(prices) {
			return nil, fmt.Errorf("slot prefix: class %d needs rows up to %d, have %d prices", k, end, len(prices))
		}
		size = max(size, layout.Offsets[k]+k+h+1)
	}
	sp.sums = make([]float64, size)
	for k, h := range layout.Horizons {
		base, off := layout.Offsets[k]+k, layout.Offsets[k]
		s, ok := 0.0, true
		sp.sums[base] = 0
		for t := 0; t < h; t++ {
			x := prices[off+t]
			if math.IsNaN(x) || math.IsInf(x, 0) {
				return nil, fmt.Errorf("slot prefix: price %v of class %d slot %d is not finite", x, k, t)
			}
			ok = ok && x >= 0
			s += x
			sp.sums[base+t+1] = s
		}
		sp.nonNeg[k] = ok
	}
	return sp, nil
}

// Sums returns class k's prefix sums (Horizons[k]+1 values, read-only).
func (sp *SlotPrefix) Sums(k int) []float64 {
	base := sp.layout.Offsets[k] + k
	return sp.sums[base : base+sp.layout.Horizons[k]+1 : base+sp.layout.Horizons[k]+1]
}

// TimeIndexed is the block of one job in a time-indexed machine-class
// model: the job chooses one class k among Classes and one start s with
// Release <= s and s+Processing <= Horizons[k], minimising its own cost
// f(C) = Flow·C + Tardy·max(0, C − Due) at completion C = s+Processing
// plus the slot prices Σ_{t=s}^{s+Processing−1} λ_{k,t}. Flow and Tardy
// are at least 0 (weighted completion time: Flow = w, Tardy = 0; weighted
// tardiness: Flow = 0, Tardy = w), so f never falls as C grows.
//
// Solve scans every allowed start of every allowed class once, reading the
// price of a start from the round's prefix sums (req.Shared() as built by
// NewSlotPrefix; without them the block sums the prices itself), so it is
// exact and O(H) per class. When a class's prices are all >= 0 the scan of
// that class stops at the first start whose own cost alone reaches the
// best priced value found, since no later start can do better. Ties go to
// the lowest class, then the earliest start. The sense must be Minimise
// and the rows LessEqual (capacity m_k per slot); the block uses each slot
// it occupies by 1.
//
// Variables (K = len(Layout.Horizons)):
//
//   - variable k, 0 <= k < K: 1 when the job runs on class k (binary);
//   - variable K: the start time s (integer);
//   - variable K+1+t, t >= 0: 1 when the job starts before t, i.e. s < t
//     (binary). Fixing it to 0 means "not before t", to 1 "not after t−1".
//
// Answer.Primal lists the class variable (value 1) and, when s > 0, the
// start variable (value s); the before-t indicators follow from s and are
// not listed. Fixings use the same numbering; when no class and start
// honour them (a class fixed to 1 that is not eligible, two classes fixed
// to 1, a start outside every horizon, a binary fixed to a value other
// than 0 or 1, an empty window) Solve returns an error wrapping
// decomp.ErrInfeasible. Answer.Use is sparse: the Processing slots of the
// chosen class, each with value 1.
type TimeIndexed struct {
	Layout     *SlotLayout
	Processing int
	Release    int
	Flow       float64
	Tardy      float64
	Due        int
	// Classes lists the eligible classes in increasing order.
	Classes []int

	scratch []float64 // own prefix sums when the request carries none
}

// Cost is the job's own cost at completion time c.
func (b *TimeIndexed) Cost(c int) float64 {
	v := b.Flow * float64(c)
	if c > b.Due {
		v += b.Tardy * float64(c-b.Due)
	}
	return v
}

// StartVar is the number of the start variable; ClassVar(k) = k.
func (b *TimeIndexed) StartVar() int { return len(b.Layout.Horizons) }

// BeforeVar is the number of the "starts before t" indicator.
func (b *TimeIndexed) BeforeVar(t int) int { return len(b.Layout.Horizons) + 1 + t }

// Solve implements decomp.Block.
func (b *TimeIndexed) Solve(_ context.Context, req *decomp.Request, ans *decomp.Answer) error {
	if req.Sense != decomp.Minimise {
		return fmt.Errorf("time-indexed block %d: sense %s, want min", req.Block, req.Sense)
	}
	if b.Processing < 1 || b.Flow < 0 || b.Tardy < 0 || len(b.Classes) == 0 || b.Layout == nil {
		return fmt.Errorf("time-indexed block %d: processing %d, flow %v, tardy %v, %d classes: want processing >= 1, non-negative weights and a class",
			req.Block, b.Processing, b.Flow, b.Tardy, len(b.Classes))
	}
	K := len(b.Layout.Horizons)
	lo, hi := b.Release, math.MaxInt
	only := -1
	var excluded []int // classes fixed to 0 (sorted, since fixings are)
	for _, f := range req.Fixed() {
		switch {
		case f.Var < 0:
			return fmt.Errorf("time-indexed block %d: fixing of variable %d", req.Block, f.Var)
		case f.Var < K:
			switch f.Value {
			case 0:
				excluded = append(excluded, f.Var)
			case 1:
				if only >= 0 {
					return fmt.Errorf("time-indexed block %d: classes %d and %d both fixed to 1: %w", req.Block, only, f.Var, decomp.ErrInfeasible)
				}
				only = f.Var
			default:
				return fmt.Errorf("time-indexed block %d: class %d fixed to %v, not 0 or 1: %w", req.Block, f.Var, f.Value, decomp.ErrInfeasible)
			}
		case f.Var == K:
			s := f.Value
			if s != math.Trunc(s) || s < 0 || s > 1e15 {
				return fmt.Errorf("time-indexed block %d: start fixed to %v, not a time: %w", req.Block, s, decomp.ErrInfeasible)
			}
			lo, hi = max(lo, int(s)), min(hi, int(s))
		default:
			t := f.Var - K - 1
			switch f.Value {
			case 0: // not before t
				lo = max(lo, t)
			case 1: // before t
				hi = min(hi, t-1)
			default:
				return fmt.Errorf("time-indexed block %d: indicator \"before %d\" fixed to %v, not 0 or 1: %w", req.Block, t, f.Value, decomp.ErrInfeasible)
			}
		}
	}
	sp, _ := req.Shared().(*SlotPrefix)
	if sp != nil && sp.layout != b.Layout {
		sp = nil // another layout's sums: not ours to read
	}
	p := b.Processing
	bestK, bestS, best := -1, 0, math.Inf(1)
	ex := 0
	for _, k := range b.Classes {
		if k < 0 || k >= K {
			return fmt.Errorf("time-indexed block %d: class %d outside the layout's %d classes", req.Block, k, K)
		}
		for ex < len(excluded) && excluded[ex] < k {
			ex++
		}
		if (only >= 0 && k != only) || (ex < len(excluded) && excluded[ex] == k) {
			continue
		}
		H := b.Layout.Horizons[k]
		sLo, sHi := lo, min(hi, H-p)
		if sLo > sHi {
			continue
		}
		var sums []float64
		prune := false
		if sp != nil {
			sums, prune = sp.Sums(k), sp.nonNeg[k]
		} else {
			sums, prune = b.ownSums(req.Prices, k)
		}
		for s := sLo; s <= sHi; s++ {
			c := b.Cost(s + p)
			if prune && c >= best {
				break // own cost only grows and prices add >= 0
			}
			if v := c + sums[s+p] - sums[s]; v < best {
				bestK, bestS, best = k, s, v
			}
		}
	}
	if bestK < 0 {
		return fmt.Errorf("time-indexed block %d: no eligible class and start in [%d, %d] honours the fixings: %w", req.Block, lo, hi, decomp.ErrInfeasible)
	}
	// The value is recomputed from the prices themselves, so that it is
	// exactly own cost plus Σ price·use (prefix differences round).
	off := b.Layout.Offsets[bestK]
	ans.Cost = b.Cost(bestS + p)
	ans.Use = ans.Use[:0]
	v := ans.Cost
	for t := bestS; t < bestS+p; t++ {
		v += req.Prices[off+t]
		ans.Use = append(ans.Use, decomp.Entry{Index: off + t, Value: 1})
	}
	ans.Value = v
	ans.Primal = append(ans.Primal[:0], decomp.Entry{Index: bestK, Value: 1})
	if bestS != 0 {
		ans.Primal = append(ans.Primal, decomp.Entry{Index: K, Value: float64(bestS)})
	}
	return nil
}

// ownSums fills the block's scratch with class k's prefix sums.
func (b *TimeIndexed) ownSums(prices []float64, k int) ([]float64, bool) {
	H, off := b.Layout.Horizons[k], b.Layout.Offsets[k]
	b.scratch = append(b.scratch[:0], 0)
	s, ok := 0.0, true
	for t := 0; t < H; t++ {
		x := prices[off+t]
		ok = ok && x >= 0
		s += x
		b.scratch = append(b.scratch, s)
	}
	return b.scratch, ok
}

// TimeIndexedStart reads the class and start from a TimeIndexed block's
// primal answer (K = number of classes); ok is false when no class is set.
func TimeIndexedStart(primal []decomp.Entry, K int) (class, start int, ok bool) {
	class = -1
	for _, e := range primal {
		switch {
		case e.Index < K && e.Value == 1:
			class = e.Index
		case e.Index == K:
			start = int(e.Value)
		}
	}
	return class, start, class >= 0
}
