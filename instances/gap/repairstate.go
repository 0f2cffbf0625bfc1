package gap

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
)

// gapRepairTag starts the repairer's saved state (version 2: the
// counters, the best relaxed value and the plan searcher's state).
const gapRepairTag = "gaprep2\x00"

// RepairState implements decomp.StatefulRepairer: the counters that shape
// later repairs (failures in a row, calls left to skip, in-round calls,
// calls since the best plan improved), so that a resumed run repairs as
// the uninterrupted one.
func (r *repairer) RepairState() ([]byte, error) {
	b := make([]byte, 0, len(gapRepairTag)+32)
	b = append(b, gapRepairTag...)
	for _, v := range []int{r.failures, r.skip, r.calls, r.idle} {
		b = binary.LittleEndian.AppendUint64(b, uint64(v))
	}
	haveL := uint64(0)
	if r.haveL {
		haveL = 1
	}
	b = binary.LittleEndian.AppendUint64(b, haveL)
	b = binary.LittleEndian.AppendUint64(b, math.Float64bits(r.bestL))
	if r.searcher == nil {
		return b, nil // no repair yet: nothing searched
	}
	return append(b, r.searcher.MarshalState()...), nil
}

// RestoreRepairState implements decomp.StatefulRepairer.
func (r *repairer) RestoreRepairState(data []byte) error {
	n := len(gapRepairTag)
	if len(data) < n+48 || string(data[:n]) != gapRepairTag {
		return errors.New("gap: not the state of an assignment repairer")
	}
	var v [4]int
	for k := range v {
		u := binary.LittleEndian.Uint64(data[n+8*k:])
		if u > math.MaxInt32 {
			return fmt.Errorf("gap: repairer state out of range (counter %d is %d)", k, u)
		}
		v[k] = int(u)
	}
	haveL := binary.LittleEndian.Uint64(data[n+32:])
	bestL := math.Float64frombits(binary.LittleEndian.Uint64(data[n+40:]))
	if haveL > 1 || math.IsNaN(bestL) {
		return errors.New("gap: repairer state holds a bad relaxed value")
	}
	if len(data) > n+48 {
		if err := r.prepare(); err != nil {
			return err
		}
		if err := r.searcher.UnmarshalState(data[n+48:]); err != nil {
			return fmt.Errorf("gap: repairer state: %w", err)
		}
	}
	r.failures, r.skip, r.calls, r.idle = v[0], v[1], v[2], v[3]
	r.haveL, r.bestL = haveL == 1, bestL
	return nil
}
