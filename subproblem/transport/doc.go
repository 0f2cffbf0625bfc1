// Package transport solves the transportation problem exactly: ship a
// divisible good from sites with limited supply to customers whose demand
// must be met in full, at the least total cost per unit shipped.
//
//	minimise   Σ_i Σ_j u_ij q_ij
//	subject to Σ_i q_ij  = d_j   for every customer j
//	           Σ_j q_ij <= s_i   for every site i
//	           q_ij >= 0,  q_ij = 0 where the lane i→j is forbidden
//
// In pincer it is the allocation step of capacitated facility location
// with split demand: once a family model has chosen which sites are open
// (inside a repair heuristic or a local search over the open set), the
// best way to serve the customers from those sites is this problem. It sits
// at the "rounds" stage of the flow
//
//	file -> family model -> engine problem -> rounds -> result -> report
//
// and reports, besides the shipments, the dual values: a non-positive
// shadow price per unit of site capacity and a price per unit of customer
// demand, which the report shows per site.
//
// # Method
//
// The problem is solved as an uncapacitated minimum-cost flow by the primal
// network simplex method on the bipartite graph of sites and customers,
// with one extra root node that absorbs unused supply through zero-cost
// slack arcs and can feed unmet demand through artificial arcs of a large
// cost (the big-M device). The spanning-tree basis is kept strongly
// feasible, so degenerate pivots cannot cycle, and entering arcs are chosen
// by block pricing. A problem is infeasible exactly when the optimum still
// uses artificial arcs; their flow is then the smallest possible shortfall
// of demand and is reported in an [*InfeasibleError].
//
// [Solve] handles a single problem. A [Solver] keeps the optimal basis of
// its last solve: after [Solver.SetSupply] or [Solver.SetDemand] (opening a
// site is raising its supply from zero, closing it is setting the supply to
// zero) the next [Solver.Solve] starts from the previous shipments instead
// of from scratch, which is what a local search over open sites needs.
// Sites with zero supply cost nothing in the pricing loop.
package transport
