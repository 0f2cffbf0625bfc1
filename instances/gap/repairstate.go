package gap

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
)

// gapRepairTag starts the repairer's saved state (version 1).
const gapRepairTag = "gaprep1\x00"

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
	return b, nil
}

// RestoreRepairState implements decomp.StatefulRepairer.
func (r *repairer) RestoreRepairState(data []byte) error {
	n := len(gapRepairTag)
	if len(data) != n+32 || string(data[:n]) != gapRepairTag {
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
	r.failures, r.skip, r.calls, r.idle = v[0], v[1], v[2], v[3]
	return nil
}
