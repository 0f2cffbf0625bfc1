package heuristics

import (
	"context"
	"math"
	"math/rand/v2"
	"sync"
)

// Plan search: path relinking between elite plans, each path followed by
// the tabu search with shift, swap and ejection-chain moves of Improve.
//
// The idea is that of Yagiura, Ibaraki & Glover ("A path relinking approach
// with ejection chains for the generalized assignment problem", EJOR 169,
// 2006): good plans share much of their structure, so the region between
// two of them is a good place to search. A task walks from an initiating
// elite plan towards a guiding one, moving at each step the differing item
// whose move to its guiding resource costs least on the penalised objective
// (cost plus the weighted capacity excess), stops part of the way (a random
// fraction between 0.3 and 0.7 of the differing items) and runs the tabu
// search from there. This is a simplified version of the paper's method:
// one point per path instead of several, and the tabu search of this
// package as the improvement step.
//
// Tasks run side by side: every round of PlanSearch runs a fixed number of
// tasks, each on its own search state and random stream (derived from the
// seed, the round and the task number only), and merges their plans into
// the pool in task order once all have finished. The result therefore
// depends on the seed and the settings, never on how many goroutines ran
// the tasks or how they were scheduled.

// elitePlan is a feasible plan of the pool with its cost (minimisation
// sense, base costs).
type elitePlan struct {
	asg  []int
	cost float64
}

// SearchSettings bound the work of PlanSearch. The zero value means
// defaults. All budgets count moves, so a search is reproducible.
type SearchSettings struct {
	// Moves is the number of tabu moves of each task; 0 means 10 per item
	// plus 2000. With Focus, a task whose narrowed model keeps fewer pairs
	// than the widest task's gets more moves in that proportion (at most
	// 4 times as many), so that tasks run side by side end at about the
	// same time instead of leaving a core idle.
	Moves int
	// Stall is the number of moves without a better plan after which a
	// task goes back to its best plan; 0 means 3 per item plus 100.
	Stall int
	// Rounds is the number of merge points; 0 means 1.
	Rounds int
	// Tasks is the number of tasks (paths) per round; 0 means 2.
	Tasks int
	// Workers is the number of tasks run at once (goroutines); 0 or 1 runs
	// them one after another. It changes the time a search takes, never
	// its result.
	Workers int
	// Focus narrows the tasks' moves: task t keeps, per item, only its
	// Focus[t % len(Focus)] allowed pairs of least bound (as ranked by
	// Restrict) and its pair in the task's initiating plan (the guiding
	// plan's other pairs are then skipped by the path); 0 (or no Focus, or
	// no Restrict) keeps every allowed pair. A heuristic narrowing: the
	// plans found are feasible for the whole assignment either way.
	Focus []int
}

// maxMoveScale bounds the extra moves of a narrowed task (see
// SearchSettings.Moves).
const maxMoveScale = 4

// elitePool is the size of the pool of elite plans.
const elitePool = 10

// Offer adds a plan (assign[j] = resource of item j) to the elite pool of
// PlanSearch if it is feasible, not already in the pool, and the pool has
// room or the plan beats the pool's worst (which it then replaces). It
// reports whether the plan was added.
func (sr *Searcher) Offer(assign []int) bool {
	md := sr.base
	if !md.fits(assign) {
		return false
	}
	if _, ok := sr.p.Evaluate(assign); !ok {
		return false
	}
	cost := 0.0
	for j, i := range assign {
		cost += md.cost[j*md.m+i]
	}
	return sr.offer(assign, cost)
}

func (sr *Searcher) offer(assign []int, cost float64) bool {
	for _, e := range sr.elite {
		if e.cost == cost && equalInts(e.asg, assign) {
			return false
		}
	}
	if len(sr.elite) >= elitePool {
		w := len(sr.elite) - 1 // kept sorted: the last is the worst
		if !(cost < sr.elite[w].cost) {
			return false
		}
		sr.elite = sr.elite[:w]
	}
	e := elitePlan{asg: append([]int(nil), assign...), cost: cost}
	q := len(sr.elite)
	sr.elite = append(sr.elite, e)
	for ; q > 0 && sr.elite[q-1].cost > cost; q-- {
		sr.elite[q] = sr.elite[q-1]
	}
	sr.elite[q] = e
	return true
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for k := range a {
		if a[k] != b[k] {
			return false
		}
	}
	return true
}

// EliteSize returns the number of plans in the elite pool.
func (sr *Searcher) EliteSize() int { return len(sr.elite) }

// taskResult is the outcome of one task.
type taskResult struct {
	asg  []int
	cost float64
	ok   bool
}

// PlanSearch runs st.Rounds rounds of st.Tasks path-relinking tasks over
// the elite pool (see Offer) and returns the best plan of the pool
// afterwards with its value in the sense of the assignment; ok is false
// when the pool holds no plan that the current restriction (Restrict)
// allows. The plans found join the pool. The first task of every round
// starts from the pool's best plan, the others from random pool plans; each
// is guided by a random other pool plan (with a pool of one plan the tasks
// perturb it with random shifts instead).
//
// The result depends only on the pool, the restriction, st (apart from
// Workers) and seed. When ctx is cancelled the tasks stop within about a
// millisecond and the best plan so far is returned.
func (sr *Searcher) PlanSearch(ctx context.Context, st SearchSettings, seed uint64) (assign []int, value float64, ok bool) {
	md := sr.model()
	n := md.n
	if st.Moves == 0 {
		st.Moves = 10*n + 2000
	}
	if st.Stall <= 0 {
		st.Stall = 3*n + 100
	}
	st.Rounds = max(st.Rounds, 1)
	if st.Tasks <= 0 {
		st.Tasks = 2
	}
	st.Workers = max(st.Workers, 1)
	for len(sr.tasks) < st.Tasks {
		sr.tasks = append(sr.tasks, newSearch(md.m, n))
		sr.tmods = append(sr.tmods, model{})
	}
	res := make([]taskResult, st.Tasks)
	type job struct{ from, guide []int }
	jobs := make([]job, st.Tasks)
	tms := make([]*model, st.Tasks)
	for r := 0; r < st.Rounds && ctx.Err() == nil; r++ {
		pool := sr.pool(md)
		if len(pool) == 0 {
			return nil, sr.p.worst(), false
		}
		rngs := make([]*rand.Rand, st.Tasks)
		for t := range jobs {
			rngs[t] = rand.New(rand.NewPCG(seed, uint64(r*st.Tasks+t)+1))
			a := 0
			if t > 0 {
				a = rngs[t].IntN(len(pool))
			}
			jobs[t] = job{from: pool[a].asg}
			if len(pool) > 1 {
				b := rngs[t].IntN(len(pool) - 1)
				if b >= a {
					b++
				}
				jobs[t].guide = pool[b].asg
			}
		}
		// The tasks' models first: a task's moves cost about in
		// proportion to the pairs its model keeps, so narrower tasks get
		// more moves (see SearchSettings.Moves) and the tasks of a merge
		// point take about as long.
		widest := 0
		for t := range jobs {
			tms[t] = md
			if len(st.Focus) > 0 {
				tms[t] = sr.narrow(md, st.Focus[t%len(st.Focus)], &sr.tmods[t], jobs[t].from)
			}
			widest = max(widest, len(tms[t].opt))
		}
		run := func(t int) {
			ts := st
			if k := len(tms[t].opt); k > 0 && st.Moves > 0 {
				ts.Moves = int(float64(st.Moves) * min(float64(widest)/float64(k), maxMoveScale))
			}
			res[t] = sr.tasks[t].relinkTask(ctx, tms[t], jobs[t].from, jobs[t].guide, ts, rngs[t])
		}
		if st.Workers == 1 {
			for t := range jobs {
				run(t)
			}
		} else {
			var wg sync.WaitGroup
			sem := make(chan struct{}, st.Workers)
			for t := range jobs {
				wg.Add(1)
				sem <- struct{}{}
				go func(t int) {
					defer wg.Done()
					defer func() { <-sem }()
					run(t)
				}(t)
			}
			wg.Wait()
		}
		// merge point: the tasks' plans join the pool in task order
		for _, tr := range res {
			if tr.ok {
				sr.offer(tr.asg, tr.cost)
			}
		}
	}
	pool := sr.pool(md)
	if len(pool) == 0 {
		return nil, sr.p.worst(), false
	}
	out := append([]int(nil), pool[0].asg...)
	v, _ := sr.p.Evaluate(out)
	return out, v, true
}

// pool lists the elite plans md allows, best first.
func (sr *Searcher) pool(md *model) []elitePlan {
	var out []elitePlan
	for _, e := range sr.elite {
		if md.fits(e.asg) {
			out = append(out, e)
		}
	}
	return out
}

// relinkTask walks from from towards guide (nil: perturbs from), runs the
// tabu search and polishes the best plan found by descent.
func (s *search) relinkTask(ctx context.Context, md *model, from, guide []int, st SearchSettings, rng *rand.Rand) taskResult {
	m := md.m
	s.reset(ctx, md, from, rng)
	if guide != nil {
		var diff []int
		for j, i := range guide {
			if i != from[j] && i >= 0 && i < m && md.cost[j*m+i] <= maxFinite {
				diff = append(diff, j)
			}
		}
		steps := int(float64(len(diff)) * (0.3 + 0.4*rng.Float64()))
		for ; steps > 0 && len(diff) > 0; steps-- {
			if s.cancelled() {
				break
			}
			bq, bv := -1, math.Inf(1)
			for q, j := range diff {
				if v := s.shiftValue(j, guide[j]); v < bv {
					bq, bv = q, v
				}
			}
			if bq < 0 {
				break
			}
			j := diff[bq]
			diff[bq] = diff[len(diff)-1]
			diff = diff[:len(diff)-1]
			s.shift(j, guide[j])
		}
	} else {
		for r := 2 + s.n/20; r > 0; r-- {
			j := rng.IntN(s.n)
			opts := md.allowed(j)
			if len(opts) > 1 {
				s.shift(j, int(opts[rng.IntN(len(opts))]))
			}
		}
	}
	s.recompute()
	s.record()
	// On large instances a quarter of the moves go to the tabu search,
	// which finds a feasible plan near the path's end, and the rest to the
	// iterated local search with the exchange polish, which improves
	// packed plans where the tabu search does not (see exchange.go); each
	// of its rounds counts as ilsMoves moves, about what it costs on a
	// narrowed model (so about a quarter of the time goes to the tabu
	// search there; see ilsMoves for wide models).
	tabuMoves, ilsRounds := st.Moves, 0
	if s.n > fullWindow && st.Moves > 0 {
		tabuMoves = st.Moves / 4
		ilsRounds = (st.Moves - tabuMoves) / ilsMoves(s.n)
	}
	if tabuMoves > 0 && m > 1 {
		s.tabuSearch(tabuMoves, st.Stall, false)
	}
	if !s.haveBest {
		return taskResult{}
	}
	copy(s.asg, s.best)
	s.recompute()
	s.polish(false)
	if ilsRounds > 0 && m > 1 {
		s.ils(ilsRounds)
		copy(s.asg, s.best)
		s.recompute()
	}
	cost := 0.0 // summed afresh: the running sum drifts
	for j, i := range s.best {
		cost += md.cost[j*m+i]
	}
	return taskResult{asg: append([]int(nil), s.best...), cost: cost, ok: true}
}

// shiftValue is the change of the penalised objective (cost plus weighted
// capacity excess) when item j moves to resource i.
func (s *search) shiftValue(j, i int) float64 {
	a := s.asg[j]
	if a == i {
		return 0
	}
	m := s.m
	ka, ki := j*m+a, j*m+i
	v := s.model.cost[ki] - s.model.cost[ka]
	la, li := s.load[a], s.load[i]
	v += s.alpha[a] * (s.excess(a, la-s.weight[ka]) - s.excess(a, la))
	v += s.alpha[i] * (s.excess(i, li+s.weight[ki]) - s.excess(i, li))
	return v
}

// ilsMoves is the number of tabu moves one round of the iterated local
// search counts as, in a task's move budget: about what it costs in time.
// A round is a few kicks and a polish whose descent passes over every item
// once, about n/window tabu moves of a narrowed 64-item window; measured in
// CPU profiles of 20 s runs, a round cost about n/46 tabu moves on d40400
// and n/88 on d801600. (It counted as n/2 before, which left the iterated
// search a tenth of the time meant for it: 20 s runs, seeds 1 and 2,
// d801600 0.30-0.35 % above the best known before, 0.20-0.21 % after;
// d401600 0.27-0.30 % before, 0.22-0.30 % after; d40400 unchanged within
// its noise of about 0.1 %.) On a model that is not narrowed (fewer than
// 20 resources in the assignment families) a round costs more, since the
// descent looks at every allowed pair: on a generated 15 x 900 type C
// instance the iterated search took 56 % of the CPU and the tabu search
// 38 %, and those instances did slightly better with the old count. A
// split that follows what each phase finds would suit both.
func ilsMoves(n int) int { return max(n/48, 1) }
