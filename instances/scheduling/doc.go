// Package scheduling is the shared-machine scheduling family: jobs with
// integer processing times, weights, due dates and optional release dates
// compete for machine classes of identical machines, without preemption,
// and a schedule minimises total weighted tardiness Σ_j w_j max(0, C_j − d_j)
// or total weighted completion time Σ_j w_j C_j.
//
// In the flow file -> family model -> engine problem -> rounds -> result ->
// report it holds the family model (Instance, the OR-Library weighted
// tardiness reader) and its engine problem (NewProblem).
//
// # Model and relaxation
//
// The time-indexed formulation has a binary x_{j,k,s} for job j starting
// at slot s on class k, over a safe horizon H_k per class (see
// Instance.Horizons for the argument): each job picks one class and one
// start, and in each class and slot at most m_k jobs are in process.
// NewProblem prices these slot capacity rows: each job becomes a block
// (subproblem.TimeIndexed) that picks the class and start of least own
// cost plus slot prices, exactly, in O(H) per class from prefix sums that
// Problem.Share computes once per round for all jobs. Each block has the
// integrality property, so the best bound equals the time-indexed linear
// programming bound, a strong bound for these objectives.
//
// The prices start at the slot values of a quick schedule (the weight of
// the later tardy jobs that one slot less would delay), scaled by the best
// of a few factors; from zero the subgradient rule would need thousands of
// rounds to build up the early slots' prices.
//
// # Repair
//
// The repair list-schedules the jobs in the order of their relaxed starts
// (each on the eligible machine where it starts first, ties to the class
// its block chose) and improves the schedule by an iterated local search:
// dynasearch (the best set of independent swaps on a machine, by dynamic
// programming; Congram, Potts & van de Velde 2002), insertion within a
// machine, moves and swaps between machines, and seeded random kicks. It
// also continues from the best plan so far. Moves are evaluated
// incrementally: a move re-times only the changed positions and the tail
// until it meets its old timing again. The effort is a count of evaluated
// job positions that grows with the round, so runs are reproducible.
//
// A plan is decision support: check it against site rules and local
// practice before use.
package scheduling
