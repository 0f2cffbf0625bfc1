package scheduling

import (
	"fmt"

	"pincer/decomp"
	"pincer/instances"
)

// Family is the shared-machine scheduling family as the command line sees
// it.
type Family struct{}

var (
	_ instances.Family = Family{}
	_ instances.Model  = (*Model)(nil)
)

// Name returns "scheduling".
func (Family) Name() string { return "scheduling" }

// Formats lists the formats the family reads: wt-orlib (an OR-Library
// weighted tardiness file). The schedulers' CSV folder is added beside it
// by its reader.
func (Family) Formats() []instances.Format {
	return []instances.Format{
		{Name: "wt-orlib", About: "single-machine weighted tardiness, OR-Library wt40/wt50/wt100 files (125 instances each; --index, --machines)"},
		{Name: "jobs-csv", About: "shared-machine scheduling, a schedulers' folder (jobs.csv, machines.csv)", Folder: true},
	}
}

// Relaxations lists the one relaxation: the capacity rows of every class
// and time slot.
func (Family) Relaxations() []string { return []string{"slots"} }

// Options lists index, machines, objective and relax.
func (f Family) Options() []instances.Option {
	return []instances.Option{
		{Name: "index", Usage: "instance number in an OR-Library weighted tardiness file", Kind: instances.Int,
			Default: "1", Min: 1, Max: ORLibInstances, HasMin: true, HasMax: true},
		{Name: "machines", Usage: "run the jobs of an OR-Library file on this many identical machines", Kind: instances.Int,
			Default: "1", Min: 1, Max: 1000, HasMin: true, HasMax: true},
		{Name: "objective", Usage: "what the schedule minimises: weighted-tardiness (sum of weight x lateness past the due date) or weighted-completion (sum of weight x completion time)",
			Kind: instances.String, Default: WeightedTardiness.String(), Allowed: []string{WeightedTardiness.String(), WeightedCompletion.String()}},
		{Name: "relax", Usage: "which rows to price: slots (at most m_k jobs of class k in process in each time slot)",
			Kind: instances.String, Default: "slots", Allowed: f.Relaxations()},
		{Name: "gantt", Usage: "write a Gantt chart of the best schedule as SVG to this file", Kind: instances.String, Default: ""},
	}
}

// Load reads path in format with the option values.
func (Family) Load(format, path string, v instances.Values) (instances.Model, error) {
	var in *Instance
	var err error
	switch format {
	case "wt-orlib":
		in, err = ReadORLibFile(path, v.Int("index"), max(1, v.Int("machines")))
	case "jobs-csv":
		if k := v.Int("index"); k > 1 {
			return nil, fmt.Errorf("--index %d: a jobs folder holds one instance; --index picks an instance of an OR-Library file only", k)
		}
		if k := v.Int("machines"); k > 1 {
			return nil, fmt.Errorf("--machines %d: a jobs folder names its machines in machines.csv; --machines applies to OR-Library files only", k)
		}
		in, err = ReadCSVFolder(path)
	default:
		return nil, fmt.Errorf("scheduling: unknown format %q", format)
	}
	if err != nil {
		return nil, err
	}
	switch o := v.String("objective"); o {
	case "", WeightedTardiness.String():
		in.Objective = WeightedTardiness
	case WeightedCompletion.String():
		in.Objective = WeightedCompletion
	default:
		return nil, fmt.Errorf("scheduling: --objective %q: want %s or %s", o, WeightedTardiness, WeightedCompletion)
	}
	m, err := NewModel(in, Options{})
	if err != nil {
		return nil, err
	}
	m.Gantt = v.String("gantt")
	return m, nil
}

// NewModel validates in and keeps the options for the engine problem.
func NewModel(in *Instance, opt Options) (*Model, error) {
	if err := in.Validate(); err != nil {
		return nil, err
	}
	return &Model{In: in, Opt: opt}, nil
}

// Model is a loaded scheduling instance; it implements instances.Model.
type Model struct {
	In  *Instance
	Opt Options
	// Gantt, when not empty, is the file the Gantt chart of the best
	// schedule is written to after a run.
	Gantt string
}

// Name is the instance name.
func (m *Model) Name() string { return m.In.Name }

// Size gives jobs, machines, classes and the objective.
func (m *Model) Size() string {
	machines := 0
	for _, c := range m.In.Classes {
		machines += c.Machines
	}
	plural := func(n int, word string) string {
		if n == 1 {
			return fmt.Sprintf("%d %s", n, word)
		}
		if word == "class" {
			return fmt.Sprintf("%d classes", n)
		}
		return fmt.Sprintf("%d %ss", n, word)
	}
	return fmt.Sprintf("%s on %s in %s, %s", plural(len(m.In.Jobs), "job"), plural(machines, "machine"), plural(len(m.In.Classes), "class"), m.In.Objective)
}

// Sense is always Minimise.
func (m *Model) Sense() decomp.Sense { return decomp.Minimise }

// Problem builds the engine problem.
func (m *Model) Problem() (*decomp.Problem, error) { return NewProblem(m.In, m.Opt) }

// ScheduleOf returns a plan's schedule (nil for no plan) and an error when
// the plan's Detail is not a *Schedule of this instance.
func (m *Model) ScheduleOf(p *decomp.Plan) (*Schedule, error) {
	return ioScheduleOf(m.In, p)
}

// PlacedJob is one job of a plan in the JSON report.
type PlacedJob struct {
	Job       string `json:"job"`
	Name      string `json:"name,omitempty"`
	Class     string `json:"class"`
	Machine   int    `json:"machine"` // 1-based within the class
	Start     int    `json:"start"`
	End       int    `json:"end"`
	Tardiness int    `json:"tardiness"`
	Cost      int64  `json:"cost"` // the job's objective term
}

// Placements lists a schedule's jobs by class, machine and start.
func Placements(in *Instance, s *Schedule) []PlacedJob {
	out := make([]PlacedJob, 0, len(in.Jobs))
	for _, j := range ioScheduleOrder(in, s) {
		jb := in.Jobs[j]
		end := s.Start[j] + jb.Processing
		k := s.Class[j]
		cls := ""
		if k >= 0 && k < len(in.Classes) {
			cls = in.Classes[k].ID
		}
		out = append(out, PlacedJob{Job: jb.ID, Name: jb.Name, Class: cls, Machine: s.Machine[j] + 1, Start: s.Start[j], End: end,
			Tardiness: max(0, end-jb.Due), Cost: in.Cost(j, end)})
	}
	return out
}

// PlanJSON lists the placed jobs, by class, machine and start.
func (m *Model) PlanJSON(p *decomp.Plan) (any, error) {
	s, err := m.ScheduleOf(p)
	if err != nil || s == nil {
		return nil, err
	}
	return Placements(m.In, s), nil
}

// Extra adds the sizes, the objective and the horizons of the model.
func (m *Model) Extra(res *decomp.Result) (map[string]any, error) {
	if _, err := m.ScheduleOf(res.Plan); err != nil {
		return nil, err
	}
	h := m.In.Horizons()
	hz := make(map[string]int, len(h))
	for k, c := range m.In.Classes {
		hz[c.ID] = h[k]
	}
	out := map[string]any{
		"jobs":      len(m.In.Jobs),
		"classes":   len(m.In.Classes),
		"objective": m.In.Objective.String(),
		"horizons":  hz,
	}
	if res.Plan != nil {
		if s, _ := m.ScheduleOf(res.Plan); s != nil {
			late := 0
			for j, jb := range m.In.Jobs {
				if s.Start[j]+jb.Processing > jb.Due {
					late++
				}
			}
			out["late_jobs"] = late
		}
	}
	return out, nil
}

// Resources lists each class's machines over its horizon: capacity is
// machine-slots, load the slots the plan uses, and the price the largest
// slot price of the class at the best bound.
func (m *Model) Resources(res *decomp.Result) ([]instances.Resource, error) {
	s, err := m.ScheduleOf(res.Plan)
	if err != nil || s == nil {
		return nil, err
	}
	lay := Layout(m.In)
	out := make([]instances.Resource, len(m.In.Classes))
	for k, c := range m.In.Classes {
		r := instances.Resource{Name: "class " + c.ID, Capacity: float64(c.Machines * lay.Horizons[k])}
		for j, jb := range m.In.Jobs {
			if s.Class[j] == k {
				r.Load += float64(jb.Processing)
			}
		}
		for t := 0; t < lay.Horizons[k]; t++ {
			if i := lay.Offsets[k] + t; i < len(res.Prices) && res.Prices[i] > r.Price {
				r.Price = res.Prices[i]
			}
		}
		r.Binding = r.Price > 0
		out[k] = r
	}
	return out, nil
}
