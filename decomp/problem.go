package decomp

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sort"
)

// Sense is the direction of optimisation.
type Sense int8

// Objective senses.
const (
	Minimise Sense = iota
	Maximise
)

// String returns "min" or "max".
func (s Sense) String() string {
	if s == Maximise {
		return "max"
	}
	return "min"
}

// Better reports whether value a is strictly better than b in this sense.
func (s Sense) Better(a, b float64) bool {
	if s == Maximise {
		return a > b
	}
	return a < b
}

// RowSense is the comparison of a coupling row.
type RowSense int8

// Row senses.
const (
	LessEqual RowSense = iota
	GreaterEqual
	Equal
)

// String returns "<=", ">=" or "=".
func (r RowSense) String() string {
	switch r {
	case GreaterEqual:
		return ">="
	case Equal:
		return "="
	}
	return "<="
}

// Row is a coupling row: the blocks' summed use compared with RHS.
type Row struct {
	Name  string
	Sense RowSense
	RHS   float64
}

// Entry is one non-zero of a sparse vector: an index and a value.
// In a block's use it indexes coupling rows; in a block's primal answer it
// indexes the block's own variables.
type Entry struct {
	Index int
	Value float64
}

// Request is what a block is asked to solve in one round: its exact optimum
// of own cost plus priced use of the coupling rows, in the given sense.
// Blocks must not modify it.
//
// One Request serves every block of a round; Block tells the block which
// one it is, so that it can find its own fixings. An evaluator that ships
// work elsewhere sends the shared fields once and the block index per task.
type Request struct {
	Sense  Sense
	Prices []float64 // one per coupling row, indexed like Problem.Rows
	// Block is the stable identity of the block being asked: its index in
	// Problem.Blocks. The evaluator sets it.
	Block int
	// Workers is how many goroutines the block may use inside Solve (at
	// least 1); the evaluator sets it from its own budget, so that the
	// whole run draws on one worker count.
	Workers int
	// Fixings are the variable fixings of every block, sorted by block and
	// then by variable (see SortFixings). A block must return the exact
	// optimum over the points that honour its fixings, or an error wrapping
	// ErrInfeasible when none does.
	Fixings []Fixing

	shared any // set by Problem.Prepare; never shipped
}

// Shared returns what Problem.Share derived from this request's prices, or
// nil when the problem has no Share. Blocks must treat it as read-only.
func (r *Request) Shared() any { return r.shared }

// Fixing fixes one of a block's own variables (numbered as in
// Answer.Primal) to a value.
type Fixing struct {
	Block int
	Var   int
	Value float64
}

// ErrInfeasible is wrapped by a block's error when no point of the block
// honours its fixings. The engine then knows the relaxation, and so the
// problem under those fixings, has no feasible point.
var ErrInfeasible = errors.New("no feasible point under the fixings")

// SortFixings sorts fixings by block, then variable, the order Request
// needs. It returns an error when a variable is fixed twice to different
// values.
func SortFixings(f []Fixing) error {
	sort.Slice(f, func(a, b int) bool {
		if f[a].Block != f[b].Block {
			return f[a].Block < f[b].Block
		}
		return f[a].Var < f[b].Var
	})
	for i := 1; i < len(f); i++ {
		if f[i].Block == f[i-1].Block && f[i].Var == f[i-1].Var && f[i].Value != f[i-1].Value {
			return fmt.Errorf("decomp: block %d variable %d fixed to both %v and %v", f[i].Block, f[i].Var, f[i-1].Value, f[i].Value)
		}
	}
	return nil
}

// Fixed returns the fixings of the block being asked (Request.Block),
// sorted by variable; nil when it has none.
func (r *Request) Fixed() []Fixing {
	return FixingsOf(r.Fixings, r.Block)
}

// FixingsOf returns the fixings of block k from fixings sorted by
// SortFixings.
func FixingsOf(fixings []Fixing, k int) []Fixing {
	if len(fixings) == 0 {
		return nil
	}
	lo := sort.Search(len(fixings), func(i int) bool { return fixings[i].Block >= k })
	hi := lo
	for hi < len(fixings) && fixings[hi].Block == k {
		hi++
	}
	if lo == hi {
		return nil
	}
	return fixings[lo:hi:hi]
}

// Answer is a block's exact optimum at the requested prices.
//
// A block may reuse the slices it finds in the Answer from the previous
// round (truncate and append), which keeps rounds free of allocation.
type Answer struct {
	// Value is own cost plus Σ price·use at the block's optimum.
	Value float64
	// Cost is the block's own cost (or profit) at that optimum.
	Cost float64
	// Use is the sparse use of coupling rows (Index = row).
	Use []Entry
	// Primal lists the block's own variables at non-zero value
	// (Index = the block's local variable number). Repairers and price
	// rules that average primal answers read it.
	Primal []Entry
}

// Block is one independent piece of the problem. Solve must return the
// exact optimum (a heuristic answer would make the bound invalid).
//
// The engine never calls Solve on the same block from two goroutines at
// once, so a block may keep scratch space of its own.
type Block interface {
	Solve(ctx context.Context, req *Request, ans *Answer) error
}

// Plan is a feasible solution found by a repairer.
type Plan struct {
	// Value is the plan's objective value.
	Value float64
	// Use is the dense use of every coupling row by the plan, indexed like
	// Problem.Rows; the result reports slack and binding rows from it.
	Use []float64
	// Detail is the family's own representation of the plan; the engine
	// passes it through untouched.
	Detail any
	// ProvedOptimal states that the repairer proved this plan optimal by an exact
	// search of its own (for example a branch and bound over a few
	// decisions, using the relaxation's bound). The engine then takes the
	// plan's value as the bound and stops.
	ProvedOptimal bool
}

// RepairInput is what a repairer sees in a round.
type RepairInput struct {
	Round   int
	Final   bool      // the last repair of the run
	Sense   Sense     // objective sense
	Prices  []float64 // prices at which Answers were computed
	Answers []Answer  // one per block, in block order
	// Bound is the best bound so far and BoundPrices the prices that gave
	// it (an exact search in the repairer may price its own bounds there).
	Bound       float64
	BoundPrices []float64
	Best        *Plan  // best plan so far, or nil
	Seed        uint64 // derived from Settings.Seed and Round, for reproducible randomness
	// Primal, when the price rule builds one (see PrimalAverager), is an
	// approximate fractional primal solution: per block, its variables at
	// their averaged values (numbered as in Answer.Primal). Nil otherwise.
	// A repairer may use it to rank choices; it is the repairer's own copy.
	Primal [][]Entry
	// Workers is the run's worker budget (Settings.Workers; 0 means
	// GOMAXPROCS). A repairer may split its search into as many
	// goroutines; its result must not depend on the number.
	Workers int
	// Stalled reports that bound and plan have not improved for
	// Settings.StallRounds rounds in a run whose time limit is a budget
	// (see Settings.StallRounds): the rounds wait for this repair, which
	// may spend more effort than usual.
	Stalled bool
	// Fixings, in a repair at a node of a Search, are the node's fixings
	// (the problem's own, the branching decisions and the reduced-cost
	// fixings inherited), sorted by SortFixings: a plan the repairer
	// returns must be feasible for the problem, but one that honours them
	// is the node's own. Nil in a plain run.
	Fixings []Fixing
}

// Repairer turns block answers into a feasible plan. It returns nil (and no
// error) when it finds none. It must stop promptly when ctx is cancelled,
// returning the best plan it has.
//
// The engine runs in-round repairs on their own goroutine, overlapping the
// next rounds' block evaluation (the input is a private copy), and merges
// the plan at the next repair round. A repairer must therefore share no
// mutable state with the blocks. The engine never runs two repairs at once.
type Repairer interface {
	Repair(ctx context.Context, in *RepairInput) (*Plan, error)
}

// StatefulRepairer is a Repairer whose own state shapes later repairs
// (counters, caches, warm starts), so that a resumed run repairs exactly
// as the uninterrupted one. The engine captures RepairState at every
// checkpoint, after the repair in flight has finished, and calls
// RestoreRepairState when Resume starts from a state that holds one
// (before the first round). RestoreRepairState must refuse data it did not
// write with an error, never panic.
type StatefulRepairer interface {
	Repairer
	RepairState() ([]byte, error)
	RestoreRepairState(data []byte) error
}

// Problem is a decomposed optimisation problem: blocks tied by coupling
// rows.
type Problem struct {
	Name   string
	Sense  Sense
	Rows   []Row
	Blocks []Block
	// Prices, when not nil, are the starting prices (projected onto the
	// valid signs before use); otherwise prices start at zero.
	Prices []float64
	// IntegralObjective states that every feasible plan has an integral
	// value, so the bound may be rounded (up when minimising, down when
	// maximising) when judging whether a plan is proved optimal.
	IntegralObjective bool
	// WorstPlanValue, when HasWorstPlanValue is set, is a value that every feasible
	// plan is at least as good as (for example the sum of every block's
	// worst cost). A bound beyond it proves that no feasible plan exists.
	WorstPlanValue    float64
	HasWorstPlanValue bool
	// Repair is optional; without it the run gives a bound only. A
	// repairer with state of its own implements StatefulRepairer.
	Repair Repairer
	// Fixings fix block variables for the whole run (a search node's
	// child problem); every Request carries them, sorted by SortFixings.
	Fixings []Fixing
	// Plans serialises Plan.Detail for checkpoints; nil when the family's
	// plans carry no detail or are not checkpointed.
	Plans PlanCodec
	// Share, when not nil, derives from a request the data that every
	// block of an evaluation reads (for example prefix sums of slot prices
	// shared by thousands of tiny blocks), so that it is computed once per
	// evaluation and not once per block. The engine calls it through
	// Prepare before every evaluation; blocks find the result through
	// Request.Shared. It must depend on the request only (sense, prices,
	// fixings, workers): an evaluator that ships requests elsewhere does
	// not ship the result but calls Prepare again on the far side.
	Share func(req *Request) (any, error)
}

// Prepare sets req's shared data from p.Share (nil when p has no Share).
// The engine calls it before every evaluation; an evaluator that decodes
// a shipped request calls it before solving blocks.
func (p *Problem) Prepare(req *Request) error {
	req.shared = nil
	if p.Share == nil {
		return nil
	}
	v, err := p.Share(req)
	if err != nil {
		return fmt.Errorf("decomp: problem %q: preparing shared round data: %w", p.Name, err)
	}
	req.shared = v
	return nil
}

// PlanCodec serialises a family's Plan.Detail, so that a checkpoint can
// hold the best plan. DecodePlan must refuse data it did not write with an
// error, never panic.
type PlanCodec interface {
	EncodePlan(detail any) ([]byte, error)
	DecodePlan(data []byte) (any, error)
}

// Validate checks the problem's shape.
func (p *Problem) Validate() error {
	if p == nil {
		return errors.New("decomp: nil problem")
	}
	if p.Sense != Minimise && p.Sense != Maximise {
		return fmt.Errorf("decomp: problem %q: unknown objective sense %d", p.Name, p.Sense)
	}
	if len(p.Blocks) == 0 {
		return fmt.Errorf("decomp: problem %q has no blocks", p.Name)
	}
	for i, r := range p.Rows {
		if r.Sense != LessEqual && r.Sense != GreaterEqual && r.Sense != Equal {
			return fmt.Errorf("decomp: problem %q: row %d (%s): unknown sense %d", p.Name, i, r.Name, r.Sense)
		}
		if math.IsNaN(r.RHS) || math.IsInf(r.RHS, 0) {
			return fmt.Errorf("decomp: problem %q: row %d (%s): right-hand side %v is not finite", p.Name, i, r.Name, r.RHS)
		}
	}
	for i, b := range p.Blocks {
		if b == nil {
			return fmt.Errorf("decomp: problem %q: block %d is nil", p.Name, i)
		}
	}
	if p.Prices != nil && len(p.Prices) != len(p.Rows) {
		return fmt.Errorf("decomp: problem %q: %d starting prices for %d rows", p.Name, len(p.Prices), len(p.Rows))
	}
	return nil
}

// PriceSign returns the sign a multiplier must have for a row of the given
// sense in a problem of the given objective sense: +1 (non-negative), -1
// (non-positive) or 0 (free). See the table in the package doc.
func PriceSign(obj Sense, row RowSense) int {
	switch row {
	case Equal:
		return 0
	case LessEqual:
		if obj == Minimise {
			return 1
		}
		return -1
	default:
		if obj == Minimise {
			return -1
		}
		return 1
	}
}

// Project moves prices onto their valid signs in place.
func Project(obj Sense, rows []Row, prices []float64) {
	for r := range rows {
		switch PriceSign(obj, rows[r].Sense) {
		case 1:
			if !(prices[r] >= 0) {
				prices[r] = 0
			}
		case -1:
			if !(prices[r] <= 0) {
				prices[r] = 0
			}
		default:
			if math.IsNaN(prices[r]) {
				prices[r] = 0
			}
		}
	}
}
