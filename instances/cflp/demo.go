package cflp

import (
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"sort"

	"pincer/decomp"
	"pincer/instances"
)

// The sites scenario is invented: Marrowby Provisions, a regional grocery
// wholesaler, can run any of 24 warehouses next year to supply its 300
// corner shops and small supermarkets. Each warehouse has a weekly
// throughput in pallets and a weekly running cost (lease, staff, energy);
// trucking costs $1.90 per pallet-kilometre. Which warehouses should it
// run, and how should the shops be supplied?
type sitesDemoWarehouse struct {
	name     string
	x, y     float64 // km on a 300 x 300 km map
	capacity float64 // pallets a week
	running  float64 // dollars a week
}

func sitesDemoWarehouses() []sitesDemoWarehouse {
	return []sitesDemoWarehouse{
		{"Abbotsmere", 30, 40, 900, 15200}, {"Blackthorn Quay", 280, 20, 1100, 17900},
		{"Coldharbour", 150, 150, 1500, 23800}, {"Drovers Cross", 70, 220, 800, 13100},
		{"Easterbrook", 240, 250, 950, 15800}, {"Fairlight", 120, 60, 1200, 19400},
		{"Gorsey Bank", 200, 100, 850, 13900}, {"Hatherleigh", 20, 150, 700, 11800},
		{"Inchmore", 260, 160, 1000, 16500}, {"Jessop's Yard", 110, 280, 750, 12600},
		{"Kingsmead", 180, 210, 1300, 21000}, {"Longacre", 60, 100, 1000, 16300},
		{"Millbeck", 220, 50, 900, 14700}, {"Nettlecombe", 150, 20, 650, 11200},
		{"Oxley Park", 290, 290, 800, 13300}, {"Pyebridge", 40, 280, 850, 14100},
		{"Quenby", 100, 180, 1100, 18000}, {"Redgate", 190, 290, 700, 11900},
		{"Stanwick", 250, 110, 1200, 19600}, {"Tollerton", 80, 20, 750, 12500},
		{"Upwell", 160, 90, 1400, 22300}, {"Vinehall", 10, 80, 600, 10400},
		{"Wrenfield", 210, 170, 950, 15600}, {"Yarrowby", 130, 230, 1000, 16400},
	}
}

const (
	sitesDemoShops       = 300
	sitesDemoPalletKmUSD = 1.90
	// sitesDemoSqueeze scales the listed throughputs to next year's
	// staffing: total capacity is then about 1.4 times the demand, so some
	// warehouses run full.
	sitesDemoSqueeze = 0.45
)

// sitesDemoInstance builds the scenario deterministically.
func sitesDemoInstance() *Instance {
	rng := rand.New(rand.NewPCG(2027, 3))
	in := &Instance{Name: "Marrowby Provisions, network plan"}
	for i, w := range sitesDemoWarehouses() {
		in.Sites = append(in.Sites, Site{ID: fmt.Sprintf("W%02d", i+1), Name: w.name,
			Capacity: math.Round(w.capacity * sitesDemoSqueeze), FixedCost: w.running})
	}
	type point struct{ x, y float64 }
	shops := make([]point, sitesDemoShops)
	for j := range shops {
		// Shops cluster around a few market towns.
		town := sitesDemoWarehouses()[rng.IntN(len(sitesDemoWarehouses()))]
		shops[j] = point{math.Min(300, math.Max(0, town.x+rng.NormFloat64()*35)), math.Min(300, math.Max(0, town.y+rng.NormFloat64()*35))}
		pallets := float64(8 + rng.IntN(33)) // pallets a week
		in.Customers = append(in.Customers, Customer{ID: fmt.Sprintf("S%03d", j+1),
			Name: fmt.Sprintf("shop %d", j+1), Demand: pallets})
	}
	in.Cost = make([][]float64, len(in.Sites))
	for i, w := range sitesDemoWarehouses() {
		in.Cost[i] = make([]float64, sitesDemoShops)
		for j, s := range shops {
			km := math.Hypot(w.x-s.x, w.y-s.y) + 5 // plus local delivery
			in.Cost[i][j] = math.Round(km*sitesDemoPalletKmUSD*in.Customers[j].Demand*100) / 100
		}
	}
	return in
}

// Scenarios offers the invented "sites" scenario.
func (Family) Scenarios() []instances.Scenario {
	return []instances.Scenario{{
		Name:  "sites",
		About: "a wholesaler chooses which warehouses to run and which shops each serves (capacitated facility location)",
		Options: []instances.Option{{Name: "single-source", Usage: "sites scenario: each shop served by one warehouse",
			Kind: instances.Bool, Default: "false"}},
		// The bound creeps up for thousands of rounds; 1500 rounds and the
		// exact site search of the last repair settle the plan in seconds.
		Rounds: 1500,
		Report: "pincer-sites-report.json",
		Load: func(w io.Writer, v instances.Values) (instances.Model, error) {
			in := sitesDemoInstance()
			m, err := NewModel(in, Options{SingleSource: v.Bool("single-source")})
			if err != nil {
				return nil, err
			}
			fmt.Fprintf(w, "Marrowby Provisions (an invented wholesaler) can run any of %d warehouses\n", len(in.Sites))
			fmt.Fprintf(w, "to supply %d shops (%.0f pallets a week); which should it run, at least weekly cost?\n\n",
				len(in.Customers), in.TotalDemand())
			return m, nil
		},
		Explain: func(w io.Writer, m instances.Model, res *decomp.Result) error {
			cm, ok := m.(*Model)
			if !ok {
				return fmt.Errorf("cflp: demo explains a %T", m)
			}
			sol, err := cm.SolutionOf(res.Plan)
			if err != nil || sol == nil {
				return err
			}
			if sol.Optimal {
				fmt.Fprintln(w, "The search over warehouse sets closed: this plan is the cheapest possible.")
			}
			explainSitesDemo(w, cm, sol)
			return nil
		},
	}}
}

// explainSitesDemo tells what the plan and the capacity prices mean for
// the wholesaler.
func explainSitesDemo(w io.Writer, m *Model, sol *Solution) {
	in := m.In
	var open []int
	for i, o := range sol.Open {
		if o {
			open = append(open, i)
		}
	}
	fmt.Fprintln(w)
	fmt.Fprintf(w, "Run %d of the %d warehouses:", len(open), len(in.Sites))
	for k, i := range open {
		sep := ","
		if k == 0 {
			sep = ""
		}
		fmt.Fprintf(w, "%s %s", sep, in.Sites[i].Name)
	}
	fmt.Fprintln(w, ".")
	sort.SliceStable(open, func(a, b int) bool { return sol.CapacityPrice[open[a]] > sol.CapacityPrice[open[b]] })
	fmt.Fprintln(w, "What the capacity prices say:")
	shown := 0
	for _, i := range open {
		p := sol.CapacityPrice[i]
		if p <= 0.005 || shown == 3 {
			continue
		}
		fmt.Fprintf(w, "  One more pallet a week of capacity at %s is worth about $%.2f a week\n", in.Sites[i].Name, p)
		fmt.Fprintf(w, "  (it ships %.0f of its %.0f pallets; the next shop it would take is served from further away today).\n",
			sol.Load[i], in.Sites[i].Capacity)
		shown++
	}
	slack := 0
	for _, i := range open {
		if sol.CapacityPrice[i] <= 0.005 {
			slack++
		}
	}
	switch {
	case slack == len(open):
		fmt.Fprintln(w, "  No running warehouse is short of capacity: more pallets anywhere would not lower the cost.")
	case slack > 0:
		fmt.Fprintf(w, "  %d running warehouses have spare capacity: more pallets there would not lower the cost.\n", slack)
	}
}
