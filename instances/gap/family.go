package gap

import (
	"bufio"
	"errors"
	"fmt"
	"io"

	"pincer/decomp"
	"pincer/instances"
)

// Family is the generalized assignment family as the command line sees it.
type Family struct{}

var (
	_ instances.Family    = Family{}
	_ instances.Generator = Family{}
	_ instances.Demo      = Family{}
)

// Name returns "gap".
func (Family) Name() string { return "gap" }

// Formats lists the one input layout, gap-orlib.
func (Family) Formats() []instances.Format {
	return []instances.Format{{Name: "gap-orlib",
		About: "generalized assignment, OR-Library layout (multi-instance files or one-instance files)"}}
}

// Relaxations lists knapsack (the default) and choice.
func (Family) Relaxations() []string { return []string{"knapsack", "choice"} }

// Options lists index, sense and relax.
func (f Family) Options() []instances.Option {
	return []instances.Option{
		{Name: "index", Usage: "instance number in a multi-instance file", Kind: instances.Int, Default: "1", Min: 1, HasMin: true},
		{Name: "sense", Usage: "objective sense", Kind: instances.String, Default: "min", Allowed: []string{"min", "max"}},
		{Name: "relax", Usage: "which rows to price: knapsack (job rows; stronger) or choice (agent capacities)",
			Kind: instances.String, Default: "knapsack", Allowed: f.Relaxations()},
	}
}

// Load reads an OR-Library file.
func (Family) Load(format, path string, v instances.Values) (instances.Model, error) {
	if format != "gap-orlib" {
		return nil, fmt.Errorf("gap: unknown format %q", format)
	}
	in, err := ReadFile(path, v.Int("index"))
	if err != nil {
		return nil, err
	}
	relax, err := ParseRelaxation(v.String("relax"))
	if err != nil {
		return nil, err
	}
	return &Model{In: in, Opt: Options{Maximise: v.String("sense") == "max", Relaxation: relax}}, nil
}

// Model is a loaded assignment instance; it implements instances.Model,
// Verifier, MPSExporter and PlanWriter.
type Model struct {
	In  *Instance
	Opt Options
	// AgentNames, when set, name the agents in summaries, reports and plans.
	AgentNames []string
}

// AgentName is the name of agent i (0-based), "agent N" without names.
func (m *Model) AgentName(i int) string {
	if i < len(m.AgentNames) && m.AgentNames[i] != "" {
		return m.AgentNames[i]
	}
	return fmt.Sprintf("agent %d", i+1)
}

// Name is the instance name.
func (m *Model) Name() string { return m.In.Name }

// Size gives the dimensions and relaxation.
func (m *Model) Size() string {
	return fmt.Sprintf("%d agents x %d jobs, %s relaxation", m.In.Agents, m.In.Jobs, m.Opt.Relaxation)
}

// Sense is the objective sense.
func (m *Model) Sense() decomp.Sense {
	if m.Opt.Maximise {
		return decomp.Maximise
	}
	return decomp.Minimise
}

// Problem builds the engine problem.
func (m *Model) Problem() (*decomp.Problem, error) { return NewProblem(m.In, m.Opt) }

// AssignmentOf returns a plan's assignment (nil for no plan) and an error
// when the plan's Detail is not an assignment of this instance.
func (m *Model) AssignmentOf(p *decomp.Plan) ([]int, error) {
	if p == nil {
		return nil, nil
	}
	a, ok := p.Detail.([]int)
	if !ok || len(a) != m.In.Jobs {
		return nil, fmt.Errorf("gap: plan detail is %T, want an assignment of %d jobs", p.Detail, m.In.Jobs)
	}
	return a, nil
}

// PlanJSON lists one entry per job.
func (m *Model) PlanJSON(p *decomp.Plan) (any, error) {
	assign, err := m.AssignmentOf(p)
	if err != nil || assign == nil {
		return nil, err
	}
	type line struct {
		Job       int    `json:"job"`
		Agent     int    `json:"agent"`
		AgentName string `json:"agent_name,omitempty"`
		Cost      int64  `json:"cost"`
		Use       int64  `json:"use"`
	}
	out := make([]line, len(assign))
	for j, i := range assign {
		out[j] = line{Job: j + 1, Agent: i + 1, Cost: m.In.Cost[i][j], Use: m.In.Use[i][j]}
		if m.AgentNames != nil {
			out[j].AgentName = m.AgentName(i)
		}
	}
	return out, nil
}

func (m *Model) resourceList(res *decomp.Result) ([]Resource, error) {
	assign, err := m.AssignmentOf(res.Plan)
	if err != nil {
		return nil, err
	}
	return Resources(m.In, m.Opt, res.Prices, assign), nil
}

// Extra adds the agents' capacities, loads and prices ("resources").
func (m *Model) Extra(res *decomp.Result) (map[string]any, error) {
	type resource struct {
		Agent    int     `json:"agent"`
		Name     string  `json:"name,omitempty"`
		Capacity int64   `json:"capacity"`
		Load     *int64  `json:"load"`
		Price    float64 `json:"price"`
		Binding  bool    `json:"binding"`
	}
	rs, err := m.resourceList(res)
	if err != nil {
		return nil, err
	}
	out := []resource{}
	for _, r := range rs {
		rr := resource{Agent: r.Agent + 1, Capacity: r.Capacity, Price: instances.RoundNumber(r.Price), Binding: r.Binding}
		if m.AgentNames != nil {
			rr.Name = m.AgentName(r.Agent)
		}
		if res.Plan != nil {
			l := r.Load
			rr.Load = &l
		}
		out = append(out, rr)
	}
	return map[string]any{"resources": out, "relaxation": m.Opt.Relaxation.String(), "agents": m.In.Agents, "jobs": m.In.Jobs}, nil
}

// Resources lists the agents for the summary.
func (m *Model) Resources(res *decomp.Result) ([]instances.Resource, error) {
	rs, err := m.resourceList(res)
	if err != nil {
		return nil, err
	}
	out := make([]instances.Resource, len(rs))
	for k, r := range rs {
		out[k] = instances.Resource{Name: m.AgentName(r.Agent), Capacity: float64(r.Capacity), Load: float64(r.Load),
			Price: r.Price, Binding: r.Binding}
	}
	return out, nil
}

// Verify reads a plan CSV and checks it with [Verify].
func (m *Model) Verify(r io.Reader, file string) (instances.Verdict, error) {
	assign, err := ReadPlanCSV(r, file, m.In)
	if err != nil {
		return instances.Verdict{}, err
	}
	v := Verify(m.In, assign, m.Opt.Maximise)
	return instances.Verdict{Value: float64(v.Value), Feasible: v.Feasible, Problems: v.Problems}, nil
}

// WriteMPS writes the full model.
func (m *Model) WriteMPS(w io.Writer) error { return WriteMPS(w, m.In, m.Opt.Maximise) }

// PlanTables is empty: the plan is one table.
func (m *Model) PlanTables() []string { return nil }

// WritePlan writes the plan CSV.
func (m *Model) WritePlan(w io.Writer, res *decomp.Result, _ instances.Tables) error {
	assign, err := m.AssignmentOf(res.Plan)
	if err != nil {
		return err
	}
	if assign == nil {
		return errors.New("gap: no plan")
	}
	var names []string
	if m.AgentNames != nil {
		names = make([]string, m.In.Agents)
		for i := range names {
			names[i] = m.AgentName(i)
		}
	}
	return WriteNamedPlanCSV(w, m.In, assign, names)
}

// Recipes offers `gen gap`.
func (Family) Recipes() []instances.Recipe {
	return []instances.Recipe{{
		Name:  "gap",
		Usage: "--type a|b|c|d|e --agents M --jobs N --seed S [-o FILE]",
		Short: "Generalized assignment instance (Chu & Beasley 1997 types A-C; Laguna et al. 1995 type D; type E of Yagiura et al.)",
		Options: []instances.Option{
			{Name: "type", Usage: "instance type", Kind: instances.String, Default: "c", Allowed: []string{"a", "b", "c", "d", "e"}},
			{Name: "agents", Usage: "number of agents", Kind: instances.Int, Default: "10", Min: 1, HasMin: true},
			{Name: "jobs", Usage: "number of jobs", Kind: instances.Int, Default: "100", Min: 1, HasMin: true},
			{Name: "seed", Usage: "random seed", Kind: instances.Int, Default: "1", Min: 0, HasMin: true},
		},
		Run: func(v instances.Values, out instances.Sink) (string, error) {
			in, err := Generate(v.String("type")[0], v.Int("agents"), v.Int("jobs"), uint64(v.Int("seed")))
			if err != nil {
				return "", err
			}
			w, err := out.Create("")
			if err != nil {
				return "", err
			}
			bw := bufio.NewWriter(w)
			if err := WriteORLib(bw, in); err != nil {
				w.Close()
				return "", err
			}
			if err := bw.Flush(); err != nil {
				w.Close()
				return "", err
			}
			return "", w.Close()
		},
	}}
}
