// Package heuristics is about capacitated assignment: it turns relaxed answers
// into feasible assignment plans and improves
// them.
//
// In the solve flow (file -> family model -> engine problem -> rounds ->
// result -> report) the engine prices the coupling rows of a separable
// problem and solves each block on its own; the blocks' answers then usually
// break the coupling rows. Every few rounds the engine hands such an answer to
// this package, which builds a feasible plan (the primal bound of the round)
// and improves it by local search.
//
// The package works on one family-neutral model, the capacitated assignment
// problem ([Assignment]): every item goes to exactly one resource, each pair
// has a cost and a use of the resource's capacity. The generalized assignment
// problem maps to it directly (jobs are items, agents are resources), and so
// does single-source capacitated facility location once the open sites are
// fixed (customers are items, open sites are resources, the use of a pair is
// the customer's demand).
//
// [Repair] keeps what the relaxation decided where it can, inserts the rest by
// regret and, on tight instances, runs a penalised search on capacity excess
// until the plan fits. [Improve] runs a first-improvement descent with shift
// and swap moves followed by a tabu search that may cross infeasible regions,
// with an adaptive penalty on capacity excess. A [Searcher] compiles an
// assignment once for repeated calls (the engine repairs every few rounds);
// the package-level functions compile on every call.
//
// [Searcher.AddItemPrices] records, from a Lagrangian relaxation that prices
// the "every item once" rows, a bound on the plans using and avoiding each
// pair (reduced costs); [Searcher.Restrict] forbids the pairs that cannot be
// in a plan better than the incumbent and may narrow each item to its pairs
// of least bound. [Searcher.PlanSearch] then runs path relinking between the
// elite plans given to [Searcher.Offer], each path followed by the tabu
// search, as tasks merged at fixed points (side by side on several
// goroutines, with the same result for any number of them).
//
// Both scale to about a million pairs: one move looks at a bounded window of
// items, each with its shifts to every resource and a bounded list of swap
// partners, so a descent pass costs O(n*m + n*K) and the default budgets
// grow linearly with n*m. Both check their context about every millisecond.
// Both are deterministic for a given seed; budgets count moves, never
// wall-clock time (only a cancelled context stops them earlier).
package heuristics
