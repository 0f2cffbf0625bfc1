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
//
// # Run state, checkpoints and resume
//
// A run is a value, [State]: round counter, idle count, status, prices,
// best prices, best bound, best plan, a repair outcome waiting to be
// merged, history and the price rule's own state ([StatefulMethod];
// [Subgradient] implements it). Solve starts a state, makes one round at a
// time over it and finishes it (merge the repair in flight, last repair,
// result). One function, stopRule, judges every finished round.
//
// Settings.Checkpoint is handed the state every Settings.CheckpointEvery
// rounds and when the run stops early, at a round boundary with no repair
// in flight (a running repair is waited for; its outcome is kept in the
// state and merged at the next repair round, exactly when the overlapped
// repair would have been). [EncodeCheckpoint] writes a [Checkpoint] (state
// plus the caller's instance content hash and settings fingerprint) as
//
//	magic "PINCRUN\x00" · version uint16 (1) · payload length uint64 ·
//	gob payload · CRC-32 (IEEE) of the payload          (little endian)
//
// with Plan.Detail serialised by the family's [PlanCodec] (Problem.Plans).
// [DecodeCheckpoint] refuses damaged, truncated, foreign or newer data
// with an error wrapping [ErrCheckpoint], never a panic;
// [WriteCheckpointFile] writes atomically (temporary file in the same
// folder, fsync, rename) and [ReadCheckpointFile] names the file in its
// errors. [Checkpoint.Match] returns a [*MismatchError] for another
// instance or other settings. [Resume] continues a run: with the same seed
// and round limit it ends with the same plan value, bound, rounds, prices
// and history as the uninterrupted run, provided the repairer keeps no
// memory across calls (a repairer with memory must be rebuilt to the same
// memory, or the resumed plans may differ; bounds stay valid either way).
//
// The in-round repair goroutine is owned by the run: it is cancelled and
// waited for on every return path, so nothing of a run works after Solve
// returns.
//
// # Stop reasons
//
//	running            the zero Status: the run has not stopped
//	gap-reached        relative gap at or below Settings.Gap
//	integer-closed     the plan meets the (rounded) bound: proved optimal
//	prices-settled     the projected subgradient vanished: dual optimal prices
//	round-limit        Settings.Rounds rounds made (early)
//	time-limit         Settings.Time ran out, or the caller's deadline (early)
//	stalled            no better bound or plan for Settings.StallRounds rounds (early; with a
//	                   time limit only when StallRounds is set, see Settings.StallRounds)
//	interrupted        the caller cancelled the context (early)
//	proved-infeasible  the bound passed Problem.WorstPlanValue: no feasible plan
//	search-closed      the repairer's own exact search proved its plan (Plan.ProvedOptimal)
//	method-stopped     the price rule ended the run (Step.Stop); Result.Reason says why
//
// Early stops can be resumed from their last checkpoint.
//
// # Fixings
//
// Problem.Fixings fix block variables for a whole run; every [Request]
// carries them, sorted by [SortFixings], and a block must honour them
// exactly or report [ErrInfeasible].
package decomp
