package cflp

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strconv"
)

// Constants of the generator, in the style of Cornuéjols, Sridharan and
// Thizy (1991). All of them are from memory, not read in the paper.
const (
	genDemandLo, genDemandHi       = 5.0, 35.0    // demand ~ U[5,35] (from memory)
	genCapacityLo, genCapacityHi   = 10.0, 160.0  // raw capacity ~ U[10,160] before scaling (from memory)
	genFixedLo, genFixedHi         = 0.0, 90.0    // fixed cost = U[0,90] + … (from memory)
	genFixedSqrtLo, genFixedSqrtHi = 100.0, 110.0 // … + U[100,110]·sqrt(capacity) (from memory)
	genUnitCostPerDistance         = 10.0         // unit cost = 10 × Euclidean distance (from memory)
	genMaxCells                    = 50_000_000   // largest sites × customers accepted
)

// Invented syllables for place names.
func genPlaceHeads() [20]string {
	return [...]string{"Ash", "Bram", "Cal", "Dun", "Elm", "Fen", "Glen", "Hart", "Ives", "Kel",
		"Lark", "Mor", "Nor", "Oak", "Pen", "Quill", "Ros", "Sel", "Thorn", "Wyn"}
}

func genPlaceTails() [10]string {
	return [...]string{"ford", "by", "wick", "ton", "mere", "stead", "bury", "field", "haven", "moor"}
}

func genSiteKinds() [4]string { return [...]string{"depot", "warehouse", "hub", "yard"} }

func genCustKinds() [6]string {
	return [...]string{"store", "market", "outlet", "works", "clinic", "school"}
}

// Generate returns a random instance with the given numbers of sites and
// customers. Sites and customers are points uniform in the unit square;
// demands are uniform in [5,35]; capacities are uniform in [10,160] and then
// scaled so that the total capacity is ratio times the total demand (ratio
// must be at least 1); the fixed cost of a site with capacity s is
// U[0,90] + U[100,110]·√s; and serving a unit of demand costs 10 times the
// distance, so Cost[i][j] = 10 · dist(i,j) · d_j. Every lane is allowed and
// every site is free. Ids are S001…, C0001… and names are invented. The
// same arguments always give the same instance.
// round2 rounds to two decimals: generated data carry no more digits.
func round2(v float64) float64 { return math.Round(v*100) / 100 }

func Generate(sites, customers int, ratio float64, seed uint64) (*Instance, error) {
	switch {
	case sites < 1 || customers < 1:
		return nil, fmt.Errorf("cflp: generate: need at least one site and one customer, got %d and %d", sites, customers)
	case sites > genMaxCells/customers:
		return nil, fmt.Errorf("cflp: generate: %d sites × %d customers is above the limit of %d lanes", sites, customers, genMaxCells)
	case !(ratio >= 1) || math.IsInf(ratio, 1):
		return nil, errors.New("cflp: generate: the capacity ratio must be a number of at least 1, or the instance is infeasible")
	}
	rng := rand.New(rand.NewPCG(seed, 0x63666c70)) // second word: "cflp"
	uniform := func(lo, hi float64) float64 { return lo + (hi-lo)*rng.Float64() }
	place := func() string {
		return genPlaceHeads()[rng.IntN(len(genPlaceHeads()))] + genPlaceTails()[rng.IntN(len(genPlaceTails()))]
	}

	in := &Instance{
		Name:      "gen-" + strconv.Itoa(sites) + "x" + strconv.Itoa(customers) + "-r" + formatNumber(ratio) + "-s" + strconv.FormatUint(seed, 10),
		Sites:     make([]Site, sites),
		Customers: make([]Customer, customers),
		Cost:      make([][]float64, sites),
	}
	type point struct{ x, y float64 }
	cp := make([]point, customers)
	total := 0.0
	for j := range in.Customers {
		cp[j] = point{rng.Float64(), rng.Float64()}
		d := round2(uniform(genDemandLo, genDemandHi))
		total += d
		in.Customers[j] = Customer{
			ID:     fmt.Sprintf("C%04d", j+1),
			Name:   place() + " " + genCustKinds()[rng.IntN(len(genCustKinds()))],
			Demand: d,
		}
	}
	sp := make([]point, sites)
	raw := 0.0
	for i := range in.Sites {
		sp[i] = point{rng.Float64(), rng.Float64()}
		s := uniform(genCapacityLo, genCapacityHi)
		raw += s
		in.Sites[i] = Site{
			ID:       fmt.Sprintf("S%03d", i+1),
			Name:     place() + " " + genSiteKinds()[rng.IntN(len(genSiteKinds()))],
			Capacity: s,
		}
	}
	scale := ratio * total / raw
	for i := range in.Sites {
		s := &in.Sites[i]
		s.Capacity = math.Ceil(s.Capacity*scale*100) / 100
		s.FixedCost = round2(uniform(genFixedLo, genFixedHi) + uniform(genFixedSqrtLo, genFixedSqrtHi)*math.Sqrt(s.Capacity))
		row := make([]float64, customers)
		for j, c := range in.Customers {
			row[j] = round2(genUnitCostPerDistance*math.Hypot(sp[i].x-cp[j].x, sp[i].y-cp[j].y)) * c.Demand
		}
		in.Cost[i] = row
	}
	// Capacities are rounded up to cents, so the total stays at least
	// ratio × demand and ratio ≥ 1 gives a feasible instance.
	if err := in.Validate(); err != nil {
		return nil, fmt.Errorf("cflp: generate: %w", err)
	}
	return in, nil
}
