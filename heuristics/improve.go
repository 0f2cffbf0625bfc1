package heuristics

import (
	"context"
	"math/rand/v2"
)

// ImproveSettings bounds the work of Improve. The zero value means defaults.
//
// A move is one step of the tabu search: it evaluates the neighbourhood of a
// window of at most 64 items (each item's shift to every resource and its
// swaps with at most 64 partner items on its cheapest other resources) plus
// at most 6 two-link ejection chains of 4 items each, and makes the best
// admissible one. A move therefore costs O(m + K) per window item, whatever
// the number of items n, and the default budget, which is proportional to n,
// makes the run time of Improve grow about linearly with n*m.
type ImproveSettings struct {
	// Moves is the number of tabu-search moves after the descent; 0 means
	// 10 per item plus 2000, a negative value skips the tabu search.
	Moves int
	// Stall is the number of moves without a new best assignment after
	// which the search goes back to the best one and perturbs it; 0 means
	// 3 per item plus 100.
	Stall int
	// PairNodes bounds each two-resource branch and bound of the final
	// polish; 0 means 5000, a negative value skips that polish (a light
	// repair for frequent calls).
	PairNodes int
}

func (st ImproveSettings) withDefaults(n int) ImproveSettings {
	if st.Moves == 0 {
		st.Moves = 10*n + 2000
	}
	if st.Stall <= 0 {
		st.Stall = 3*n + 100
	}
	return st
}

// Improve runs local search from assign (assign[j] = resource of item j) and
// returns the best feasible assignment found with its value, in the sense of
// p. It first applies improving shift and swap moves (first improvement),
// then runs a tabu search whose moves are shifts, swaps and two-link ejection
// chains (an item enters a resource and another item leaves it for a third
// one); the search may cross over-capacity assignments, which are penalised
// by per-resource weights raised while a resource stays over and lowered
// while the assignment fits. After s.Stall moves without a new best it goes
// back to the best assignment, re-solves the items of every pair of
// resources by a small branch and bound and, if that finds nothing, perturbs
// it with a few random shifts. The budget is counted in moves, so the result
// depends only on the input and rng.
//
// When ctx is cancelled Improve stops within about a millisecond and returns
// the best so far. The input should be feasible; an over-capacity input is
// searched from as well, and when no feasible assignment is found (or the
// input is malformed or uses a forbidden pair) Improve returns a copy of the
// input and the worst value of the sense (+Inf when minimising, -Inf when
// maximising). Improve never returns a worse value than that of a feasible
// input.
//
// Improve compiles p on every call; use a [Searcher] for repeated calls.
func Improve(ctx context.Context, p *Assignment, assign []int, s ImproveSettings, rng *rand.Rand) ([]int, float64) {
	sr, err := NewSearcher(p)
	if err != nil {
		return append([]int(nil), assign...), p.worst()
	}
	return sr.Improve(ctx, assign, s, rng)
}

// Improve is the package-level [Improve] on the compiled assignment. When
// [Searcher.Restrict] has forbidden pairs and assign uses none of them, the
// search keeps to the allowed pairs (a better plan uses no other); otherwise
// it searches every pair.
func (sr *Searcher) Improve(ctx context.Context, assign []int, s ImproveSettings, rng *rand.Rand) ([]int, float64) {
	in := append([]int(nil), assign...)
	md := sr.base
	if !md.fits(assign) {
		return in, sr.p.worst()
	}
	if rm := sr.model(); rm.fits(assign) {
		md = rm // the restriction of Restrict, when the start respects it
	}
	if md.n == 0 {
		return in, 0
	}
	s = s.withDefaults(md.n)
	srch := sr.srch
	srch.reset(ctx, md, assign, rng)
	if srch.over == 0 {
		srch.descend(1 << 30)
	}
	if s.Moves > 0 && md.m > 1 {
		srch.tabuSearch(s.Moves, s.Stall, false)
	}
	if !srch.haveBest {
		return in, sr.p.worst()
	}
	// Polish the best assignment.
	copy(srch.asg, srch.best)
	srch.recompute()
	nodes := s.PairNodes
	if nodes == 0 {
		nodes = pairNodes
	}
	if nodes < 0 {
		// a light repair: the descent only
		srch.descend(1 << 30)
	} else {
		srch.polish(false)
		if !srch.cancelled() && srch.pairOpt(nodes) {
			srch.polish(false)
		}
	}
	out := append([]int(nil), srch.best...)
	v, _ := sr.p.Evaluate(out)
	return out, v
}

// pairNodes bounds each two-resource branch and bound of pairOpt.
const pairNodes = 5000

const maxFinite = 1.7976931348623157e308

// tabuSearch runs up to moves tabu moves. With untilFeasible it stops at the
// first feasible assignment. It stops early when the context is cancelled.
func (s *search) tabuSearch(moves, stall int, untilFeasible bool) {
	const up, down = 1.05, 1 / 1.05
	lastBest := 0
	for t := 0; t < moves; t++ {
		if t%ctxEvery == 0 && s.cancelled() {
			return
		}
		if !s.step() {
			// every move of the window is tabu: with a full window,
			// forget the tabu list; otherwise the next window differs
			if s.n <= fullWindow {
				for k := range s.tabu {
					s.tabu[k] = 0
				}
			}
			continue
		}
		if s.over > 0 {
			for i, l := range s.load {
				if l > s.limit[i] {
					s.alpha[i] *= up
				}
			}
		} else {
			for i := range s.alpha {
				s.alpha[i] *= down
			}
		}
		if s.over == 0 {
			if s.record() {
				lastBest = t
			}
			if untilFeasible {
				return
			}
		}
		if t-lastBest > stall && s.haveBest {
			s.restart()
			lastBest = t
		}
	}
}

// restart returns to the best assignment and shifts a few random items to
// random allowed resources.
func (s *search) restart() {
	copy(s.asg, s.best)
	s.recompute()
	if s.pairOpt(pairNodes) {
		s.recompute()
		return
	}
	kicks := 2 + s.n/50
	for r := 0; r < kicks; r++ {
		j := s.rng.IntN(s.n)
		i := s.rng.IntN(s.m)
		if i != s.asg[j] && s.model.cost[j*s.m+i] <= maxFinite {
			s.shift(j, i)
		}
	}
	s.recompute()
}
