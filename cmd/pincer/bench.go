package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"time"

	"github.com/spf13/cobra"

	"pincer/decomp"
)

// benchFlags are the flags of pincer bench.
type benchFlags struct {
	time       time.Duration
	peer       string
	workers    int
	rule       []string // as given: names, maybe comma-separated
	rules      []string // parsed by check; empty: each row's default rule
	marksText  string
	marks      []time.Duration // parsed by check, increasing
	gap        float64
	seed       uint64
	csv        string
	chart      string
	benchmarks string
	// onRow, when set (by tests), is called as row k (0-based) starts.
	onRow func(k int)
}

func newBenchCmd() *cobra.Command {
	var f benchFlags
	cmd := &cobra.Command{
		Use:   "bench MANIFEST [--time T] [--peer cbc] [--workers N] [--csv out.csv] [--chart out.svg]",
		Short: "Run the instances of a manifest with a time limit, optionally beside cbc, and tabulate plan, bound, gap and deviation from the reference",
		Long: `bench reads a manifest (a CSV file listing instances: name, format, file, index,
sense, options, reference value and its kind) and solves each instance in turn
with the time limit. With --peer cbc and cbc installed, cbc solves the model
pincer exports as MPS, with the same wall time and thread count. The table on
standard output puts the reference, pincer's plan, bound and gap, cbc's plan
and bound, the times and both plans' deviations from the reference side by
side; --csv and --chart write it as CSV and as an SVG chart.

Files in the manifest are relative to the benchmarks folder: --benchmarks,
else $PINCER_BENCHMARKS, else the nearest shared/benchmarks found walking up
from the manifest's folder. Ctrl-C stops the running instance with its best
plan and bound, and the rows done so far are written.`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			return runBench(cmd.Context(), cmd.OutOrStdout(), cmd.ErrOrStderr(), &f, args[0])
		},
	}
	fl := cmd.Flags()
	fl.DurationVar(&f.time, "time", 10*time.Second, "wall-clock limit of each run, pincer's and the peer's (more than 0)")
	fl.StringVar(&f.peer, "peer", "", "also run this general-purpose solver on the exported MPS model: cbc")
	fl.IntVar(&f.workers, "workers", runtime.NumCPU(), "goroutines evaluating blocks, and the peer's thread count (at least 1)")
	fl.StringSliceVar(&f.rule, "rule", nil, "price-update rules, separated by commas or the flag repeated: each row runs under each in turn ("+strings.Join(decomp.Rules(), ", ")+"; default: the family's default rule)")
	fl.StringVar(&f.marksText, "marks", "", "also record each run's bound and plan at these times, separated by commas (e.g. 1s,10s,60s; each at most --time)")
	fl.Float64Var(&f.gap, "gap", 1e-4, "stop a run when the relative gap between plan and bound is at most this (a fraction, at least 0)")
	fl.Uint64Var(&f.seed, "seed", 1, "seed for the repair heuristics")
	fl.StringVar(&f.csv, "csv", "", "also write the table as CSV to this file (- for standard output)")
	fl.StringVar(&f.chart, "chart", "", "draw each plan's deviation from the reference, pincer beside the peer, as SVG to this file")
	fl.StringVar(&f.benchmarks, "benchmarks", "", "the folder manifest files are relative to (default: $PINCER_BENCHMARKS, else the nearest shared/benchmarks above the manifest)")
	for name, vals := range map[string][]string{"peer": {"cbc"}, "rule": decomp.Rules()} {
		vals := vals
		_ = cmd.RegisterFlagCompletionFunc(name, func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
			return vals, cobra.ShellCompDirectiveNoFileComp
		})
	}
	return cmd
}

func (f *benchFlags) check() error {
	bad := func(flag string, v any, want string) error {
		return badInput(fmt.Errorf("--%s %v: want %s", flag, v, want))
	}
	switch {
	case f.time <= 0:
		return bad("time", f.time, "more than 0")
	case f.workers < 1:
		return bad("workers", f.workers, "at least 1")
	case f.peer != "" && f.peer != "cbc":
		return bad("peer", f.peer, "cbc")
	case math.IsNaN(f.gap) || f.gap < 0 || math.IsInf(f.gap, 0):
		return bad("gap", f.gap, "a number at least 0")
	case f.chart == stdoutPath:
		return badInput(errors.New("--chart -: the chart must go to a file"))
	}
	var err error
	if f.rules, err = parseRuleList(f.rule); err != nil {
		return err
	}
	if f.marks, err = parseMarks(f.marksText, f.time); err != nil {
		return err
	}
	if err := checkWritable("--csv", f.csv); err != nil {
		return err
	}
	return checkWritable("--chart", f.chart)
}

// benchResult is the outcome of one manifest row.
type benchResult struct {
	row    resolvedRow
	rule   string // the price rule that ran
	ruleBy string // where it came from (see chooseRule)
	status string // done, interrupted, error
	note   string
	sense  decomp.Sense
	size   string

	plan     float64
	hasPlan  bool
	bound    float64
	hasBound bool
	gap      float64
	proved   bool
	stop     string
	rounds   int
	seconds  float64
	threads  int

	peer  *peerOutcome // nil when no peer ran
	marks []markValue  // one per --marks value (empty on error)
}

// deviation is how much worse than the reference a value is, as a
// fraction of max(1, |reference|): positive when worse, negative when
// better (which an optimal reference forbids). NaN without both.
func deviation(v float64, ok bool, r *benchResult) float64 {
	if !ok || !r.row.hasReference {
		return math.NaN()
	}
	d := (v - r.row.reference) / math.Max(1, math.Abs(r.row.reference))
	if r.sense == decomp.Maximise {
		d = -d
	}
	return d
}

// conflicts lists what contradicts the reference: a bound past an optimal
// or best-known value, or a plan better than an optimal value or a bound.
// Each one means a wrong value somewhere and deserves a look.
func conflicts(r *benchResult) []string {
	if !r.row.hasReference || r.status == "error" {
		return nil
	}
	ref := r.row.reference
	tol := 1e-6 * math.Max(1, math.Abs(ref))
	better := func(a, b float64) bool { // a better than b beyond tol
		if r.sense == decomp.Maximise {
			return a > b+tol
		}
		return a < b-tol
	}
	var out []string
	check := func(who string, plan float64, hasPlan bool, bound float64, hasBound bool) {
		if hasBound && r.row.kind != "bound" && better(ref, bound) {
			out = append(out, who+" bound passes the reference")
		}
		if hasPlan && r.row.kind != "best-known" && better(plan, ref) {
			out = append(out, who+" plan beats the "+r.row.kind+" reference")
		}
	}
	check("pincer", r.plan, r.hasPlan, r.bound, r.hasBound)
	if p := r.peer; p != nil {
		check("cbc", p.plan, p.hasPlan, p.bound, p.hasBound)
	}
	return out
}

// runBench reads the manifest, runs every row and writes the outputs. Rows
// run one after another, so each has the machine's workers to itself.
func runBench(ctx context.Context, stdout, stderr io.Writer, f *benchFlags, manifestPath string) error {
	if err := f.check(); err != nil {
		return err
	}
	mf, err := os.Open(manifestPath)
	if err != nil {
		return badInput(fmt.Errorf("manifest: %w", err))
	}
	man, err := readManifest(mf, manifestPath)
	mf.Close()
	if err != nil {
		return badInput(err)
	}
	root, err := benchmarksRoot(f.benchmarks, manifestPath)
	if err != nil {
		return err
	}
	var rows []resolvedRow
	for _, row := range man.rows {
		if root == "" && !filepath.IsAbs(row.file) {
			return badInput(fmt.Errorf("%s:%d: file %s is relative, and no benchmarks folder was found (no shared/benchmarks above %s): pass --benchmarks DIR or set PINCER_BENCHMARKS",
				manifestPath, row.line, row.file, manifestPath))
		}
		rr, err := man.resolve(row, root)
		if err != nil {
			return badInput(err)
		}
		rows = append(rows, rr)
	}
	peerBin := ""
	if f.peer == "cbc" {
		if bin, err := exec.LookPath("cbc"); err == nil {
			peerBin = bin
		} else {
			fmt.Fprintf(stderr, "pincer: --peer cbc: cbc is not installed (Debian: apt-get install coinor-cbc); the table has no peer columns\n")
		}
	}
	// Each row runs under each rule back to back, so the rules of a row
	// see the same machine load.
	rules := f.rules
	if len(rules) == 0 {
		rules = []string{""}
	}
	runs := len(rows) * len(rules)
	prog := newBenchProgress(stderr, runs)
	var results []*benchResult
	k := 0
rows:
	for _, rr := range rows {
		for _, rule := range rules {
			if ctx.Err() != nil {
				break rows
			}
			if f.onRow != nil {
				f.onRow(k)
			}
			k++
			prog.start(benchLabel(rr.name, rule, len(f.rules) > 1))
			var peer *peerOutcome // the peer runs once per row, beside the first rule
			if len(results) > 0 && results[len(results)-1].row.name == rr.name {
				peer = results[len(results)-1].peer
			}
			r := runBenchRow(ctx, f, rr, rule, peerBin, peer)
			results = append(results, r)
			prog.finish(r)
		}
	}
	prog.done()
	interrupted := ctx.Err() != nil
	printBenchTable(stdout, f, peerBin != "", results, runs, interrupted)
	if f.csv != "" {
		if err := writeBenchCSVFile(f.csv, stdout, peerBin != "", f.marks, results); err != nil {
			return &exitError{code: exitInternal, err: err}
		}
	}
	if f.chart != "" {
		if err := writeBenchChartFile(f.chart, man.file, peerBin != "", len(f.rules) > 1, results); err != nil {
			return &exitError{code: exitInternal, err: err}
		}
	}
	failed := 0
	for _, r := range results {
		if r.status == "error" {
			failed++
		}
	}
	switch {
	case interrupted:
		return &exitError{code: exitInterrupted, err: fmt.Errorf("interrupted after %d of %d runs; the runs done were written", len(results), runs)}
	case failed > 0:
		return badInput(fmt.Errorf("%d of %d runs could not start (the table says why)", failed, runs))
	}
	return nil
}

// runBenchRow loads and solves one row under rule ("" for the row's
// default rule), then runs the peer on it, unless peer already holds the
// peer's outcome on this row (from the row's first rule).
func runBenchRow(ctx context.Context, f *benchFlags, rr resolvedRow, rule, peerBin string, peer *peerOutcome) *benchResult {
	r := &benchResult{row: rr, rule: rule, threads: f.workers, gap: math.Inf(1)}
	if rr.unknown != nil {
		r.status, r.note = "error", strings.TrimSuffix(rr.unknown.Error(), ": "+errUnknownFormat.Error())
		return r
	}
	m, err := rr.entry.fam.Load(rr.format, rr.path, rr.values)
	if err != nil {
		r.status, r.note = "error", err.Error()
		return r
	}
	r.sense, r.size = m.Sense(), m.Size()
	p, err := m.Problem()
	if err == nil {
		r.rule, r.ruleBy = chooseRule(rule, m, p)
		err = ruleFits(r.rule, p)
	}
	if err != nil {
		r.status, r.note = "error", err.Error()
		return r
	}
	settings, err := engineSettings(f.gap, f.time, 0, f.seed, f.workers, r.rule)
	if err != nil {
		r.status, r.note = "error", err.Error()
		return r
	}
	res, err := decomp.Solve(ctx, p, settings)
	if err != nil {
		r.status, r.note = "error", err.Error()
		return r
	}
	r.status = "done"
	if res.Status == decomp.Interrupted {
		r.status = "interrupted"
	}
	r.stop, r.rounds, r.seconds, r.proved, r.gap = res.Status.String(), res.Rounds, res.Elapsed.Seconds(), res.ProvedOptimal, res.Gap
	r.bound, r.hasBound = res.Bound, res.HasBound
	if res.Plan != nil {
		r.plan, r.hasPlan = res.Plan.Value, true
	}
	r.marks = valuesAtMarks(res, f.time, f.marks)
	switch {
	case peerBin == "":
	case peer != nil:
		r.peer = peer
	default:
		if ctx.Err() != nil {
			r.peer = &peerOutcome{status: "not-run", note: "interrupted", threads: f.workers}
		} else {
			r.peer = runCBC(ctx, peerBin, m, f.time, peerGrace(f.time), f.workers)
		}
	}
	return r
}

// describe is a short account of a row's outcome, for the progress lines.
func (r *benchResult) describe() string {
	if r.status == "error" {
		return "error: " + r.note
	}
	var b strings.Builder
	fmt.Fprintf(&b, "plan %s  bound %s  gap %s  %.1f s (%s)", dash(r.planOrNaN()), dash(r.boundOrNaN()), fmtGap(r.gap), r.seconds, r.stop)
	if p := r.peer; p != nil {
		fmt.Fprintf(&b, "; cbc plan %s  bound %s  %.1f s (%s)", dash(p.planOrNaN()), dash(p.boundOrNaN()), p.seconds, p.status)
	}
	return b.String()
}

func (r *benchResult) planOrNaN() float64 {
	if !r.hasPlan {
		return math.NaN()
	}
	return r.plan
}

func (r *benchResult) boundOrNaN() float64 {
	if !r.hasBound {
		return math.NaN()
	}
	return r.bound
}

func (o *peerOutcome) planOrNaN() float64 {
	if o == nil || !o.hasPlan {
		return math.NaN()
	}
	return o.plan
}

func (o *peerOutcome) boundOrNaN() float64 {
	if o == nil || !o.hasBound {
		return math.NaN()
	}
	return o.bound
}

// referenceText is the reference with its kind, for the table.
func (r *benchResult) referenceText() string {
	if !r.row.hasReference {
		return "-"
	}
	// As written in the manifest: the reference's digits are the point.
	return strconv.FormatFloat(r.row.reference, 'f', -1, 64) + " (" + r.row.kind + ")"
}
