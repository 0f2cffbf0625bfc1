package subproblem

import (
	"fmt"
	"math/rand/v2"
	"testing"
)

// benchInstance is one priced agent block of a generalized assignment
// instance: profit = price of the job minus its cost on this agent.
type benchInstance struct {
	profit   []float64
	weight   []int64
	capacity int64
}

// makeBench draws instances with weights 1..100 and capacity
// 0.8*sum(w)/m. Kind "gapD" draws costs with c + w in 110..121 (cost and
// weight inversely related, as in the hard generalized assignment class);
// "uncorr" draws costs 1..120 independently. Prices are 60 +- 5 (about the
// median cost), so roughly half the profits are positive.
func makeBench(kind string, n, m, count int, seed uint64) []benchInstance {
	rng := rand.New(rand.NewPCG(seed, uint64(n*1000+m)))
	out := make([]benchInstance, count)
	for i := range out {
		profit := make([]float64, n)
		weight := make([]int64, n)
		var total int64
		for j := range n {
			w := int64(1 + rng.IntN(100))
			var c float64
			switch kind {
			case "gapD":
				c = float64(110+rng.IntN(12)) - float64(w)
			case "uncorr":
				c = float64(1 + rng.IntN(120))
			case "strong": // profit = w + 10 for every item (integer, many ties)
				c = 50 - float64(w+10)
			}
			price := 60 + 10*rng.Float64() - 5
			if kind == "strong" {
				price = 50
			}
			profit[j] = price - c
			weight[j] = w
			total += w
		}
		out[i] = benchInstance{profit, weight, int64(0.8 * float64(total) / float64(m))}
	}
	return out
}

func BenchmarkKnapsack(b *testing.B) {
	for _, kind := range []string{"gapD", "uncorr"} {
		for _, n := range []int{100, 400, 1600, 2000} {
			for _, m := range []int{5, 20, 80} {
				insts := makeBench(kind, n, m, 32, 1)
				b.Run(fmt.Sprintf("%s/n=%d/m=%d", kind, n, m), func(b *testing.B) {
					var k Knapsack
					take := make([]bool, n)
					i := 0
					for b.Loop() {
						in := &insts[i%len(insts)]
						if _, err := k.Solve(in.profit, in.weight, in.capacity, take); err != nil {
							b.Fatal(err)
						}
						i++
					}
				})
			}
		}
	}
	// Strongly correlated integer profits: the hard case for the search.
	for _, n := range []int{100, 400, 2000} {
		insts := makeBench("strong", n, 5, 8, 1)
		b.Run(fmt.Sprintf("strong/n=%d/m=5", n), func(b *testing.B) {
			var k Knapsack
			take := make([]bool, n)
			i := 0
			for b.Loop() {
				in := &insts[i%len(insts)]
				if _, err := k.Solve(in.profit, in.weight, in.capacity, take); err != nil {
					b.Fatal(err)
				}
				i++
			}
		})
	}
}

func BenchmarkFractional(b *testing.B) {
	for _, n := range []int{100, 2000} {
		insts := makeBench("gapD", n, 5, 8, 2)
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) {
			var k Knapsack
			x := make([]float64, n)
			w := make([][]float64, len(insts))
			for i, in := range insts {
				w[i] = make([]float64, n)
				for j, v := range in.weight {
					w[i][j] = float64(v)
				}
			}
			i := 0
			for b.Loop() {
				in := &insts[i%len(insts)]
				if _, err := k.SolveFractional(in.profit, w[i%len(insts)], float64(in.capacity), x); err != nil {
					b.Fatal(err)
				}
				i++
			}
		})
	}
}
