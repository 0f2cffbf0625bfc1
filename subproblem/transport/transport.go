package transport

import (
	"errors"
	"fmt"
	"math"
)

// Problem is a transportation problem.
//
// Supply[i] is the capacity of site i and Demand[j] the amount customer j
// must receive; both must be finite and non-negative. Cost[i][j] is the
// cost per unit shipped from site i to customer j; math.Inf(1) forbids the
// lane. Costs may be negative but must not be NaN or -Inf. Total supply may
// exceed total demand; the excess simply stays at the sites.
type Problem struct {
	Supply []float64
	Demand []float64
	Cost   [][]float64
}

// Shipment is a positive quantity shipped from a site to a customer.
type Shipment struct {
	Site, Customer int
	Qty            float64
}

// Solution is an optimal solution of a [Problem].
type Solution struct {
	// Cost is Σ u_ij q_ij over the shipments.
	Cost float64
	// Shipments lists the positive flows, sorted by site then customer.
	// An optimal basic solution has at most sites+customers-1 of them.
	Shipments []Shipment
	// SiteDual[i] <= 0 is the shadow price of one more unit of capacity
	// at site i: the optimal cost changes by about SiteDual[i] per unit
	// added. It is zero at sites with spare capacity.
	SiteDual []float64
	// CustomerDual[j] is the marginal cost of one more unit of demand at
	// customer j. Together with SiteDual it satisfies
	// SiteDual[i]+CustomerDual[j] <= Cost[i][j] on every allowed lane, with
	// equality on lanes that carry flow, and
	// Σ Supply[i]·SiteDual[i] + Σ Demand[j]·CustomerDual[j] = Cost.
	CustomerDual []float64
	// Pivots is the number of simplex pivots this solve took.
	Pivots int
}

// ErrInfeasible is matched (with errors.Is) by the error returned when the
// demand cannot be met.
var ErrInfeasible = errors.New("transport: demand cannot be met")

// InfeasibleError reports a problem whose demand cannot be met, either
// because total supply is short or because forbidden lanes cut customers
// off from enough supply.
type InfeasibleError struct {
	// Shortfall is the smallest possible amount of unmet demand.
	Shortfall float64
	// Supply and Demand are the problem's totals.
	Supply, Demand float64
}

func (e *InfeasibleError) Error() string {
	if e.Supply < e.Demand {
		return fmt.Sprintf("transport: demand cannot be met: short by %g (total supply %g < total demand %g)",
			e.Shortfall, e.Supply, e.Demand)
	}
	return fmt.Sprintf("transport: demand cannot be met: short by %g (total supply %g, total demand %g; forbidden lanes cut customers off)",
		e.Shortfall, e.Supply, e.Demand)
}

// Unwrap makes errors.Is(err, ErrInfeasible) true.
func (e *InfeasibleError) Unwrap() error { return ErrInfeasible }

// Solve returns an optimal solution of p, or an error wrapping
// [ErrInfeasible] (an [*InfeasibleError]) when its demand cannot be met, or
// an error describing invalid input. It never panics on bad input.
func Solve(p *Problem) (*Solution, error) {
	s, err := newSolver(p, false)
	if err != nil {
		return nil, err
	}
	return s.Solve()
}

// NewSolver validates p and returns a Solver for it. The Solver copies the
// costs, so p may be changed afterwards without effect.
func NewSolver(p *Problem) (*Solver, error) {
	return newSolver(p, true)
}

// SetSupply changes the supply of site i; the next Solve starts from the
// previous solution.
func (s *Solver) SetSupply(i int, v float64) error {
	if i < 0 || i >= s.m {
		return fmt.Errorf("transport: site %d out of range [0,%d)", i, s.m)
	}
	if err := checkAmount(v); err != nil {
		return fmt.Errorf("transport: supply of site %d: %w", i, err)
	}
	s.supply[i] = v
	return nil
}

// SetDemand changes the demand of customer j; the next Solve starts from
// the previous solution.
func (s *Solver) SetDemand(j int, v float64) error {
	if j < 0 || j >= s.n {
		return fmt.Errorf("transport: customer %d out of range [0,%d)", j, s.n)
	}
	if err := checkAmount(v); err != nil {
		return fmt.Errorf("transport: demand of customer %d: %w", j, err)
	}
	s.demand[j] = v
	return nil
}

// Supply returns the current supply of site i.
func (s *Solver) Supply(i int) float64 { return s.supply[i] }

// Demand returns the current demand of customer j.
func (s *Solver) Demand(j int) float64 { return s.demand[j] }

func checkAmount(v float64) error {
	if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
		return fmt.Errorf("got %v, want a finite value >= 0", v)
	}
	return nil
}

func newSolver(p *Problem, copyCosts bool) (*Solver, error) {
	if p == nil {
		return nil, errors.New("transport: nil problem")
	}
	m, n := len(p.Supply), len(p.Demand)
	if len(p.Cost) != m {
		return nil, fmt.Errorf("transport: Cost has %d rows, want one per site (%d)", len(p.Cost), m)
	}
	if m > math.MaxInt32/2 || n > math.MaxInt32/2 {
		return nil, fmt.Errorf("transport: problem too large (%d sites, %d customers)", m, n)
	}
	for i, v := range p.Supply {
		if err := checkAmount(v); err != nil {
			return nil, fmt.Errorf("transport: supply of site %d: %w", i, err)
		}
	}
	for j, v := range p.Demand {
		if err := checkAmount(v); err != nil {
			return nil, fmt.Errorf("transport: demand of customer %d: %w", j, err)
		}
	}
	maxAbs := 0.0
	for i, row := range p.Cost {
		if len(row) != n {
			return nil, fmt.Errorf("transport: Cost row %d has %d entries, want one per customer (%d)", i, len(row), n)
		}
		for j, c := range row {
			if math.IsNaN(c) || math.IsInf(c, -1) {
				return nil, fmt.Errorf("transport: cost of lane %d->%d is %v, want a number or +Inf", i, j, c)
			}
			if !math.IsInf(c, 1) {
				maxAbs = max(maxAbs, math.Abs(c))
			}
		}
	}
	s := &Solver{m: m, n: n}
	s.supply = append([]float64(nil), p.Supply...)
	s.demand = append([]float64(nil), p.Demand...)
	if copyCosts {
		flat := make([]float64, m*n)
		s.rows = make([][]float64, m)
		for i, row := range p.Cost {
			s.rows[i] = flat[i*n : (i+1)*n : (i+1)*n]
			copy(s.rows[i], row)
		}
	} else {
		s.rows = p.Cost
	}
	// Any simple path has at most m+n real arcs, so an artificial arc
	// costing more than all of them together is never used while demand
	// can be met some other way.
	s.bigM = 1 + 2*maxAbs*float64(m+n+1)
	s.tolC = 1e-13 * s.bigM
	s.init()
	return s, nil
}
