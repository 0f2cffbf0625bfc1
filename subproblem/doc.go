// Package subproblem holds the exact single-block solvers that the
// decomposition engine calls once per block in every round.
//
// In the flow file -> family model -> engine problem -> rounds -> result ->
// report, this package sits inside "rounds": a family model prices its
// coupling rows with the current multipliers, which turns each block into a
// small optimisation problem, and the block optimum is computed here. The
// engine's relaxed bound is only valid when that block optimum is exact, so
// the solvers in this package are exact (up to a tiny, documented floating
// point tolerance), deterministic, and reuse their scratch memory between
// calls.
//
// Besides the [Choice] block (pick one option per block), two knapsack
// solvers are provided:
//
//   - [Knapsack] solves the 0-1 knapsack problem with real profits and
//     integer weights (one per agent per round in the generalized
//     assignment family, and one per facility in single-source facility
//     location). It is a branch and bound that starts from the greedy
//     break solution and widens a core of items around the break item on
//     demand, using linear relaxation bounds; a dynamic program over the
//     capacity takes over when the search grows large and the table is
//     affordable.
//   - [FractionalKnapsack] (and [Knapsack.SolveFractional]) solves the
//     continuous knapsack problem, used for split-demand facility location.
package subproblem
