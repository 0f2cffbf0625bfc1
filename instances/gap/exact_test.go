package gap

import (
	"context"
	"fmt"
	"math/rand/v2"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"
	"time"

	"pincer/decomp"
)

// solveExact runs a short plain run for prices and a first plan, then the
// exact search from there, as solve --exact does.
func solveExact(t testing.TB, in *Instance, opt Options, workers int, rule BranchRule) *decomp.SearchResult {
	t.Helper()
	build := func() (*decomp.Problem, error) { return NewExactProblem(in, opt) }
	res, err := decomp.Search(context.Background(), build, NewBrancher(in, opt, rule), decomp.SearchSettings{
		Time: 60 * time.Second, Workers: workers, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

var smallGap = regexp.MustCompile(`^orlib/gap([0-9]+)\.txt$`)

func TestExactPublished(t *testing.T) {
	dir := gapBenchDir(t)
	for _, r := range readGapReference(t, dir) {
		if !smallGap.MatchString(r.file) || r.status != "optimal" {
			continue
		}
		t.Run(fmt.Sprintf("%s/%s", r.name, r.sense), func(t *testing.T) {
			in, err := ReadFile(filepath.Join(dir, filepath.FromSlash(r.file)), r.index)
			if err != nil {
				t.Fatal(err)
			}
			start := time.Now()
			res := solveExact(t, in, Options{Maximise: r.sense == "max"}, 1, JobRule)
			t.Logf("%s %s: value %v bound %v proved %v nodes %d open %d fixed %d/%d depth %d %v", r.name, r.sense, res.Plan.Value, res.Bound, res.Proved,
				res.Tree.Nodes, res.Tree.Open, res.Tree.RootFixed, res.Tree.Fixed, res.Tree.Depth, time.Since(start))
			if !res.Proved || res.Plan == nil || res.Plan.Value != float64(r.value) || res.Bound != float64(r.value) {
				t.Errorf("want proved %d", r.value)
			}
		})
	}
}

// tinyInstance draws a random instance small enough to enumerate; tight
// makes capacities small enough that some instances are infeasible.
func tinyInstance(rng *rand.Rand, tight bool) *Instance {
	m, n := 2+rng.IntN(2), 4+rng.IntN(4)
	in := &Instance{Name: "tiny", Agents: m, Jobs: n, Cost: matrix(m, n), Use: matrix(m, n), Capacity: make([]int64, m)}
	for i := 0; i < m; i++ {
		var sum int64
		for j := 0; j < n; j++ {
			in.Cost[i][j] = 1 + rng.Int64N(30)
			in.Use[i][j] = 1 + rng.Int64N(12)
			sum += in.Use[i][j]
		}
		div := int64(m)
		if tight {
			div = int64(m) + 1
		}
		in.Capacity[i] = max(1, sum/div+rng.Int64N(6))
	}
	return in
}

// optimalPlans enumerates every feasible assignment honouring the x_ij
// fixings (key i*Jobs+j) and returns the optimum and all assignments that
// reach it: the outside reference (brute force).
func optimalPlans(in *Instance, maximise bool, fix map[int]float64) (best int64, plans [][]int) {
	load := make([]int64, in.Agents)
	assign := make([]int, in.Jobs)
	var rec func(j int, v int64)
	rec = func(j int, v int64) {
		if j == in.Jobs {
			switch {
			case plans == nil || (maximise && v > best) || (!maximise && v < best):
				best, plans = v, [][]int{append([]int(nil), assign...)}
			case v == best:
				plans = append(plans, append([]int(nil), assign...))
			}
			return
		}
		for i := 0; i < in.Agents; i++ {
			if f, has := fix[i*in.Jobs+j]; has && f == 0 {
				continue
			}
			must := false
			for a := 0; a < in.Agents; a++ {
				if f, has := fix[a*in.Jobs+j]; has && f == 1 && a != i {
					must = true
				}
			}
			if must || load[i]+in.Use[i][j] > in.Capacity[i] {
				continue
			}
			load[i] += in.Use[i][j]
			assign[j] = i
			rec(j+1, v+in.Cost[i][j])
			load[i] -= in.Use[i][j]
		}
	}
	rec(0, 0)
	return best, plans
}

// TestExactBruteForce: on random tiny instances, both senses and both
// relaxations, the search proves the optimum that enumeration of every
// assignment finds (brute force), or proves infeasibility when there is
// no assignment; the same with fixing switched off and with one worker or
// three (same value, bound and tree).
func TestExactBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 1))
	for c := 0; c < 160; c++ {
		in := tinyInstance(rng, c%4 == 3)
		opt := Options{Maximise: c%2 == 1, Relaxation: Relaxation((c / 2) % 2)}
		want, plans := optimalPlans(in, opt.Maximise, nil)
		build := func() (*decomp.Problem, error) { return NewExactProblem(in, opt) }
		var first *decomp.SearchResult
		for _, s := range []decomp.SearchSettings{{Workers: 1}, {Workers: 3}, {Workers: 1, NoFixing: true}, {Workers: 2, Batch: 1, RootRounds: 3, NodeRounds: 2}} {
			s.Seed = 1
			res, err := decomp.Search(context.Background(), build, NewBrancher(in, opt, BranchRule(c%3%2)), s)
			if err != nil {
				if len(plans) == 0 && errorsIsNoOption(err) {
					break // a job fits no agent: NewProblem refuses, and no plan exists
				}
				t.Fatalf("case %d: %v", c, err)
			}
			if !res.Proved {
				t.Fatalf("case %d %+v: not proved: %+v", c, s, res)
			}
			if len(plans) == 0 {
				if res.Plan != nil {
					t.Fatalf("case %d: infeasible instance, plan %v", c, res.Plan.Value)
				}
				continue
			}
			if res.Plan == nil || res.Plan.Value != float64(want) || res.Bound != float64(want) {
				t.Fatalf("case %d (%s, %s) %+v: plan %v bound %v, brute force optimum %d", c, opt.Relaxation, decompSense(opt), s, res.Plan, res.Bound, want)
			}
			if v := Verify(in, res.Plan.Detail.([]int), opt.Maximise); !v.Feasible || float64(v.Value) != res.Plan.Value {
				t.Fatalf("case %d: plan does not verify: %+v", c, v)
			}
			if s.Workers == 1 && !s.NoFixing && s.Batch == 0 {
				first = res
			} else if s.Workers == 3 && (res.Tree != first.Tree || res.Bound != first.Bound) {
				t.Fatalf("case %d: 3 workers %+v, 1 worker %+v", c, res.Tree, first.Tree)
			}
		}
	}
}

func errorsIsNoOption(err error) bool {
	return err != nil && strings.Contains(err.Error(), "fits no agent")
}

func decompSense(o Options) string {
	if o.Maximise {
		return "max"
	}
	return "min"
}

// TestReducedCostFixingKeepsOptima: at a node (random fixings), with the
// threshold the node's optimum by enumeration (brute force), every
// variable that reduced costs fix agrees with every optimal plan of the
// node, for both relaxations and senses, at the prices of a short ascent
// and at its first prices.
func TestReducedCostFixingKeepsOptima(t *testing.T) {
	rng := rand.New(rand.NewPCG(29, 3))
	fixedSeen := 0
	for c := 0; c < 300; c++ {
		in := tinyInstance(rng, false)
		opt := Options{Maximise: c%2 == 1, Relaxation: Relaxation((c / 2) % 2)}
		fix := randomFixings(rng, in)
		best, plans := optimalPlans(in, opt.Maximise, fix)
		if len(plans) == 0 {
			continue
		}
		p, err := NewProblem(in, opt)
		if err != nil {
			continue
		}
		nf := engineFixings(in, opt.Relaxation, fix)
		for _, rounds := range []int{1, 40} {
			res, err := decomp.SolveNode(context.Background(), p, decomp.NodeSettings{Fixings: nf, Rounds: rounds, KeepBest: true})
			if err != nil || !res.HasBound {
				t.Fatalf("case %d: %v %+v", c, err, res)
			}
			q := *p
			q.Fixings = nf
			got, err := decomp.ReducedCostFixings(context.Background(), &q, res.Prices, res.BestAnswers, res.Bound, float64(best))
			if err != nil {
				t.Fatal(err)
			}
			fixedSeen += len(got)
			for _, f := range got {
				i, j := f.Block, f.Var
				if opt.Relaxation == ChoiceRelaxation {
					i, j = jobAgents(in, f.Block)[f.Var], f.Block
				}
				for _, a := range plans {
					if (a[j] == i) != (f.Value == 1) {
						t.Fatalf("case %d (%s, %s): fixing x[%d][%d] = %v removes the optimal plan %v (value %d)", c, opt.Relaxation, decompSense(opt), i, j, f.Value, a, best)
					}
				}
			}
		}
	}
	if fixedSeen < 100 {
		t.Fatalf("only %d fixings made in all cases: the check is too weak", fixedSeen)
	}
	t.Logf("%d reduced-cost fixings checked", fixedSeen)
}

// TestExactAgainstCBC: on generated 10 x 60 instances (type C, fixed
// seeds), the search proves the optimum that the outside MIP solver cbc
// proves on the exported model (expected values: cbc's optimal
// objective; for maximisation the model is written as minimisation of
// the negated profit, so the optimum is minus cbc's objective).
func TestExactAgainstCBC(t *testing.T) {
	if testing.Short() {
		t.Skip("cbc takes up to about 10 s per instance; skipped in -short mode")
	}
	if _, err := exec.LookPath("cbc"); err != nil {
		t.Skipf("cbc is not on PATH (Debian package coinor-cbc); skipping the oracle comparison: %v", err)
	}
	cases := []struct {
		seed     uint64
		maximise bool
	}{{21, false}, {23, false}, {21, true}}
	for _, c := range cases {
		t.Run(fmt.Sprintf("c10x60-s%d-max%v", c.seed, c.maximise), func(t *testing.T) {
			t.Parallel()
			in, err := Generate('c', 10, 60, c.seed)
			if err != nil {
				t.Fatal(err)
			}
			obj, optimal := cbcOptimum(t, in, c.maximise, 60)
			if !optimal {
				t.Skipf("cbc did not prove optimality within 60 CPU seconds (incumbent %v); the oracle gives no answer", obj)
			}
			want := obj
			if c.maximise {
				want = -obj
			}
			res := solveExact(t, in, Options{Maximise: c.maximise}, 1, JobRule)
			t.Logf("cbc optimum %v; search %v, bound %v, %d nodes, %v", want, res.Plan.Value, res.Bound, res.Tree.Nodes, res.Elapsed)
			if !res.Proved || res.Plan.Value != want || res.Bound != want {
				t.Fatalf("search: plan %v bound %v proved %v; cbc proves %v", res.Plan.Value, res.Bound, res.Proved, want)
			}
		})
	}
}
