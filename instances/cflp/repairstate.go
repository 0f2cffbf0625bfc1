package cflp

import (
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"slices"

	"pincer/subproblem/transport"
)

// cflpRepairTag starts the repairer's saved state (version 1):
//
//	tag      8 bytes "cflprep1"
//	sites    uint32  (the key length is (sites+7)/8 bytes)
//	entries  uint32, then per entry: key, float64 bits (sorted by key)
//	flows    uint32, then per flow: uint32 site, uint32 customer, float64 bits
//
// all little endian.
const cflpRepairTag = "cflprep1"

// RepairState implements decomp.StatefulRepairer. What shapes later
// repairs is the cache of evaluated open sets (a cached set costs no move
// of the budget) and the allocation's warm start (the flows the next
// transport solve starts from, which decide the allocation among equally
// cheap ones and so the moves tried next); both are saved, so that a
// resumed run repairs as the uninterrupted one.
func (r *repairer) RepairState() ([]byte, error) {
	m := len(r.md.sites)
	keys := make([]string, 0, len(r.seen))
	for k := range r.seen {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	var flows []transport.Shipment
	if r.tp != nil {
		flows = r.tp.WarmFlows()
	}
	kl := (m + 7) / 8
	b := make([]byte, 0, len(cflpRepairTag)+12+len(keys)*(kl+8)+len(flows)*16)
	b = append(b, cflpRepairTag...)
	b = binary.LittleEndian.AppendUint32(b, uint32(m))
	b = binary.LittleEndian.AppendUint32(b, uint32(len(keys)))
	for _, k := range keys {
		if len(k) != kl {
			return nil, fmt.Errorf("cflp: repairer cache key of %d bytes for %d sites", len(k), m)
		}
		b = append(b, k...)
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(r.seen[k]))
	}
	b = binary.LittleEndian.AppendUint32(b, uint32(len(flows)))
	for _, f := range flows {
		b = binary.LittleEndian.AppendUint32(b, uint32(f.Site))
		b = binary.LittleEndian.AppendUint32(b, uint32(f.Customer))
		b = binary.LittleEndian.AppendUint64(b, math.Float64bits(f.Qty))
	}
	return b, nil
}

// RestoreRepairState implements decomp.StatefulRepairer.
func (r *repairer) RestoreRepairState(data []byte) error {
	bad := errors.New("cflp: not the state of a facility repairer for this instance")
	m, n := len(r.md.sites), len(r.md.in.Customers)
	kl := (m + 7) / 8
	if !bytes.HasPrefix(data, []byte(cflpRepairTag)) {
		return bad
	}
	d := data[len(cflpRepairTag):]
	u32 := func() (int, bool) {
		if len(d) < 4 {
			return 0, false
		}
		v := binary.LittleEndian.Uint32(d)
		d = d[4:]
		return int(v), true
	}
	sites, ok := u32()
	if !ok || sites != m {
		return bad
	}
	entries, ok := u32()
	if !ok || uint64(entries)*uint64(kl+8) > uint64(len(d)) {
		return bad
	}
	seen := make(map[string]float64, entries)
	for range entries {
		seen[string(d[:kl])] = math.Float64frombits(binary.LittleEndian.Uint64(d[kl:]))
		d = d[kl+8:]
	}
	nf, ok := u32()
	if !ok || uint64(nf)*16 != uint64(len(d)) {
		return bad
	}
	flows := make([]transport.Shipment, nf)
	for k := range flows {
		i, j := int(binary.LittleEndian.Uint32(d)), int(binary.LittleEndian.Uint32(d[4:]))
		q := math.Float64frombits(binary.LittleEndian.Uint64(d[8:]))
		if i >= m || j >= n {
			return bad
		}
		flows[k] = transport.Shipment{Site: i, Customer: j, Qty: q}
		d = d[16:]
	}
	// A fresh allocation solver (all supplies zero, as r.sup says) that
	// starts from the saved flows.
	r.tp = nil
	clear(r.sup)
	if len(flows) > 0 {
		if err := r.newSolver(); err != nil {
			return err
		}
		if err := r.tp.SetWarmFlows(flows); err != nil {
			return fmt.Errorf("cflp: repairer state: %w", err)
		}
	}
	r.seen = seen
	return nil
}
