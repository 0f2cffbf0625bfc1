package lotsizing

import (
	"fmt"
	"math"
)

// Verify checks a schedule against the instance on its own: demand met
// without backlog, stock balances, setups wherever something is made,
// capacity respected (or overtime, at the given per-period costs; nil
// means none), and the reported loads, overtime and cost.
func Verify(in *Instance, s *Schedule, overtime []float64) error {
	n, T := len(in.Items), in.Periods()
	if len(s.Production) != n || len(s.Setup) != n || len(s.Inventory) != n || len(s.Load) != T || len(s.Overtime) != T {
		return fmt.Errorf("lotsizing verify: schedule shape does not match %d items x %d periods", n, T)
	}
	near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-6*math.Max(1, math.Abs(b)) }
	cost := 0.0
	load := make([]float64, T)
	for i, it := range in.Items {
		v := it.InitialStock
		for t := 0; t < T; t++ {
			q := s.Production[i][t]
			if q < 0 {
				return fmt.Errorf("lotsizing verify: item %d period %d: negative production %v", i+1, t+1, q)
			}
			if q > 0 && !s.Setup[i][t] {
				return fmt.Errorf("lotsizing verify: item %d period %d: production %v without a setup", i+1, t+1, q)
			}
			v += q - in.Demand[i][t]
			if v < -1e-6 {
				return fmt.Errorf("lotsizing verify: item %d period %d: demand unmet by %v", i+1, t+1, -v)
			}
			if !near(v, s.Inventory[i][t]) {
				return fmt.Errorf("lotsizing verify: item %d period %d: stock %v, schedule says %v", i+1, t+1, v, s.Inventory[i][t])
			}
			if s.Setup[i][t] {
				cost += it.SetupCost
				load[t] += it.SetupTime
			}
			load[t] += it.UnitTime * q
			cost += it.Holding * math.Max(v, 0)
		}
	}
	for t := 0; t < T; t++ {
		if !near(load[t], s.Load[t]) {
			return fmt.Errorf("lotsizing verify: period %d: load %v, schedule says %v", t+1, load[t], s.Load[t])
		}
		e := load[t] - in.Capacity[t]
		if e > 1e-6*math.Max(1, in.Capacity[t]) {
			if overtime == nil || overtime[t] < 0 {
				return fmt.Errorf("lotsizing verify: period %d: load %v exceeds capacity %v and no overtime is allowed", t+1, load[t], in.Capacity[t])
			}
			cost += overtime[t] * e
		}
	}
	if !near(cost, s.Cost) {
		return fmt.Errorf("lotsizing verify: cost %v, schedule says %v", cost, s.Cost)
	}
	return nil
}
