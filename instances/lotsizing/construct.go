package lotsizing

import "math"

// construct builds a plan period by period, forward, in the manner of the
// period-by-period heuristics with a capacity look-ahead (Dixon & Silver
// 1981; setup times counted as Trigeiro et al. 1989 do in their
// feasibility routine): every period first makes what its own net demand
// still needs; then, while some later horizon t+1..τ cannot hold its
// remaining demand plus one setup of every item it needs, it makes ahead
// the earliest future demand, items already set up first; then it extends
// its lots by later demand while carrying it costs less than the setup it
// saves and room is left. It gives tight instances a first plan that the
// pattern search keeps feasible; it may still leave excess capacity when
// the look-ahead's setup count is too optimistic.
func construct(in *Instance, net [][]float64) [][]float64 {
	n, T := len(in.Items), in.Periods()
	rem := clone(net)
	x := make([][]float64, n)
	for i := range x {
		x[i] = make([]float64, T)
	}
	set := make([]bool, n)
	for t := 0; t < T; t++ {
		room := in.Capacity[t]
		for i, it := range in.Items {
			set[i] = rem[i][t] > 0
			if set[i] {
				room -= it.SetupTime + it.UnitTime*rem[i][t]
				x[i][t] += rem[i][t]
				rem[i][t] = 0
			}
		}
		// Make ahead what later horizons cannot hold.
		for room > tol {
			short, upto := lookAhead(in, rem, t)
			if short <= tol {
				break
			}
			i, u := pickAhead(in, rem, set, t, upto, room)
			if i < 0 {
				break
			}
			it := &in.Items[i]
			extra := 0.0
			if !set[i] {
				extra = it.SetupTime
			}
			q := rem[i][u]
			if it.UnitTime > 0 {
				q = math.Min(q, math.Min(short, room-extra)/it.UnitTime)
			}
			if q <= tol {
				break
			}
			room -= extra + it.UnitTime*q
			set[i] = true
			x[i][t] += q
			rem[i][u] -= q
		}
		// Extend lots while carrying costs less than a setup.
		for i, it := range in.Items {
			if !set[i] {
				continue
			}
			for u := t + 1; u < T && room > tol; u++ {
				q := rem[i][u]
				if q <= 0 {
					continue
				}
				if it.Holding*q*float64(u-t) > it.SetupCost {
					break
				}
				if it.UnitTime > 0 && it.UnitTime*q > room {
					break
				}
				room -= it.UnitTime * q
				x[i][t] += q
				rem[i][u] = 0
			}
		}
	}
	return x
}

// lookAhead returns the largest shortfall of capacity over the horizons
// t+1..τ (remaining demand plus one setup time of every item with
// remaining demand in it, less their capacity) and the τ that attains it
// (-1 when nothing is short).
func lookAhead(in *Instance, rem [][]float64, t int) (float64, int) {
	T := in.Periods()
	worst, at := 0.0, -1
	need := 0.0
	for tau := t + 1; tau < T; tau++ {
		need -= in.Capacity[tau]
		for i, it := range in.Items {
			if rem[i][tau] > 0 {
				need += it.UnitTime * rem[i][tau]
				first := true
				for u := t + 1; u < tau; u++ {
					if rem[i][u] > 0 {
						first = false
						break
					}
				}
				if first {
					need += it.SetupTime
				}
			}
		}
		if need > worst {
			worst, at = need, tau
		}
	}
	return worst, at
}

// pickAhead chooses the earliest remaining demand (i,u) with t < u <= upto
// to make in period t: items already set up in t first, then the cheapest
// to carry per unit of capacity; -1 when none fits the room.
func pickAhead(in *Instance, rem [][]float64, set []bool, t, upto int, room float64) (int, int) {
	bi, bu := -1, -1
	best := math.Inf(1)
	for i, it := range in.Items {
		if it.UnitTime == 0 {
			continue
		}
		extra := 0.0
		if !set[i] {
			extra = it.SetupTime
		}
		if extra >= room {
			continue
		}
		for u := t + 1; u <= upto; u++ {
			if rem[i][u] <= 0 {
				continue
			}
			score := it.Holding / it.UnitTime * float64(u-t)
			if !set[i] {
				score += 1e6 // a new setup only when no set-up item can help
			}
			if score < best {
				best, bi, bu = score, i, u
			}
			break
		}
	}
	return bi, bu
}
