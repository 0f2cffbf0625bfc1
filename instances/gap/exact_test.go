package gap

import (
	"context"
	"fmt"
	"path/filepath"
	"regexp"
	"testing"
	"time"

	"pincer/decomp"
)

// solveExact runs a short plain run for prices and a first plan, then the
// exact search from there, as solve --exact does.
func solveExact(t testing.TB, in *Instance, opt Options, workers int, rule BranchRule) (*decomp.SearchResult, *decomp.Result) {
	t.Helper()
	p, err := NewProblem(in, opt)
	if err != nil {
		t.Fatal(err)
	}
	run, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 200, Seed: 1, Workers: 1, Evaluator: decomp.Pool{Workers: 1}})
	if err != nil {
		t.Fatal(err)
	}
	build := func() (*decomp.Problem, error) { return NewProblem(in, opt) }
	res, err := decomp.Search(context.Background(), build, NewBrancher(in, opt, rule), decomp.SearchSettings{
		Time: 60 * time.Second, Workers: workers, Seed: 1, Prices: run.Prices, Incumbent: run.Plan})
	if err != nil {
		t.Fatal(err)
	}
	return res, run
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
			res, run := solveExact(t, in, Options{Maximise: r.sense == "max"}, 1, JobRule)
			t.Logf("%s %s: value %v bound %v proved %v nodes %d open %d fixed %d/%d depth %d run %v/%v %v", r.name, r.sense, res.Plan.Value, res.Bound, res.Proved,
				res.Tree.Nodes, res.Tree.Open, res.Tree.RootFixed, res.Tree.Fixed, res.Tree.Depth, run.Plan.Value, run.Bound, time.Since(start))
			if !res.Proved || res.Plan == nil || res.Plan.Value != float64(r.value) || res.Bound != float64(r.value) {
				t.Errorf("want proved %d", r.value)
			}
		})
	}
}
