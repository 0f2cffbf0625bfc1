package lotsizing

import (
	"fmt"
	"math/rand/v2"
)

// GenerateConfig sets the size and tightness of a generated instance.
type GenerateConfig struct {
	Items, Periods int
	// Utilisation is the target share of capacity used by production and
	// expected setups; 0 means 0.85.
	Utilisation float64
	// SetupTimeScale multiplies the setup times (10..50); 0 means 1.
	// Scales above 1 with a utilisation near 1 give tight instances.
	SetupTimeScale float64
	Seed           uint64
}

// Generate builds an instance in the style of the Trigeiro, Thomas &
// McClain (1989) recipe. The constants are from memory (and from the
// observed ranges of the shared F/G/X files, see their SOURCES.md), not a
// published definition: demand uniform on 50..150 with one period in ten
// empty, unit times 1, holding costs 0.8..1.2, setup times 10..50, setup
// costs 200..1000, one capacity for all periods set so that mean demand
// plus one setup of every item every second period fills Utilisation of
// it. Capacity is raised where needed so that cumulative demand always
// fits (and in period 1 its setups too, since nothing can be made
// earlier); setup times later are not checked, so a tight recipe may make
// an instance without any plan.
func Generate(c GenerateConfig) (*Instance, error) {
	if c.Items < 1 || c.Periods < 1 {
		return nil, fmt.Errorf("lotsizing generate: need items and periods >= 1, got %d x %d", c.Items, c.Periods)
	}
	u := c.Utilisation
	if u == 0 {
		u = 0.85
	}
	if !(u > 0 && u <= 1) {
		return nil, fmt.Errorf("lotsizing generate: utilisation %v outside (0, 1]", u)
	}
	scale := c.SetupTimeScale
	if scale == 0 {
		scale = 1
	}
	if !(scale > 0 && scale <= 100) {
		return nil, fmt.Errorf("lotsizing generate: setup time scale %v outside (0, 100]", scale)
	}
	r := rand.New(rand.NewPCG(c.Seed, 0x7733))
	in := &Instance{Name: fmt.Sprintf("gen-%dx%d-%d", c.Items, c.Periods, c.Seed), Capacity: make([]float64, c.Periods)}
	load := 0.0
	for i := 0; i < c.Items; i++ {
		it := Item{Name: fmt.Sprintf("item%d", i+1), UnitTime: 1, Holding: float64(80+r.IntN(41)) / 100, SetupTime: scale * float64(10+r.IntN(41)), SetupCost: float64(200 + r.IntN(801))}
		d := make([]float64, c.Periods)
		sum := 0.0
		for t := range d {
			if r.IntN(10) > 0 {
				d[t] = float64(50 + r.IntN(101))
			}
			sum += d[t]
		}
		load += sum/float64(c.Periods) + it.SetupTime/2
		in.Items = append(in.Items, it)
		in.Demand = append(in.Demand, d)
	}
	capacity := float64(int(load/u + 0.5))
	cum, cumCap := 0.0, 0.0
	for t := 0; t < c.Periods; t++ {
		for i := range in.Items {
			cum += in.Demand[i][t]
			if t == 0 && in.Demand[i][t] > 0 {
				cum += in.Items[i].SetupTime // period 1 makes its own demand
			}
		}
		cumCap += capacity
		if cum > cumCap {
			capacity += (cum - cumCap) / float64(t+1)
			cumCap = capacity * float64(t+1)
		}
	}
	for t := range in.Capacity {
		in.Capacity[t] = capacity
	}
	return in, in.Validate()
}
