package lotsizing

import (
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"

	"pincer/decomp"
	"pincer/instances"
)

// Family is the capacitated lot-sizing family as the command line sees it.
type Family struct{}

var (
	_ instances.Family      = Family{}
	_ instances.Demo        = Family{}
	_ instances.Model       = (*Model)(nil)
	_ instances.PlanWriter  = (*Model)(nil)
	_ instances.MPSExporter = (*Model)(nil)
	_ instances.Verifier    = (*Model)(nil)
	_ instances.Generator   = Family{}
)

// Name returns "lotsizing".
func (Family) Name() string { return "lotsizing" }

// Formats lists lotsizing-ttm (a file) and lotsizing-csv (a planner's folder).
func (Family) Formats() []instances.Format {
	return []instances.Format{
		{Name: "lotsizing-ttm", About: "multi-item capacitated lot sizing with setup times, layout of the Trigeiro-Thomas-McClain test files"},
		{Name: "lotsizing-csv", About: "multi-item capacitated lot sizing, planner's folder (items.csv, demand.csv, capacity.csv)", Folder: true},
	}
}

// Relaxations lists the one relaxation: the per-period capacity rows.
func (Family) Relaxations() []string { return []string{"capacity"} }

// Options lists overtime-cost and relax.
func (f Family) Options() []instances.Option {
	return []instances.Option{
		{Name: "overtime-cost", Usage: "cost per capacity unit beyond a period's capacity (0: no overtime unless the input sets one)",
			Kind: instances.Float, Default: "0", Min: 0, HasMin: true},
		{Name: "relax", Usage: "which rows to price: capacity (the per-period capacity rows)",
			Kind: instances.String, Default: "capacity", Allowed: f.Relaxations()},
	}
}

// Load reads a TTM-layout file or a CSV folder.
func (Family) Load(format, path string, v instances.Values) (instances.Model, error) {
	var in *Instance
	var err error
	switch format {
	case "lotsizing-ttm":
		in, err = ReadTTMFile(path)
	case "lotsizing-csv":
		in, err = ReadCSVFolder(path)
	default:
		return nil, fmt.Errorf("lotsizing: unknown format %q", format)
	}
	if err != nil {
		return nil, asParseError(err, format == "lotsizing-csv", path)
	}
	return NewModel(in, Options{OvertimeCost: v.Float("overtime-cost")})
}

// asParseError turns the readers' own *ParseError into the shared
// *instances.ParseError the command line recognises; other errors pass.
// The readers name bare file names; the message names the path as given
// (a folder's file joined to the folder).
func asParseError(err error, folder bool, path string) error {
	var pe *ParseError
	if !errors.As(err, &pe) {
		return err
	}
	file := pe.File
	switch {
	case folder && file != "" && filepath.Base(file) == file:
		file = filepath.Join(path, file)
	case !folder && file == filepath.Base(path):
		file = path
	}
	return &instances.ParseError{File: file, Line: pe.Line, Column: pe.Column, Expected: pe.Expected, Err: pe.Err}
}

// NewModel validates in and keeps the options for the engine problem.
func NewModel(in *Instance, opt Options) (*Model, error) {
	if err := in.Validate(); err != nil {
		return nil, err
	}
	if opt.OvertimeCost < 0 || math.IsNaN(opt.OvertimeCost) || math.IsInf(opt.OvertimeCost, 0) {
		return nil, fmt.Errorf("lotsizing: overtime cost %v: want a finite number >= 0", opt.OvertimeCost)
	}
	return &Model{In: in, Opt: opt}, nil
}

// Model is a loaded lot-sizing instance; it implements instances.Model,
// MPSExporter and PlanWriter.
type Model struct {
	In  *Instance
	Opt Options
}

// Name is the instance name.
func (m *Model) Name() string { return m.In.Name }

// Size gives the dimensions and the overtime variant.
func (m *Model) Size() string {
	v := "no overtime"
	if m.overtimeAllowed() {
		v = "overtime allowed"
	}
	return fmt.Sprintf("%d items x %d periods, %s", len(m.In.Items), m.In.Periods(), v)
}

func (m *Model) overtimeAllowed() bool {
	if m.Opt.OvertimeCost > 0 {
		return true
	}
	for _, c := range m.In.OvertimeCost {
		if c >= 0 {
			return true
		}
	}
	return false
}

// Sense is always Minimise.
func (m *Model) Sense() decomp.Sense { return decomp.Minimise }

// Problem builds the engine problem.
func (m *Model) Problem() (*decomp.Problem, error) { return NewProblem(m.In, m.Opt) }

// ScheduleOf returns a plan's schedule (nil for no plan) and an error when
// the plan's Detail is not a *Schedule of this instance.
func (m *Model) ScheduleOf(p *decomp.Plan) (*Schedule, error) {
	if p == nil {
		return nil, nil
	}
	s, ok := p.Detail.(*Schedule)
	n, T := len(m.In.Items), m.In.Periods()
	if !ok || s == nil || len(s.Production) != n || len(s.Setup) != n || len(s.Inventory) != n ||
		len(s.Load) != T || len(s.Overtime) != T {
		return nil, fmt.Errorf("lotsizing: plan detail is %T, want a *lotsizing.Schedule of %d items x %d periods", p.Detail, n, T)
	}
	for i := range n {
		if len(s.Production[i]) != T || len(s.Setup[i]) != T || len(s.Inventory[i]) != T {
			return nil, fmt.Errorf("lotsizing: plan detail for item %d does not have %d periods", i+1, T)
		}
	}
	return s, nil
}

// PlanJSON is the schedule with its cost.
func (m *Model) PlanJSON(p *decomp.Plan) (any, error) {
	s, err := m.ScheduleOf(p)
	if err != nil || s == nil {
		return nil, err
	}
	return s, nil
}

// Extra adds the period table ("periods") and the sizes.
func (m *Model) Extra(res *decomp.Result) (map[string]any, error) {
	s, err := m.ScheduleOf(res.Plan)
	if err != nil {
		return nil, err
	}
	out := map[string]any{
		"items":            len(m.In.Items),
		"period_count":     m.In.Periods(),
		"overtime_allowed": m.overtimeAllowed(),
	}
	if m.Opt.OvertimeCost > 0 {
		out["overtime_cost"] = m.Opt.OvertimeCost
	}
	if s != nil {
		loads := Loads(m.In, s, res.Prices)
		for k := range loads {
			l := &loads[k]
			l.Load, l.Slack, l.Overtime, l.ShadowPrice = instances.RoundNumber(l.Load), instances.RoundNumber(l.Slack),
				instances.RoundNumber(l.Overtime), instances.RoundNumber(l.ShadowPrice)
		}
		out["periods"] = loads
	}
	return out, nil
}

// Resources lists the periods' capacities; the price is the capacity row's
// shadow price at the best bound.
func (m *Model) Resources(res *decomp.Result) ([]instances.Resource, error) {
	s, err := m.ScheduleOf(res.Plan)
	if err != nil || s == nil {
		return nil, err
	}
	out := make([]instances.Resource, m.In.Periods())
	for t, c := range m.In.Capacity {
		out[t] = instances.Resource{Name: fmt.Sprintf("period %d", t+1), Capacity: c, Load: s.Load[t],
			Binding: s.Load[t] >= c*(1-1e-9)}
		if t < len(res.Prices) {
			out[t].Price = res.Prices[t]
		}
	}
	return out, nil
}

// Verify reads a schedule.csv plan (see [ReadScheduleCSV]) and checks it
// with [Check], at the overtime costs of the model (the input's and
// --overtime-cost).
func (m *Model) Verify(r io.Reader, file string) (instances.Verdict, error) {
	pf, err := ReadScheduleCSV(r, file, m.In)
	if err != nil {
		return instances.Verdict{}, err
	}
	return Check(m.In, pf, overtimeCosts(m.In, m.Opt)), nil
}

// NoPlanNote says what a run without a plan means for lot sizing.
func (m *Model) NoPlanNote() string {
	if m.overtimeAllowed() {
		return "no plan was found within the limits"
	}
	return "no plan without overtime was found (capacity may be too tight for the setups, or the search too short); " +
		"--overtime-cost C lets periods exceed capacity at cost C per capacity unit and always gives a plan"
}

// Recipes offers `gen lotsizing`, a file in the TTM layout.
func (Family) Recipes() []instances.Recipe {
	return []instances.Recipe{{
		Name:  "lotsizing",
		Usage: "--items N --periods T --utilisation U --setup-scale S --seed K [-o FILE]",
		Short: "Capacitated lot-sizing file, TTM layout (recipe in the style of Trigeiro, Thomas & McClain 1989; constants from memory)",
		Options: []instances.Option{
			{Name: "items", Usage: "number of items", Kind: instances.Int, Default: "10", Min: 1, HasMin: true, Max: 10000, HasMax: true},
			{Name: "periods", Usage: "number of periods", Kind: instances.Int, Default: "20", Min: 1, HasMin: true, Max: 10000, HasMax: true},
			{Name: "utilisation", Usage: "share of capacity taken by mean demand and a setup of every item every second period", Kind: instances.Float, Default: "0.85", Min: 0.01, HasMin: true, Max: 1, HasMax: true},
			{Name: "setup-scale", Usage: "factor on the setup times (10..50)", Kind: instances.Float, Default: "1", Min: 0.01, HasMin: true, Max: 100, HasMax: true},
			{Name: "seed", Usage: "random seed", Kind: instances.Int, Default: "1", Min: 0, HasMin: true},
		},
		Run: func(v instances.Values, out instances.Sink) (string, error) {
			in, err := Generate(GenerateConfig{Items: v.Int("items"), Periods: v.Int("periods"), Utilisation: v.Float("utilisation"),
				SetupTimeScale: v.Float("setup-scale"), Seed: uint64(v.Int("seed"))})
			if err != nil {
				return "", err
			}
			w, err := out.Create("")
			if err != nil {
				return "", err
			}
			if err := WriteTTM(w, in); err != nil {
				w.Close()
				return "", err
			}
			return "", w.Close()
		},
	}}
}

// WriteMPS writes the full model.
func (m *Model) WriteMPS(w io.Writer) error { return WriteMPS(w, m.In, m.Opt) }

// PlanTables names the period table written beside the schedule.
func (m *Model) PlanTables() []string { return []string{"periods"} }

// WritePlan writes schedule.csv to w (see [WriteScheduleCSV]) and, when
// extra is not nil, the period table (see [WriteLoadCSV]) to
// extra.Create("periods"), with the result's capacity prices.
func (m *Model) WritePlan(w io.Writer, res *decomp.Result, extra instances.Tables) error {
	s, err := m.ScheduleOf(res.Plan)
	if err != nil {
		return err
	}
	if s == nil {
		return errors.New("lotsizing: no plan")
	}
	if err := WriteScheduleCSV(w, m.In, s); err != nil {
		return err
	}
	if extra == nil {
		return nil
	}
	t, err := extra.Create("periods")
	if err != nil {
		return fmt.Errorf("lotsizing: writing period table: %w", err)
	}
	if err := WriteLoadCSV(t, Loads(m.In, s, res.Prices)); err != nil {
		t.Close()
		return err
	}
	return t.Close()
}

// Scenarios offers the invented "plant" scenario.
func (Family) Scenarios() []instances.Scenario {
	return []instances.Scenario{{
		Name:  "plant",
		About: "a bakery-goods plant plans a quarter of lots on one packing line (capacitated lot sizing)",
		// The first week's orders exceed one week of line hours, so the
		// scenario needs overtime; 0 shows the bound alone.
		Options: []instances.Option{{Name: "overtime-cost", Usage: "plant scenario: cost of an overtime line hour (0: none, and the first week cannot be met)",
			Kind: instances.Float, Default: "90", Min: 0, HasMin: true}},
		Rounds: 300,
		Report: "pincer-plant-report.json",
		Load: func(w io.Writer, v instances.Values) (instances.Model, error) {
			in := Demo()
			m, err := NewModel(in, Options{OvertimeCost: v.Float("overtime-cost")})
			if err != nil {
				return nil, err
			}
			fmt.Fprintf(w, "The Larkspur Lane plant (invented) packs %d products on one line over %d weeks;\n",
				len(in.Items), in.Periods())
			fmt.Fprintln(w, "when should each be made, at least cleaning and cold-store cost? (Week 7 has a maintenance stop.)")
			fmt.Fprintln(w)
			return m, nil
		},
		Explain: func(w io.Writer, m instances.Model, res *decomp.Result) error {
			lm, ok := m.(*Model)
			if !ok {
				return fmt.Errorf("lotsizing: demo explains a %T", m)
			}
			s, err := lm.ScheduleOf(res.Plan)
			if err != nil || s == nil {
				return err
			}
			explainPlant(w, lm.In, s, res.Prices)
			return nil
		},
	}}
}

// explainPlant says what the weekly line-hour prices mean for the plant.
func explainPlant(w io.Writer, in *Instance, s *Schedule, prices []float64) {
	fmt.Fprintln(w)
	lots := 0
	for _, row := range s.Setup {
		for _, y := range row {
			if y {
				lots++
			}
		}
	}
	fmt.Fprintf(w, "The plan runs %d lots over the quarter.\n", lots)
	fmt.Fprintln(w, "What the line-hour prices say:")
	shown := 0
	for t, p := range prices {
		if p <= 0.005 || shown == 4 {
			continue
		}
		fmt.Fprintf(w, "  One more line hour in week %d is worth about %.2f (the line runs %.1f of its %.1f hours).\n",
			t+1, p, s.Load[t], in.Capacity[t])
		shown++
	}
	if shown == 0 {
		fmt.Fprintln(w, "  No week is short of line hours: more hours would not lower the cost.")
	}
	for t, o := range s.Overtime {
		if o > 1e-9 {
			fmt.Fprintf(w, "  Week %d uses %.1f overtime hours.\n", t+1, o)
		}
	}
}
