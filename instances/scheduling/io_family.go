package scheduling

import (
	"errors"
	"fmt"
	"io"

	"pincer/decomp"
	"pincer/instances"
)

// This file holds the input/output halves of the family's optional
// abilities as plain functions, for the Family and Model methods to call:
// PlanWriter (WritePlanFiles, PlanTableNames), Verifier (VerifyFile, in
// verify.go), MPSExporter (WriteMPS, in mps.go), Generator
// (GenerateRecipe), Demo (DemoScenario), the summary's resources
// (WindowResources) and the report's windows (WindowRows).

// ioScheduleOf returns a plan's schedule (nil for no plan) and an error
// when the plan's Detail is not a *Schedule placing every job of in on an
// existing machine.
func ioScheduleOf(in *Instance, p *decomp.Plan) (*Schedule, error) {
	if p == nil {
		return nil, nil
	}
	s, ok := p.Detail.(*Schedule)
	if !ok || s == nil {
		return nil, fmt.Errorf("scheduling: plan detail is %T, want a *scheduling.Schedule", p.Detail)
	}
	if err := ioCheckShape(in, s); err != nil {
		return nil, err
	}
	return s, nil
}

// PlanTableNames lists the extra tables WritePlanFiles writes beside
// schedule.csv: "windows", the busiest windows of the slot prices.
func PlanTableNames() []string { return []string{"windows"} }

// WritePlanFiles writes the result's schedule as schedule.csv to w (see
// WriteScheduleCSV) and, when extra is not nil, the busy windows of the
// result's prices (see BusiestWindows, at most 50, and WriteWindowsCSV) to
// extra.Create("windows"). The prices are laid out by SlotRows over
// in.Horizons(); a result without prices gives an empty window table.
func WritePlanFiles(w io.Writer, in *Instance, res *decomp.Result, extra instances.Tables) error {
	s, err := ioScheduleOf(in, res.Plan)
	if err != nil {
		return err
	}
	if s == nil {
		return errors.New("scheduling: no plan")
	}
	if err := WriteScheduleCSV(w, in, s); err != nil {
		return err
	}
	if extra == nil {
		return nil
	}
	var wins []BusyWindow
	if len(res.Prices) > 0 {
		if wins, err = BusiestWindows(in, nil, res.Prices, 50); err != nil {
			return err
		}
	}
	t, err := extra.Create("windows")
	if err != nil {
		return fmt.Errorf("scheduling: writing window table: %w", err)
	}
	if err := WriteWindowsCSV(t, in, wins); err != nil {
		t.Close()
		return err
	}
	return t.Close()
}

// WindowRow is a busy window as the JSON report shows it.
type WindowRow struct {
	Class  string  `json:"class"`
	From   int     `json:"from"`
	To     int     `json:"to"`
	Saving float64 `json:"saving"`
	Peak   float64 `json:"peak_price"`
	Text   string  `json:"text"`
}

// WindowRows turns the busiest windows of the result's prices (at most
// limit) into report rows with their sentence (see WindowSentence).
func WindowRows(in *Instance, prices []float64, limit int) ([]WindowRow, error) {
	if len(prices) == 0 {
		return nil, nil
	}
	wins, err := BusiestWindows(in, nil, prices, limit)
	if err != nil {
		return nil, err
	}
	out := make([]WindowRow, len(wins))
	for i, win := range wins {
		out[i] = WindowRow{Class: in.Classes[win.Class].ID, From: win.From, To: win.To,
			Saving: instances.RoundNumber(win.Saving), Peak: instances.RoundNumber(win.Peak), Text: WindowSentence(in, win)}
	}
	return out, nil
}

// WindowResources lists the busiest windows (at most limit) as the
// summary's shared resources: capacity is the class's machine count, load
// the most jobs of the schedule in process at once during the window (0
// without a schedule), price the window's summed slot price (the value of
// one more machine there) and binding whether the load reaches the
// capacity.
func WindowResources(in *Instance, s *Schedule, prices []float64, limit int) ([]instances.Resource, error) {
	if len(prices) == 0 {
		return nil, nil
	}
	wins, err := BusiestWindows(in, nil, prices, limit)
	if err != nil {
		return nil, err
	}
	out := make([]instances.Resource, len(wins))
	for i, win := range wins {
		c := in.Classes[win.Class]
		load := 0
		if s != nil {
			load = peakInProcess(in, s, win)
		}
		out[i] = instances.Resource{Name: fmt.Sprintf("%s slots %d..%d", c.ID, win.From, win.To-1), Capacity: float64(c.Machines),
			Load: float64(load), Price: win.Saving, Binding: load >= c.Machines}
	}
	return out, nil
}

// peakInProcess is the most jobs of s in process at once on the window's
// class during the window.
func peakInProcess(in *Instance, s *Schedule, win BusyWindow) int {
	count := make([]int, win.To-win.From)
	for j, jb := range in.Jobs {
		if s.Class[j] != win.Class {
			continue
		}
		for t := max(s.Start[j], win.From); t < min(s.Start[j]+jb.Processing, win.To); t++ {
			count[t-win.From]++
		}
	}
	peak := 0
	for _, c := range count {
		peak = max(peak, c)
	}
	return peak
}

// GenerateRecipe is `pincer gen scheduling`: a jobs-csv folder from
// Generate. The defaults give a 50-job instance on 2 identical machines in
// the published style (TF = RDD = 0.6); --preset benchmark5000 gives the
// Benchmark5000 configuration (the other options except --seed are then
// ignored).
func GenerateRecipe() instances.Recipe {
	return instances.Recipe{
		Name:  "scheduling",
		Usage: "--jobs N --machines M --classes C --seed S -o DIR",
		Short: "Shared-machine scheduling folder (jobs in the style of the OR-Library weighted tardiness generator)",
		Options: []instances.Option{
			{Name: "jobs", Usage: "number of jobs", Kind: instances.Int, Default: "50", Min: 1, Max: genMaxJobs, HasMin: true, HasMax: true},
			{Name: "machines", Usage: "total number of machines (at least one per class)", Kind: instances.Int, Default: "2", Min: 1, HasMin: true},
			{Name: "classes", Usage: "number of machine classes", Kind: instances.Int, Default: "1", Min: 1, HasMin: true},
			{Name: "tf", Usage: "tardiness factor (published: 0.2 to 1.0)", Kind: instances.Float, Default: "0.6", Min: 0, Max: 2, HasMin: true, HasMax: true},
			{Name: "rdd", Usage: "relative range of due dates (published: 0.2 to 1.0)", Kind: instances.Float, Default: "0.6", Min: 0, Max: 2, HasMin: true, HasMax: true},
			{Name: "max-processing", Usage: "largest processing time (published: 100)", Kind: instances.Int, Default: "100", Min: 1, Max: MaxCSVNumber / genMaxJobs, HasMin: true, HasMax: true},
			{Name: "release-factor", Usage: "release dates up to this share of the per-machine workload (0: none)", Kind: instances.Float, Default: "0", Min: 0, Max: 10, HasMin: true, HasMax: true},
			{Name: "eligible-share", Usage: "share of jobs restricted to some classes", Kind: instances.Float, Default: "0", Min: 0, Max: 1, HasMin: true, HasMax: true},
			{Name: "preset", Usage: "none, or benchmark5000 (5,000 jobs, 20 machines in 3 classes, release dates)", Kind: instances.String, Default: "none", Allowed: []string{"none", "benchmark5000"}},
			{Name: "seed", Usage: "random seed", Kind: instances.Int, Default: "1", Min: 0, HasMin: true},
		},
		Files: []string{MachinesFile, JobsFile},
		Run: func(v instances.Values, out instances.Sink) (string, error) {
			cfg := GenerateConfig{Jobs: v.Int("jobs"), Machines: v.Int("machines"), Classes: v.Int("classes"),
				TF: v.Float("tf"), RDD: v.Float("rdd"), MaxProcessing: v.Int("max-processing"),
				ReleaseFactor: v.Float("release-factor"), EligibleShare: v.Float("eligible-share"), Seed: uint64(v.Int("seed"))}
			if v.String("preset") == "benchmark5000" {
				cfg = Benchmark5000(uint64(v.Int("seed")))
			}
			in, err := GenerateChecked(cfg)
			if err != nil {
				return "", err
			}
			if err := WriteCSVTo(out.Create, in); err != nil {
				return "", err
			}
			machines := 0
			for _, c := range in.Classes {
				machines += c.Machines
			}
			return fmt.Sprintf("%d jobs, %d machines in %d classes (%s, %s)", len(in.Jobs), machines, len(in.Classes), MachinesFile, JobsFile), nil
		},
	}
}

// DemoScenario is `pincer demo --scenario print-shop` (see Demo). newModel
// builds the family's model of an instance; instanceOf returns the
// instance of such a model, for the explanation.
func DemoScenario(newModel func(*Instance) (instances.Model, error), instanceOf func(instances.Model) (*Instance, error)) instances.Scenario {
	return instances.Scenario{
		Name:   "print-shop",
		About:  "a harbour-town print shop plans a week of jobs on presses and a binding line (shared-machine scheduling)",
		Rounds: 300,
		Report: "pincer-print-shop-report.json",
		Load: func(w io.Writer, _ instances.Values) (instances.Model, error) {
			in := Demo()
			if err := WriteDemoIntro(w, in); err != nil {
				return nil, err
			}
			return newModel(in)
		},
		Explain: func(w io.Writer, m instances.Model, res *decomp.Result) error {
			in, err := instanceOf(m)
			if err != nil {
				return err
			}
			s, err := ioScheduleOf(in, res.Plan)
			if err != nil || s == nil {
				return err
			}
			var wins []BusyWindow
			if len(res.Prices) > 0 {
				if wins, err = BusiestWindows(in, nil, res.Prices, 4); err != nil {
					return err
				}
			}
			return WriteDemoExplanation(w, in, s, wins)
		},
	}
}
