// Package lotsizing is the multi-item capacitated lot-sizing family with
// setup times: items share one resource whose capacity C_t may vary by
// period; producing item i in period t uses b_i per unit plus its setup
// time st_i when set up, and costs its setup cost sc_i; stock costs h_i per
// unit and period; demand must be met without backlog.
//
// Relaxation (Trigeiro, Thomas & McClain 1989): the per-period capacity
// rows Σ_i (b_i x_it + st_i y_it) <= C_t are priced, so every item becomes
// an uncapacitated single-item lot-sizing block with priced capacity,
// solved exactly by the Wagner & Whitin (1958) dynamic program
// ([subproblem.LotSizing]). Each such block has the integrality property
// under the facility-location (shortest-path) reformulation: the LP of
// that reformulation has integral setup vertices, its convex hull is the
// block's. By Geoffrion (1974) the Lagrangian dual therefore equals the LP
// bound of the facility-location reformulation with the capacity rows kept
// (without the per-period bound x_it <= (C_t − st_i)/b_i, which the blocks
// relax; that bound is valid but left to the repair and the MPS model).
//
// Overtime variant: capacity may be exceeded at a cost per unit of
// capacity. Overtime o_t enters the capacity row as −o_t and is one more
// block per period, with 0 <= o_t <= U_t where U_t is the most any plan can
// load period t beyond C_t (setup times plus unit times of remaining demand
// of every item, x_it never exceeding remaining demand). That bound excludes
// no feasible plan, so the bound stays valid; the block takes o_t = U_t
// exactly when the price exceeds the overtime cost, so prices above the
// overtime cost are penalised and the subgradient drives them back.
//
// Repair: the relaxed plan (every item's Wagner-Whitin lots at the round's
// prices) is first made capacity-feasible by priced lot moves, in the
// spirit of the smoothing of Trigeiro et al. (1989): a move shifts part or
// all of a lot to an earlier period, or to a later one where the stock in
// between allows, judged by its exact cost change. Its setup pattern then
// enters a local search over setup patterns in which every pattern is
// priced exactly: with the setups fixed, the cheapest quantities are a
// minimum-cost flow (the transshipment view of Hindi 1996, cited from
// memory; capacity units,
// so unit times keep the network pure), with excess capacity priced at the
// overtime cost or, where none is allowed, at a penalty that starts soft
// and hardens (strategic oscillation) until the excess is gone. Moves add,
// drop or shift a setup; while stuck over capacity, a period's setup may
// pass to another item. While no plan exists, a forward construction with
// a capacity look-ahead (in the style of Dixon & Silver 1981, cited from
// memory) is a second start. An
// iterated search then continues from the best plan found so far: kicks
// are a few random setup moves or the re-planning of one item by the
// Wagner-Whitin recursion with the other items' loads fixed. The effort of
// a repair is counted in arcs scanned by the flow solves (reproducible, no
// clock), starting near the work of the five rounds between repairs and
// growing with the round. When excess remains where no overtime is allowed
// the repair reports no plan for that round; the engine keeps the best
// plan found.
//
// Exact mode (solve --exact, exact.go): decomp.Search branches on one
// setup y_it at a time, off or on; the item blocks price the forcing of
// each free setup exactly (the block solved again with it forced) for
// reduced-cost fixing; a node whose relaxed setup pattern, priced by the
// flow above, meets its bound is solved, and so is a node with every setup
// decided. Costs may be fractional, so a proof closes within the search's
// tolerance (about 1e-9 relative), never by rounding.
//
// Block numbering: blocks 0..n-1 are the items (variables as documented on
// subproblem.LotSizing: Var t setup, T+t production, 2T+t stock); the
// overtime blocks follow, one per period that allows overtime (Var 0 is
// o_t). Row t is the capacity row of period t; its price at the best bound
// is the period's capacity shadow price.
//
// Plans are decision support: they meet the model's rows, not every
// concern of a planner.
package lotsizing

import (
	"fmt"
	"math"
)

// Item is one product.
type Item struct {
	Name         string
	UnitTime     float64 // capacity per unit produced (b_i)
	SetupTime    float64 // capacity used by a setup (st_i)
	SetupCost    float64 // sc_i
	Holding      float64 // h_i per unit per period
	InitialStock float64
}

// Instance is a lot-sizing problem.
type Instance struct {
	Name     string
	Items    []Item
	Demand   [][]float64 // [item][period]
	Capacity []float64   // per period
	// OvertimeCost per period (cost per capacity unit beyond Capacity);
	// nil or a negative entry means no overtime in that period.
	OvertimeCost []float64
}

// Periods returns T.
func (in *Instance) Periods() int { return len(in.Capacity) }

// Validate checks the instance's shape and numbers.
func (in *Instance) Validate() error {
	T := len(in.Capacity)
	if len(in.Items) == 0 || T == 0 {
		return fmt.Errorf("lotsizing %q: need at least one item and one period", in.Name)
	}
	if len(in.Demand) != len(in.Items) {
		return fmt.Errorf("lotsizing %q: %d demand rows for %d items", in.Name, len(in.Demand), len(in.Items))
	}
	ok := func(x float64) bool { return x >= 0 && !math.IsInf(x, 0) }
	for i, it := range in.Items {
		if !ok(it.UnitTime) || !ok(it.SetupTime) || !ok(it.SetupCost) || !ok(it.Holding) || !ok(it.InitialStock) {
			return fmt.Errorf("lotsizing %q: item %d has a negative or non-finite parameter", in.Name, i+1)
		}
		if len(in.Demand[i]) != T {
			return fmt.Errorf("lotsizing %q: item %d has %d demands for %d periods", in.Name, i+1, len(in.Demand[i]), T)
		}
		for t, d := range in.Demand[i] {
			if !ok(d) {
				return fmt.Errorf("lotsizing %q: item %d period %d: demand %v", in.Name, i+1, t+1, d)
			}
		}
	}
	for t, c := range in.Capacity {
		if !ok(c) {
			return fmt.Errorf("lotsizing %q: period %d: capacity %v", in.Name, t+1, c)
		}
	}
	if in.OvertimeCost != nil && len(in.OvertimeCost) != T {
		return fmt.Errorf("lotsizing %q: %d overtime costs for %d periods", in.Name, len(in.OvertimeCost), T)
	}
	for t, c := range in.OvertimeCost {
		if math.IsNaN(c) || math.IsInf(c, 0) {
			return fmt.Errorf("lotsizing %q: period %d: overtime cost %v", in.Name, t+1, c)
		}
	}
	return nil
}
