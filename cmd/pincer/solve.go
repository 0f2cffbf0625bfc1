package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"time"

	"github.com/rs/zerolog"
	"github.com/spf13/cobra"
	"golang.org/x/term"

	"pincer/decomp"
)

// runFlags are shared by solve and demo.
type runFlags struct {
	format      string
	model       modelOptions
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
}

func (f *runFlags) register(cmd *cobra.Command, withFormat bool) {
	fl := cmd.Flags()
	if withFormat {
		fl.StringVar(&f.format, "format", "", formatHelp())
		fl.IntVar(&f.model.index, "index", 0, "instance number in a multi-instance file, or capacity variant for capa/capb/capc (default 1)")
		fl.StringVar(&f.model.sense, "sense", "", "objective sense: min or max (default min)")
		fl.StringVar(&f.model.relax, "relax", "", "which rows to price: gap-orlib knapsack|choice; cflp site|site-aggregate (default: the strongest)")
		fl.BoolVar(&f.model.singleSource, "single-source", false, "facility location: each customer served by exactly one site")
	}
	fl.DurationVar(&f.time, "time", 10*time.Second, "wall-clock limit (0 for none)")
	fl.IntVar(&f.rounds, "rounds", 0, "round limit (0 for none)")
	fl.Float64Var(&f.gap, "gap", 1e-4, "stop when the relative gap between plan and bound is at most this")
	fl.IntVar(&f.workers, "workers", runtime.NumCPU(), "goroutines evaluating blocks")
	fl.Uint64Var(&f.seed, "seed", 1, "seed for the repair heuristics")
	fl.StringVar(&f.report, "report", "", "write the JSON report to this file")
	fl.StringVar(&f.plan, "plan", "", "write the best plan as CSV to this file")
	fl.BoolVar(&f.quiet, "quiet", false, "no progress on stderr")
	fl.StringVar(&f.logFormat, "log-format", "text", "progress log format when stderr is not a terminal: text or json")
	fl.IntVar(&f.top, "top", 5, "shared resources listed in the summary")
	fl.IntVar(&f.repairEvery, "repair-every", 0, "repair every this many rounds (0: engine default)")
	fl.IntVar(&f.stall, "stall", 0, "stop after this many rounds without a better bound or plan (0: engine default, 300)")
}

func (f *runFlags) check() error {
	if f.logFormat != "text" && f.logFormat != "json" {
		return badInput(fmt.Errorf("unknown --log-format %q (want text or json)", f.logFormat))
	}
	if f.workers < 1 {
		return badInput(fmt.Errorf("--workers must be at least 1, got %d", f.workers))
	}
	if f.time < 0 || f.rounds < 0 || math.IsNaN(f.gap) {
		return badInput(errors.New("--time, --rounds and --gap must not be negative"))
	}
	return nil
}

func newSolveCmd() *cobra.Command {
	var f runFlags
	cmd := &cobra.Command{
		Use:   "solve --format FORMAT [flags] FILE",
		Short: "Solve an instance and report plan, bound, gap and shadow prices",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := f.check(); err != nil {
				return err
			}
			fam, err := findFamily(f.format)
			if err != nil {
				return err
			}
			m, err := fam.load(args[0], f.model)
			if err != nil {
				return err
			}
			_, err = solveModel(cmd.Context(), cmd.OutOrStdout(), cmd.ErrOrStderr(), &f, args[0], m)
			return err
		},
	}
	f.register(cmd, true)
	return cmd
}

// solveModel runs the engine on a loaded model, prints the summary, writes
// report and plan, and maps the outcome to an exit code.
func solveModel(ctx context.Context, stdout, stderr io.Writer, f *runFlags, file string, m model) (*decomp.Result, error) {
	p, err := m.problem()
	if err != nil {
		return nil, badInput(err)
	}
	settings := decomp.Settings{
		Gap: f.gap, Time: f.time, Rounds: f.rounds, Seed: f.seed, RepairEvery: f.repairEvery, StallRounds: f.stall,
		Evaluator: decomp.Pool{Workers: f.workers},
	}
	if f.gap == 0 {
		settings.Gap = -1 // run to proof or a limit
	}
	prog := newProgress(stderr, f)
	if prog != nil {
		settings.Observer = prog
	}
	res, err := decomp.Solve(ctx, p, settings)
	if prog != nil {
		prog.done()
	}
	if err != nil {
		return nil, &exitError{code: exitInternal, err: err}
	}
	printSummary(stdout, m, res, f.top)
	index := f.model.index
	if index == 0 {
		index = 1
	}
	if f.report != "" {
		if err := writeJSONFile(f.report, buildReport(f.format, file, index, f.workers, f.seed, m, res)); err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
	}
	if f.plan != "" && res.Plan != nil {
		if err := writePlanFile(f.plan, m, res.Plan); err != nil {
			return res, &exitError{code: exitInternal, err: err}
		}
	}
	switch {
	case res.Status == decomp.Interrupted:
		return res, &exitError{code: exitInterrupted, err: errors.New("interrupted; best plan and report written")}
	case res.Plan == nil:
		return res, &exitError{code: exitNoPlan, err: errors.New("no feasible plan found (the bound and report are still valid)")}
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
	if p.live {
		plan := "none"
		gap := "-"
		if pr.HasPlan {
			plan = fmtNum(r.PlanValue)
			gap = fmt.Sprintf("%.3f%%", 100*math.Abs(r.PlanValue-r.Bound)/math.Max(1, math.Abs(r.PlanValue)))
		}
		line := fmt.Sprintf("round %d  %.1fs  bound %s  plan %s  gap %s", r.Round, r.Elapsed.Seconds(), fmtNum(r.Bound), plan, gap)
		pad := ""
		if n := p.lastLine - len(line); n > 0 {
			pad = fmt.Sprintf("%*s", n, "")
		}
		p.lastLine = len(line)
		fmt.Fprintf(p.w, "\r%s%s", line, pad)
		return
	}
	ev := p.log.Info().Int("round", r.Round).Float64("seconds", r.Elapsed.Seconds()).Float64("bound", r.Bound)
	if pr.HasPlan {
		ev = ev.Float64("plan", r.PlanValue)
	}
	ev.Msg("progress")
}

func (p *progress) done() {
	if p.live && p.lastLine > 0 {
		fmt.Fprintln(p.w)
	}
}
