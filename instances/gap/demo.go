package gap

import (
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"sort"

	"pincer/decomp"
	"pincer/instances"
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
func demoInstance() *Instance {
	rng := rand.New(rand.NewPCG(2026, 12))
	m := len(demoPlants())
	in := &Instance{Name: "Brackenridge Joinery, week 49", Agents: m, Jobs: demoOrders,
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

// Scenarios offers the invented "orders" scenario.
func (Family) Scenarios() []instances.Scenario {
	return []instances.Scenario{{
		Name:   "orders",
		About:  "Brackenridge Joinery places 600 customer orders on 20 workshops with limited hours (generalized assignment)",
		Report: "pincer-demo-report.json",
		Load: func(w io.Writer, _ instances.Values) (instances.Model, error) {
			in := demoInstance()
			names := make([]string, len(demoPlants()))
			for i, p := range demoPlants() {
				names[i] = p.name
			}
			fmt.Fprintf(w, "Brackenridge Joinery (an invented company) must place %d customer orders\n", in.Jobs)
			fmt.Fprintf(w, "on %d workshops, each with limited hours this week, at least cost.\n\n", in.Agents)
			return &Model{In: in, AgentNames: names}, nil
		},
		Explain: func(w io.Writer, m instances.Model, res *decomp.Result) error {
			gm, ok := m.(*Model)
			if !ok {
				return fmt.Errorf("gap: demo explains a %T", m)
			}
			return explainDemo(w, gm, res)
		},
	}}
}

// explainDemo explains the prices in the scenario's words.
func explainDemo(w io.Writer, m *Model, res *decomp.Result) error {
	rs, err := m.Resources(res)
	if err != nil {
		return err
	}
	sort.SliceStable(rs, func(a, b int) bool {
		if rs[a].Binding != rs[b].Binding {
			return rs[a].Binding
		}
		return rs[a].Price > rs[b].Price
	})
	fmt.Fprintln(w)
	fmt.Fprintln(w, "What the shadow prices say:")
	shown := 0
	for _, r := range rs {
		if r.Price <= 0.005 || shown == 3 {
			continue
		}
		fmt.Fprintf(w, "  One more hour at %s is worth about $%.2f this week (it is %s).\n", r.Name, r.Price,
			map[bool]string{true: "fully booked", false: "nearly full"}[r.Binding])
		shown++
	}
	free := 0
	for _, r := range rs {
		if r.Price <= 0.005 {
			free++
		}
	}
	if free > 0 {
		fmt.Fprintf(w, "  %d workshops have a price of zero: extra hours there would not lower the cost.\n", free)
	}
	return nil
}
