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
	// GapReached: the relative gap fell to Settings.Gap or below.
	GapReached Status = iota + 1
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
	// ProvedInfeasible: the bound passed Problem.PlanLimit, so no feasible
	// plan exists.
	ProvedInfeasible
	// SearchClosed: the repairer proved its plan optimal by an exact search
	// (Plan.Proved).
	SearchClosed
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
type Settings struct {
	Gap         float64       // relative gap to stop at; 0 means 1e-4, negative means never
	Time        time.Duration // wall-clock limit; 0 means none
	Rounds      int           // round limit; 0 means none
	StallRounds int           // rounds without any improvement before stopping; 0 means 300
	RepairEvery int           // repair on round 1 and every this many rounds; 0 means 5
	Seed        uint64        // passed (mixed with the round) to the repairer
	Method      Method        // price-update rule; nil means a fresh Subgradient
	Evaluator   Evaluator     // block evaluation; nil means Pool{} (GOMAXPROCS workers)
	Observer    Observer      // sees every round; nil means none
	// FinalRepairTime is kept for the last repair: with a time limit the
	// rounds stop this long before it, so that the whole run fits in Time;
	// after an interruption the last repair gets this long. 0 means a
	// tenth of Time, at least 0.2 s and at most 2 s (2 s without a time
	// limit).
	FinalRepairTime time.Duration
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
	// Proved reports that the plan is optimal: it meets the bound (within
	// 1e-9 relative, or exactly after rounding an integral objective).
	Proved bool
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
// returns an error only for an invalid problem or a failing block or
// repairer; cancellation of ctx is a normal stop (Status Interrupted).
func Solve(ctx context.Context, p *Problem, s Settings) (*Result, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	start := time.Now()
	s = withDefaults(s)
	run := &runner{p: p, s: s, start: start}
	return run.loop(ctx)
}

func withDefaults(s Settings) Settings {
	if s.Gap == 0 {
		s.Gap = 1e-4
	}
	if s.StallRounds <= 0 {
		s.StallRounds = 300
	}
	if s.RepairEvery <= 0 {
		s.RepairEvery = 5
	}
	if s.Method == nil {
		s.Method = &Subgradient{}
	}
	if s.Evaluator == nil {
		s.Evaluator = Pool{}
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

	prices, bestPrices []float64
	answers            []Answer
	sub                []float64
	scale              []float64 // per row: |rhs| + Σ |use|, the size of its rounding noise
	bound              float64
	hasBound           bool
	plan               *Plan
	planProved         bool
	pending            chan repairOutcome // the repair running, if any
	seen               []float64          // this round's prices, for the observer
	history            []RoundRecord
}

func (r *runner) loop(parent context.Context) (*Result, error) {
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
	p, s := r.p, r.s
	nrows := len(p.Rows)
	r.prices = make([]float64, nrows)
	if p.Prices != nil {
		copy(r.prices, p.Prices)
	}
	Project(p.Sense, p.Rows, r.prices)
	r.bestPrices = append([]float64(nil), r.prices...)
	r.answers = make([]Answer, len(p.Blocks))
	r.sub = make([]float64, nrows)
	s.Method.Init(p.Sense, p.Rows)
	req := &Request{Sense: p.Sense}
	idle := 0
	status := Status(0)
	round := 0
	for status == 0 {
		if ctx.Err() != nil {
			status = r.stopReason(parent)
			break
		}
		if s.Rounds > 0 && round >= s.Rounds {
			status = RoundLimit
			break
		}
		round++
		req.Prices = r.prices
		if err := s.Evaluator.Evaluate(ctx, p.Blocks, req, r.answers); err != nil {
			if ctx.Err() != nil {
				round--
				status = r.stopReason(parent)
				break
			}
			return nil, fmt.Errorf("decomp: round %d: %w", round, err)
		}
		value := r.reduce()
		improved := false
		if !r.hasBound || p.Sense.Better(r.bound, value) {
			r.bound, r.hasBound = value, true
			copy(r.bestPrices, r.prices)
			improved = true
		}
		planImproved := false
		if round == 1 || round%s.RepairEvery == 0 {
			var err error
			if planImproved, err = r.collectRepair(); err != nil {
				return nil, err
			}
			r.launchRepair(ctx, round)
		}
		if improved || planImproved {
			idle = 0
		} else {
			idle++
		}
		if s.Observer != nil {
			r.seen = append(r.seen[:0], r.prices...)
		}
		norm := r.project()
		rec := RoundRecord{Round: round, Elapsed: time.Since(r.start), Value: value, Bound: r.bound, PlanValue: math.NaN()}
		if r.plan != nil {
			rec.PlanValue = r.plan.Value
		}
		rec.Norm = norm
		switch {
		case p.HasPlanLimit && p.Sense.Better(p.PlanLimit, r.bound) && r.plan == nil:
			status = ProvedInfeasible
		case r.closed():
			status = r.closedStatus()
		case norm == 0:
			status = PricesSettled
		case idle >= s.StallRounds:
			status = Stalled
		}
		if status == 0 {
			st := &RoundState{
				Round: round, Sense: p.Sense, Rows: p.Rows, Value: value, Bound: r.bound,
				Improved: improved, Target: r.target(), HasPlan: r.plan != nil,
				Subgradient: r.sub, Answers: r.answers,
			}
			rec.Step = s.Method.Update(st, r.prices)
			Project(p.Sense, p.Rows, r.prices)
			for _, v := range r.prices {
				if math.IsNaN(v) || math.IsInf(v, 0) {
					// A method that lost its footing restarts from the
					// prices of the best bound.
					copy(r.prices, r.bestPrices)
					break
				}
			}
		}
		r.history = append(r.history, rec)
		if s.Observer != nil {
			s.Observer.Observe(&Progress{Record: rec, Prices: r.seen, Problem: p, HasPlan: r.plan != nil})
		}
	}
	// The repair still running is merged first.
	if _, err := r.collectRepair(); err != nil {
		return nil, err
	}
	if r.closed() && status != ProvedInfeasible {
		status = r.closedStatus()
	}
	// A last repair from the latest answers. After an interruption it gets
	// a short detached deadline so that a plan is not lost.
	if round > 0 && status != IntegerClosed && status != ProvedInfeasible && status != SearchClosed {
		rctx := hard
		if parent.Err() != nil {
			var cancel context.CancelFunc
			rctx, cancel = context.WithTimeout(context.WithoutCancel(parent), s.FinalRepairTime)
			defer cancel()
		}
		if _, err := r.repair(rctx, round, true); err != nil {
			return nil, err
		}
		if r.closed() {
			status = r.closedStatus()
		} else if status != TimeLimit && parent.Err() != nil {
			// The user stopped the last repair: say so.
			status = Interrupted
		}
	}
	return r.result(status, round), nil
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
func (r *runner) reduce() float64 {
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
		value -= r.prices[i] * row.RHS
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
		if sign != 0 && r.prices[i] == 0 && float64(sign)*dir*r.sub[i] < 0 {
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

func (r *runner) target() float64 {
	if r.plan != nil {
		return r.plan.Value
	}
	est := 0.05*math.Abs(r.bound) + 1
	if r.p.Sense == Maximise {
		return r.bound - est
	}
	return r.bound + est
}

// repairInput snapshots what a repairer sees; with copy set it owns its
// slices, so that the repair can run while the next rounds reuse them.
func (r *runner) repairInput(round int, final, copyState bool) *RepairInput {
	in := &RepairInput{
		Round: round, Final: final, Sense: r.p.Sense, Prices: r.prices,
		Answers: r.answers, Best: r.plan, Seed: mixSeed(r.s.Seed, uint64(round)),
		Bound: r.bound, BoundPrices: r.bestPrices,
	}
	if copyState {
		in.Prices = append([]float64(nil), r.prices...)
		in.BoundPrices = append([]float64(nil), r.bestPrices...)
		in.Answers = make([]Answer, len(r.answers))
		for k, a := range r.answers {
			in.Answers[k] = Answer{Value: a.Value, Cost: a.Cost,
				Use: append([]Entry(nil), a.Use...), Primal: append([]Entry(nil), a.Primal...)}
		}
	}
	return in
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
	go func() {
		plan, err := r.p.Repair.Repair(ctx, in)
		ch <- repairOutcome{round: round, plan: plan, err: err, cancelled: ctx.Err() != nil}
	}()
	r.pending = ch
}

// collectRepair waits for the running repair, if any, and merges its plan.
func (r *runner) collectRepair() (bool, error) {
	if r.pending == nil {
		return false, nil
	}
	o := <-r.pending
	r.pending = nil
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
	better := r.plan == nil || r.p.Sense.Better(plan.Value, r.plan.Value)
	if plan.Proved && (better || math.Abs(plan.Value-r.plan.Value) <= 1e-9*math.Max(1, math.Abs(plan.Value))) {
		// The optimum's value is itself a valid bound.
		r.plan, r.planProved = plan, true
		r.bound, r.hasBound = plan.Value, true
		return true, nil
	}
	if better {
		r.plan = plan
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
	b := r.bound
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
	if r.planProved {
		return true
	}
	if r.plan == nil || !r.hasBound {
		return false
	}
	b := r.roundedBound()
	if r.p.Sense == Minimise {
		return r.plan.Value <= b+1e-9*math.Max(1, math.Abs(b))
	}
	return r.plan.Value >= b-1e-9*math.Max(1, math.Abs(b))
}

func (r *runner) gap() float64 {
	if r.plan == nil || !r.hasBound {
		return math.Inf(1)
	}
	return math.Max(0, math.Abs(r.plan.Value-r.bound)/math.Max(1, math.Abs(r.plan.Value)))
}

func (r *runner) closed() bool {
	return r.proved() || (r.s.Gap > 0 && r.gap() <= r.s.Gap)
}

func (r *runner) closedStatus() Status {
	if r.planProved {
		return SearchClosed
	}
	if r.proved() {
		return IntegerClosed
	}
	return GapReached
}

func (r *runner) result(status Status, rounds int) *Result {
	res := &Result{
		Status: status, Proved: r.proved(), Bound: r.bound, HasBound: r.hasBound,
		Plan: r.plan, Gap: r.gap(), Rounds: rounds, Elapsed: time.Since(r.start),
		Prices: r.bestPrices, History: r.history,
	}
	if !r.hasBound {
		res.Bound = math.NaN()
	}
	res.Rows = make([]RowReport, len(r.p.Rows))
	for i, row := range r.p.Rows {
		rep := RowReport{Name: row.Name, Sense: row.Sense, RHS: row.RHS, Price: r.bestPrices[i], Use: math.NaN(), Slack: math.NaN()}
		if r.plan != nil && i < len(r.plan.Use) {
			rep.Use = r.plan.Use[i]
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
	r := &runner{p: p, prices: prices, answers: make([]Answer, len(p.Blocks)), sub: make([]float64, len(p.Rows))}
	if err := ev.Evaluate(ctx, p.Blocks, &Request{Sense: p.Sense, Prices: prices}, r.answers); err != nil {
		return 0, nil, fmt.Errorf("decomp: %w", err)
	}
	return r.reduce(), r.answers, nil
}
