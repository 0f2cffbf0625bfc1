package heuristics

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
)

// searcherStateTag starts a Searcher's saved state (version 1).
const searcherStateTag = "srchst1\x00"

// MarshalState returns what a Searcher carries from one call to the next
// and what shapes later searches: the pair bounds gathered so far and the
// elite plans. A resumed run that restores it searches as the
// uninterrupted one.
func (sr *Searcher) MarshalState() []byte {
	b := append([]byte(nil), searcherStateTag...)
	if pb := sr.bounds; pb != nil {
		have := uint64(0)
		if pb.have {
			have = 1
		}
		b = binary.LittleEndian.AppendUint64(b, 1)
		b = binary.LittleEndian.AppendUint64(b, have)
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(pb.bound))
		for k := range pb.in {
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(pb.in[k]))
			b = binary.LittleEndian.AppendUint64(b, math.Float64bits(pb.out[k]))
		}
	} else {
		b = binary.LittleEndian.AppendUint64(b, 0)
	}
	b = binary.LittleEndian.AppendUint64(b, uint64(len(sr.elite)))
	for _, e := range sr.elite {
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(e.cost))
		for _, i := range e.asg {
			b = binary.LittleEndian.AppendUint32(b, uint32(i))
		}
	}
	return b
}

// UnmarshalState restores what MarshalState wrote for the same
// assignment problem; anything else is refused with an error.
func (sr *Searcher) UnmarshalState(data []byte) error {
	md := sr.base
	m, n := md.m, md.n
	bad := errors.New("heuristics: not a searcher state of this problem")
	if len(data) < len(searcherStateTag)+8 || string(data[:len(searcherStateTag)]) != searcherStateTag {
		return bad
	}
	rest := data[len(searcherStateTag):]
	next := func() (uint64, bool) {
		if len(rest) < 8 {
			return 0, false
		}
		v := binary.LittleEndian.Uint64(rest)
		rest = rest[8:]
		return v, true
	}
	hasBounds, _ := next()
	var pb *pairBounds
	switch hasBounds {
	case 0:
	case 1:
		have, ok1 := next()
		bound, ok2 := next()
		if !ok1 || !ok2 || have > 1 || len(rest) < 16*m*n {
			return bad
		}
		pb = &pairBounds{in: make([]float64, m*n), out: make([]float64, m*n),
			order: make([]int, 0, n), pos: make([]int, n),
			prof: make([]float64, n), wsum: make([]float64, n+1), psum: make([]float64, n+1),
			have: have == 1, bound: math.Float64frombits(bound)}
		for k := range pb.in {
			pb.in[k] = math.Float64frombits(binary.LittleEndian.Uint64(rest))
			pb.out[k] = math.Float64frombits(binary.LittleEndian.Uint64(rest[8:]))
			rest = rest[16:]
			if math.IsNaN(pb.in[k]) || math.IsNaN(pb.out[k]) {
				return bad
			}
		}
	default:
		return bad
	}
	count, ok := next()
	if !ok || count > elitePool || uint64(len(rest)) != count*uint64(8+4*n) {
		return bad
	}
	elite := make([]elitePlan, count)
	for q := range elite {
		e := elitePlan{cost: math.Float64frombits(binary.LittleEndian.Uint64(rest)), asg: make([]int, n)}
		rest = rest[8:]
		for j := range e.asg {
			i := binary.LittleEndian.Uint32(rest)
			rest = rest[4:]
			if int(i) >= m {
				return fmt.Errorf("heuristics: searcher state assigns an item to resource %d of %d", i, m)
			}
			e.asg[j] = int(i)
		}
		elite[q] = e
	}
	sr.bounds, sr.elite = pb, elite
	return nil
}
