// Package decomp is pincer's engine: it holds the problem model (coupling
// rows and blocks), prices the coupling rows, evaluates the blocks in
// parallel, keeps the best relaxed bound and the best repaired plan, and
// decides when to stop.
//
// It sits in the middle of the flow
//
//	file -> family model -> engine problem -> rounds -> result -> report
//
// and knows no family: a family (package instances/...) builds a [Problem]
// from its own data, supplies [Block] values that solve their own piece
// exactly, and optionally a [Repairer] that turns block answers into a
// feasible [Plan].
//
// # Pricing convention
//
// Every coupling row r is a sum of block uses compared with a right-hand
// side: use_r(x) (<=, >=, =) rhs_r. Its multiplier (price) λ_r moves the
// row into the objective as the term
//
//	λ_r · (use_r(x) − rhs_r)
//
// so the relaxed value at prices λ is
//
//	L(λ) = Σ_blocks opt_x (own cost + Σ_r λ_r·use_r(x)) − Σ_r λ_r·rhs_r
//
// where opt is min for a minimisation problem and max for a maximisation
// problem. The subgradient of L at λ is g_r = use_r(x*) − rhs_r.
//
// The sign of each multiplier is the one that makes the priced term
// penalise violation, so that for every feasible x the term is never
// favourable and L(λ) is a valid bound (lower when minimising, upper when
// maximising):
//
//	objective  row    multiplier   why
//	min        <=     λ >= 0       violation (use > rhs) adds cost
//	min        >=     λ <= 0       violation (use < rhs) adds cost
//	min        =      free         term is zero at every feasible x
//	max        <=     λ <= 0       violation (use > rhs) removes profit
//	max        >=     λ >= 0       violation (use < rhs) removes profit
//	max        =      free         term is zero at every feasible x
//
// Prices are projected onto these signs after every update. A price is
// also the row's shadow price: under this convention a one-unit increase
// of rhs_r changes the bound by −λ_r, so for a capacity row (<=) of a
// cost-minimising problem λ_r is what one more unit of capacity is worth.
//
// # Rounds
//
// Each round evaluates all blocks at the current prices through an
// [Evaluator] (a bounded pool of goroutines by default; the seam exists so
// that remote workers can take its place), reduces the values and uses in
// fixed block order (so results are bit-identical for any worker count),
// records the bound, calls the repairer on schedule, and asks the [Method]
// for new prices. Limits and stopping rules live here once, for every
// method.
package decomp
