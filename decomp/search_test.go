package decomp_test

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
	"pincer/subproblem"
)

// choiceProblem draws blocks that each pick one option, tied by capacity
// rows; fractional costs make the objective non-integral.
func choiceProblem(rng *rand.Rand, sense decomp.Sense, integral bool, nb int) *decomp.Problem {
	nrows := 1 + rng.IntN(3)
	p := &decomp.Problem{Name: "choices", Sense: sense, IntegralObjective: integral}
	for r := 0; r < nrows; r++ {
		p.Rows = append(p.Rows, decomp.Row{Name: "cap", Sense: decomp.LessEqual, RHS: float64(2 + rng.IntN(3*nb))})
	}
	for k := 0; k < nb; k++ {
		c := &subproblem.Choice{}
		for o := 0; o < 2+rng.IntN(3); o++ {
			cost := float64(rng.IntN(20))
			if !integral {
				cost += math.Round(rng.Float64()*1000) / 1000
			}
			opt := subproblem.Option{Cost: cost}
			for r := 0; r < nrows; r++ {
				if w := rng.IntN(7); w > 0 {
					opt.Use = append(opt.Use, decomp.Entry{Index: r, Value: float64(w)})
				}
			}
			c.Options = append(c.Options, opt)
		}
		p.Blocks = append(p.Blocks, c)
	}
	return p
}

// bruteChoices enumerates every combination of options (brute force).
func bruteChoices(p *decomp.Problem) (best float64, ok bool) {
	pick := make([]int, len(p.Blocks))
	use := make([]float64, len(p.Rows))
	var rec func(k int, v float64)
	rec = func(k int, v float64) {
		if k == len(p.Blocks) {
			for r, row := range p.Rows {
				if use[r] > row.RHS {
					return
				}
			}
			if !ok || p.Sense.Better(v, best) {
				best, ok = v, true
			}
			return
		}
		for o, opt := range p.Blocks[k].(*subproblem.Choice).Options {
			pick[k] = o
			for _, e := range opt.Use {
				use[e.Index] += e.Value
			}
			rec(k+1, v+opt.Cost)
			for _, e := range opt.Use {
				use[e.Index] -= e.Value
			}
		}
	}
	rec(0, 0)
	return best, ok
}

// choiceBrancher splits on one block's chosen option (chosen or not),
// preferring blocks on over-full rows and, among them, the largest
// penalty; answers that fit every row and meet the bound solve the node.
type choiceBrancher struct{ p *decomp.Problem }

func (b choiceBrancher) Branch(in *decomp.BranchInput) (*decomp.Branching, error) {
	use := make([]float64, len(b.p.Rows))
	value := 0.0
	for _, a := range in.Answers {
		value += a.Cost
		for _, e := range a.Use {
			use[e.Index] += e.Value
		}
	}
	out := &decomp.Branching{}
	over := make([]bool, len(use))
	feasible := true
	for r, row := range b.p.Rows {
		over[r] = use[r] > row.RHS
		feasible = feasible && !over[r]
	}
	if feasible {
		out.Plan = &decomp.Plan{Value: value, Use: use}
		if !in.Sense.Better(in.Bound, value) {
			return out, nil
		}
	}
	pick, best := -1, -1.0
	for k, a := range in.Answers {
		fixedOne := false
		for _, f := range decomp.FixingsOf(in.Fixings, k) {
			fixedOne = fixedOne || f.Value == 1
		}
		if fixedOne {
			continue
		}
		hits := feasible
		for _, e := range a.Use {
			hits = hits || over[e.Index]
		}
		if !hits {
			continue
		}
		d := 0.0
		if in.Penalties != nil {
			for _, q := range in.Penalties[k] {
				if q.Var == a.Primal[0].Index && q.Value == 0 {
					d = q.Delta
				}
			}
		}
		if d > best {
			pick, best = k, d
		}
	}
	if pick < 0 {
		return out, nil // every block fixed: the node's one point is out.Plan or none
	}
	o := in.Answers[pick].Primal[0].Index
	out.Children = [][]decomp.Fixing{{{Block: pick, Var: o, Value: 1}}, {{Block: pick, Var: o, Value: 0}}}
	return out, nil
}

// TestSearchBruteForce: on random choice problems, both senses, integral
// and fractional costs, the search proves the optimum that enumeration
// finds (brute force), or that none exists; the global bound is exact
// after integral closure and within the reported gap otherwise; one and
// four workers give the same tree.
func TestSearchBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	infeasible := 0
	for c := 0; c < 300; c++ {
		sense := decomp.Sense(c % 2)
		integral := c%3 != 0
		seed := rng.Uint64()
		build := func() (*decomp.Problem, error) {
			return choiceProblem(rand.New(rand.NewPCG(seed, 1)), sense, integral, 3+int(seed%3)), nil
		}
		p, _ := build()
		want, ok := bruteChoices(p)
		var ref *decomp.SearchResult
		for _, s := range []decomp.SearchSettings{{Workers: 1}, {Workers: 4}, {Workers: 1, NoFixing: true, Batch: 1}} {
			res, err := decomp.Search(context.Background(), build, choiceBrancher{p}, s)
			if err != nil {
				t.Fatalf("case %d: %v", c, err)
			}
			if !res.Proved || res.Status != decomp.SearchProved {
				t.Fatalf("case %d: not proved: %+v", c, res)
			}
			if !ok {
				if res.Plan != nil {
					t.Fatalf("case %d: no feasible point, plan %v", c, res.Plan.Value)
				}
				infeasible++
				continue
			}
			if res.Plan == nil {
				t.Fatalf("case %d: no plan, brute force optimum %v", c, want)
			}
			tol := 1e-9 * math.Max(1, math.Abs(want))
			if math.Abs(res.Plan.Value-want) > tol {
				t.Fatalf("case %d (%s, integral %v): plan %v, brute force optimum %v", c, sense, integral, res.Plan.Value, want)
			}
			if (sense == decomp.Minimise && res.Bound > want+tol) || (sense == decomp.Maximise && res.Bound < want-tol) || res.Gap > 2e-9 {
				t.Fatalf("case %d: global bound %v (gap %v), optimum %v", c, res.Bound, res.Gap, want)
			}
			if integral && (res.Bound != want || res.Gap != 0) {
				t.Fatalf("case %d: integral costs: global bound %v, optimum %v", c, res.Bound, want)
			}
			if s.Workers == 1 && !s.NoFixing {
				ref = res
			} else if s.Workers == 4 && (res.Tree != ref.Tree || res.Bound != ref.Bound || res.Plan.Value != ref.Plan.Value) {
				t.Fatalf("case %d: 4 workers %+v bound %v, 1 worker %+v bound %v", c, res.Tree, res.Bound, ref.Tree, ref.Bound)
			}
		}
	}
	if infeasible == 0 {
		t.Fatal("no infeasible case drawn: the check of infeasibility proofs did not run")
	}
}

// TestSearchLimits: a node limit, a store of two nodes, a store of a few
// nodes' bytes and a budget of ascent rounds stop the search early or
// drop nodes; the global bound stays on the right side of the optimum
// (brute force) and no proof is claimed unless the tree closed without
// dropping.
func TestSearchLimits(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 5))
	dropped, limited, byBytes, worked := 0, 0, 0, 0
	memory := 3 * decomp.NodeBytes(2, 3)
	for c := 0; c < 60; c++ {
		seed := rng.Uint64()
		sense := decomp.Sense(c % 2)
		build := func() (*decomp.Problem, error) {
			return choiceProblem(rand.New(rand.NewPCG(seed, 2)), sense, true, 9), nil
		}
		p, _ := build()
		want, ok := bruteChoices(p)
		if !ok {
			continue
		}
		for _, s := range []decomp.SearchSettings{{Nodes: 3, NoFixing: true}, {MaxOpen: 2, NoFixing: true, Batch: 1, NodeRounds: 3, RootRounds: 5},
			{MaxBytes: memory, NoFixing: true, Batch: 1, NodeRounds: 3, RootRounds: 5}, {Rounds: 12, Batch: 2, NodeRounds: 3, RootRounds: 5}} {
			res, err := decomp.Search(context.Background(), build, choiceBrancher{p}, s)
			if err != nil {
				t.Fatal(err)
			}
			if sense.Better(want, res.Bound) {
				t.Fatalf("case %d %+v: global bound %v passes the optimum %v", c, s, res.Bound, want)
			}
			if res.Plan != nil && sense.Better(res.Plan.Value, want) {
				t.Fatalf("case %d: plan %v better than the optimum %v", c, res.Plan.Value, want)
			}
			if s.MaxBytes > 0 {
				// The store holds at most its bound after every push and
				// shrink; the peak is taken before a shrink, one node over.
				if res.Tree.OpenBytes > memory || res.Tree.PeakBytes > memory+decomp.NodeBytes(len(p.Blocks), len(p.Rows)) {
					t.Fatalf("case %d: store of %d bytes (peak %d), bound %d", c, res.Tree.OpenBytes, res.Tree.PeakBytes, memory)
				}
				if res.Tree.Dropped > 0 {
					byBytes++
				}
			}
			if s.Rounds > 0 {
				// A node's ascent is capped by the budget left when its
				// batch starts: at most a batch of node ascents over.
				if res.Tree.Rounds > s.Rounds+2*s.NodeRounds {
					t.Fatalf("case %d: %d ascent rounds for a budget of %d", c, res.Tree.Rounds, s.Rounds)
				}
				if res.Status == decomp.SearchWorkLimit {
					worked++
					if res.Proved || res.Tree.Rounds < s.Rounds {
						t.Fatalf("case %d: work limit: %+v", c, res)
					}
				}
			}
			switch {
			case res.Tree.Dropped > 0:
				dropped++
				if res.Proved || res.Status != decomp.SearchStoreFull {
					t.Fatalf("case %d: %d nodes dropped, yet status %s proved %v", c, res.Tree.Dropped, res.Status, res.Proved)
				}
			case res.Status == decomp.SearchNodeLimit:
				limited++
				if res.Proved || res.Tree.Nodes != 3 {
					t.Fatalf("case %d: node limit: %+v", c, res)
				}
			case res.Proved && res.Plan.Value != want:
				t.Fatalf("case %d: proved %v, optimum %v", c, res.Plan.Value, want)
			}
		}
	}
	if dropped == 0 || limited == 0 || byBytes == 0 || worked == 0 {
		t.Fatalf("dropped in %d cases (%d by bytes), node limit in %d, work limit in %d: the limits were not exercised", dropped, byBytes, limited, worked)
	}
}

// TestReducedCostFixingChoice: fixings from the exact choice penalties at
// the optimum as threshold keep every optimal combination (brute force
// over all combinations).
func TestReducedCostFixingChoice(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 19))
	seen := 0
	for c := 0; c < 200; c++ {
		p := choiceProblem(rng, decomp.Sense(c%2), c%2 == 0, 5)
		want, ok := bruteChoices(p)
		if !ok {
			continue
		}
		res, err := decomp.SolveNode(context.Background(), p, decomp.NodeSettings{Rounds: 30, KeepBest: true})
		if err != nil || !res.HasBound {
			t.Fatal(err)
		}
		fix, err := decomp.ReducedCostFixings(context.Background(), p, res.Prices, res.BestAnswers, res.Bound, want)
		if err != nil {
			t.Fatal(err)
		}
		seen += len(fix)
		// Every optimal combination must honour every fixing.
		pick := make([]int, len(p.Blocks))
		use := make([]float64, len(p.Rows))
		var rec func(k int, v float64)
		rec = func(k int, v float64) {
			if k == len(p.Blocks) {
				for r, row := range p.Rows {
					if use[r] > row.RHS {
						return
					}
				}
				if math.Abs(v-want) > 1e-9*math.Max(1, math.Abs(want)) {
					return
				}
				for _, f := range fix {
					if (pick[f.Block] == f.Var) != (f.Value == 1) {
						t.Fatalf("case %d: fixing %+v removes the optimal combination %v (value %v)", c, f, pick, v)
					}
				}
				return
			}
			for o, opt := range p.Blocks[k].(*subproblem.Choice).Options {
				pick[k] = o
				for _, e := range opt.Use {
					use[e.Index] += e.Value
				}
				rec(k+1, v+opt.Cost)
				for _, e := range opt.Use {
					use[e.Index] -= e.Value
				}
			}
		}
		rec(0, 0)
	}
	if seen < 50 {
		t.Fatalf("only %d fixings made: the check is too weak", seen)
	}
}

// TestSearchRulesBruteForce: with each price rule at the nodes
// (NodeMethod), the search proves the optimum that enumeration finds
// (brute force) on random choice problems, both senses, integral and
// fractional costs (boxstep on two cases), and one and three workers give
// the same tree.
func TestSearchRulesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 29))
	for c := 0; c < 24; c++ {
		sense := decomp.Sense(c % 2)
		integral := c%3 != 0
		seed := rng.Uint64()
		build := func() (*decomp.Problem, error) {
			return choiceProblem(rand.New(rand.NewPCG(seed, 3)), sense, integral, 3+int(seed%3)), nil
		}
		p, _ := build()
		want, ok := bruteChoices(p)
		for _, rule := range decomp.Rules() {
			mk, err := decomp.NodeMethod(rule)
			if err != nil {
				t.Fatal(err)
			}
			workers := []int{1, 3}
			set := decomp.SearchSettings{NewMethod: mk}
			if rule == "boxstep" {
				// Its LP master makes a round some 60 times dearer: the
				// first two cases (both senses), one worker count, short
				// ascents.
				if c >= 2 {
					continue
				}
				workers = workers[:1]
				set.RootRounds, set.NodeRounds = 60, 15
			}
			var ref *decomp.SearchResult
			for _, w := range workers {
				set.Workers = w
				res, err := decomp.Search(context.Background(), build, choiceBrancher{p}, set)
				if err != nil {
					t.Fatalf("case %d %s: %v", c, rule, err)
				}
				if !res.Proved {
					t.Fatalf("case %d %s: not proved: %+v", c, rule, res)
				}
				if !ok {
					if res.Plan != nil {
						t.Fatalf("case %d %s: no feasible point, plan %v", c, rule, res.Plan.Value)
					}
					continue
				}
				tol := 1e-9 * math.Max(1, math.Abs(want))
				slack := tol // the bound may not pass the optimum beyond it
				if sense == decomp.Maximise {
					slack = -tol
				}
				if res.Plan == nil || math.Abs(res.Plan.Value-want) > tol || sense.Better(want+slack, res.Bound) {
					t.Fatalf("case %d %s: plan %v bound %v, brute force optimum %v", c, rule, res.Plan, res.Bound, want)
				}
				if ref == nil {
					ref = res
				} else if res.Tree != ref.Tree || res.Bound != ref.Bound {
					t.Fatalf("case %d %s: 3 workers %+v, 1 worker %+v", c, rule, res.Tree, ref.Tree)
				}
			}
		}
	}
	if _, err := decomp.NodeMethod("none"); err == nil {
		t.Fatal("an unknown rule was accepted")
	}
}
