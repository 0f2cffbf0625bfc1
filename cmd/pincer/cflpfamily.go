package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"github.com/spf13/cobra"

	"pincer/decomp"
	"pincer/instances/cflp"
)

func cflpORLibFamily() family {
	return family{
		format: "cflp-orlib",
		about:  "capacitated facility location, OR-Library warehouse layout (capa/capb/capc: --index 1..4 picks the capacity)",
		load: func(file string, o modelOptions) (model, error) {
			index := o.index
			if index == 0 {
				index = 1
			}
			f, err := os.Open(file)
			if err != nil {
				return nil, badInput(err)
			}
			defer f.Close()
			in, err := cflp.ReadORLib(f, file, index)
			if err != nil {
				return nil, badInput(err)
			}
			return newCflpModel(in, o)
		},
	}
}

func cflpCSVFamily() family {
	return family{
		format: "cflp-csv",
		about:  "capacitated facility location, scenario folder (sites.csv, customers.csv, lanes.csv)",
		load: func(dir string, o modelOptions) (model, error) {
			in, err := cflp.ReadScenario(dir)
			if err != nil {
				return nil, badInput(err)
			}
			return newCflpModel(in, o)
		},
	}
}

func newCflpModel(in *cflp.Instance, o modelOptions) (model, error) {
	sense, err := parseSense(o.sense, decomp.Minimise)
	if err != nil {
		return nil, err
	}
	if sense == decomp.Maximise {
		return nil, badInput(errors.New("facility location minimises cost; --sense max does not apply"))
	}
	relax, err := cflp.ParseRelaxation(o.relax)
	if err != nil {
		return nil, badInput(err)
	}
	if err := in.Validate(); err != nil {
		return nil, badInput(err)
	}
	used, note := cflp.ResolveRelaxation(in, relax)
	return &cflpModel{in: in, opt: cflp.Options{SingleSource: o.singleSource, Relaxation: used}, note: note}, nil
}

type cflpModel struct {
	in   *cflp.Instance
	opt  cflp.Options
	note string // why the relaxation differs from the one asked for
}

func (m *cflpModel) name() string { return m.in.Name }
func (m *cflpModel) size() string {
	v := "split demand"
	if m.opt.SingleSource {
		v = "single source"
	}
	return fmt.Sprintf("%d sites x %d customers, %s, %s relaxation", len(m.in.Sites), len(m.in.Customers), v, m.opt.Relaxation)
}
func (m *cflpModel) sense() decomp.Sense               { return decomp.Minimise }
func (m *cflpModel) problem() (*decomp.Problem, error) { return cflp.NewProblem(m.in, m.opt) }

func solutionOf(p *decomp.Plan) *cflp.Solution {
	if p == nil {
		return nil
	}
	return p.Detail.(*cflp.Solution)
}

// writePlan writes the plan CSV; when w is a file it also writes the site
// table beside it (plan.csv -> plan-sites.csv).
func (m *cflpModel) writePlan(w io.Writer, p *decomp.Plan) error {
	sol := solutionOf(p)
	if sol == nil {
		return errors.New("no plan")
	}
	if err := cflp.WritePlanCSV(w, m.in, sol.Flow); err != nil {
		return err
	}
	if f, ok := w.(*os.File); ok {
		return m.writeSites(sitesPath(f.Name()), sol)
	}
	return nil
}

// sitesPath names the site table that goes with a plan file.
func sitesPath(plan string) string {
	ext := filepath.Ext(plan)
	return strings.TrimSuffix(plan, ext) + "-sites" + ext
}

func (m *cflpModel) writeSites(path string, sol *cflp.Solution) error {
	f, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("writing site table: %w", err)
	}
	if err := cflp.WriteSitesCSV(f, m.in, sol.Open, sol.Load, sol.CapacityPrice); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

func (m *cflpModel) planJSON(p *decomp.Plan) any {
	sol := solutionOf(p)
	if sol == nil {
		return nil
	}
	type lane struct {
		Site     string  `json:"site"`
		Customer string  `json:"customer"`
		Quantity float64 `json:"quantity"`
		Cost     float64 `json:"cost"`
	}
	out := []lane{}
	for i, row := range sol.Flow {
		for j, q := range row {
			if q > 0 {
				out = append(out, lane{Site: m.in.Sites[i].ID, Customer: m.in.Customers[j].ID, Quantity: q,
					Cost: m.in.Cost[i][j] * q / m.in.Customers[j].Demand})
			}
		}
	}
	return out
}

type cflpSite struct {
	ID            string  `json:"id"`
	Name          string  `json:"name"`
	Open          bool    `json:"open"`
	Capacity      float64 `json:"capacity"`
	Load          float64 `json:"load"`
	Utilisation   num     `json:"utilisation"`
	FixedCost     float64 `json:"fixed_cost"`
	CapacityPrice float64 `json:"capacity_price"`
}

func (m *cflpModel) siteList(res *decomp.Result) []cflpSite {
	sol := solutionOf(res.Plan)
	out := make([]cflpSite, len(m.in.Sites))
	for i, s := range m.in.Sites {
		out[i] = cflpSite{ID: s.ID, Name: s.Name, Capacity: s.Capacity, FixedCost: s.FixedCost, Utilisation: num(math.NaN())}
		if sol != nil {
			out[i].Open, out[i].Load, out[i].CapacityPrice = sol.Open[i], sol.Load[i], sol.CapacityPrice[i]
			if s.Capacity > 0 {
				out[i].Utilisation = num(sol.Load[i] / s.Capacity)
			}
		}
	}
	return out
}

func (m *cflpModel) extra(res *decomp.Result) map[string]any {
	out := map[string]any{
		"sites":         m.siteList(res),
		"relaxation":    m.opt.Relaxation.String(),
		"single_source": m.opt.SingleSource,
		"site_count":    len(m.in.Sites),
		"customers":     len(m.in.Customers),
	}
	if sol := solutionOf(res.Plan); sol != nil {
		// The exact search over site sets may prove the plan optimal when
		// the Lagrangian bound alone does not.
		out["site_search_proved_optimal"] = sol.Optimal
	}
	if m.note != "" {
		out["relaxation_note"] = m.note
	}
	return out
}

// resources lists the open sites; the price is what one more unit of
// capacity would save, per unit of demand.
func (m *cflpModel) resources(res *decomp.Result) []resourceLine {
	var out []resourceLine
	for _, s := range m.siteList(res) {
		if !s.Open {
			continue
		}
		name := s.ID
		if s.Name != "" {
			name = s.Name
		}
		out = append(out, resourceLine{name: name, capacity: s.Capacity, load: s.Load, price: s.CapacityPrice,
			binding: s.Load >= s.Capacity*(1-1e-9)})
	}
	sortResources(out)
	return out
}

func (m *cflpModel) verify(planFile string) (verdict, error) {
	f, err := os.Open(planFile)
	if err != nil {
		return verdict{}, badInput(err)
	}
	defer f.Close()
	flow, err := cflp.ReadPlanCSV(f, planFile, m.in)
	if err != nil {
		return verdict{}, badInput(err)
	}
	v := cflp.Verify(m.in, flow, m.opt.SingleSource)
	return verdict{value: v.Value, feasible: v.Feasible, problems: v.Problems}, nil
}

func (m *cflpModel) exportMPS(w io.Writer) error { return cflp.WriteMPS(w, m.in, m.opt.SingleSource) }

// newGenCflpCmd is `pincer gen cflp`: a random scenario folder.
func newGenCflpCmd() *cobra.Command {
	var sites, customers int
	var ratio float64
	var seed uint64
	var out string
	cmd := &cobra.Command{
		Use:   "cflp --sites M --customers N --ratio R --seed S -o DIR",
		Short: "Facility location scenario folder (random points; capacity = ratio x demand)",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if out == "" {
				return badInput(errors.New("-o DIR is required"))
			}
			in, err := cflp.Generate(sites, customers, ratio, seed)
			if err != nil {
				return badInput(err)
			}
			if err := cflp.WriteScenario(out, in); err != nil {
				return &exitError{code: exitInternal, err: err}
			}
			fmt.Fprintf(cmd.OutOrStdout(), "wrote %s: %d sites, %d customers (%s, %s, %s)\n", out, sites, customers,
				cflp.SitesFile, cflp.CustomersFile, cflp.LanesFile)
			return nil
		},
	}
	cmd.Flags().IntVar(&sites, "sites", 50, "number of candidate sites")
	cmd.Flags().IntVar(&customers, "customers", 500, "number of customers")
	cmd.Flags().Float64Var(&ratio, "ratio", 3, "total capacity divided by total demand (at least 1)")
	cmd.Flags().Uint64Var(&seed, "seed", 1, "random seed")
	cmd.Flags().StringVarP(&out, "output", "o", "", "scenario folder to write")
	return cmd
}
