package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"slices"
	"strings"
	"time"

	"github.com/rs/zerolog"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"pincer/decomp"
	"pincer/instances"
)

// runFlags are shared by solve and demo.
type runFlags struct {
	format      string
	opts        *optionSet
	time        time.Duration
	rounds      int
	gap         float64
	workers     int
	seed        uint64
	report      string
	plan        string
	quiet       bool
	logFormat   string
	top         int
	repairEvery int
	stall       int
	stallGiven  bool // --stall was on the command line (set by check)
	history     string
	rule        string // as given; "" for the model's default
	// ruleUsed and ruleBy are the rule a run uses and where it came from
	// (set by solveModel, see chooseRule).
	ruleUsed, ruleBy string
	plot             string
	primal           bool
	checkpoints      checkpointFlags // solve only
	warm             warmFlags       // solve only
	exact            exactFlags      // solve only
}

func (f *runFlags) register(cmd *cobra.Command) {
	fl := cmd.Flags()
	fl.DurationVar(&f.time, "time", 10*time.Second, "wall-clock limit (0 for none; at least 0)")
	fl.IntVar(&f.rounds, "rounds", 0, "round limit (0 for none; at least 0)")
	fl.Float64Var(&f.gap, "gap", 1e-4, "stop when the relative gap between plan and bound is at most this (a fraction, at least 0)")
	fl.IntVar(&f.workers, "workers", runtime.NumCPU(), "goroutines evaluating blocks (at least 1)")
	fl.Uint64Var(&f.seed, "seed", 1, "seed for the repair heuristics")
	fl.StringVar(&f.report, "report", "", "write the JSON report to this file (- for standard output)")
	fl.StringVar(&f.plan, "plan", "", "write the best plan as CSV to this file (- for standard output)")
	fl.BoolVar(&f.quiet, "quiet", false, "no progress on stderr")
	fl.StringVar(&f.logFormat, "log-format", "text", "progress log format when stderr is not a terminal: text or json")
	fl.IntVar(&f.top, "top", 5, "shared resources listed in the summary (at least 0)")
	fl.IntVar(&f.repairEvery, "repair-every", 0, "repair every this many rounds (0: engine default; at least 0)")
	fl.IntVar(&f.stall, "stall", 0, "stop after this many rounds without a better bound or plan (0: 300; at least 0); when not given, a run with --time uses its whole time unless the gap closes")
	fl.StringVar(&f.rule, "rule", "", ruleHelp())
	fl.BoolVar(&f.primal, "primal-average", false, "add the volume rule's averaged (fractional) block answers to the report as primal_average (needs --rule volume)")
	fl.StringVar(&f.plot, "plot", "", "draw bound, plan value and the most binding rows' prices over time as SVG to this file")
	fl.StringVar(&f.history, "history", "summary", "report history: summary (every improvement plus a thinned trace, at most 2000 rounds) or full")
	for name, vals := range map[string][]string{"log-format": {"text", "json"}, "history": {"summary", "full"}, "rule": decomp.Rules()} {
		vals := vals
		_ = cmd.RegisterFlagCompletionFunc(name, func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
			return vals, cobra.ShellCompDirectiveNoFileComp
		})
	}
}

// check validates the run flags and the output paths before any solving.
func (f *runFlags) check(cmd *cobra.Command) error {
	f.stallGiven = cmd.Flags().Changed("stall")
	bad := func(flag string, v any, want string) error {
		return badInput(fmt.Errorf("--%s %v: want %s", flag, v, want))
	}
	switch {
	case f.logFormat != "text" && f.logFormat != "json":
		return bad("log-format", f.logFormat, "one of text, json")
	case f.history != "summary" && f.history != "full":
		return bad("history", f.history, "one of summary, full")
	case f.rule != "" && !slices.Contains(decomp.Rules(), f.rule):
		return bad("rule", f.rule, "one of "+strings.Join(decomp.Rules(), ", "))
	case f.primal && f.rule != "" && f.rule != "volume":
		return badInput(fmt.Errorf("--primal-average needs --rule volume (the rule that builds it), not %s", f.rule))
	case f.workers < 1:
		return bad("workers", f.workers, "at least 1")
	case f.time < 0:
		return bad("time", f.time, "at least 0")
	case f.rounds < 0:
		return bad("rounds", f.rounds, "at least 0")
	case math.IsNaN(f.gap) || f.gap < 0 || math.IsInf(f.gap, 0):
		return bad("gap", f.gap, "a number at least 0")
	case f.top < 0:
		return bad("top", f.top, "at least 0")
	case f.repairEvery < 0:
		return bad("repair-every", f.repairEvery, "at least 0")
	case f.stall < 0:
		return bad("stall", f.stall, "at least 0")
	case f.report == stdoutPath && f.plan == stdoutPath:
		return badInput(errors.New("--report and --plan cannot both be - (standard output)"))
	}
	if err := checkWritable("--report", f.report); err != nil {
		return err
	}
	if f.plot == stdoutPath {
		return badInput(errors.New("--plot -: the plot must go to a file"))
	}
	if err := checkWritable("--plot", f.plot); err != nil {
		return err
	}
	return checkWritable("--plan", f.plan)
}

// checkTables checks the extra plan tables of m.
func (f *runFlags) checkTables(m instances.Model) error {
	pw, ok := m.(instances.PlanWriter)
	if !ok || f.plan == "" || f.plan == stdoutPath {
		return nil
	}
	for _, t := range pw.PlanTables() {
		if err := checkWritable("--plan table", tablePath(f.plan, t)); err != nil {
			return err
		}
	}
	return nil
}

func newSolveCmd(chosen string) *cobra.Command {
	var f runFlags
	var prof profileFlags
	cmd := &cobra.Command{
		Use:   "solve --format FORMAT [flags] FILE",
		Short: "Solve an instance and report plan, bound, gap and shadow prices",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := f.check(cmd); err != nil {
				return err
			}
			if err := f.checkpoints.check(); err != nil {
				return err
			}
			if err := f.warm.check(f.checkpoints.resume); err != nil {
				return err
			}
			if err := f.exact.check(&f); err != nil {
				return err
			}
			m, err := load(f.format, args[0], f.opts)
			if err != nil {
				return err
			}
			if err := f.checkTables(m); err != nil {
				return err
			}
			if a, ok := m.(instances.Artefacts); ok {
				for _, path := range a.Outputs() {
					if err := checkWritable("output", path); err != nil {
						return err
					}
				}
			}
			stop, err := prof.start()
			if err != nil {
				return err
			}
			defer stop()
			_, err = solveModel(cmd.Context(), cmd.OutOrStdout(), cmd.ErrOrStderr(), &f, args[0], m)
			return err
		},
	}
	f.opts = familyOptions(cmd, &f.format, chosen)
	prof.register(cmd)
	f.register(cmd)
	f.checkpoints.register(cmd)
	f.warm.register(cmd)
	f.exact.register(cmd)
	return cmd
}

// solveModel runs the engine on a loaded model, prints the summary, writes
// report and plan, and maps the outcome to an exit code. When the report or
// plan goes to standard output, the summary goes to stderr.
func solveModel(ctx context.Context, stdout, stderr io.Writer, f *runFlags, file string, m instances.Model) (*decomp.Result, error) {
	if f.exact.on {
		return solveExact(ctx, stdout, stderr, f, file, m)
	}
	p, err := m.Problem()
	if err != nil {
		return nil, badInput(err)
	}
	f.ruleUsed, f.ruleBy = chooseRule(f.rule, m, p)
	if f.primal && f.ruleUsed != "volume" {
		return nil, badInput(fmt.Errorf("--primal-average needs --rule volume (the rule that builds it); this run's rule is %s (%s)", f.ruleUsed, f.ruleBy))
	}
	settings, err := engineSettings(f.gap, f.time, f.rounds, f.seed, f.workers, f.ruleUsed)
	if err != nil {
		return nil, badInput(err)
	}
	settings.RepairEvery = f.repairEvery
	if f.stallGiven {
		// A stall stop the user asked for; without it a time limit is a
		// budget (see decomp.Settings, the stall rule).
		settings.StallRounds = f.stall
		if f.stall == 0 {
			settings.StallRounds = 300
		}
	}
	if err := ruleFits(f.ruleUsed, p); err != nil {
		return nil, err
	}
	var warm *warmJSON
	if f.warm.path != "" {
		if warm, err = applyWarmStart(f.warm.path, f.format, m, p); err != nil {
			return nil, err
		}
	}
	prog := newProgress(stderr, f)
	var obs observers
	if prog != nil {
		obs = append(obs, prog)
	}
	var trace *priceTrace
	if f.plot != "" {
		trace = newPriceTrace(len(p.Rows))
		obs = append(obs, trace)
	}
	if len(obs) > 0 {
		settings.Observer = obs
	}
	state, err := prepareCheckpoints(f, file, p, &settings)
	if err != nil {
		return nil, err
	}
	res, err := decomp.Resume(ctx, p, settings, state)
	if prog != nil {
		prog.done(res)
	}
	if err != nil {
		return nil, &exitError{code: exitInternal, err: err}
	}
	summary := stdout
	if f.report == stdoutPath || f.plan == stdoutPath {
		summary = stderr
	}
	if err := printSummary(summary, m, p.IntegralObjective, res, f.top); err != nil {
		return res, &exitError{code: exitInternal, err: err}
	}
	if f.plot != "" {
		if err := writePlotFile(f.plot, m.Name(), res, trace, f.top); err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
	}
	if a, ok := m.(instances.Artefacts); ok {
		if err := a.WriteArtefacts(res); err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
	}
	if f.report != "" {
		rep, err := buildReport(f.format, file, f.opts.values().Int("index"), f.workers, f.seed, f.history == "full", m, res)
		if rep != nil {
			rep.Rule, rep.RuleChosenBy, rep.WarmStart = f.ruleUsed, f.ruleBy, warm
			if pa, ok := settings.Method.(decomp.PrimalAverager); ok && f.primal {
				rep.PrimalAverage = primalJSON(pa.AveragePrimal())
			}
		}
		if err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
		rep.withRounded(roundedBound(res.Bound, p.IntegralObjective, m.Sense()))
		if err := writeJSON(f.report, stdout, rep); err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
	}
	if f.plan != "" && res.Plan != nil {
		if err := writePlan(f.plan, stdout, m, res); err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
	}
	switch {
	case res.Status == decomp.Interrupted:
		return res, &exitError{code: exitInterrupted, err: errors.New("interrupted; best plan and report written")}
	case res.Plan == nil:
		msg := "no feasible plan found (the bound and report are still valid)"
		if nn, ok := m.(instances.NoPlanNoter); ok {
			msg += "; " + nn.NoPlanNote()
		}
		return res, &exitError{code: exitNoPlan, err: errors.New(msg)}
	}
	return res, nil
}

// progress shows rounds on stderr: a live line on a terminal, periodic log
// lines otherwise. It only reads what the engine gives it.
type progress struct {
	w        io.Writer
	live     bool
	log      zerolog.Logger
	last     time.Time
	every    time.Duration
	lastLine int
}

func newProgress(stderr io.Writer, f *runFlags) *progress {
	if f.quiet {
		return nil
	}
	p := &progress{w: stderr}
	if file, ok := stderr.(*os.File); ok && term.IsTerminal(int(file.Fd())) {
		p.live = true
		p.every = 100 * time.Millisecond
		return p
	}
	p.every = time.Second
	var out io.Writer = stderr
	if f.logFormat == "text" {
		out = zerolog.ConsoleWriter{Out: stderr, NoColor: true, TimeFormat: time.TimeOnly}
	}
	p.log = zerolog.New(out).With().Timestamp().Logger()
	return p
}

func (p *progress) Observe(pr *decomp.Progress) {
	now := time.Now()
	if pr.Record.Round > 1 && now.Sub(p.last) < p.every {
		return
	}
	p.last = now
	r := pr.Record
	gap := math.Inf(1)
	if pr.HasPlan {
		gap = math.Abs(r.PlanValue-r.Bound) / math.Max(1, math.Abs(r.PlanValue))
	}
	if p.live {
		plan := "none"
		if pr.HasPlan {
			plan = fmtNum(r.PlanValue)
		}
		line := fmt.Sprintf("round %d  %.1fs  bound %s  plan %s  gap %s", r.Round, r.Elapsed.Seconds(), fmtNum(r.Bound), plan, fmtGap(gap))
		p.liveLine(line)
		return
	}
	ev := p.log.Info().Int("round", r.Round).Float64("seconds", r.Elapsed.Seconds()).Float64("bound", r.Bound)
	if pr.HasPlan {
		ev = ev.Float64("plan", r.PlanValue).Str("gap", fmtGap(gap))
	}
	ev.Msg("progress")
}

// engineSettings are the engine settings every command that solves
// shares: limits, seed, one worker budget and the price rule. A --gap of 0
// means no gap stop: run to proof or a limit.
func engineSettings(gap float64, limit time.Duration, rounds int, seed uint64, workers int, rule string) (decomp.Settings, error) {
	s := decomp.Settings{Gap: gap, Time: limit, Rounds: rounds, Seed: seed, Workers: workers, Evaluator: decomp.Pool{Workers: workers}}
	if gap == 0 {
		s.Gap = -1
	}
	var err error
	s.Method, err = decomp.NewMethod(rule)
	return s, err
}

// liveLine overwrites the live line with line, blanking what is left of
// a longer earlier one.
func (p *progress) liveLine(line string) {
	pad := ""
	if n := p.lastLine - len(line); n > 0 {
		pad = fmt.Sprintf("%*s", n, "")
	}
	p.lastLine = len(line)
	fmt.Fprintf(p.w, "\r%s%s", line, pad)
}

// done ends the live line, or writes a final log line.
func (p *progress) done(res *decomp.Result) {
	if p.live {
		if p.lastLine > 0 {
			fmt.Fprintln(p.w)
		}
		return
	}
	if res == nil {
		return
	}
	ev := p.log.Info().Int("round", res.Rounds).Float64("seconds", res.Elapsed.Seconds()).Float64("bound", res.Bound)
	if res.Plan != nil {
		ev = ev.Float64("plan", res.Plan.Value)
	}
	ev.Str("gap", fmtGap(res.Gap)).Str("stop", res.Status.String()).Msg("finished")
}
