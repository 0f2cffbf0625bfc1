package cflp

import (
	"errors"
	"fmt"
	"io"
	"os"

	"pincer/decomp"
	"pincer/instances"
)

// Family is the capacitated facility location family as the command line
// sees it.
type Family struct{}

var (
	_ instances.Family    = Family{}
	_ instances.Generator = Family{}
	_ instances.Demo      = Family{}
)

// Name returns "cflp".
func (Family) Name() string { return "cflp" }

// Formats lists cflp-orlib (a file) and cflp-csv (a scenario folder).
func (Family) Formats() []instances.Format {
	return []instances.Format{
		{Name: "cflp-orlib", About: "capacitated facility location, OR-Library warehouse layout (capa/capb/capc: --index 1..4 picks the capacity)"},
		{Name: "cflp-csv", About: "capacitated facility location, scenario folder (sites.csv, customers.csv, lanes.csv)", Folder: true},
	}
}

// Relaxations lists site-aggregate (the default) and site.
func (Family) Relaxations() []string { return []string{"site-aggregate", "site"} }

// Options lists index, sense, relax and single-source.
func (f Family) Options() []instances.Option {
	return []instances.Option{
		{Name: "index", Usage: "capacity variant of an OR-Library capa/capb/capc file", Kind: instances.Int, Default: "1",
			Min: 1, Max: 4, HasMin: true, HasMax: true},
		{Name: "sense", Usage: "objective sense (facility location minimises cost)", Kind: instances.String, Default: "min",
			Allowed: []string{"min"}},
		{Name: "relax", Usage: "which rows to price: site-aggregate (keeps the total capacity row; stronger) or site",
			Kind: instances.String, Default: "site-aggregate", Allowed: f.Relaxations()},
		{Name: "single-source", Usage: "each customer served by exactly one site", Kind: instances.Bool, Default: "false"},
	}
}

// Load reads an OR-Library file or a scenario folder.
func (Family) Load(format, path string, v instances.Values) (instances.Model, error) {
	var in *Instance
	switch format {
	case "cflp-orlib":
		f, err := os.Open(path)
		if err != nil {
			return nil, err
		}
		defer f.Close()
		if in, err = ReadORLib(f, path, v.Int("index")); err != nil {
			return nil, err
		}
	case "cflp-csv":
		if k := v.Int("index"); k != 1 {
			return nil, fmt.Errorf("--index %d: a scenario folder holds one instance; --index picks a capacity variant of OR-Library capa/capb/capc files only", k)
		}
		var err error
		if in, err = ReadScenario(path); err != nil {
			return nil, err
		}
	default:
		return nil, fmt.Errorf("cflp: unknown format %q", format)
	}
	relax, err := ParseRelaxation(v.String("relax"))
	if err != nil {
		return nil, err
	}
	return NewModel(in, Options{SingleSource: v.Bool("single-source"), Relaxation: relax})
}

// NewModel validates in and resolves the relaxation asked for in opt.
func NewModel(in *Instance, opt Options) (*Model, error) {
	if err := in.Validate(); err != nil {
		return nil, err
	}
	used, note := ResolveRelaxation(in, opt.Relaxation)
	opt.Relaxation = used
	return &Model{In: in, Opt: opt, Note: note}, nil
}

// Model is a loaded facility location instance; it implements
// instances.Model, Verifier, MPSExporter and PlanWriter.
type Model struct {
	In   *Instance
	Opt  Options
	Note string // why the relaxation differs from the one asked for
}

// Name is the instance name.
func (m *Model) Name() string { return m.In.Name }

// Size gives the dimensions, variant and relaxation.
func (m *Model) Size() string {
	v := "split demand"
	if m.Opt.SingleSource {
		v = "single source"
	}
	return fmt.Sprintf("%d sites x %d customers, %s, %s relaxation", len(m.In.Sites), len(m.In.Customers), v, m.Opt.Relaxation)
}

// Sense is always Minimise.
func (m *Model) Sense() decomp.Sense { return decomp.Minimise }

// Problem builds the engine problem.
func (m *Model) Problem() (*decomp.Problem, error) { return NewProblem(m.In, m.Opt) }

// SolutionOf returns a plan's solution (nil for no plan) and an error when
// the plan's Detail is not a *Solution of this instance.
func (m *Model) SolutionOf(p *decomp.Plan) (*Solution, error) {
	if p == nil {
		return nil, nil
	}
	s, ok := p.Detail.(*Solution)
	if !ok || s == nil || len(s.Open) != len(m.In.Sites) {
		return nil, fmt.Errorf("cflp: plan detail is %T, want a *cflp.Solution of %d sites", p.Detail, len(m.In.Sites))
	}
	return s, nil
}

// PlanJSON lists the lanes with a positive quantity.
func (m *Model) PlanJSON(p *decomp.Plan) (any, error) {
	sol, err := m.SolutionOf(p)
	if err != nil || sol == nil {
		return nil, err
	}
	type lane struct {
		Site         string  `json:"site"`
		SiteName     string  `json:"site_name,omitempty"`
		Customer     string  `json:"customer"`
		CustomerName string  `json:"customer_name,omitempty"`
		Quantity     float64 `json:"quantity"`
		Cost         float64 `json:"cost"`
	}
	out := []lane{}
	for i, row := range sol.Flow {
		for j, q := range row {
			if q > 0 {
				s, c := m.In.Sites[i], m.In.Customers[j]
				out = append(out, lane{Site: s.ID, SiteName: s.Name, Customer: c.ID, CustomerName: c.Name,
					Quantity: instances.RoundNumber(q), Cost: instances.RoundNumber(m.In.Cost[i][j] * q / c.Demand)})
			}
		}
	}
	return out, nil
}

// siteJSON is one site in the report. CapacityPrice is null for a closed
// site: it is the shadow price of capacity among the open sites only.
type siteJSON struct {
	ID            string   `json:"id"`
	Name          string   `json:"name"`
	Open          bool     `json:"open"`
	Capacity      float64  `json:"capacity"`
	Load          float64  `json:"load"`
	Utilisation   *float64 `json:"utilisation"`
	FixedCost     float64  `json:"fixed_cost"`
	CapacityPrice *float64 `json:"capacity_price"`
}

func (m *Model) sites(sol *Solution) []siteJSON {
	out := make([]siteJSON, len(m.In.Sites))
	for i, s := range m.In.Sites {
		out[i] = siteJSON{ID: s.ID, Name: s.Name, Capacity: s.Capacity, FixedCost: s.FixedCost}
		if sol != nil {
			out[i].Open, out[i].Load = sol.Open[i], instances.RoundNumber(sol.Load[i])
			if s.Capacity > 0 {
				u := instances.RoundNumber(sol.Load[i] / s.Capacity)
				out[i].Utilisation = &u
			}
			if sol.Open[i] && sol.CapacityPrice != nil {
				p := instances.RoundNumber(sol.CapacityPrice[i])
				out[i].CapacityPrice = &p
			}
		}
	}
	return out
}

// Extra adds the site table ("sites") and the variant.
func (m *Model) Extra(res *decomp.Result) (map[string]any, error) {
	sol, err := m.SolutionOf(res.Plan)
	if err != nil {
		return nil, err
	}
	out := map[string]any{
		"sites":         m.sites(sol),
		"relaxation":    m.Opt.Relaxation.String(),
		"single_source": m.Opt.SingleSource,
		"site_count":    len(m.In.Sites),
		"customers":     len(m.In.Customers),
	}
	if sol != nil {
		// The exact search over site sets may prove the plan optimal when
		// the Lagrangian bound alone does not.
		out["site_search_proved_optimal"] = sol.Optimal
	}
	if m.Note != "" {
		out["relaxation_note"] = m.Note
	}
	return out, nil
}

// Resources lists the open sites; the price is what one more unit of
// capacity would save, per unit of demand.
func (m *Model) Resources(res *decomp.Result) ([]instances.Resource, error) {
	sol, err := m.SolutionOf(res.Plan)
	if err != nil || sol == nil {
		return nil, err
	}
	var out []instances.Resource
	for i, s := range m.In.Sites {
		if !sol.Open[i] {
			continue
		}
		name := s.ID
		if s.Name != "" {
			name = s.Name + " (" + s.ID + ")"
		}
		out = append(out, instances.Resource{Name: name, Capacity: s.Capacity, Load: sol.Load[i],
			Price: sol.CapacityPrice[i], Binding: sol.Load[i] >= s.Capacity*(1-1e-9)})
	}
	return out, nil
}

// Verify reads a plan CSV and checks it with [Verify].
func (m *Model) Verify(r io.Reader, file string) (instances.Verdict, error) {
	flow, err := ReadPlanCSV(r, file, m.In)
	if err != nil {
		return instances.Verdict{}, err
	}
	v := Verify(m.In, flow, m.Opt.SingleSource)
	return instances.Verdict{Value: v.Value, Feasible: v.Feasible, Problems: v.Problems}, nil
}

// WriteMPS writes the full model.
func (m *Model) WriteMPS(w io.Writer) error { return WriteMPS(w, m.In, m.Opt.SingleSource) }

// PlanTables names the site table written beside the plan.
func (m *Model) PlanTables() []string { return []string{"sites"} }

// WritePlan writes the lane plan to w and, when extra is not nil, the site
// table (see [WriteSitesCSV]) to extra.Create("sites").
func (m *Model) WritePlan(w io.Writer, res *decomp.Result, extra instances.Tables) error {
	sol, err := m.SolutionOf(res.Plan)
	if err != nil {
		return err
	}
	if sol == nil {
		return errors.New("cflp: no plan")
	}
	if err := WritePlanCSV(w, m.In, sol.Flow); err != nil {
		return err
	}
	if extra == nil {
		return nil
	}
	t, err := extra.Create("sites")
	if err != nil {
		return fmt.Errorf("cflp: writing site table: %w", err)
	}
	if err := WriteSitesCSV(t, m.In, sol.Open, sol.Load, sol.CapacityPrice); err != nil {
		t.Close()
		return err
	}
	return t.Close()
}

// Recipes offers `gen cflp`, a scenario folder.
func (Family) Recipes() []instances.Recipe {
	return []instances.Recipe{{
		Name:  "cflp",
		Usage: "--sites M --customers N --ratio R --seed S -o DIR",
		Short: "Facility location scenario folder (random points; capacity = ratio x demand)",
		Options: []instances.Option{
			{Name: "sites", Usage: "number of candidate sites", Kind: instances.Int, Default: "50", Min: 1, HasMin: true},
			{Name: "customers", Usage: "number of customers", Kind: instances.Int, Default: "500", Min: 1, HasMin: true},
			{Name: "ratio", Usage: "total capacity divided by total demand", Kind: instances.Float, Default: "3", Min: 1, HasMin: true},
			{Name: "seed", Usage: "random seed", Kind: instances.Int, Default: "1", Min: 0, HasMin: true},
		},
		Files: []string{SitesFile, CustomersFile, LanesFile},
		Run: func(v instances.Values, out instances.Sink) (string, error) {
			in, err := Generate(v.Int("sites"), v.Int("customers"), v.Float("ratio"), uint64(v.Int("seed")))
			if err != nil {
				return "", err
			}
			if err := WriteScenarioTo(out.Create, in); err != nil {
				return "", err
			}
			return fmt.Sprintf("%d sites, %d customers (%s, %s, %s)", len(in.Sites), len(in.Customers),
				SitesFile, CustomersFile, LanesFile), nil
		},
	}}
}
