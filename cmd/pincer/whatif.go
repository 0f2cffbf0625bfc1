package main

import (
	"context"
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/spf13/cobra"

	"pincer/decomp"
	"pincer/instances"
)

// whatifFlags are the flags of pincer whatif.
type whatifFlags struct {
	format  string
	opts    *optionSet
	time    time.Duration
	rounds  int
	gap     float64
	workers int
	seed    uint64
	rule    string
	rhs     []string
	open    []string
	close   []string
	csv     string
}

// change is one what-if question.
type change struct {
	label    string
	resource string // capacity changes
	value    string // as given: "+40", "-10%", "120"
	part     string // switches
	open     bool
}

func newWhatifCmd(chosen string) *cobra.Command {
	var f whatifFlags
	cmd := &cobra.Command{
		Use:   "whatif --format FORMAT [--rhs NAME=CHANGE]... [--open PART]... [--close PART]... FILE",
		Short: "Change shared resources and re-solve warm: shadow-price prediction beside the re-solved change",
		Long: `whatif solves the instance once, then once per change, each from the first run's
prices (a warm start). A change is one of:
  --rhs "NAME=+40"    capacity of resource NAME raised by 40 (also -40, +10%, -5%, or =120 to set it)
  --open PART         a part (a facility site) forced open
  --close PART        a part forced closed
Each change is judged alone against the first run. For capacity changes the table
puts the prediction from the resource's shadow price (price x change) beside the
change in plan value and bound found by re-solving. Shadow prices are marginal:
they predict small changes well and large ones less so.`,
		Args: cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			changes, err := f.check()
			if err != nil {
				return err
			}
			m, err := load(f.format, args[0], f.opts)
			if err != nil {
				return err
			}
			return runWhatif(cmd.Context(), cmd.OutOrStdout(), cmd.ErrOrStderr(), &f, m, changes)
		},
	}
	f.opts = familyOptions(cmd, &f.format, chosen)
	fl := cmd.Flags()
	fl.DurationVar(&f.time, "time", 10*time.Second, "wall-clock limit of each solve (0 for none; at least 0)")
	fl.IntVar(&f.rounds, "rounds", 0, "round limit of each solve (0 for none; at least 0)")
	fl.Float64Var(&f.gap, "gap", 1e-4, "stop a solve when the relative gap is at most this (a fraction, at least 0)")
	fl.IntVar(&f.workers, "workers", runtime.NumCPU(), "goroutines evaluating blocks (at least 1)")
	fl.Uint64Var(&f.seed, "seed", 1, "seed for the repair heuristics")
	fl.StringVar(&f.rule, "rule", "", ruleHelp())
	fl.StringArrayVar(&f.rhs, "rhs", nil, `change a resource's capacity: "NAME=+40", "NAME=-10%", "NAME==120" (repeatable)`)
	fl.StringArrayVar(&f.open, "open", nil, "force a part (a facility site) open (repeatable)")
	fl.StringArrayVar(&f.close, "close", nil, "force a part (a facility site) closed (repeatable)")
	fl.StringVar(&f.csv, "csv", "", "also write the table as CSV to this file (- for standard output)")
	return cmd
}

func (f *whatifFlags) check() ([]change, error) {
	bad := func(flag string, v any, want string) error {
		return badInput(fmt.Errorf("--%s %v: want %s", flag, v, want))
	}
	switch {
	case f.workers < 1:
		return nil, bad("workers", f.workers, "at least 1")
	case f.time < 0:
		return nil, bad("time", f.time, "at least 0")
	case f.rounds < 0:
		return nil, bad("rounds", f.rounds, "at least 0")
	case math.IsNaN(f.gap) || f.gap < 0 || math.IsInf(f.gap, 0):
		return nil, bad("gap", f.gap, "a number at least 0")
	case f.rule != "" && !slices.Contains(decomp.Rules(), f.rule):
		return nil, bad("rule", f.rule, "one of "+strings.Join(decomp.Rules(), ", "))
	}
	var out []change
	for _, r := range f.rhs {
		k := strings.LastIndex(r, "=")
		if k <= 0 || k == len(r)-1 {
			return nil, bad("rhs", strconv.Quote(r), `NAME=CHANGE, for example "Greyhaven=+40", "agent 3=-10%" or "period 4==120"`)
		}
		name, val := r[:k], r[k+1:]
		if strings.HasSuffix(name, "=") { // NAME==120 sets the capacity
			name, val = strings.TrimSuffix(name, "="), "="+val
		}
		if _, err := applyChange(100, val); err != nil {
			return nil, bad("rhs", strconv.Quote(r), err.Error())
		}
		out = append(out, change{label: name + " " + val, resource: name, value: val})
	}
	for _, p := range f.open {
		out = append(out, change{label: p + " forced open", part: p, open: true})
	}
	for _, p := range f.close {
		out = append(out, change{label: p + " forced closed", part: p})
	}
	if len(out) == 0 {
		return nil, badInput(errors.New("no change given: use --rhs, --open or --close"))
	}
	if f.csv != "" {
		if err := checkWritable("--csv", f.csv); err != nil {
			return nil, err
		}
	}
	return out, nil
}

// applyChange returns the capacity after a change: "+D", "-D", "+P%",
// "-P%" or "=V".
func applyChange(old float64, val string) (float64, error) {
	set := strings.HasPrefix(val, "=")
	num := strings.TrimPrefix(val, "=")
	pct := strings.HasSuffix(num, "%")
	num = strings.TrimSuffix(num, "%")
	if !set && !strings.HasPrefix(num, "+") && !strings.HasPrefix(num, "-") {
		return 0, errors.New(`a change that starts with + or - (or = to set the capacity)`)
	}
	d, err := strconv.ParseFloat(num, 64)
	if err != nil || math.IsNaN(d) || math.IsInf(d, 0) {
		return 0, fmt.Errorf("a number after the sign, not %q", num)
	}
	switch {
	case set && pct:
		return 0, errors.New("a percentage with + or -, not =")
	case set:
		return d, nil
	case pct:
		return old * (1 + d/100), nil
	}
	return old + d, nil
}

// whatifRow is one line of the table.
type whatifRow struct {
	change           string
	from, to         float64 // capacities (NaN for switches)
	price, predicted float64 // NaN when there is none
	plan, bound      float64 // NaN for no plan
	dPlan, dBound    float64
	stop             string
}

func runWhatif(ctx context.Context, stdout, stderr io.Writer, f *whatifFlags, m instances.Model, changes []change) error {
	solve := func(m instances.Model, warm *decomp.Result) (*decomp.Result, error) {
		p, err := m.Problem()
		if err != nil {
			return nil, badInput(err)
		}
		if warm != nil && sameRows(p.Rows, warm.Rows) && len(warm.Prices) == len(p.Rows) {
			p.Prices = append([]float64(nil), warm.Prices...)
		}
		rule, _ := chooseRule(f.rule, m, p)
		s, err := engineSettings(f.gap, f.time, f.rounds, f.seed, f.workers, rule)
		if err != nil {
			return nil, badInput(err)
		}
		if err := ruleFits(rule, p); err != nil {
			return nil, err
		}
		res, err := decomp.Solve(ctx, p, s)
		if err != nil {
			return nil, &exitError{code: exitInternal, err: err}
		}
		return res, nil
	}
	fmt.Fprintf(stderr, "whatif: solving %s as given\n", m.Name())
	base, err := solve(m, nil)
	if err != nil {
		return err
	}
	prices := map[string]float64{}
	if rs, err := m.Resources(base); err == nil {
		for _, r := range rs {
			prices[r.Name] = r.Price
		}
	}
	sign := -1.0 // minimising: more capacity lowers the value by the price
	if m.Sense() == decomp.Maximise {
		sign = 1
	}
	var rows []whatifRow
	for _, c := range changes {
		if ctx.Err() != nil {
			fmt.Fprintf(stderr, "whatif: interrupted; the table holds the changes solved so far\n")
			break
		}
		row := whatifRow{change: c.label, from: math.NaN(), to: math.NaN(), price: math.NaN(), predicted: math.NaN()}
		var changed instances.Model
		if c.part != "" {
			sw, ok := m.(instances.Switcher)
			if !ok {
				return badInput(fmt.Errorf("--format %s has no parts to force open or closed", f.format))
			}
			if changed, err = sw.WithSwitch(c.part, c.open); err != nil {
				return badInput(err)
			}
		} else {
			ad, ok := m.(instances.Adjuster)
			if !ok {
				return badInput(fmt.Errorf("--format %s has no resource capacities to change", f.format))
			}
			if row.from, err = ad.Capacity(c.resource); err != nil {
				return badInput(err)
			}
			if row.to, err = applyChange(row.from, c.value); err != nil {
				return badInput(fmt.Errorf("--rhs %s: %w", c.label, err))
			}
			if changed, err = ad.WithCapacity(c.resource, row.to); err != nil {
				return badInput(fmt.Errorf("--rhs %s: %w", c.label, err))
			}
			if pr, ok := prices[c.resource]; ok {
				row.price = pr
				row.predicted = sign * pr * (row.to - row.from)
				if row.predicted == 0 {
					row.predicted = 0 // no −0 in the CSV
				}
			}
		}
		fmt.Fprintf(stderr, "whatif: solving with %s\n", c.label)
		res, err := solve(changed, base)
		if err != nil {
			return err
		}
		row.plan, row.bound, row.stop = planValue(res), res.Bound, res.Status.String()
		row.dPlan, row.dBound = difference(row.plan, planValue(base)), difference(res.Bound, base.Bound)
		rows = append(rows, row)
	}
	printWhatif(stdout, m, base, rows)
	if f.csv != "" {
		out, err := createOutput(f.csv, stdout)
		if err != nil {
			return err
		}
		if err := writeWhatifCSV(out, rows); err != nil {
			out.Close()
			return &exitError{code: exitInternal, err: err}
		}
		if err := out.Close(); err != nil {
			return &exitError{code: exitInternal, err: err}
		}
	}
	return nil
}

// difference is a − b, with rounding noise (below 1e-9 of the values'
// size) shown as zero.
func difference(a, b float64) float64 {
	d := a - b
	if math.Abs(d) <= 1e-9*math.Max(1, math.Max(math.Abs(a), math.Abs(b))) {
		return 0
	}
	return d
}

// ruleFits refuses a price rule the problem is too large for.
func ruleFits(rule string, p *decomp.Problem) error {
	if rule == "boxstep" && len(p.Rows) > decomp.BoxstepMaxRows {
		return badInput(fmt.Errorf("--rule boxstep: %s has %d coupling rows; the rule takes at most %d (its LP master grows with the rows): use subgradient, deflected or volume", p.Name, len(p.Rows), decomp.BoxstepMaxRows))
	}
	return nil
}

func planValue(res *decomp.Result) float64 {
	if res.Plan == nil {
		return math.NaN()
	}
	return res.Plan.Value
}

func sameRows(a []decomp.Row, b []decomp.RowReport) bool {
	if len(a) != len(b) {
		return false
	}
	for r := range a {
		if a[r].Name != b[r].Name {
			return false
		}
	}
	return true
}

func printWhatif(w io.Writer, m instances.Model, base *decomp.Result, rows []whatifRow) {
	fmt.Fprintf(w, "instance  %s (%s)\n", m.Name(), m.Size())
	fmt.Fprintf(w, "as given  plan %s  bound %s  (%s)\n\n", fmtNum(planValue(base)), fmtNum(base.Bound), base.Status)
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "change\tcapacity\tshadow price\tpredicted change\tplan change\tbound change\tplan\tbound\tstop")
	for _, r := range rows {
		capacity := "-"
		if !math.IsNaN(r.from) {
			capacity = fmtNum(r.from) + " -> " + fmtNum(r.to)
		}
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", r.change, capacity, dash(r.price), signed(r.predicted),
			signed(r.dPlan), signed(r.dBound), dash(r.plan), dash(r.bound), r.stop)
	}
	tw.Flush()
	fmt.Fprintln(w, "\nPredicted change = shadow price x capacity change, first order; the re-solved plan and")
	fmt.Fprintln(w, "bound changes are what the changed instance gives. Plans are decision support: check them")
	fmt.Fprintln(w, "against site rules and local practice before use.")
}

func dash(v float64) string {
	if math.IsNaN(v) {
		return "-"
	}
	return fmtNum(v)
}

func signed(v float64) string {
	if math.IsNaN(v) {
		return "-"
	}
	if v > 0 {
		return "+" + fmtNum(v)
	}
	if v == 0 {
		return "0" // also −0
	}
	return fmtNum(v)
}

func writeWhatifCSV(w io.Writer, rows []whatifRow) error {
	cw := csv.NewWriter(w)
	_ = cw.Write([]string{"change", "capacity_before", "capacity_after", "shadow_price", "predicted_change", "plan_change", "bound_change", "plan", "bound", "stop"})
	cell := func(v float64) string {
		if math.IsNaN(v) {
			return ""
		}
		return instances.FormatNumber(v)
	}
	for _, r := range rows {
		_ = cw.Write([]string{r.change, cell(r.from), cell(r.to), cell(r.price), cell(r.predicted), cell(r.dPlan), cell(r.dBound), cell(r.plan), cell(r.bound), r.stop})
	}
	cw.Flush()
	return cw.Error()
}
