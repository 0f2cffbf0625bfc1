package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"pincer/decomp"
	"pincer/instances"
)

// exactFlags are solve's flags of the exact search (--exact).
type exactFlags struct {
	on      bool
	nodes   int
	maxOpen int
	memory  string // --node-memory as given
	bytes   int64  // and in bytes, set by check
	batch   int
}

// minNodeMemory is the smallest --node-memory accepted.
const minNodeMemory = 64 << 10

// parseSize reads a byte count with an optional binary unit: "512MiB",
// "64KiB", "2GiB", "1048576" or "1048576B".
func parseSize(s string) (int64, bool) {
	units := []struct {
		suffix string
		factor int64
	}{{"KiB", 1 << 10}, {"MiB", 1 << 20}, {"GiB", 1 << 30}, {"TiB", 1 << 40}, {"B", 1}}
	t := strings.TrimSpace(s)
	factor := int64(1)
	for _, u := range units {
		if strings.HasSuffix(t, u.suffix) {
			t, factor = strings.TrimSpace(strings.TrimSuffix(t, u.suffix)), u.factor
			break
		}
	}
	n, err := strconv.ParseInt(t, 10, 64)
	if err != nil || n < 0 || n > math.MaxInt64/factor {
		return 0, false
	}
	return n * factor, true
}

func (e *exactFlags) register(cmd *cobra.Command) {
	fl := cmd.Flags()
	fl.BoolVar(&e.on, "exact", false, "search to a proof: Lagrangian branch and bound with reduced-cost fixing, limited by --time, --nodes and --open-limit (families with an exact mode)")
	fl.IntVar(&e.nodes, "nodes", 0, "with --exact: limit on nodes evaluated (0 for none; at least 0)")
	fl.IntVar(&e.maxOpen, "open-limit", 200000, "with --exact: most open nodes kept; when full the worse-bound half is dropped and its bound stays in the global bound, which then cannot close (at least 2)")
	fl.StringVar(&e.memory, "node-memory", "512MiB", "with --exact: most memory the open nodes may hold, estimated from their fixings and warm prices (B, KiB, MiB, GiB; at least 64KiB); when full the worse-bound half is dropped as with --open-limit")
	fl.IntVar(&e.batch, "batch", 8, "with --exact: nodes evaluated together (the search depends on it, not on --workers; at least 1)")
}

func (e *exactFlags) check(f *runFlags) error {
	n, ok := parseSize(e.memory)
	if !ok || n < minNodeMemory {
		return badInput(fmt.Errorf("--node-memory %q: want a size of at least 64KiB, such as 512MiB (a whole number with B, KiB, MiB or GiB)", e.memory))
	}
	e.bytes = n
	switch {
	case e.nodes < 0:
		return badInput(fmt.Errorf("--nodes %d: want at least 0", e.nodes))
	case e.maxOpen < 2:
		return badInput(fmt.Errorf("--open-limit %d: want at least 2", e.maxOpen))
	case e.batch < 1:
		return badInput(fmt.Errorf("--batch %d: want at least 1", e.batch))
	case !e.on:
		return nil
	case f.checkpoints.path != "" || f.checkpoints.resume != "":
		return badInput(errors.New("--exact cannot be checkpointed (--checkpoint, --resume)"))
	case f.plot != "":
		return badInput(errors.New("--plot draws rounds of a plain run; --exact has nodes instead"))
	case f.primal:
		return badInput(errors.New("--primal-average belongs to a plain run with --rule volume, not to --exact"))
	}
	return nil
}

// exactReport is the JSON report of an exact search: the plain report's
// keys (rounds and history empty) plus the search's.
type exactReport struct {
	*report
	Nodes       int      `json:"nodes"`
	OpenNodes   int      `json:"open_nodes"`
	NodeMemory  int64    `json:"node_memory"`
	NodeRule    string   `json:"node_rule"`
	GlobalBound num      `json:"global_bound"`
	RootBound   num      `json:"root_bound"`
	Proved      bool     `json:"proved"`
	SearchStop  string   `json:"search_stop"`
	Tree        treeJSON `json:"tree"`
}

type treeJSON struct {
	Depth      int   `json:"depth"`
	CutOff     int   `json:"cut_off"`
	Infeasible int   `json:"infeasible"`
	Solved     int   `json:"solved"`
	Branched   int   `json:"branched"`
	Pruned     int   `json:"pruned_by_penalty"`
	Dropped    int   `json:"dropped"`
	Fixed      int   `json:"fixed_by_reduced_cost"`
	RootFixed  int   `json:"fixed_at_root"`
	Plans      int   `json:"plans_found"`
	Batch      int   `json:"batch"`
	Rounds     int   `json:"ascent_rounds"`
	OpenBytes  int64 `json:"open_bytes"`
	PeakBytes  int64 `json:"peak_bytes"`
}

// solveExact runs the exact search on a loaded model and reports it like
// solveModel does a plain run.
func solveExact(ctx context.Context, stdout, stderr io.Writer, f *runFlags, file string, m instances.Model) (*decomp.Result, error) {
	ex, ok := m.(instances.Exact)
	if !ok {
		return nil, badInput(fmt.Errorf("--exact: format %s has no exact mode", f.format))
	}
	p, err := ex.ExactProblem()
	if err != nil {
		return nil, badInput(err)
	}
	br, err := ex.Brancher()
	if err != nil {
		return nil, badInput(err)
	}
	var warm *warmJSON
	if f.warm.path != "" {
		if warm, err = applyWarmStart(f.warm.path, f.format, m, p); err != nil {
			return nil, err
		}
	}
	prog := newProgress(stderr, f)
	first := true
	build := func() (*decomp.Problem, error) {
		if first {
			first = false
			return p, nil
		}
		return ex.ExactProblem()
	}
	if err := ruleFits(f.rule, p); err != nil {
		return nil, err
	}
	newMethod, err := decomp.NodeMethod(f.rule)
	if err != nil {
		return nil, badInput(err)
	}
	// The node ascents keep the subgradient rule unless one is given: the
	// families' default rules were chosen on plain runs, and the exact
	// mode's figures were measured with the subgradient rule at nodes.
	nodeRule := f.rule
	if nodeRule == "" {
		nodeRule = decomp.Rules()[0]
	}
	s := decomp.SearchSettings{NewMethod: newMethod, Time: f.time, Nodes: f.exact.nodes, MaxOpen: f.exact.maxOpen, MaxBytes: f.exact.bytes, Batch: f.exact.batch,
		Workers: f.workers, Seed: f.seed, Prices: p.Prices}
	if prog != nil {
		s.Progress = prog.search
	}
	sr, err := decomp.Search(ctx, build, br, s)
	if prog != nil && sr != nil {
		prog.searchDone(sr)
	}
	if err != nil {
		return nil, &exitError{code: exitInternal, err: err}
	}
	res := searchResult(p, sr)
	summary := stdout
	if f.report == stdoutPath || f.plan == stdoutPath {
		summary = stderr
	}
	// The plain summary, with the search's stop and size in place of the
	// run's.
	var sum strings.Builder
	if err := printSummary(&sum, m, p.IntegralObjective, res, f.top); err != nil {
		return res, &exitError{code: exitInternal, err: err}
	}
	for _, line := range strings.SplitAfter(sum.String(), "\n") {
		switch {
		case strings.HasPrefix(line, "stop "):
			line = fmt.Sprintf("stop        %s\n", sr.Status)
		case strings.HasPrefix(line, "time "):
			line = fmt.Sprintf("time        %.2f s, %d nodes\n", sr.Elapsed.Seconds(), sr.Tree.Nodes)
		}
		io.WriteString(summary, line)
	}
	t := sr.Tree
	fmt.Fprintf(summary, "search      %d nodes, %d open, depth %d; %d cut off, %d infeasible, %d solved, %d pruned by penalties, %d dropped; %d variables fixed by reduced costs (%d at the root)\n",
		t.Nodes, t.Open, t.Depth, t.CutOff, t.Infeasible, t.Solved, t.Pruned, t.Dropped, t.Fixed, t.RootFixed)
	fmt.Fprintf(summary, "node store  peak %s of %s (estimated), %d ascent rounds\n", fmtMiB(t.PeakBytes), fmtMiB(f.exact.bytes), t.Rounds)
	fmt.Fprintf(summary, "global bound %s (%s)\n", fmtNum(sr.Bound), sr.Status)
	if f.report != "" {
		rep, err := buildReport(f.format, file, f.opts.values().Int("index"), f.workers, f.seed, f.history == "full", m, res)
		if err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
		rep.Rule, rep.WarmStart, rep.Stop = "exact", warm, sr.Status.String()
		rep.withRounded(roundedBound(res.Bound, p.IntegralObjective, m.Sense()))
		out := &exactReport{report: rep, Nodes: t.Nodes, OpenNodes: t.Open, NodeMemory: f.exact.bytes, NodeRule: nodeRule, GlobalBound: num(sr.Bound), RootBound: num(sr.RootBound),
			Proved: sr.Proved, SearchStop: sr.Status.String(),
			Tree: treeJSON{Depth: t.Depth, CutOff: t.CutOff, Infeasible: t.Infeasible, Solved: t.Solved, Branched: t.Branched,
				Pruned: t.Pruned, Dropped: t.Dropped, Fixed: t.Fixed, RootFixed: t.RootFixed, Plans: t.Plans, Batch: f.exact.batch,
				Rounds: t.Rounds, OpenBytes: t.OpenBytes, PeakBytes: t.PeakBytes}}
		if err := writeJSON(f.report, stdout, out); err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
	}
	if f.plan != "" && res.Plan != nil {
		if err := writePlan(f.plan, stdout, m, res); err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
	}
	switch {
	case sr.Status == decomp.SearchInterrupted:
		return res, &exitError{code: exitInterrupted, err: errors.New("interrupted; best plan and report written")}
	case res.Plan == nil && sr.Proved:
		return res, &exitError{code: exitNoPlan, err: errors.New("the search proved that no feasible plan exists")}
	case res.Plan == nil:
		return res, &exitError{code: exitNoPlan, err: errors.New("no feasible plan found (the bound and report are still valid)")}
	}
	return res, nil
}

// fmtMiB writes a byte count in MiB.
func fmtMiB(n int64) string { return fmt.Sprintf("%.1f MiB", float64(n)/(1<<20)) }

// searchResult presents a search's outcome as a run result, so that the
// summary, report and plan writers serve both: the bound is the global
// bound, the prices are the root's, rows are measured in the plan.
func searchResult(p *decomp.Problem, sr *decomp.SearchResult) *decomp.Result {
	res := &decomp.Result{Bound: sr.Bound, HasBound: !math.IsInf(sr.Bound, 0), Plan: sr.Plan, Gap: sr.Gap,
		Elapsed: sr.Elapsed, Prices: sr.RootPrices, ProvedOptimal: sr.Proved && sr.Plan != nil}
	switch sr.Status {
	case decomp.SearchProved:
		res.Status = decomp.SearchClosed
		if sr.Plan == nil {
			res.Status = decomp.ProvedInfeasible
		}
	case decomp.SearchTimeLimit:
		res.Status = decomp.TimeLimit
	case decomp.SearchInterrupted:
		res.Status = decomp.Interrupted
	default:
		res.Status = decomp.RoundLimit
	}
	if res.Prices == nil {
		res.Prices = make([]float64, len(p.Rows))
	}
	res.Rows = make([]decomp.RowReport, len(p.Rows))
	for i, row := range p.Rows {
		rep := decomp.RowReport{Name: row.Name, Sense: row.Sense, RHS: row.RHS, Price: res.Prices[i], Use: math.NaN(), Slack: math.NaN()}
		if sr.Plan != nil && i < len(sr.Plan.Use) {
			rep.Use = sr.Plan.Use[i]
			switch row.Sense {
			case decomp.LessEqual:
				rep.Slack = row.RHS - rep.Use
			case decomp.GreaterEqual:
				rep.Slack = rep.Use - row.RHS
			default:
				rep.Slack = -math.Abs(rep.Use - row.RHS)
			}
			rep.Binding = math.Abs(rep.Slack) <= 1e-9*math.Max(1, math.Abs(row.RHS))
		}
		res.Rows[i] = rep
	}
	return res
}

// search shows the exact search's state: global bound, plan and open
// nodes, on the live line or as periodic log lines.
func (p *progress) search(sp *decomp.SearchProgress) {
	now := time.Now()
	if sp.Nodes > 1 && now.Sub(p.last) < p.every {
		return
	}
	p.last = now
	gap := math.Inf(1)
	if sp.HasIncumbent {
		gap = math.Abs(sp.Incumbent-sp.Bound) / math.Max(1, math.Abs(sp.Incumbent))
	}
	if p.live {
		plan := "none"
		if sp.HasIncumbent {
			plan = fmtNum(sp.Incumbent)
		}
		line := fmt.Sprintf("nodes %d  open %d  %.1fs  global bound %s  plan %s  gap %s", sp.Nodes, sp.Open, sp.Elapsed.Seconds(), fmtNum(sp.Bound), plan, fmtGap(gap))
		p.liveLine(line)
		return
	}
	ev := p.log.Info().Int("nodes", sp.Nodes).Int("open", sp.Open).Float64("seconds", sp.Elapsed.Seconds()).Float64("global_bound", sp.Bound)
	if sp.HasIncumbent {
		ev = ev.Float64("plan", sp.Incumbent).Str("gap", fmtGap(gap))
	}
	ev.Msg("search")
}

// searchDone ends the live line, or writes a final log line.
func (p *progress) searchDone(sr *decomp.SearchResult) {
	if p.live {
		if p.lastLine > 0 {
			fmt.Fprintln(p.w)
		}
		return
	}
	ev := p.log.Info().Int("nodes", sr.Tree.Nodes).Int("open", sr.Tree.Open).Float64("seconds", sr.Elapsed.Seconds()).Float64("global_bound", sr.Bound)
	if sr.Plan != nil {
		ev = ev.Float64("plan", sr.Plan.Value)
	}
	ev.Str("gap", fmtGap(sr.Gap)).Str("stop", sr.Status.String()).Bool("proved", sr.Proved).Msg("finished")
}
