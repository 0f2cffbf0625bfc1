package cflp

import (
	"fmt"
	"math"
)

// Verification is the outcome of checking a plan with Verify.
type Verification struct {
	Value    float64   // fixed costs of open sites plus lane costs
	Feasible bool      // no problem was found
	Problems []string  // what is wrong, at most maxProblems entries plus a summary line
	Open     []bool    // site ships something, or is forced open
	Load     []float64 // quantity shipped by each site, in demand units
}

// Tolerances used by Verify, relative to the demand or capacity concerned.
const (
	demandTol   = 1e-6
	capacityTol = 1e-6
	maxProblems = 20
)

// Verify checks a plan against the instance from scratch, without using the
// engine. flow[i][j] is the quantity shipped from site i to customer j, in
// demand units. It checks that the matrix has the right shape, that
// quantities are finite and non-negative, that every customer receives its
// demand (within a relative 1e-6), that no site ships more than its
// capacity (within a relative 1e-6), that forbidden lanes and forced-closed
// sites ship nothing and, if singleSource, that each customer is served by
// a single site.
//
// A site is open when it ships a positive quantity or is forced open; the
// value is the sum of the fixed costs of open sites plus, over lanes,
// Cost[i][j] · flow[i][j] / demand_j (forbidden lanes add nothing).
func Verify(in *Instance, flow [][]float64, singleSource bool) Verification {
	m, n := len(in.Sites), len(in.Customers)
	v := Verification{Open: make([]bool, m), Load: make([]float64, m)}
	more := 0
	problem := func(format string, args ...any) {
		if len(v.Problems) < maxProblems {
			v.Problems = append(v.Problems, fmt.Sprintf(format, args...))
		} else {
			more++
		}
	}
	if len(flow) != m {
		problem("plan has %d site rows, instance has %d sites", len(flow), m)
		return v
	}
	for i := range flow {
		if len(flow[i]) != n {
			problem("plan row of site %s has %d entries, instance has %d customers", in.Sites[i].ID, len(flow[i]), n)
			return v
		}
	}

	received := make([]float64, n)
	servers := make([]int, n)
	for i, s := range in.Sites {
		for j, c := range in.Customers {
			q := flow[i][j]
			if q == 0 {
				continue
			}
			if math.IsNaN(q) || math.IsInf(q, 0) || q < 0 {
				problem("site %s → customer %s: quantity %v is not a non-negative number", s.ID, c.ID, q)
				continue
			}
			v.Load[i] += q
			received[j] += q
			servers[j]++
			v.Open[i] = true
			if math.IsInf(in.Cost[i][j], 1) {
				problem("site %s → customer %s: lane is not allowed but ships %g", s.ID, c.ID, q)
				continue
			}
			v.Value += in.Cost[i][j] * q / c.Demand
		}
	}
	for i, s := range in.Sites {
		if s.Status == ForcedOpen {
			v.Open[i] = true
		}
		if s.Status == ForcedClosed && v.Load[i] > 0 {
			problem("site %s is forced closed but ships %g", s.ID, v.Load[i])
		}
		if v.Load[i] > s.Capacity*(1+capacityTol) {
			problem("site %s ships %g, above its capacity %g by %g", s.ID, v.Load[i], s.Capacity, v.Load[i]-s.Capacity)
		}
		if v.Open[i] {
			v.Value += s.FixedCost
		}
	}
	for j, c := range in.Customers {
		if math.Abs(received[j]-c.Demand) > demandTol*c.Demand {
			problem("customer %s receives %g of its demand %g", c.ID, received[j], c.Demand)
		}
		if singleSource && servers[j] > 1 {
			problem("customer %s is served by %d sites, single source allows one", c.ID, servers[j])
		}
	}
	if more > 0 {
		v.Problems = append(v.Problems, fmt.Sprintf("… and %d more problems", more))
	}
	v.Feasible = len(v.Problems) == 0
	return v
}
