package decomp

import (
	"bytes"
	"encoding/binary"
	"encoding/gob"
	"errors"
	"fmt"
	"hash/crc32"
	"os"
	"path/filepath"
	"time"
)

// State is a run as a value: everything the round loop needs to go on.
// Solve builds one, rounds change it, and a checkpoint saves it; Resume
// continues from it. Encode it with EncodeCheckpoint.
type State struct {
	Round int // rounds made so far (the whole run, resumed or not)
	Idle  int // rounds in a row without a better bound or plan
	// IdleBound is the bound when Idle was last reset: under a time
	// budget a better bound resets Idle only when it has moved far enough
	// from it (see Settings).
	IdleBound float64
	Status    Status // Running until a stop rule fires
	Reason    string // the method's reason when Status is MethodStopped

	Prices     []float64 // prices for the next round
	BestPrices []float64 // prices that gave Bound
	// LastPrices are the prices of the last round made (nil before the
	// first): a run resumed after its rounds are over evaluates the blocks
	// there again, so that its last repair sees the answers the
	// uninterrupted run's last repair saw.
	LastPrices []float64
	Bound      float64
	HasBound   bool
	Plan       *Plan // best plan so far, or nil
	PlanProved bool  // Plan was proved optimal by the repairer's own search

	// Pending is a repair's outcome (its plan, maybe nil) waited for at a
	// checkpoint and not yet merged; it is merged at the next repair
	// round, as the overlapped repair would have been.
	Pending      *Plan
	PendingRound int
	HasPending   bool

	History []RoundRecord
	Method  []byte // the StatefulMethod's own state, or nil
	// Repair is the StatefulRepairer's own state, or nil.
	Repair  []byte
	Elapsed time.Duration // run time before this call (set at checkpoints)

	// elapsed0 is Elapsed when the call began.
	elapsed0 time.Duration
}

func (s *State) clone() *State {
	c := *s
	c.Prices = append([]float64(nil), s.Prices...)
	c.BestPrices = append([]float64(nil), s.BestPrices...)
	if s.LastPrices != nil {
		c.LastPrices = append([]float64(nil), s.LastPrices...)
	}
	c.History = append([]RoundRecord(nil), s.History...)
	c.Method = append([]byte(nil), s.Method...)
	if s.Method == nil {
		c.Method = nil
	}
	c.Repair = append([]byte(nil), s.Repair...)
	if s.Repair == nil {
		c.Repair = nil
	}
	c.elapsed0 = s.Elapsed
	return &c
}

// Checkpoint is a saved run: the state and what it was made from. The
// caller supplies the instance's content hash and a fingerprint of the
// settings that shape the run (seed, limits, method), and checks both with
// Match before resuming.
type Checkpoint struct {
	InstanceHash string
	Settings     string
	State        *State
}

// MismatchError says a checkpoint was made from another instance or other
// settings than the run that wants to resume it.
type MismatchError struct {
	What       string // "instance" or "settings"
	Saved, Now string
}

func (e *MismatchError) Error() string {
	return fmt.Sprintf("decomp: checkpoint was made for another %s (saved %q, now %q)", e.What, e.Saved, e.Now)
}

// Match returns a *MismatchError when the checkpoint does not belong to
// this instance hash and settings fingerprint.
func (c *Checkpoint) Match(instanceHash, settings string) error {
	if c.InstanceHash != instanceHash {
		return &MismatchError{What: "instance", Saved: c.InstanceHash, Now: instanceHash}
	}
	if c.Settings != settings {
		return &MismatchError{What: "settings", Saved: c.Settings, Now: settings}
	}
	return nil
}

// Checkpoint encoding, version 2 (version 1 had no repairer state and no
// last prices; it is refused, since resuming it could not repair as the
// uninterrupted run):
//
//	magic   8 bytes  "PINCRUN\x00"
//	version uint16   little endian, 2
//	length  uint64   little endian, bytes of payload
//	payload          gob of the checkpoint record (plans' Detail through the PlanCodec)
//	crc     uint32   little endian, CRC-32 (IEEE) of payload
const (
	checkpointMagic   = "PINCRUN\x00"
	checkpointVersion = 2
	checkpointHeader  = len(checkpointMagic) + 2 + 8
	maxCheckpoint     = 1 << 34
)

// ErrCheckpoint is wrapped by every refusal of damaged, truncated, foreign
// or newer checkpoint data.
var ErrCheckpoint = errors.New("not a usable checkpoint")

type planRecord struct {
	Value     float64
	Use       []float64
	Detail    []byte
	HasDetail bool
	Proved    bool
}

type checkpointRecord struct {
	InstanceHash, Settings string
	Round, Idle            int
	IdleBound              float64
	Status                 int8
	Reason                 string
	Prices, BestPrices     []float64
	LastPrices             []float64
	Bound                  float64
	HasBound, PlanProved   bool
	Plan, Pending          *planRecord
	PendingRound           int
	HasPending             bool
	History                []RoundRecord
	Method, Repair         []byte
	Elapsed                time.Duration
}

func encodePlan(p *Plan, codec PlanCodec) (*planRecord, error) {
	if p == nil {
		return nil, nil
	}
	rec := &planRecord{Value: p.Value, Use: p.Use, Proved: p.ProvedOptimal}
	if p.Detail != nil {
		if codec == nil {
			return nil, errors.New("decomp: the plan has a detail but the problem has no PlanCodec")
		}
		b, err := codec.EncodePlan(p.Detail)
		if err != nil {
			return nil, fmt.Errorf("decomp: encoding the plan: %w", err)
		}
		rec.Detail, rec.HasDetail = b, true
	}
	return rec, nil
}

func decodePlan(rec *planRecord, codec PlanCodec) (*Plan, error) {
	if rec == nil {
		return nil, nil
	}
	p := &Plan{Value: rec.Value, Use: rec.Use, ProvedOptimal: rec.Proved}
	if rec.HasDetail {
		if codec == nil {
			return nil, fmt.Errorf("%w: the plan has a detail but no PlanCodec was given", ErrCheckpoint)
		}
		d, err := codec.DecodePlan(rec.Detail)
		if err != nil {
			return nil, fmt.Errorf("%w: plan detail: %v", ErrCheckpoint, err)
		}
		p.Detail = d
	}
	return p, nil
}

// EncodeCheckpoint serialises a checkpoint (format in the package doc).
func EncodeCheckpoint(c *Checkpoint, codec PlanCodec) ([]byte, error) {
	st := c.State
	if st == nil {
		return nil, errors.New("decomp: checkpoint without a state")
	}
	rec := checkpointRecord{
		InstanceHash: c.InstanceHash, Settings: c.Settings,
		Round: st.Round, Idle: st.Idle, IdleBound: st.IdleBound, Status: int8(st.Status), Reason: st.Reason,
		Prices: st.Prices, BestPrices: st.BestPrices, LastPrices: st.LastPrices, Bound: st.Bound, HasBound: st.HasBound,
		PlanProved: st.PlanProved, PendingRound: st.PendingRound, HasPending: st.HasPending,
		History: st.History, Method: st.Method, Repair: st.Repair, Elapsed: st.Elapsed,
	}
	var err error
	if rec.Plan, err = encodePlan(st.Plan, codec); err != nil {
		return nil, err
	}
	if rec.Pending, err = encodePlan(st.Pending, codec); err != nil {
		return nil, err
	}
	var payload bytes.Buffer
	if err := gob.NewEncoder(&payload).Encode(&rec); err != nil {
		return nil, fmt.Errorf("decomp: encoding the checkpoint: %w", err)
	}
	out := make([]byte, 0, checkpointHeader+payload.Len()+4)
	out = append(out, checkpointMagic...)
	out = binary.LittleEndian.AppendUint16(out, checkpointVersion)
	out = binary.LittleEndian.AppendUint64(out, uint64(payload.Len()))
	out = append(out, payload.Bytes()...)
	out = binary.LittleEndian.AppendUint32(out, crc32.ChecksumIEEE(payload.Bytes()))
	return out, nil
}

// DecodeCheckpoint reads what EncodeCheckpoint wrote. Damaged, truncated,
// foreign or newer data is refused with an error wrapping ErrCheckpoint.
func DecodeCheckpoint(data []byte, codec PlanCodec) (c *Checkpoint, err error) {
	if len(data) < checkpointHeader+4 || string(data[:len(checkpointMagic)]) != checkpointMagic {
		return nil, fmt.Errorf("%w: no checkpoint header", ErrCheckpoint)
	}
	if v := binary.LittleEndian.Uint16(data[len(checkpointMagic):]); v != checkpointVersion {
		if v < checkpointVersion {
			return nil, fmt.Errorf("%w: version %d was written by an older build without the repairer's state, so the run could not continue exactly; this build reads version %d (start the run afresh)", ErrCheckpoint, v, checkpointVersion)
		}
		return nil, fmt.Errorf("%w: version %d, this build reads version %d", ErrCheckpoint, v, checkpointVersion)
	}
	n := binary.LittleEndian.Uint64(data[len(checkpointMagic)+2:])
	if n > maxCheckpoint || uint64(len(data)) != uint64(checkpointHeader)+n+4 {
		return nil, fmt.Errorf("%w: truncated or padded (%d bytes for a payload of %d)", ErrCheckpoint, len(data), n)
	}
	payload := data[checkpointHeader : checkpointHeader+int(n)]
	if crc32.ChecksumIEEE(payload) != binary.LittleEndian.Uint32(data[checkpointHeader+int(n):]) {
		return nil, fmt.Errorf("%w: checksum mismatch (damaged)", ErrCheckpoint)
	}
	defer func() {
		// gob guards itself, but a checkpoint reader must never panic.
		if p := recover(); p != nil {
			c, err = nil, fmt.Errorf("%w: undecodable payload", ErrCheckpoint)
		}
	}()
	var rec checkpointRecord
	if err := gob.NewDecoder(bytes.NewReader(payload)).Decode(&rec); err != nil {
		return nil, fmt.Errorf("%w: %v", ErrCheckpoint, err)
	}
	if len(rec.Prices) != len(rec.BestPrices) || (rec.LastPrices != nil && len(rec.LastPrices) != len(rec.Prices)) || rec.Round < 0 || rec.Idle < 0 || rec.Status < 0 || rec.Status > int8(MethodStopped) {
		return nil, fmt.Errorf("%w: inconsistent state", ErrCheckpoint)
	}
	st := &State{
		Round: rec.Round, Idle: rec.Idle, IdleBound: rec.IdleBound, Status: Status(rec.Status), Reason: rec.Reason,
		Prices: rec.Prices, BestPrices: rec.BestPrices, LastPrices: rec.LastPrices, Bound: rec.Bound, HasBound: rec.HasBound,
		PlanProved: rec.PlanProved, PendingRound: rec.PendingRound, HasPending: rec.HasPending,
		History: rec.History, Method: rec.Method, Repair: rec.Repair, Elapsed: rec.Elapsed,
	}
	if st.Prices == nil {
		st.Prices, st.BestPrices = []float64{}, []float64{}
	}
	if st.Plan, err = decodePlan(rec.Plan, codec); err != nil {
		return nil, err
	}
	if st.Pending, err = decodePlan(rec.Pending, codec); err != nil {
		return nil, err
	}
	return &Checkpoint{InstanceHash: rec.InstanceHash, Settings: rec.Settings, State: st}, nil
}

// FileError names the checkpoint file an error is about.
type FileError struct {
	File string
	Err  error
}

func (e *FileError) Error() string { return fmt.Sprintf("checkpoint %s: %v", e.File, e.Err) }
func (e *FileError) Unwrap() error { return e.Err }

// WriteCheckpointFile writes a checkpoint atomically: to a temporary file
// in the same folder, synced, then renamed over path, so that a crash
// leaves either the old or the new checkpoint, never a torn one.
func WriteCheckpointFile(path string, c *Checkpoint, codec PlanCodec) error {
	data, err := EncodeCheckpoint(c, codec)
	if err != nil {
		return &FileError{File: path, Err: err}
	}
	f, err := os.CreateTemp(filepath.Dir(path), filepath.Base(path)+".tmp*")
	if err != nil {
		return &FileError{File: path, Err: err}
	}
	tmp := f.Name()
	fail := func(err error) error {
		f.Close()
		os.Remove(tmp)
		return &FileError{File: path, Err: err}
	}
	if _, err := f.Write(data); err != nil {
		return fail(err)
	}
	if err := f.Sync(); err != nil {
		return fail(err)
	}
	if err := f.Close(); err != nil {
		os.Remove(tmp)
		return &FileError{File: path, Err: err}
	}
	if err := os.Rename(tmp, path); err != nil {
		os.Remove(tmp)
		return &FileError{File: path, Err: err}
	}
	if d, err := os.Open(filepath.Dir(path)); err == nil {
		d.Sync() // make the rename durable; not every system supports it
		d.Close()
	}
	return nil
}

// ReadCheckpointFile reads a checkpoint; its errors are *FileError naming
// the file (wrapping ErrCheckpoint for unusable data).
func ReadCheckpointFile(path string, codec PlanCodec) (*Checkpoint, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, &FileError{File: path, Err: err}
	}
	c, err := DecodeCheckpoint(data, codec)
	if err != nil {
		return nil, &FileError{File: path, Err: err}
	}
	return c, nil
}

// GobPlans is a PlanCodec for a family whose Plan.Detail is always a value
// of type T that encoding/gob can carry (exported fields, no functions or
// channels).
type GobPlans[T any] struct{}

// EncodePlan implements PlanCodec.
func (GobPlans[T]) EncodePlan(detail any) ([]byte, error) {
	v, ok := detail.(T)
	if !ok {
		var zero T
		return nil, fmt.Errorf("decomp: plan detail of type %T, want %T", detail, zero)
	}
	var b bytes.Buffer
	if err := gob.NewEncoder(&b).Encode(&v); err != nil {
		return nil, fmt.Errorf("decomp: encoding plan detail: %w", err)
	}
	return b.Bytes(), nil
}

// DecodePlan implements PlanCodec.
func (GobPlans[T]) DecodePlan(data []byte) (any, error) {
	var v T
	if err := gob.NewDecoder(bytes.NewReader(data)).Decode(&v); err != nil {
		return nil, fmt.Errorf("decomp: decoding plan detail: %w", err)
	}
	return v, nil
}
