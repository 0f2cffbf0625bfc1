package transport

import (
	"fmt"
	"math"
)

// WarmFlows returns what the next Solve starts from: the positive flows on
// the lanes of the current basis (nil before the first Solve or after a
// failed one). Saved with a run and handed to SetWarmFlows of a fresh
// Solver on the same problem, they make its next Solve repeat the
// original Solver's exactly.
func (s *Solver) WarmFlows() []Shipment {
	if s.restored != nil {
		return append([]Shipment(nil), s.restored...)
	}
	if !s.warm {
		return nil
	}
	mn := s.m * s.n
	var out []Shipment
	for v := 1; v < len(s.parent); v++ {
		if a := s.pred[v]; a < mn && s.flow[v] > 0 {
			out = append(out, Shipment{Site: a / s.n, Customer: a % s.n, Qty: s.flow[v]})
		}
	}
	return out
}

// SetWarmFlows makes the next Solve start from the given flows (as
// WarmFlows returned them) instead of the current basis. A nil or empty
// list means a cold start.
func (s *Solver) SetWarmFlows(f []Shipment) error {
	for k, x := range f {
		if x.Site < 0 || x.Site >= s.m || x.Customer < 0 || x.Customer >= s.n || !(x.Qty > 0) || math.IsInf(x.Qty, 0) {
			return fmt.Errorf("transport: warm flow %d (site %d, customer %d, quantity %v) out of range", k, x.Site, x.Customer, x.Qty)
		}
	}
	s.warm = false
	s.restored = nil
	if len(f) > 0 {
		s.restored = append([]Shipment(nil), f...)
	}
	return nil
}

// restoredFlows fills s.fa from the flows set by SetWarmFlows, as
// warmFlows would have gathered them from the basis they came from.
func (s *Solver) restoredFlows() {
	s.fa = s.fa[:0]
	for _, x := range s.restored {
		if x.Qty > s.tolF {
			s.fa = append(s.fa, flowArc{x.Site, x.Customer, x.Qty})
		}
	}
	s.restored = nil
	s.reduceFlows()
}
