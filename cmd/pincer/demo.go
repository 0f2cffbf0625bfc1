package main

import (
	"fmt"
	"io"
	"math"
	"math/rand/v2"

	"github.com/spf13/cobra"

	"pincer/decomp"
	"pincer/instances/gap"
)

// The demo scenario is invented: Brackenridge Joinery, a furniture maker
// with twenty workshops, has six hundred customer orders for the coming
// week. Each order can be built at any workshop, but workshops differ in
// skill (hours an order takes there), hourly rate and distance to the
// customer, and each has a limited number of hours this week.
type demoPlant struct {
	name string
	rate float64 // dollars per hour
	x, y float64 // location, km on a 400 x 400 km map
}

func demoPlants() []demoPlant {
	return []demoPlant{
		{"Ashcombe", 41, 20, 40}, {"Bellwater", 38, 90, 310}, {"Cinder Vale", 44, 150, 120},
		{"Dunmore Quay", 36, 380, 60}, {"Elder Ford", 39, 210, 270}, {"Fallowmere", 42, 60, 180},
		{"Greyhaven", 35, 330, 350}, {"Hollins Cross", 40, 260, 30}, {"Ivybridge Mill", 43, 120, 380},
		{"Juniper Row", 37, 300, 190}, {"Kestrel Point", 45, 30, 330}, {"Larkspur", 38, 180, 200},
		{"Mossgate", 41, 370, 260}, {"Northwick", 36, 240, 110}, {"Orchard End", 40, 100, 60},
		{"Pennant Hill", 39, 160, 340}, {"Quarry Lane", 44, 280, 330}, {"Rookley", 37, 340, 130},
		{"Saltmarsh", 42, 70, 250}, {"Thornbury Yard", 38, 200, 10},
	}
}

const demoOrders = 600

// demoInstance builds the scenario deterministically.
func demoInstance() *gap.Instance {
	rng := rand.New(rand.NewPCG(2026, 12))
	m := len(demoPlants())
	in := &gap.Instance{Name: "Brackenridge Joinery, week 49", Agents: m, Jobs: demoOrders,
		Cost: make([][]int64, m), Use: make([][]int64, m), Capacity: make([]int64, m)}
	skill := make([]float64, m)
	for i := range skill {
		skill[i] = 0.8 + 0.4*rng.Float64()
		in.Cost[i] = make([]int64, demoOrders)
		in.Use[i] = make([]int64, demoOrders)
	}
	for j := 0; j < demoOrders; j++ {
		work := 4 + rng.Float64()*26 // hours at an average workshop
		cx, cy := rng.Float64()*400, rng.Float64()*400
		volume := 1 + rng.Float64()*3 // truckload fraction
		for i, p := range demoPlants() {
			hours := math.Max(1, math.Round(work*skill[i]*(0.9+0.2*rng.Float64())))
			km := math.Hypot(p.x-cx, p.y-cy)
			in.Use[i][j] = int64(hours)
			in.Cost[i][j] = int64(math.Round(hours*p.rate + km*volume*1.6))
		}
	}
	for i := range in.Capacity {
		var sum int64
		for j := 0; j < demoOrders; j++ {
			sum += in.Use[i][j]
		}
		in.Capacity[i] = int64(math.Round(1.08 * float64(sum) / float64(m)))
	}
	return in
}

func newDemoCmd() *cobra.Command {
	var f runFlags
	var scenario string
	cmd := &cobra.Command{
		Use:   "demo [--scenario orders|sites]",
		Short: "Solve an invented scenario and explain its shadow prices",
		Long: `demo solves one of two invented scenarios and explains its shadow prices:
  orders  Brackenridge Joinery places 600 customer orders on 20 workshops with
          limited hours (generalized assignment; the default)
  sites   a wholesaler chooses which warehouses to run and which shops each
          serves (capacitated facility location)`,
		Args: cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := f.check(); err != nil {
				return err
			}
			switch scenario {
			case "sites":
				return runSitesDemo(cmd.Context(), cmd.OutOrStdout(), cmd.ErrOrStderr(), &f)
			case "orders", "":
			default:
				return badInput(fmt.Errorf("unknown --scenario %q (want orders or sites)", scenario))
			}
			in := demoInstance()
			names := make([]string, len(demoPlants()))
			for i, p := range demoPlants() {
				names[i] = p.name
			}
			m := &gapModel{in: in, opt: gap.Options{}, agentNames: names}
			out := cmd.OutOrStdout()
			fmt.Fprintf(out, "Brackenridge Joinery (an invented company) must place %d customer orders\n", in.Jobs)
			fmt.Fprintf(out, "on %d workshops, each with limited hours this week, at least cost.\n\n", in.Agents)
			f.format = "demo"
			if f.report == "" {
				f.report = "pincer-demo-report.json"
			}
			res, err := solveModel(cmd.Context(), out, cmd.ErrOrStderr(), &f, "(embedded)", m)
			if res != nil {
				explainDemo(out, m, res, f.report)
			}
			return err
		},
	}
	f.register(cmd, false)
	cmd.Flags().StringVar(&scenario, "scenario", "orders", "which scenario: orders or sites")
	cmd.Flags().BoolVar(&f.model.singleSource, "single-source", false, "sites scenario: each shop served by one warehouse")
	cmd.Flags().Lookup("time").DefValue = "5s"
	_ = cmd.Flags().Set("time", "5s")
	return cmd
}

// explainDemo explains the prices in the scenario's words.
func explainDemo(w io.Writer, m *gapModel, res *decomp.Result, reportPath string) {
	rs := m.resources(res)
	fmt.Fprintln(w)
	fmt.Fprintln(w, "What the shadow prices say:")
	shown := 0
	for _, r := range rs {
		if r.price <= 0.005 || shown == 3 {
			continue
		}
		fmt.Fprintf(w, "  One more hour at %s is worth about $%.2f this week (it is %s).\n", r.name, r.price,
			map[bool]string{true: "fully booked", false: "nearly full"}[r.binding])
		shown++
	}
	free := 0
	for _, r := range rs {
		if r.price <= 0.005 {
			free++
		}
	}
	if free > 0 {
		fmt.Fprintf(w, "  %d workshops have a price of zero: extra hours there would not lower the cost.\n", free)
	}
	fmt.Fprintf(w, "Report written to %s.\n", reportPath)
}
