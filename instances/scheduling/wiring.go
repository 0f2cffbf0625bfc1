package scheduling

import (
	"fmt"
	"io"
	"os"

	"pincer/decomp"
	"pincer/instances"
)

// The family's optional abilities, wired to the functions of the
// input/output files.
var (
	_ instances.Verifier    = (*Model)(nil)
	_ instances.MPSExporter = (*Model)(nil)
	_ instances.PlanWriter  = (*Model)(nil)
	_ instances.Explainer   = (*Model)(nil)
	_ instances.Artefacts   = (*Model)(nil)
	_ instances.Generator   = Family{}
	_ instances.Demo        = Family{}
)

// Verify reads a schedule.csv plan and checks it independently of the
// engine (see VerifyFile).
func (m *Model) Verify(r io.Reader, file string) (instances.Verdict, error) {
	return VerifyFile(m.In, r, file)
}

// WriteMPS writes the time-indexed MIP (refused past the stated size).
func (m *Model) WriteMPS(w io.Writer) error { return WriteMPS(w, m.In) }

// PlanTables names the window table written beside schedule.csv.
func (m *Model) PlanTables() []string { return PlanTableNames() }

// WritePlan writes schedule.csv and the busiest windows.
func (m *Model) WritePlan(w io.Writer, res *decomp.Result, extra instances.Tables) error {
	return WritePlanFiles(w, m.In, res, extra)
}

// Explain adds the busiest windows in the schedulers' words: what one more
// machine of a class would save during the window (first order, from the
// slot prices at the best bound).
func (m *Model) Explain(res *decomp.Result) ([]string, error) {
	if len(res.Prices) == 0 {
		return nil, nil
	}
	wins, err := BusiestWindows(m.In, nil, res.Prices, 3)
	if err != nil || len(wins) == 0 {
		return nil, err
	}
	lines := []string{"busiest windows (from the slot prices at the best bound):"}
	for _, w := range wins {
		if res.Plan != nil {
			lines = append(lines, "  "+CappedWindowSentence(m.In, w, res.Plan.Value))
		} else {
			lines = append(lines, "  "+WindowSentence(m.In, w))
		}
	}
	return lines, nil
}

// Outputs lists the Gantt chart file, when asked for.
func (m *Model) Outputs() []string {
	if m.Gantt == "" {
		return nil
	}
	return []string{m.Gantt}
}

// WriteArtefacts writes the Gantt chart of the best schedule, when asked
// for; without a plan there is nothing to draw and no file is written.
func (m *Model) WriteArtefacts(res *decomp.Result) error {
	if m.Gantt == "" {
		return nil
	}
	s, err := m.ScheduleOf(res.Plan)
	if err != nil || s == nil {
		return err
	}
	f, err := os.Create(m.Gantt)
	if err != nil {
		return fmt.Errorf("scheduling: --gantt: %w", err)
	}
	if err := WriteGanttSVG(f, m.In, s, GanttOptions{}); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// Recipes offers `pincer gen scheduling`.
func (Family) Recipes() []instances.Recipe { return []instances.Recipe{GenerateRecipe()} }

// Scenarios offers the invented print-shop scenario.
func (Family) Scenarios() []instances.Scenario {
	return []instances.Scenario{DemoScenario(
		func(in *Instance) (instances.Model, error) { return NewModel(in, Options{}) },
		func(m instances.Model) (*Instance, error) {
			sm, ok := m.(*Model)
			if !ok {
				return nil, fmt.Errorf("scheduling: model is %T, want *scheduling.Model", m)
			}
			return sm.In, nil
		})}
}
