package decomp

import (
	"context"
	"errors"
	"fmt"
	"math"
	"time"
)

// Status says why a run stopped.
type Status int8

// Stop reasons.
const (
	// Running: the run has not stopped (the zero Status).
	Running Status = iota
	// GapReached: the relative gap fell to Settings.Gap or below.
	GapReached
	// IntegerClosed: the plan's value meets the bound (rounded, for an
	// integral objective), so the plan is optimal.
	IntegerClosed
	// PricesSettled: the projected subgradient vanished, so the current
	// prices are optimal for the dual and the bound cannot improve.
	PricesSettled
	// RoundLimit: Settings.Rounds rounds were made.
	RoundLimit
	// TimeLimit: Settings.Time ran out.
	TimeLimit
	// Stalled: neither bound nor plan improved for Settings.StallRounds rounds.
	Stalled
	// Interrupted: the context was cancelled.
	Interrupted
	// ProvedInfeasible: the bound passed Problem.WorstPlanValue, so no feasible
	// plan exists.
	ProvedInfeasible
	// SearchClosed: the repairer proved its plan optimal by an exact search
	// (Plan.ProvedOptimal).
	SearchClosed
	// MethodStopped: the price-update method ended the run (Step.Stop);
	// State.Reason and Result.Reason carry its own explanation.
	MethodStopped
)

// String returns the stop reason as used in reports.
func (s Status) String() string {
	switch s {
	case GapReached:
		return "gap-reached"
	case IntegerClosed:
		return "integer-closed"
	case PricesSettled:
		return "prices-settled"
	case RoundLimit:
		return "round-limit"
	case TimeLimit:
		return "time-limit"
	case Stalled:
		return "stalled"
	case Interrupted:
		return "interrupted"
	case ProvedInfeasible:
		return "proved-infeasible"
	case SearchClosed:
		return "search-closed"
	case Running:
		return "running"
	case MethodStopped:
		return "method-stopped"
	}
	return fmt.Sprintf("status(%d)", int(s))
}

// Early reports whether the run stopped before it could close the gap or
// settle the prices.
func (s Status) Early() bool {
	return s == RoundLimit || s == TimeLimit || s == Stalled || s == Interrupted
}

// Settings are limits and choices for a run. The zero value is valid and
// means sensible defaults.
//
// The stall rule: the run has stalled after StallRounds rounds without a
// better bound or plan. Without a time limit, or with StallRounds set
// (> 0), a stall ends the run (status stalled). With a time limit and
// StallRounds left at 0 the time is a budget: a stall does not end the run
// while the gap is open, it moves effort from price rounds to plan search.
// Under a budget a better bound counts only when it has moved by more than
// a hundredth of the open gap since the last progress (State.IdleBound). The
// in-round repairs then see RepairInput.Stalled (a repairer may spend
// more per call) and run on the round's goroutine, so that the rounds pause
// while they search (same merge points, same outcome). Once stalled, only
// such a bound move ends the stall: better plans found by the search do not
// hand the cores back to the rounds. Such a run ends at
// its limit, or earlier only when the gap closes, the plan is proved or
// the prices settle.
//
// Repair rounds: a repair starts on round 1 and every RepairEvery rounds,
// on its own goroutine when Workers allows, and its plan is merged at the
// next repair round, which waits for it. When the time limit is the only
// bound on rounds (Time set, Rounds 0, no Checkpoint) the rounds do not
// wait: a repair round that finds the repair still running goes on, and
// the repair is merged (and the next one started) at the first repair
// round after it has finished. Both cores then stay busy, rounds and
// repairs alike, and such a run is not reproducible round for round (it
// never was: the time decides how many rounds it makes). With a round
// limit every repair is merged at its fixed round.
type Settings struct {
	Gap         float64       // relative gap to stop at; 0 means 1e-4, negative means never
	Time        time.Duration // wall-clock limit; 0 means none
	Rounds      int           // round limit; 0 means none
	StallRounds int           // rounds without any improvement that make a stall; 0 means 300
	RepairEvery int           // repair on round 1 and every this many rounds; 0 means 5
	Seed        uint64        // passed (mixed with the round) to the repairer
	Method      Method        // price-update rule; nil means a fresh Subgradient
	Evaluator   Evaluator     // block evaluation; nil means Pool{Workers: Workers}
	// Workers is the run's worker budget: it sizes the default Pool (0
	// means GOMAXPROCS), and with 1 the in-round repair runs on the
	// round's goroutine instead of overlapping the next rounds (same
	// outcome, one core).
	Workers  int
	Observer Observer // sees every round; nil means none
	// FinalRepairTime is kept for the last repair: with a time limit the
	// rounds stop this long before it, so that the whole run fits in Time;
	// after an interruption the last repair gets this long. 0 means a
	// tenth of Time, at least 0.2 s and at most 2 s (2 s without a time
	// limit).
	FinalRepairTime time.Duration
	// Checkpoint, when set, is handed the run's state every CheckpointEvery
	// rounds (0: never on schedule) and once more when the run stops early
	// (interruption, time, round or stall limit), always at a round
	// boundary with no repair in flight; it is typically a closure calling
	// WriteCheckpointFile. The state is valid only during the call. A
	// checkpoint waits for the running repair, so frequent checkpoints
	// cost the overlap of repair and rounds, never reproducibility.
	Checkpoint      func(*State) error
	CheckpointEvery int
	// CheckpointInterval, when positive, also hands the state to
	// Checkpoint at the first round boundary after this much wall time
	// since the last one. Checkpoints never change a run's outcome, so a
	// clock-driven schedule keeps runs reproducible.
	CheckpointInterval time.Duration

	// stallBudget is set by withDefaults when a stall does not end the run
	// (a time limit and no StallRounds given): see StallRounds.
	stallBudget bool
}

// Progress is what an observer sees after each round.
type Progress struct {
	Record RoundRecord
	// Prices are the prices at which this round's L was computed (the
	// method has already moved on, so this is a copy kept only when an
	// observer is set). The engine reuses it: it is valid only during
	// Observe.
	Prices  []float64
	Problem *Problem
	HasPlan bool
}

// Observer watches rounds. It must not modify anything it is given.
type Observer interface {
	Observe(p *Progress)
}

// ObserverFunc adapts a function to Observer.
type ObserverFunc func(p *Progress)

// Observe implements Observer.
func (f ObserverFunc) Observe(p *Progress) { f(p) }

// RoundRecord is one line of a run's history.
type RoundRecord struct {
	Round     int
	Elapsed   time.Duration
	Value     float64 // L at this round's prices
	Bound     float64 // best bound so far
	PlanValue float64 // best plan value so far; NaN when none
	Step      float64 // step taken after this round
	Norm      float64 // length of the projected subgradient
}

// RowReport describes one coupling row at the end of a run.
type RowReport struct {
	Name  string
	Sense RowSense
	RHS   float64
	// Price is the multiplier at the best bound (see the package doc for
	// its sign and meaning as a shadow price).
	Price float64
	// Use and Slack are measured in the best plan (NaN without a plan).
	// Slack is rhs − use for <=, use − rhs for >= and −|use − rhs| for =.
	Use, Slack float64
	// Binding reports that the row is tight in the best plan.
	Binding bool
}

// Result is the outcome of a run. Every stop, early or not, carries the
// best bound and the best plan seen.
type Result struct {
	Status Status
	// Reason is the method's own explanation when Status is MethodStopped.
	Reason string
	// ProvedOptimal reports that the plan is optimal: it meets the bound (within
	// 1e-9 relative, or exactly after rounding an integral objective).
	ProvedOptimal bool
	// Bound is the best relaxed bound (lower for min, upper for max);
	// HasBound is false only when no round completed.
	Bound    float64
	HasBound bool
	Plan     *Plan
	// Gap is |plan − bound| / max(1, |plan|); +Inf without a plan.
	Gap     float64
	Rounds  int
	Elapsed time.Duration
	Prices  []float64 // prices at the best bound
	Rows    []RowReport
	History []RoundRecord
}

// Solve runs Lagrangian rounds on p until a stopping rule fires. It
// returns an error only for an invalid problem or a failing block,
// repairer or method; cancellation of ctx is a normal stop (Status
// Interrupted).
func Solve(ctx context.Context, p *Problem, s Settings) (*Result, error) {
	return Resume(ctx, p, s, nil)
}

// Resume continues a run from a state captured by a checkpoint (nil
// starts afresh, as Solve). With the same problem, seed and round limit the
// resumed run ends with the same plan value, bound, rounds and prices as
// the uninterrupted run. A state whose Status is early (see Status.Early)
// is reopened; any other stopped state is only finished.
func Resume(ctx context.Context, p *Problem, s Settings, st *State) (*Result, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	s = withDefaults(s)
	run := &runner{p: p, s: s, start: time.Now()}
	if err := run.begin(st); err != nil {
		return nil, err
	}
	return run.loop(ctx)
}

func withDefaults(s Settings) Settings {
	if s.Gap == 0 {
		s.Gap = 1e-4
	}
	if s.StallRounds <= 0 {
		s.StallRounds = 300
		s.stallBudget = s.Time > 0
	}
	if s.RepairEvery <= 0 {
		s.RepairEvery = 5
	}
	if s.Method == nil {
		s.Method = &Subgradient{}
	}
	if s.Evaluator == nil {
		s.Evaluator = Pool{Workers: s.Workers}
	}
	if s.FinalRepairTime <= 0 {
		s.FinalRepairTime = 2 * time.Second
		if s.Time > 0 {
			s.FinalRepairTime = min(2*time.Second, max(200*time.Millisecond, s.Time/10))
		}
	}
	return s
}

type runner struct {
	p     *Problem
	s     Settings
	start time.Time
	st    *State

	answers       []Answer
	sub           []float64
	scale         []float64 // per row: |rhs| + Σ |use|, the size of its rounding noise
	req           *Request
	pending       chan repairOutcome // the repair running, if any
	cancelPending context.CancelFunc
	seen          []float64 // this round's prices, for the observer
	evaluated     bool      // answers hold a round of this call
	// Set by SolveNode: without a plan the steps aim at cutoff (when
	// hasCutoff); with keep, the answers at the best bound are kept in
	// best.
	cutoff          float64
	hasCutoff, keep bool
	best            []Answer
}

// begin sets up the state: fresh, or restored from st.
func (r *runner) begin(st *State) error {
	p, s := r.p, r.s
	nrows := len(p.Rows)
	s.Method.Init(p.Sense, p.Rows)
	fix := append([]Fixing(nil), p.Fixings...)
	if err := SortFixings(fix); err != nil {
		return err
	}
	r.req = &Request{Sense: p.Sense, Fixings: fix}
	r.answers = make([]Answer, len(p.Blocks))
	r.sub = make([]float64, nrows)
	if st == nil {
		st = &State{Prices: make([]float64, nrows)}
		if p.Prices != nil {
			copy(st.Prices, p.Prices)
		}
		Project(p.Sense, p.Rows, st.Prices)
		st.BestPrices = append([]float64(nil), st.Prices...)
		r.st = st
		return nil
	}
	if len(st.Prices) != nrows || len(st.BestPrices) != nrows {
		return fmt.Errorf("decomp: state has %d prices for %d rows", len(st.Prices), nrows)
	}
	if st.LastPrices != nil && len(st.LastPrices) != nrows {
		return fmt.Errorf("decomp: state has %d last prices for %d rows", len(st.LastPrices), nrows)
	}
	st = st.clone()
	// An early stop is reopened unless the same limit would stop the run
	// again at once (a stalled run would otherwise make one more round).
	switch st.Status {
	case Interrupted, TimeLimit:
		st.Status, st.Reason = Running, ""
	case RoundLimit:
		if s.Rounds <= 0 || st.Round < s.Rounds {
			st.Status, st.Reason = Running, ""
		}
	case Stalled:
		if st.Idle < s.StallRounds {
			st.Status, st.Reason = Running, ""
		}
	}
	if sm, ok := s.Method.(StatefulMethod); ok && st.Method != nil {
		if err := sm.UnmarshalState(st.Method); err != nil {
			return fmt.Errorf("decomp: restoring the price rule: %w", err)
		}
	} else if st.Method != nil {
		return errors.New("decomp: the state holds a price rule's state but the method cannot restore it")
	}
	if st.Repair != nil {
		sr, ok := p.Repair.(StatefulRepairer)
		if !ok {
			return errors.New("decomp: the state holds a repairer's state but the problem's repairer cannot restore it")
		}
		if err := sr.RestoreRepairState(st.Repair); err != nil {
			return fmt.Errorf("decomp: restoring the repairer: %w", err)
		}
	}
	r.st = st
	return nil
}

func (r *runner) loop(parent context.Context) (res *Result, err error) {
	// The repair running in the background is ours: cancelled and waited
	// for on every return path.
	defer r.dropRepair()
	// hard ends the whole run; ctx ends the rounds, leaving room for the
	// last repair inside the time limit.
	hard, ctx := parent, parent
	if r.s.Time > 0 {
		var cancelHard, cancelRounds context.CancelFunc
		hard, cancelHard = context.WithDeadline(parent, r.start.Add(r.s.Time))
		defer cancelHard()
		reserve := min(r.s.FinalRepairTime, r.s.Time/2)
		ctx, cancelRounds = context.WithDeadline(hard, r.start.Add(r.s.Time-reserve))
		defer cancelRounds()
	}
	st := r.st
	lastCheckpoint := time.Now()
	for st.Status == Running {
		if err := r.round(ctx, parent); err != nil {
			return nil, err
		}
		if st.Status != Running || r.s.Checkpoint == nil {
			continue
		}
		byRounds := r.s.CheckpointEvery > 0 && st.Round%r.s.CheckpointEvery == 0
		byClock := r.s.CheckpointInterval > 0 && time.Since(lastCheckpoint) >= r.s.CheckpointInterval
		if byRounds || byClock {
			if err := r.checkpoint(); err != nil {
				return nil, err
			}
			lastCheckpoint = time.Now()
		}
	}
	if r.s.Checkpoint != nil && st.Status.Early() {
		// The last round boundary of a run that may be resumed.
		if err := r.checkpoint(); err != nil {
			return nil, err
		}
	}
	return r.finish(parent, hard)
}

// checkpoint hands the state to the hook at a round boundary with no
// repair in flight: a running repair is waited for and its outcome kept in
// the state, to be merged at the next repair round as it would have been.
func (r *runner) checkpoint() error {
	if r.pending != nil {
		o := <-r.pending
		r.cancelPending()
		r.pending, r.cancelPending = nil, nil
		if o.err != nil && !o.cancelled {
			return fmt.Errorf("decomp: repair in round %d: %w", o.round, o.err)
		}
		if o.err == nil {
			r.st.Pending, r.st.PendingRound, r.st.HasPending = o.plan, o.round, true
		}
	}
	if sm, ok := r.s.Method.(StatefulMethod); ok {
		b, err := sm.MarshalState()
		if err != nil {
			return fmt.Errorf("decomp: saving the price rule: %w", err)
		}
		r.st.Method = b
	}
	if sr, ok := r.p.Repair.(StatefulRepairer); ok {
		b, err := sr.RepairState()
		if err != nil {
			return fmt.Errorf("decomp: saving the repairer's state: %w", err)
		}
		r.st.Repair = b
	}
	r.st.Elapsed = r.elapsed()
	if err := r.s.Checkpoint(r.st); err != nil {
		return fmt.Errorf("decomp: checkpoint after round %d: %w", r.st.Round, err)
	}
	return nil
}

func (r *runner) elapsed() time.Duration { return r.st.elapsed0 + time.Since(r.start) }

// round makes one round over the state, or sets the stop status.
func (r *runner) round(ctx, parent context.Context) error {
	p, s, st := r.p, r.s, r.st
	if ctx.Err() != nil {
		st.Status = r.stopReason(parent)
		return nil
	}
	if s.Rounds > 0 && st.Round >= s.Rounds {
		st.Status = RoundLimit
		return nil
	}
	st.Round++
	r.req.Prices = st.Prices
	if err := p.Prepare(r.req); err != nil {
		return fmt.Errorf("decomp: round %d: %w", st.Round, err)
	}
	if err := s.Evaluator.Evaluate(ctx, p.Blocks, r.req, r.answers); err != nil {
		if ctx.Err() != nil {
			st.Round--
			st.Status = r.stopReason(parent)
			return nil
		}
		return fmt.Errorf("decomp: round %d: %w", st.Round, err)
	}
	r.evaluated = true
	value := r.reduce(st.Prices)
	improved := false
	if !st.HasBound || p.Sense.Better(st.Bound, value) {
		st.Bound, st.HasBound = value, true
		copy(st.BestPrices, st.Prices)
		improved = true
		if r.keep {
			r.keepBest()
		}
	}
	planImproved := false
	if (st.Round == 1 || st.Round%s.RepairEvery == 0) && !r.repairBusy() {
		var err error
		if planImproved, err = r.collectRepair(); err != nil {
			return err
		}
		r.launchRepair(ctx, st.Round)
	}
	// Once the rounds have stalled under a time budget, a better plan is
	// the plan search at work: it keeps the cores (the rounds had stopped
	// helping), and only a bound that moves gives them back to the rounds.
	if (planImproved && !r.stalled()) || (improved && r.boundMoved()) {
		st.Idle = 0
		st.IdleBound = st.Bound
	} else {
		st.Idle++
	}
	st.LastPrices = append(st.LastPrices[:0], st.Prices...)
	if s.Observer != nil {
		r.seen = append(r.seen[:0], st.Prices...)
	}
	norm := r.project()
	rec := RoundRecord{Round: st.Round, Elapsed: r.elapsed(), Value: value, Bound: st.Bound, PlanValue: math.NaN(), Norm: norm}
	if st.Plan != nil {
		rec.PlanValue = st.Plan.Value
	}
	st.Status = r.stopRule(norm)
	if st.Status == Running {
		rs := &RoundState{
			Round: st.Round, Sense: p.Sense, Rows: p.Rows, Value: value, Bound: st.Bound,
			Improved: improved, Target: r.target(), HasPlan: st.Plan != nil,
			Subgradient: r.sub, BestPrices: st.BestPrices, Answers: r.answers,
		}
		step, err := s.Method.Update(rs, st.Prices)
		if err != nil {
			return fmt.Errorf("decomp: price update after round %d: %w", st.Round, err)
		}
		rec.Step = step.Length
		if step.Stop {
			st.Status, st.Reason = MethodStopped, step.Reason
		}
		Project(p.Sense, p.Rows, st.Prices)
		for _, v := range st.Prices {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				// A method that lost its footing restarts from the
				// prices of the best bound.
				copy(st.Prices, st.BestPrices)
				break
			}
		}
	}
	st.History = append(st.History, rec)
	if s.Observer != nil {
		s.Observer.Observe(&Progress{Record: rec, Prices: r.seen, Problem: p, HasPlan: st.Plan != nil})
	}
	return nil
}

// stopRule is the one place that judges a finished round: it returns the
// stop status, or Running to go on. Limits checked before a round (time,
// rounds, interruption) are in round; the closing statuses after the last
// repair come from closedStatus.
func (r *runner) stopRule(norm float64) Status {
	p, st := r.p, r.st
	switch {
	case p.HasWorstPlanValue && p.Sense.Better(p.WorstPlanValue, st.Bound) && st.Plan == nil:
		return ProvedInfeasible
	case r.closed():
		return r.closedStatus()
	case norm == 0:
		return PricesSettled
	case st.Idle >= r.s.StallRounds && !r.s.stallBudget:
		return Stalled
	}
	return Running
}

// settleShare: under a time budget a better bound counts as progress for
// the stall rule only when it has moved by more than this share of the
// open gap since the last progress. A bound creeping up by thousandths
// while the plan is hundreds of units away cannot close the gap; the
// budget is then better spent on the plan (on the 80-agent type D file a
// 60 s run found a better plan so).
const settleShare = 0.01

// boundMoved reports whether a better bound is progress for the stall
// rule (see settleShare): always without a time budget or a plan.
func (r *runner) boundMoved() bool {
	st := r.st
	if !r.s.stallBudget || st.Plan == nil {
		return true
	}
	return math.Abs(st.Bound-st.IdleBound) > settleShare*math.Abs(st.Plan.Value-st.Bound)
}

// stalled reports that the rounds have stalled while the time limit is a
// budget: the repairs then get the run's effort (see Settings.StallRounds).
func (r *runner) stalled() bool {
	return r.s.stallBudget && r.st.Idle >= r.s.StallRounds
}

// finish merges the repair in flight, runs the last repair and builds the
// result.
func (r *runner) finish(parent, hard context.Context) (*Result, error) {
	st, s := r.st, r.s
	if _, err := r.collectRepair(); err != nil {
		return nil, err
	}
	if r.closed() && st.Status != ProvedInfeasible {
		st.Status = r.closedStatus()
	}
	if !r.evaluated && r.p.Repair != nil && st.LastPrices != nil && hard.Err() == nil &&
		(st.Status == RoundLimit || st.Status == Stalled) {
		// Resumed after the rounds were over: the last repair needs the
		// last round's answers, which the state does not hold; the blocks
		// give them again (they are exact and deterministic).
		r.req.Prices = st.LastPrices
		if err := r.p.Prepare(r.req); err != nil {
			return nil, fmt.Errorf("decomp: last round again: %w", err)
		}
		if err := s.Evaluator.Evaluate(hard, r.p.Blocks, r.req, r.answers); err != nil {
			if hard.Err() == nil {
				return nil, fmt.Errorf("decomp: last round again: %w", err)
			}
		} else {
			r.evaluated = true
		}
	}
	// A last repair from the latest answers. After an interruption it gets
	// a short detached deadline so that a plan is not lost.
	if r.evaluated && st.Status != IntegerClosed && st.Status != ProvedInfeasible && st.Status != SearchClosed {
		rctx := hard
		if parent.Err() != nil {
			var cancel context.CancelFunc
			rctx, cancel = context.WithTimeout(context.WithoutCancel(parent), s.FinalRepairTime)
			defer cancel()
		}
		if _, err := r.repair(rctx, st.Round, true); err != nil {
			return nil, err
		}
		if r.closed() {
			st.Status = r.closedStatus()
		} else if st.Status != TimeLimit && parent.Err() != nil {
			// The user stopped the last repair: say so.
			st.Status = Interrupted
		}
	}
	return r.result(), nil
}

// stopReason tells an interruption (the caller cancelled) from a time
// limit (ours, or a deadline the caller set).
func (r *runner) stopReason(parent context.Context) Status {
	if errors.Is(parent.Err(), context.Canceled) {
		return Interrupted
	}
	return TimeLimit
}

// reduce sums block values and uses in block order and fills r.sub with
// the (unprojected) subgradient; it returns L at the current prices.
func (r *runner) reduce(prices []float64) float64 {
	if len(r.scale) != len(r.sub) {
		r.scale = make([]float64, len(r.sub))
	}
	for i := range r.sub {
		r.sub[i] = -r.p.Rows[i].RHS
		r.scale[i] = math.Abs(r.p.Rows[i].RHS)
	}
	value := 0.0
	for k := range r.answers {
		a := &r.answers[k]
		value += a.Value
		for _, e := range a.Use {
			r.sub[e.Index] += e.Value
			r.scale[e.Index] += math.Abs(e.Value)
		}
	}
	for i, row := range r.p.Rows {
		value -= prices[i] * row.RHS
	}
	return value
}

// project zeroes the subgradient components that would push a price at
// zero out of its valid sign and returns the length of what remains.
func (r *runner) project() float64 {
	dir := 1.0
	if r.p.Sense == Maximise {
		dir = -1
	}
	norm2 := 0.0
	for i, row := range r.p.Rows {
		sign := PriceSign(r.p.Sense, row.Sense)
		if sign != 0 && r.st.Prices[i] == 0 && float64(sign)*dir*r.sub[i] < 0 {
			r.sub[i] = 0
		}
		// A component at the level of rounding noise is zero: stepping
		// along it would divide by a vanishing norm and throw the prices
		// to absurd values, where the relaxed value loses its precision.
		if math.Abs(r.sub[i]) <= 1e-9*math.Max(1, r.scale[i]) {
			r.sub[i] = 0
		}
		norm2 += r.sub[i] * r.sub[i]
	}
	return math.Sqrt(norm2)
}

// keepBest copies this round's answers as the answers at the best bound.
func (r *runner) keepBest() {
	if len(r.best) != len(r.answers) {
		r.best = make([]Answer, len(r.answers))
	}
	for k, a := range r.answers {
		b := &r.best[k]
		b.Value, b.Cost = a.Value, a.Cost
		b.Use = append(b.Use[:0], a.Use...)
		b.Primal = append(b.Primal[:0], a.Primal...)
	}
}

func (r *runner) target() float64 {
	if r.st.Plan != nil {
		return r.st.Plan.Value
	}
	if r.hasCutoff {
		// A node aims at the value it must beat.
		return r.cutoff
	}
	est := 0.05*math.Abs(r.st.Bound) + 1
	if r.p.Sense == Maximise {
		return r.st.Bound - est
	}
	return r.st.Bound + est
}

// repairInput snapshots what a repairer sees; with copy set it owns its
// slices, so that the repair can run while the next rounds reuse them.
func (r *runner) repairInput(round int, final, copyState bool) *RepairInput {
	in := &RepairInput{
		Round: round, Final: final, Sense: r.p.Sense, Prices: r.st.Prices,
		Answers: r.answers, Best: r.st.Plan, Seed: mixSeed(r.s.Seed, uint64(round)),
		Bound: r.st.Bound, BoundPrices: r.st.BestPrices,
		Workers: r.s.Workers, Stalled: r.stalled(),
	}
	if copyState {
		in.Prices = append([]float64(nil), r.st.Prices...)
		in.BoundPrices = append([]float64(nil), r.st.BestPrices...)
		in.Answers = copyAnswers(r.answers)
	}
	if pa, ok := r.s.Method.(PrimalAverager); ok {
		in.Primal = pa.AveragePrimal()
	}
	return in
}

// copyAnswers copies answers into one backing array for all their
// entries, so that a round of many tiny blocks costs two allocations, not
// two per block.
func copyAnswers(answers []Answer) []Answer {
	n := 0
	for _, a := range answers {
		n += len(a.Use) + len(a.Primal)
	}
	slab := make([]Entry, 0, n)
	out := make([]Answer, len(answers))
	for k, a := range answers {
		start := len(slab)
		slab = append(slab, a.Use...)
		use := slab[start:len(slab):len(slab)]
		start = len(slab)
		slab = append(slab, a.Primal...)
		out[k] = Answer{Value: a.Value, Cost: a.Cost, Use: use, Primal: slab[start:len(slab):len(slab)]}
	}
	return out
}

// repairOutcome is a finished repair waiting to be merged.
type repairOutcome struct {
	round     int
	plan      *Plan
	err       error
	cancelled bool
}

// launchRepair starts a repair of this round's answers on its own
// goroutine, so that it overlaps the next rounds' block evaluation. Its
// plan is merged at the next repair round (or at the end), a fixed point
// of the run, so the outcome does not depend on timing. Only one repair
// runs at a time.
func (r *runner) launchRepair(ctx context.Context, round int) {
	if r.p.Repair == nil {
		return
	}
	in := r.repairInput(round, false, true)
	ch := make(chan repairOutcome, 1)
	var rctx context.Context
	var cancel context.CancelFunc
	if r.s.Checkpoint == nil {
		rctx, cancel = context.WithCancel(ctx)
	} else {
		// With checkpoints an interruption lets the repair in flight
		// finish (its effort is bounded by moves), so that the last
		// checkpoint holds the repair the uninterrupted run would have
		// merged; a time limit still cuts it, and dropRepair cancels it.
		detached := context.WithoutCancel(ctx)
		if dl, ok := ctx.Deadline(); ok {
			rctx, cancel = context.WithDeadline(detached, dl)
		} else {
			rctx, cancel = context.WithCancel(detached)
		}
	}
	work := func() {
		plan, err := r.p.Repair.Repair(rctx, in)
		ch <- repairOutcome{round: round, plan: plan, err: err, cancelled: rctx.Err() != nil}
	}
	if r.s.Workers == 1 || in.Stalled {
		// A budget of one worker, or stalled rounds under a time budget:
		// the repair runs here, and its plan still waits for the next
		// repair round, so the run is the same as with the overlap, only
		// without the rounds competing for the cores.
		work()
	} else {
		go work()
	}
	r.pending, r.cancelPending = ch, cancel
}

// repairBusy reports that the rounds go on past a repair round without
// waiting for the repair in flight: only when the time limit is the run's
// only bound on rounds (no round limit) and no checkpoints are taken, so
// that the run is not meant to be reproduced round for round, and the
// repair has not finished yet. The rounds then keep both cores busy while
// the repair runs, and the repair is merged at the first repair round
// after it has finished. With a round
// limit every repair is merged at its fixed round, whatever the timing.
func (r *runner) repairBusy() bool {
	return r.pending != nil && len(r.pending) == 0 && r.s.Time > 0 && r.s.Rounds <= 0 && r.s.Checkpoint == nil
}

// dropRepair cancels the repair in flight, if any, and waits for it.
func (r *runner) dropRepair() {
	if r.pending == nil {
		return
	}
	r.cancelPending()
	<-r.pending
	r.pending, r.cancelPending = nil, nil
}

// collectRepair waits for the running repair, if any, and merges its plan.
func (r *runner) collectRepair() (bool, error) {
	if r.st.HasPending {
		// Waited for at a checkpoint; merged here as it would have been.
		o := repairOutcome{round: r.st.PendingRound, plan: r.st.Pending}
		r.st.Pending, r.st.PendingRound, r.st.HasPending = nil, 0, false
		return r.accept(o)
	}
	if r.pending == nil {
		return false, nil
	}
	o := <-r.pending
	r.cancelPending()
	r.pending, r.cancelPending = nil, nil
	return r.accept(o)
}

// repair runs a repair now, on the calling goroutine.
func (r *runner) repair(ctx context.Context, round int, final bool) (bool, error) {
	if r.p.Repair == nil {
		return false, nil
	}
	plan, err := r.p.Repair.Repair(ctx, r.repairInput(round, final, false))
	return r.accept(repairOutcome{round: round, plan: plan, err: err, cancelled: ctx.Err() != nil})
}

// accept keeps a repaired plan when it is better than the best so far.
func (r *runner) accept(o repairOutcome) (bool, error) {
	plan, err := o.plan, o.err
	if err != nil {
		if o.cancelled {
			return false, nil
		}
		return false, fmt.Errorf("decomp: repair in round %d: %w", o.round, err)
	}
	if plan == nil || math.IsNaN(plan.Value) {
		return false, nil
	}
	better := r.st.Plan == nil || r.p.Sense.Better(plan.Value, r.st.Plan.Value)
	if plan.ProvedOptimal && (better || math.Abs(plan.Value-r.st.Plan.Value) <= 1e-9*math.Max(1, math.Abs(plan.Value))) {
		// The optimum's value is itself a valid bound.
		r.st.Plan, r.st.PlanProved = plan, true
		r.st.Bound, r.st.HasBound = plan.Value, true
		return true, nil
	}
	if better {
		r.st.Plan = plan
		return true, nil
	}
	return false, nil
}

// mixSeed derives a per-round seed (splitmix64 finaliser).
func mixSeed(seed, round uint64) uint64 {
	z := seed + round*0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	return z ^ (z >> 31)
}

// roundedBound is the bound after rounding an integral objective.
func (r *runner) roundedBound() float64 {
	b := r.st.Bound
	if !r.p.IntegralObjective {
		return b
	}
	tol := 1e-7 * math.Max(1, math.Abs(b))
	if r.p.Sense == Minimise {
		return math.Ceil(b - tol)
	}
	return math.Floor(b + tol)
}

func (r *runner) proved() bool {
	if r.st.PlanProved {
		return true
	}
	if r.st.Plan == nil || !r.st.HasBound {
		return false
	}
	b := r.roundedBound()
	if r.p.Sense == Minimise {
		return r.st.Plan.Value <= b+1e-9*math.Max(1, math.Abs(b))
	}
	return r.st.Plan.Value >= b-1e-9*math.Max(1, math.Abs(b))
}

func (r *runner) gap() float64 {
	if r.st.Plan == nil || !r.st.HasBound {
		return math.Inf(1)
	}
	return math.Max(0, math.Abs(r.st.Plan.Value-r.st.Bound)/math.Max(1, math.Abs(r.st.Plan.Value)))
}

func (r *runner) closed() bool {
	return r.proved() || (r.s.Gap > 0 && r.gap() <= r.s.Gap)
}

func (r *runner) closedStatus() Status {
	if r.st.PlanProved {
		return SearchClosed
	}
	if r.proved() {
		return IntegerClosed
	}
	return GapReached
}

func (r *runner) result() *Result {
	res := &Result{
		Status: r.st.Status, Reason: r.st.Reason, ProvedOptimal: r.proved(), Bound: r.st.Bound, HasBound: r.st.HasBound,
		Plan: r.st.Plan, Gap: r.gap(), Rounds: r.st.Round, Elapsed: r.elapsed(),
		Prices: r.st.BestPrices, History: r.st.History,
	}
	if !r.st.HasBound {
		res.Bound = math.NaN()
	}
	res.Rows = make([]RowReport, len(r.p.Rows))
	for i, row := range r.p.Rows {
		rep := RowReport{Name: row.Name, Sense: row.Sense, RHS: row.RHS, Price: r.st.BestPrices[i], Use: math.NaN(), Slack: math.NaN()}
		if r.st.Plan != nil && i < len(r.st.Plan.Use) {
			rep.Use = r.st.Plan.Use[i]
			switch row.Sense {
			case LessEqual:
				rep.Slack = row.RHS - rep.Use
			case GreaterEqual:
				rep.Slack = rep.Use - row.RHS
			default:
				rep.Slack = -math.Abs(rep.Use - row.RHS)
			}
			rep.Binding = math.Abs(rep.Slack) <= 1e-9*math.Max(1, math.Abs(row.RHS))
		}
		res.Rows[i] = rep
	}
	return res
}

// Relaxed evaluates the relaxed value L at the given prices and returns it
// with the block answers. The prices must already have valid signs (see
// PriceSign); invalid signs are an error, since L would then not be a
// bound. A nil evaluator means Pool{}.
func Relaxed(ctx context.Context, p *Problem, prices []float64, ev Evaluator) (float64, []Answer, error) {
	if err := p.Validate(); err != nil {
		return 0, nil, err
	}
	if len(prices) != len(p.Rows) {
		return 0, nil, fmt.Errorf("decomp: %d prices for %d rows", len(prices), len(p.Rows))
	}
	for i, row := range p.Rows {
		sign := PriceSign(p.Sense, row.Sense)
		if math.IsNaN(prices[i]) || math.IsInf(prices[i], 0) || float64(sign)*prices[i] < 0 {
			return 0, nil, fmt.Errorf("decomp: price %v of row %d (%s %s) has the wrong sign for a %s problem", prices[i], i, row.Name, row.Sense, p.Sense)
		}
	}
	if ev == nil {
		ev = Pool{}
	}
	fix := append([]Fixing(nil), p.Fixings...)
	if err := SortFixings(fix); err != nil {
		return 0, nil, err
	}
	r := &runner{p: p, answers: make([]Answer, len(p.Blocks)), sub: make([]float64, len(p.Rows))}
	req := &Request{Sense: p.Sense, Prices: prices, Fixings: fix}
	if err := p.Prepare(req); err != nil {
		return 0, nil, err
	}
	if err := ev.Evaluate(ctx, p.Blocks, req, r.answers); err != nil {
		return 0, nil, fmt.Errorf("decomp: %w", err)
	}
	return r.reduce(prices), r.answers, nil
}
