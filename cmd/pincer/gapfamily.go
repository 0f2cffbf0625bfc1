package main

import (
	"fmt"
	"io"
	"os"

	"pincer/decomp"
	"pincer/instances/gap"
)

func gapFamily() family {
	return family{
		format: "gap-orlib",
		about:  "generalized assignment, OR-Library layout (multi-instance files or one-instance files)",
		load: func(file string, o modelOptions) (model, error) {
			index := o.index
			if index == 0 {
				index = 1
			}
			in, err := gap.ReadFile(file, index)
			if err != nil {
				return nil, badInput(err)
			}
			sense, err := parseSense(o.sense, decomp.Minimise)
			if err != nil {
				return nil, err
			}
			relax, err := gap.ParseRelaxation(o.relax)
			if err != nil {
				return nil, badInput(err)
			}
			if o.singleSource {
				return nil, badInput(fmt.Errorf("--single-source applies to facility location formats, not gap-orlib"))
			}
			return &gapModel{in: in, opt: gap.Options{Maximise: sense == decomp.Maximise, Relaxation: relax}}, nil
		},
	}
}

type gapModel struct {
	in  *gap.Instance
	opt gap.Options
	// agentNames, when set, name the agents in summaries (the demo's plants).
	agentNames []string
}

func (m *gapModel) agentName(i int) string {
	if i < len(m.agentNames) {
		return m.agentNames[i]
	}
	return fmt.Sprintf("agent %d", i+1)
}

func (m *gapModel) name() string { return m.in.Name }
func (m *gapModel) size() string {
	return fmt.Sprintf("%d agents x %d jobs, %s relaxation", m.in.Agents, m.in.Jobs, m.opt.Relaxation)
}
func (m *gapModel) sense() decomp.Sense {
	if m.opt.Maximise {
		return decomp.Maximise
	}
	return decomp.Minimise
}
func (m *gapModel) problem() (*decomp.Problem, error) { return gap.NewProblem(m.in, m.opt) }

func assignOf(p *decomp.Plan) []int {
	if p == nil {
		return nil
	}
	return p.Detail.([]int)
}

func (m *gapModel) writePlan(w io.Writer, p *decomp.Plan) error {
	return gap.WritePlanCSV(w, m.in, assignOf(p))
}

func (m *gapModel) planJSON(p *decomp.Plan) any {
	assign := assignOf(p)
	if assign == nil {
		return nil
	}
	type line struct {
		Job   int   `json:"job"`
		Agent int   `json:"agent"`
		Cost  int64 `json:"cost"`
		Use   int64 `json:"use"`
	}
	out := make([]line, len(assign))
	for j, i := range assign {
		out[j] = line{Job: j + 1, Agent: i + 1, Cost: m.in.Cost[i][j], Use: m.in.Use[i][j]}
	}
	return out
}

func (m *gapModel) resourceList(res *decomp.Result) []gap.Resource {
	return gap.Resources(m.in, m.opt, res.Prices, assignOf(res.Plan))
}

func (m *gapModel) extra(res *decomp.Result) map[string]any {
	type resource struct {
		Agent    int     `json:"agent"`
		Capacity int64   `json:"capacity"`
		Load     *int64  `json:"load"`
		Price    float64 `json:"price"`
		Binding  bool    `json:"binding"`
	}
	var out []resource
	for _, r := range m.resourceList(res) {
		rr := resource{Agent: r.Agent + 1, Capacity: r.Capacity, Price: r.Price, Binding: r.Binding}
		if res.Plan != nil {
			l := r.Load
			rr.Load = &l
		}
		out = append(out, rr)
	}
	return map[string]any{"resources": out, "relaxation": m.opt.Relaxation.String(), "agents": m.in.Agents, "jobs": m.in.Jobs}
}

func (m *gapModel) resources(res *decomp.Result) []resourceLine {
	var out []resourceLine
	for _, r := range m.resourceList(res) {
		out = append(out, resourceLine{
			name: m.agentName(r.Agent), capacity: float64(r.Capacity), load: float64(r.Load),
			price: r.Price, binding: r.Binding,
		})
	}
	sortResources(out)
	return out
}

func (m *gapModel) verify(planFile string) (verdict, error) {
	f, err := os.Open(planFile)
	if err != nil {
		return verdict{}, badInput(err)
	}
	defer f.Close()
	assign, err := gap.ReadPlanCSV(f, planFile, m.in)
	if err != nil {
		return verdict{}, badInput(err)
	}
	v := gap.Verify(m.in, assign, m.opt.Maximise)
	return verdict{value: float64(v.Value), feasible: v.Feasible, problems: v.Problems}, nil
}

func (m *gapModel) exportMPS(w io.Writer) error { return gap.WriteMPS(w, m.in, m.opt.Maximise) }
