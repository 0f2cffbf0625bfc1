package cflp

import (
	"errors"
	"fmt"
	"math"
	"strconv"

	"pincer/instances"
)

// SiteFixing says whether a site may be opened or closed by the optimisation.
type SiteFixing int

const (
	// Free lets the optimisation decide whether the site opens.
	Free SiteFixing = iota
	// ForcedOpen keeps the site open: its fixed cost is always paid.
	ForcedOpen
	// ForcedClosed keeps the site closed: it serves nobody.
	ForcedClosed
)

// String returns the word used for the status in scenario files:
// "free", "open" or "closed".
func (s SiteFixing) String() string {
	switch s {
	case Free:
		return "free"
	case ForcedOpen:
		return "open"
	case ForcedClosed:
		return "closed"
	}
	return fmt.Sprintf("SiteFixing(%d)", int(s))
}

// Site is a candidate facility.
type Site struct {
	ID, Name  string
	Capacity  float64 // largest total demand the site can serve, in demand units
	FixedCost float64 // paid once if the site is open
	Status    SiteFixing
}

// Customer is a demand point.
type Customer struct {
	ID, Name string
	Demand   float64 // positive, in demand units
}

// Instance is one capacitated facility location problem.
type Instance struct {
	Name      string
	Sites     []Site
	Customers []Customer
	// Cost[i][j] is the cost of serving the whole demand of customer j from
	// site i; serving a share x of it costs x·Cost[i][j]. math.Inf(1) marks a
	// lane that is not allowed.
	Cost [][]float64
}

// Allowed reports whether site i may serve customer j.
func (in *Instance) Allowed(i, j int) bool { return !math.IsInf(in.Cost[i][j], 1) }

// TotalDemand returns the sum of the customers' demands.
func (in *Instance) TotalDemand() float64 {
	t := 0.0
	for _, c := range in.Customers {
		t += c.Demand
	}
	return t
}

// TotalCapacity returns the sum of the capacities of the sites that are not
// forced closed.
func (in *Instance) TotalCapacity() float64 {
	t := 0.0
	for _, s := range in.Sites {
		if s.Status != ForcedClosed {
			t += s.Capacity
		}
	}
	return t
}

// Validate reports the first reason why the instance is malformed or
// obviously infeasible: no sites or customers, empty or repeated ids,
// negative or non-finite capacities or fixed costs, demands that are not
// positive and finite, a cost matrix of the wrong shape or holding NaN or
// negative values, a customer with no allowed lane to a site that is not
// forced closed, or a total demand above [Instance.TotalCapacity].
func (in *Instance) Validate() error {
	if in == nil {
		return errors.New("cflp: nil instance")
	}
	m, n := len(in.Sites), len(in.Customers)
	if m == 0 {
		return errors.New("cflp: instance has no sites")
	}
	if n == 0 {
		return errors.New("cflp: instance has no customers")
	}
	seen := make(map[string]int, m)
	for i, s := range in.Sites {
		switch {
		case s.ID == "":
			return fmt.Errorf("cflp: site %d has an empty id", i+1)
		case seen[s.ID] > 0:
			return fmt.Errorf("cflp: sites %d and %d share the id %q", seen[s.ID], i+1, s.ID)
		case !finiteNonNeg(s.Capacity):
			return fmt.Errorf("cflp: site %q: capacity %v is not a non-negative number", s.ID, s.Capacity)
		case !finiteNonNeg(s.FixedCost):
			return fmt.Errorf("cflp: site %q: fixed cost %v is not a non-negative number", s.ID, s.FixedCost)
		case s.Status < Free || s.Status > ForcedClosed:
			return fmt.Errorf("cflp: site %q: unknown status %d", s.ID, int(s.Status))
		}
		seen[s.ID] = i + 1
	}
	clear(seen)
	for j, c := range in.Customers {
		switch {
		case c.ID == "":
			return fmt.Errorf("cflp: customer %d has an empty id", j+1)
		case seen[c.ID] > 0:
			return fmt.Errorf("cflp: customers %d and %d share the id %q", seen[c.ID], j+1, c.ID)
		case !(c.Demand > 0) || math.IsInf(c.Demand, 0):
			return fmt.Errorf("cflp: customer %q: demand %v is not a positive number", c.ID, c.Demand)
		}
		seen[c.ID] = j + 1
	}
	if len(in.Cost) != m {
		return fmt.Errorf("cflp: cost matrix has %d rows for %d sites", len(in.Cost), m)
	}
	for i, row := range in.Cost {
		if len(row) != n {
			return fmt.Errorf("cflp: cost row of site %q has %d entries for %d customers", in.Sites[i].ID, len(row), n)
		}
		for j, c := range row {
			if math.IsNaN(c) || c < 0 {
				return fmt.Errorf("cflp: cost of site %q serving customer %q is %v, want a non-negative number or +Inf",
					in.Sites[i].ID, in.Customers[j].ID, c)
			}
		}
	}
	for j, c := range in.Customers {
		ok := false
		for i, s := range in.Sites {
			if s.Status != ForcedClosed && in.Allowed(i, j) {
				ok = true
				break
			}
		}
		if !ok {
			return fmt.Errorf("cflp: customer %q has no allowed lane from a site that is not forced closed", c.ID)
		}
	}
	if d, s := in.TotalDemand(), in.TotalCapacity(); d > s {
		return fmt.Errorf("cflp: total demand %s exceeds total capacity %s by %s",
			formatNumber(d), formatNumber(s), formatNumber(d-s))
	}
	return nil
}

func finiteNonNeg(v float64) bool { return v >= 0 && !math.IsInf(v, 1) }

// ParseError is the shared reader fault shape, [instances.ParseError].
type ParseError = instances.ParseError

// formatNumber writes v in plain decimal notation with the fewest digits
// that read back to the same float64.
func formatNumber(v float64) string { return strconv.FormatFloat(v, 'f', -1, 64) }
