package decomp_test

import (
	"bytes"
	"context"
	"encoding/gob"
	"errors"
	"math"
	"path/filepath"
	"reflect"
	"strings"
	"sync/atomic"
	"testing"
	"time"

	"pincer/decomp"
	"pincer/subproblem"
)

// intsCodec serialises a GAP plan's detail (the agent of every job).
type intsCodec struct{}

func (intsCodec) EncodePlan(d any) ([]byte, error) {
	var b bytes.Buffer
	err := gob.NewEncoder(&b).Encode(d.([]int))
	return b.Bytes(), err
}

func (intsCodec) DecodePlan(data []byte) (any, error) {
	var v []int
	err := gob.NewDecoder(bytes.NewReader(data)).Decode(&v)
	return v, err
}

// pickPlan keeps the relaxed choices when they respect every row; it has
// no memory across calls, which exact resumption needs.
type pickPlan struct{ p *decomp.Problem }

func (r pickPlan) Repair(_ context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	use := make([]float64, len(r.p.Rows))
	pick := make([]int, len(in.Answers))
	value := 0.0
	for k, a := range in.Answers {
		o := r.p.Blocks[k].(*subproblem.Choice).Options[a.Primal[0].Index]
		pick[k] = a.Primal[0].Index
		value += o.Cost
		for _, e := range o.Use {
			use[e.Index] += e.Value
		}
	}
	for i, row := range r.p.Rows {
		if use[i] > row.RHS {
			return nil, nil
		}
	}
	return &decomp.Plan{Value: value, Use: use, Detail: pick}, nil
}

func smallRun(t *testing.T) *decomp.Problem {
	t.Helper()
	p := manyBlocks(400, 8)
	for i := range p.Rows {
		p.Rows[i].RHS = 50
	}
	p.Repair = pickPlan{p}
	p.Plans = intsCodec{}
	return p
}

func clean(res *decomp.Result) {
	res.Elapsed = 0
	for i := range res.History {
		res.History[i].Elapsed = 0
		if math.IsNaN(res.History[i].PlanValue) {
			res.History[i].PlanValue = -1
		}
	}
}

// TestResumeMatchesUninterrupted: the reference is the same run without a
// break; a checkpoint at round k, written to a file, read back and resumed,
// must end in the same place.
func TestResumeMatchesUninterrupted(t *testing.T) {
	s := decomp.Settings{Rounds: 120, Seed: 5, Gap: -1, Evaluator: decomp.Pool{Workers: 2}}
	ref, err := decomp.Solve(context.Background(), smallRun(t), s)
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("reference: %s after %d rounds", ref.Status, ref.Rounds)
	for _, k := range []int{1, 7, 23} {
		path := filepath.Join(t.TempDir(), "run.ckpt")
		p := smallRun(t)
		ctx, cancel := context.WithCancel(context.Background())
		cs := s
		cs.Method = &decomp.Subgradient{}
		cs.CheckpointEvery = k
		cs.Checkpoint = func(st *decomp.State) error {
			if st.Round != k {
				return nil
			}
			cancel() // the break: the run stops at the next boundary
			return decomp.WriteCheckpointFile(path, &decomp.Checkpoint{InstanceHash: "h", Settings: "s", State: st}, p.Plans)
		}
		if _, err := decomp.Solve(ctx, p, cs); err != nil {
			t.Fatal(err)
		}
		cancel()
		c, err := decomp.ReadCheckpointFile(path, p.Plans)
		if err != nil {
			t.Fatal(err)
		}
		var mm *decomp.MismatchError
		if err := c.Match("other", "s"); !errors.As(err, &mm) {
			t.Fatalf("another instance hash was accepted: %v", err)
		}
		if err := c.Match("h", "s"); err != nil {
			t.Fatal(err)
		}
		rs := s
		rs.Method = &decomp.Subgradient{}
		res, err := decomp.Resume(context.Background(), smallRun(t), rs, c.State)
		if err != nil {
			t.Fatal(err)
		}
		r0 := *ref
		clean(&r0)
		clean(res)
		if (r0.Plan == nil) != (res.Plan == nil) || r0.Plan != nil && r0.Plan.Value != res.Plan.Value {
			t.Fatalf("k=%d: resumed plan %v, uninterrupted %v", k, res.Plan, r0.Plan)
		}
		if res.Rounds != r0.Rounds || res.Bound != r0.Bound ||
			!reflect.DeepEqual(res.Prices, r0.Prices) || !reflect.DeepEqual(res.History, r0.History) {
			t.Fatalf("k=%d: resumed run (rounds %d bound %v %s) differs from uninterrupted (rounds %d bound %v %s)",
				k, res.Rounds, res.Bound, res.Status, r0.Rounds, r0.Bound, r0.Status)
		}
	}
}

type failingBlock struct{}

func (failingBlock) Solve(context.Context, *decomp.Request, *decomp.Answer) error {
	return errors.New("broken block")
}

type onceFailing struct {
	decomp.Block
	calls int
}

func (b *onceFailing) Solve(ctx context.Context, req *decomp.Request, ans *decomp.Answer) error {
	b.calls++
	if b.calls == 2 {
		return errors.New("broken block")
	}
	return b.Block.Solve(ctx, req, ans)
}

type slowRepair struct{ started, done atomic.Int32 }

func (r *slowRepair) Repair(ctx context.Context, _ *decomp.RepairInput) (*decomp.Plan, error) {
	r.started.Add(1)
	defer r.done.Add(1)
	select {
	case <-ctx.Done():
		return nil, ctx.Err()
	case <-time.After(time.Minute):
		return nil, nil
	}
}

// TestRepairOwned: a block fails in round 2 while round 1's repair runs;
// when Solve returns, that repair has seen cancellation and returned.
func TestRepairOwned(t *testing.T) {
	p := manyBlocks(10, 3)
	p.Blocks[0] = &onceFailing{Block: p.Blocks[0]}
	rep := &slowRepair{}
	p.Repair = rep
	_, err := decomp.Solve(context.Background(), p, decomp.Settings{Evaluator: decomp.Pool{Workers: 1}})
	if err == nil {
		t.Fatal("a failing block did not fail the run")
	}
	if rep.started.Load() != 1 || rep.done.Load() != 1 {
		t.Fatalf("repairs started %d, returned %d when Solve returned", rep.started.Load(), rep.done.Load())
	}
}

func FuzzDecodeCheckpoint(f *testing.F) {
	st := &decomp.State{Round: 3, Prices: []float64{1, 2}, BestPrices: []float64{1, 0}, Bound: 4, HasBound: true,
		Plan: &decomp.Plan{Value: 5, Use: []float64{1, 1}, Detail: []int{0, 1}}, Method: []byte("x")}
	good, err := decomp.EncodeCheckpoint(&decomp.Checkpoint{InstanceHash: "h", State: st}, intsCodec{})
	if err != nil {
		f.Fatal(err)
	}
	f.Add(good)
	f.Add(good[:len(good)/2])
	f.Add([]byte("PINCRUN\x00"))
	f.Fuzz(func(t *testing.T, data []byte) {
		c, err := decomp.DecodeCheckpoint(data, intsCodec{})
		if err != nil {
			if !errors.Is(err, decomp.ErrCheckpoint) {
				t.Fatalf("refusal does not wrap ErrCheckpoint: %v", err)
			}
			return
		}
		if _, err := decomp.EncodeCheckpoint(c, intsCodec{}); err != nil {
			t.Fatalf("decoded checkpoint does not re-encode: %v", err)
		}
	})
}

// countingRepair hands over a plan only on every third call (counting
// every call), better the more calls it has made: a repairer whose later
// repairs depend on its own state. (The plan is a stand-in: the test is
// about the engine's bookkeeping, and its value stays far above the bound.)
type countingRepair struct {
	pickPlan
	calls int
}

func (r *countingRepair) Repair(_ context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	r.calls++
	if r.calls%3 != 1 {
		return nil, nil
	}
	return &decomp.Plan{Value: 20000 - 100*float64(r.calls), Use: make([]float64, len(r.p.Rows)), Detail: []int{r.calls}}, nil
}

type statefulCounting struct{ *countingRepair }

func (r statefulCounting) RepairState() ([]byte, error) { return []byte{'c', byte(r.calls)}, nil }

func (r statefulCounting) RestoreRepairState(b []byte) error {
	if len(b) != 2 || b[0] != 'c' {
		return errors.New("not a counting repairer's state")
	}
	r.calls = int(b[1])
	return nil
}

// TestResumeRepairState: a repairer's own counter is saved at a checkpoint
// and restored on resume, so the resumed run equals the uninterrupted one;
// the same repairer without the interface (its counter restarting at zero)
// gives another run, which shows the check can fail.
func TestResumeRepairState(t *testing.T) {
	s := decomp.Settings{Rounds: 90, Seed: 5, Gap: -1, RepairEvery: 2, Evaluator: decomp.Pool{Workers: 2}}
	mk := func(stateful bool) *decomp.Problem {
		p := smallRun(t)
		c := &countingRepair{pickPlan: pickPlan{p}}
		p.Repair = c
		if stateful {
			p.Repair = statefulCounting{c}
		}
		return p
	}
	run := func(stateful bool, k int) *decomp.Result {
		var saved *decomp.State
		p := mk(stateful)
		ctx, cancel := context.WithCancel(context.Background())
		defer cancel()
		cs := s
		cs.CheckpointEvery = k
		cs.Checkpoint = func(st *decomp.State) error {
			if st.Round != k {
				return nil
			}
			cancel()
			b, err := decomp.EncodeCheckpoint(&decomp.Checkpoint{State: st}, p.Plans)
			if err != nil {
				return err
			}
			c, err := decomp.DecodeCheckpoint(b, p.Plans)
			saved = c.State
			return err
		}
		if _, err := decomp.Solve(ctx, p, cs); err != nil {
			t.Fatal(err)
		}
		if stateful && saved.Repair == nil {
			t.Fatal("the checkpoint holds no repairer state")
		}
		res, err := decomp.Resume(context.Background(), mk(stateful), s, saved)
		if err != nil {
			t.Fatal(err)
		}
		clean(res)
		return res
	}
	ref, err := decomp.Solve(context.Background(), mk(true), s)
	if err != nil {
		t.Fatal(err)
	}
	clean(ref)
	same := func(a, b *decomp.Result) bool {
		return a.Rounds == b.Rounds && a.Bound == b.Bound && (a.Plan == nil) == (b.Plan == nil) &&
			(a.Plan == nil || a.Plan.Value == b.Plan.Value) && reflect.DeepEqual(a.Prices, b.Prices) &&
			reflect.DeepEqual(a.History, b.History)
	}
	differs := 0
	for _, k := range []int{3, 10, 31} {
		if res := run(true, k); !same(ref, res) {
			t.Errorf("k=%d: resumed run (bound %v plan %v) differs from the uninterrupted run (bound %v plan %v)", k, res.Bound, res.Plan, ref.Bound, ref.Plan)
		}
		if !same(ref, run(false, k)) {
			differs++
		}
	}
	if differs == 0 {
		t.Error("without its saved state the repairer resumed identically every time: the check cannot fail")
	}

	// A state with a repairer's state is refused by a repairer without one.
	if _, err := decomp.Resume(context.Background(), mk(false), s, &decomp.State{Prices: make([]float64, 8), BestPrices: make([]float64, 8), Repair: []byte("c\x01")}); err == nil {
		t.Error("a repairer's state was accepted by a repairer that cannot restore it")
	}
}

// TestCheckpointVersion1Refused: a checkpoint of the first layout (no
// repairer state) is refused with a message saying why.
func TestCheckpointVersion1Refused(t *testing.T) {
	st := &decomp.State{Round: 3, Prices: []float64{1}, BestPrices: []float64{1}}
	b, err := decomp.EncodeCheckpoint(&decomp.Checkpoint{State: st}, nil)
	if err != nil {
		t.Fatal(err)
	}
	b[8], b[9] = 1, 0
	_, err = decomp.DecodeCheckpoint(b, nil)
	if !errors.Is(err, decomp.ErrCheckpoint) || !strings.Contains(err.Error(), "version 1") || !strings.Contains(err.Error(), "older build") {
		t.Fatalf("version 1 checkpoint: %v", err)
	}
}

// finalAware is statefulCounting whose last repair returns a plan valued
// by the answers it is given, so that a resumed run's last repair must see
// the same answers as the uninterrupted run's.
type finalAware struct{ statefulCounting }

func (r finalAware) Repair(ctx context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	if !in.Final {
		return r.statefulCounting.Repair(ctx, in)
	}
	v := 0.0
	for _, a := range in.Answers {
		v += a.Value
	}
	best := 30000.0
	if in.Best != nil {
		best = in.Best.Value
	}
	// A little better than the best plan, by an amount the answers decide.
	return &decomp.Plan{Value: best - 1 - 0.5*math.Mod(math.Abs(v), 1), Use: make([]float64, len(r.p.Rows)), Detail: []int{-1}}, nil
}

// TestResumeAfterRoundsOver: the last checkpoint of a run stopped by its
// round limit or by stalling is taken before the last repair; a run
// resumed from it (a kill during that repair) must make no more rounds
// and end with the same plan as the uninterrupted run, whose last repair
// saw the last round's answers.
func TestResumeAfterRoundsOver(t *testing.T) {
	for _, s := range []decomp.Settings{
		{Rounds: 40, Seed: 2, Gap: -1, RepairEvery: 2},
		{Rounds: 5000, StallRounds: 10, Seed: 2, Gap: -1, RepairEvery: 1000},
	} {
		mk := func() *decomp.Problem {
			p := smallRun(t)
			p.Repair = finalAware{statefulCounting{&countingRepair{pickPlan: pickPlan{p}}}}
			return p
		}
		ref, err := decomp.Solve(context.Background(), mk(), s)
		if err != nil {
			t.Fatal(err)
		}
		clean(ref)
		var last *decomp.State
		cs := s
		cs.Checkpoint = func(st *decomp.State) error {
			b, err := decomp.EncodeCheckpoint(&decomp.Checkpoint{State: st}, intsCodec{})
			if err != nil {
				return err
			}
			c, err := decomp.DecodeCheckpoint(b, intsCodec{})
			if err == nil {
				last = c.State
			}
			return err
		}
		if _, err := decomp.Solve(context.Background(), mk(), cs); err != nil {
			t.Fatal(err)
		}
		if last == nil || last.Status != ref.Status {
			t.Fatalf("%s: no last checkpoint with that status (%v)", ref.Status, last)
		}
		res, err := decomp.Resume(context.Background(), mk(), s, last)
		if err != nil {
			t.Fatal(err)
		}
		clean(res)
		if res.Status != ref.Status || res.Rounds != ref.Rounds || res.Bound != ref.Bound || res.Plan == nil || res.Plan.Value != ref.Plan.Value ||
			!reflect.DeepEqual(res.Prices, ref.Prices) {
			t.Errorf("%s: resumed %s rounds %d bound %v plan %v; uninterrupted rounds %d bound %v plan %v",
				ref.Status, res.Status, res.Rounds, res.Bound, res.Plan, ref.Rounds, ref.Bound, ref.Plan)
		}
		t.Logf("%s after %d rounds, plan %v", ref.Status, ref.Rounds, ref.Plan.Value)
	}
}
