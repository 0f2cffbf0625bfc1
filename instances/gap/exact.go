package gap

import (
	"context"
	"fmt"
	"math"
	"slices"

	"pincer/decomp"
	"pincer/heuristics"
)

var _ decomp.Penalizer = (*agentBlock)(nil)

// Penalties implements decomp.Penalizer for agent i's knapsack. The
// knapsack's exact optimum v (profit terms, from ans) is compared with an
// upper bound of the knapsack with the job forced: the linear relaxation
// (greedy fill by profit per unit of use, the last job fractional) of the
// other free jobs in the room left. Forcing a taken job out costs at least
// v minus that bound, forcing a job in likewise (+Inf when it does not
// fit). The linear bound is never below the forced optimum, so each
// penalty under-estimates the true change, which keeps reduced-cost
// fixing sound.
func (b *agentBlock) Penalties(_ context.Context, req *decomp.Request, ans *decomp.Answer, dst []decomp.Penalty) ([]decomp.Penalty, error) {
	sign := -1.0
	if req.Sense == decomp.Maximise {
		sign = 1
	}
	n := len(b.cost)
	profit := make([]float64, n)
	for j, c := range b.cost {
		profit[j] = sign * (float64(c) + req.Prices[j])
	}
	fixed := make([]int8, n) // 0 free, 1 fixed in, -1 fixed out
	room := b.capacity
	fixedProfit := 0.0
	for _, f := range req.Fixed() {
		if f.Var < 0 || f.Var >= n {
			return dst, fmt.Errorf("gap: agent block %d: fixing of variable %d, but there are %d jobs", req.Block, f.Var, n)
		}
		if f.Value == 1 {
			fixed[f.Var] = 1
			room -= b.use[f.Var]
			fixedProfit += profit[f.Var]
		} else {
			fixed[f.Var] = -1
		}
	}
	taken := make([]bool, n)
	for _, e := range ans.Primal {
		taken[e.Index] = true
	}
	v := sign * ans.Value
	// The greedy order of the free jobs with positive profit.
	var list []int
	for j := 0; j < n; j++ {
		if fixed[j] == 0 && profit[j] > 0 {
			list = append(list, j)
		}
	}
	slices.SortStableFunc(list, func(a, c int) int {
		// profit[a]/use[a] > profit[c]/use[c], zero use first.
		l, r := profit[a]*float64(b.use[c]), profit[c]*float64(b.use[a])
		switch {
		case l > r:
			return -1
		case l < r:
			return 1
		}
		return 0
	})
	pos := make([]int, n)
	for j := range pos {
		pos[j] = -1
	}
	w := make([]float64, len(list)+1)
	p := make([]float64, len(list)+1)
	for t, j := range list {
		pos[j] = t
		w[t+1] = w[t] + float64(b.use[j])
		p[t+1] = p[t] + profit[j]
	}
	// lp is the linear bound of the free jobs but skip (a list position or
	// -1) in room r.
	lp := func(r float64, skip int) float64 {
		wt := func(t int) float64 {
			if skip >= 0 && skip < t {
				return w[t] - w[skip+1] + w[skip]
			}
			return w[t]
		}
		pt := func(t int) float64 {
			if skip >= 0 && skip < t {
				return p[t] - p[skip+1] + p[skip]
			}
			return p[t]
		}
		lo, hi := 0, len(list) // largest t with wt(t) <= r
		for lo < hi {
			mid := (lo + hi + 1) / 2
			if wt(mid) <= r {
				lo = mid
			} else {
				hi = mid - 1
			}
		}
		val := pt(lo)
		nx := lo
		if nx == skip {
			nx++
		}
		if nx < len(list) {
			j := list[nx]
			if u := float64(b.use[j]); u > 0 {
				val += profit[j] * math.Min(1, (r-wt(lo))/u)
			}
		}
		return val
	}
	tol := 1e-9 * (1 + math.Abs(v))
	for j := 0; j < n; j++ {
		if fixed[j] != 0 {
			continue
		}
		if taken[j] {
			ub := fixedProfit + lp(float64(room), pos[j])
			dst = append(dst, decomp.Penalty{Var: j, Value: 0, Delta: math.Max(0, v-ub-tol)})
			continue
		}
		if b.use[j] > room {
			dst = append(dst, decomp.Penalty{Var: j, Value: 1, Delta: math.Inf(1)})
			continue
		}
		ub := fixedProfit + profit[j] + lp(float64(room-b.use[j]), pos[j])
		dst = append(dst, decomp.Penalty{Var: j, Value: 1, Delta: math.Max(0, v-ub-tol)})
	}
	return dst, nil
}

// BranchRule chooses how the exact search splits a node of the knapsack
// relaxation.
type BranchRule int8

const (
	// JobRule splits on a job the node's answers do not assign exactly
	// once: one child per agent the job may still go to (the job goes
	// there and nowhere else). The job is the one whose cheapest child,
	// by the blocks' penalties, costs most.
	JobRule BranchRule = iota
	// PairRule splits on one variable x_ij of that job: job j goes to
	// agent i (and nowhere else), or not to i; i is the job's cheapest
	// child.
	PairRule
)

// ExactProblem is the problem of the exact search (instances.Exact): the
// model's own, with the repair at nodes kept to a descent and a short
// tabu search (the search repairs at every node, and its plans improve
// as it dives).
func (m *Model) ExactProblem() (*decomp.Problem, error) {
	return NewExactProblem(m.In, m.Opt)
}

// NewExactProblem is NewProblem with the repair of the exact search: at
// the root a repair with a tabu search of a few moves per job, at every
// other node a descent from the node's answers (the search repairs at
// every node, and its plans improve as it dives; a tabu search at every
// sixteenth node made the OR-Library b05200 search thirteen times slower
// and found no better plan on the type D instances). Both count moves,
// so the search stays reproducible.
func NewExactProblem(in *Instance, opt Options) (*decomp.Problem, error) {
	p, err := NewProblem(in, opt)
	if err != nil {
		return nil, err
	}
	light, full := opt, opt
	if opt.Improve == (heuristics.ImproveSettings{}) {
		light.Improve = heuristics.ImproveSettings{Moves: -1, PairNodes: -1}
		full.Improve = heuristics.ImproveSettings{Moves: 4 * in.Jobs, PairNodes: -1}
	}
	p.Repair = &exactRepairer{light: newRepairer(in, light), full: newRepairer(in, full)}
	return p, nil
}

type exactRepairer struct {
	light, full *repairer
	calls       int
}

func (r *exactRepairer) Repair(ctx context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	r.calls++
	if r.calls == 1 {
		return r.full.Repair(ctx, in)
	}
	return r.light.Repair(ctx, in)
}

// Brancher returns the exact search's brancher for the model's problem
// (it implements instances.Exact).
func (m *Model) Brancher() (decomp.Brancher, error) {
	return &brancher{in: m.In, opt: m.Opt, rule: JobRule}, nil
}

// NewBrancher returns a brancher with the given rule (knapsack
// relaxation; the choice relaxation has one rule).
func NewBrancher(in *Instance, opt Options, rule BranchRule) decomp.Brancher {
	return &brancher{in: in, opt: opt, rule: rule}
}

type brancher struct {
	in   *Instance
	opt  Options
	rule BranchRule
}

// Branch implements decomp.Brancher. Variables are numbered as the
// blocks document them: knapsack block i, variable j is x_ij; choice
// block j, variable k is job j's k-th allowed agent (jobAgents).
func (br *brancher) Branch(in *decomp.BranchInput) (*decomp.Branching, error) {
	if br.opt.Relaxation == ChoiceRelaxation {
		return br.branchChoice(in)
	}
	g := br.in
	m, n := g.Agents, g.Jobs
	if len(in.Answers) != m {
		return nil, fmt.Errorf("gap: %d block answers for %d agents", len(in.Answers), m)
	}
	takers := make([][]int, n)
	for i, a := range in.Answers {
		for _, e := range a.Primal {
			takers[e.Index] = append(takers[e.Index], i)
		}
	}
	// state[i][j]: 0 free, 1 fixed to 1, -1 fixed to 0.
	state := make([][]int8, m)
	for i := range state {
		state[i] = make([]int8, n)
		for _, f := range decomp.FixingsOf(in.Fixings, i) {
			if f.Value == 1 {
				state[i][f.Var] = 1
			} else {
				state[i][f.Var] = -1
			}
		}
	}
	pen := func(i, j int, v float64) float64 {
		if in.Penalties == nil {
			return 0
		}
		ps := in.Penalties[i]
		k, ok := slices.BinarySearchFunc(ps, j, func(p decomp.Penalty, j int) int { return p.Var - j })
		if ok && ps[k].Value == v {
			return ps[k].Delta
		}
		return 0
	}
	// Assigned exactly once everywhere: the answers are a plan, and (the
	// job rows being equalities) its value is the node's Lagrangian
	// value, so the node is solved.
	assign := make([]int, n)
	violated := false
	for j, t := range takers {
		if len(t) != 1 {
			violated = true
			break
		}
		assign[j] = t[0]
	}
	if !violated {
		r := &repairer{in: g, opt: br.opt}
		if plan := r.plan(assign); plan != nil {
			return &decomp.Branching{Plan: plan}, nil
		}
		return nil, fmt.Errorf("gap: node answers assign every job once but break a capacity")
	}
	type child struct {
		agent int
		est   float64
	}
	bestJob, bestScore, bestSum := -1, math.Inf(-1), 0.0
	var bestKids []child
	for j, t := range takers {
		if len(t) == 1 {
			continue
		}
		var kids []child
		forced := -1
		for i := 0; i < m; i++ {
			if state[i][j] == 1 {
				forced = i
			}
		}
		for i := 0; i < m; i++ {
			if state[i][j] == -1 || g.Use[i][j] > g.Capacity[i] || (forced >= 0 && i != forced) {
				continue
			}
			est := 0.0
			if !slices.Contains(t, i) {
				est += pen(i, j, 1)
			}
			for _, k := range t {
				if k != i {
					est += pen(k, j, 0)
				}
			}
			kids = append(kids, child{i, est})
		}
		if len(kids) == 0 {
			// The job can go nowhere: the node has no plan.
			return &decomp.Branching{}, nil
		}
		score, sum := math.Inf(1), 0.0
		for _, c := range kids {
			score = math.Min(score, c.est)
			sum += c.est
		}
		if bestJob < 0 || score > bestScore || (score == bestScore && sum > bestSum) {
			bestJob, bestScore, bestSum, bestKids = j, score, sum, kids
		}
	}
	slices.SortStableFunc(bestKids, func(a, b child) int {
		switch {
		case a.est < b.est:
			return -1
		case a.est > b.est:
			return 1
		}
		return a.agent - b.agent
	})
	j := bestJob
	to := func(i int) []decomp.Fixing {
		fix := []decomp.Fixing{{Block: i, Var: j, Value: 1}}
		for k := 0; k < m; k++ {
			if k != i && state[k][j] != -1 {
				fix = append(fix, decomp.Fixing{Block: k, Var: j, Value: 0})
			}
		}
		return fix
	}
	out := &decomp.Branching{}
	if br.rule == PairRule && len(bestKids) > 1 {
		i := bestKids[0].agent
		out.Children = [][]decomp.Fixing{to(i), {{Block: i, Var: j, Value: 0}}}
		return out, nil
	}
	for _, c := range bestKids {
		out.Children = append(out.Children, to(c.agent))
	}
	return out, nil
}

// branchChoice splits a node of the choice relaxation on one job's
// option: the job goes to that agent or not. It takes a job of an
// overloaded agent whose forcing away costs most; without an overloaded
// agent the answers are a plan, offered as an incumbent, and the node is
// solved when its bound meets the plan's value, else it splits on the
// free option whose forcing away costs most.
func (br *brancher) branchChoice(in *decomp.BranchInput) (*decomp.Branching, error) {
	g := br.in
	n := g.Jobs
	if len(in.Answers) != n {
		return nil, fmt.Errorf("gap: %d block answers for %d jobs", len(in.Answers), n)
	}
	assign := make([]int, n)
	load := make([]int64, g.Agents)
	chosen := make([]int, n)
	for j, a := range in.Answers {
		if len(a.Primal) != 1 {
			return nil, fmt.Errorf("gap: job %d answer with %d options", j+1, len(a.Primal))
		}
		chosen[j] = a.Primal[0].Index
		assign[j] = jobAgents(g, j)[chosen[j]]
		load[assign[j]] += g.Use[assign[j]][j]
	}
	out := &decomp.Branching{}
	over := false
	for i, l := range load {
		over = over || l > g.Capacity[i]
	}
	if !over {
		out.Plan = (&repairer{in: g, opt: br.opt}).plan(assign)
		if out.Plan != nil && !in.Sense.Better(in.Bound, out.Plan.Value) {
			return out, nil // bound meets the plan: solved
		}
	}
	bestJob, best := -1, math.Inf(-1)
	for j := 0; j < n; j++ {
		if len(decomp.FixingsOf(in.Fixings, j)) > 0 && isFixedOne(decomp.FixingsOf(in.Fixings, j)) {
			continue
		}
		if over && load[assign[j]] <= g.Capacity[assign[j]] {
			continue
		}
		d := 0.0
		if in.Penalties != nil {
			for _, p := range in.Penalties[j] {
				if p.Var == chosen[j] && p.Value == 0 {
					d = p.Delta
				}
			}
		}
		if bestJob < 0 || d > best {
			bestJob, best = j, d
		}
	}
	if bestJob < 0 {
		return out, nil // every job fixed: the node's only point was tried
	}
	k := chosen[bestJob]
	out.Children = [][]decomp.Fixing{{{Block: bestJob, Var: k, Value: 1}}, {{Block: bestJob, Var: k, Value: 0}}}
	return out, nil
}

func isFixedOne(f []decomp.Fixing) bool {
	for _, x := range f {
		if x.Value == 1 {
			return true
		}
	}
	return false
}
