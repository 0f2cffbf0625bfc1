package gap

import (
	"math"
	"sort"
)

// Resource describes one agent's capacity at the end of a run.
type Resource struct {
	Agent    int // 0-based
	Capacity int64
	Load     int64 // in the plan; 0 without one
	// Price is the value of one more unit of capacity at the best prices:
	// the row price in the choice relaxation, or the LP dual of the
	// agent's knapsack capacity (the efficiency of its critical job) in the
	// knapsack relaxation. It is >= 0 for both senses: what a unit more is
	// worth (cost saved when minimising, profit gained when maximising).
	Price   float64
	Binding bool // the agent is full (no job left out fits the slack) in the plan
}

// Resources reports every agent's capacity, load and price. assign may be
// nil (no plan).
func Resources(in *Instance, opt Options, prices []float64, assign []int) []Resource {
	res := make([]Resource, in.Agents)
	load := make([]int64, in.Agents)
	for j, i := range assign {
		load[i] += in.Use[i][j]
	}
	for i := range res {
		res[i] = Resource{Agent: i, Capacity: in.Capacity[i], Load: load[i]}
		if opt.Relaxation == ChoiceRelaxation {
			res[i].Price = math.Abs(prices[i])
		} else {
			res[i].Price = criticalRatio(in, i, prices, opt.Maximise)
		}
		if assign != nil {
			slack := in.Capacity[i] - load[i]
			min := int64(math.MaxInt64)
			for j := 0; j < in.Jobs; j++ {
				if assign[j] != i && in.Use[i][j] < min {
					min = in.Use[i][j]
				}
			}
			res[i].Binding = slack == 0 || slack < min
		}
	}
	return res
}

// criticalRatio is the LP dual of agent i's capacity in its knapsack at the
// given job prices: fill by decreasing profit per unit of use; the ratio of
// the first job that does not fit whole prices the capacity (zero when
// every profitable job fits).
func criticalRatio(in *Instance, i int, prices []float64, maximise bool) float64 {
	type item struct {
		p float64
		w int64
	}
	var items []item
	sign := -1.0
	if maximise {
		sign = 1
	}
	for j := 0; j < in.Jobs; j++ {
		p := sign * (float64(in.Cost[i][j]) + prices[j])
		if p > 0 && in.Use[i][j] > 0 {
			items = append(items, item{p, in.Use[i][j]})
		}
	}
	sort.Slice(items, func(a, b int) bool {
		return items[a].p*float64(items[b].w) > items[b].p*float64(items[a].w)
	})
	room := in.Capacity[i]
	for _, it := range items {
		if it.w > room {
			return it.p / float64(it.w)
		}
		room -= it.w
	}
	return 0
}
