package gap

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// Generate makes a random GAP instance of one of the five standard types
// ('a' to 'e', either case) with the given numbers of agents and jobs. The
// same arguments always give the same instance (PCG generator seeded from
// seed). The instances are meant to be minimised, as the published ones of
// these types are.
//
// The recipes follow Chu & Beasley (1997) for types A, B and C, Laguna,
// Kelly, Gonzalez-Velarde & Glover (1995) for type D and Yagiura, Ibaraki &
// Glover for type E. They are written here from memory of those papers, then
// checked against the published instance files (see generate_test.go); U[p,q]
// is a uniform integer draw, U(0,1] and U[0,1) uniform reals:
//
//	A  a_ij = U[5,25], c_ij = U[10,50],
//	   b_i = floor(9 n/m + 0.4 max_k sum_{j in J_k} a_kj), J_k the jobs whose
//	   cheapest agent is k (ties to the lowest k)
//	B  as A, b_i = floor(0.7 (9 n/m + 0.4 max_k sum_{j in J_k} a_kj))
//	C  as A, b_i = max(floor(0.8 sum_j a_ij / m), max_j a_ij)
//	D  a_ij = U[1,100], c_ij = 111 - a_ij + U[-10,10], b_i as C
//	E  a_ij = floor(1 - 10 ln U(0,1]), c_ij = max(0, floor(1000/a_ij - 10 U[0,1))),
//	   b_i as C
//
// The floors, the tie rule for J_k, the max-term of the C-D-E capacity and
// the clamp at 0 for type E costs are not from the papers: they are what
// makes the rules reproduce the published files exactly (capacities) or
// stay within their data ranges (costs).
func Generate(kind byte, agents, jobs int, seed uint64) (*Instance, error) {
	if kind >= 'A' && kind <= 'E' {
		kind += 'a' - 'A'
	}
	if kind < 'a' || kind > 'e' {
		return nil, fmt.Errorf("gap: generate: unknown instance type %q, want one of a, b, c, d, e", kind)
	}
	if agents <= 0 || jobs <= 0 || agents > maxCells/jobs {
		return nil, fmt.Errorf("gap: generate: %d agents x %d jobs: need positive sizes with at most %d pairs", agents, jobs, maxCells)
	}
	rng := rand.New(rand.NewPCG(seed, 0x6761702d67656e)) // second word: "gap-gen"
	in := &Instance{
		Name:   fmt.Sprintf("%c%02d%d-s%d", kind, agents, jobs, seed),
		Agents: agents,
		Jobs:   jobs,
		Cost:   matrix(agents, jobs),
		Use:    matrix(agents, jobs),
	}
	for i := 0; i < agents; i++ {
		for j := 0; j < jobs; j++ {
			var a, c int64
			switch kind {
			case 'a', 'b', 'c':
				a = 5 + rng.Int64N(21)
				c = 10 + rng.Int64N(41)
			case 'd':
				a = 1 + rng.Int64N(100)
				c = 111 - a + rng.Int64N(21) - 10
			case 'e':
				u := 1 - rng.Float64() // (0,1]
				a = int64(math.Floor(1 - 10*math.Log(u)))
				c = max(0, int64(math.Floor(1000/float64(a)-10*rng.Float64())))
			}
			in.Use[i][j], in.Cost[i][j] = a, c
		}
	}
	in.Capacity = typeCapacity(kind, in.Cost, in.Use)
	return in, nil
}

// typeCapacity applies the capacity rule of the given type (lower case) to
// the cost and use matrices.
func typeCapacity(kind byte, cost, use [][]int64) []int64 {
	agents := len(use)
	b := make([]int64, agents)
	if kind == 'a' || kind == 'b' {
		// 100 m (9 n/m + 0.4 S) is an integer, so both floors are exact.
		num, m := looseCapacity(cost, use), int64(agents)
		v := num / (100 * m)
		if kind == 'b' {
			v = 7 * num / (1000 * m)
		}
		for i := range b {
			b[i] = v
		}
		return b
	}
	for i := range b {
		b[i] = sumRuleCapacity(use[i], agents)
	}
	return b
}

// looseCapacity returns 100 m (9 n/m + 0.4 S) = 900 n + 40 m S, where S is
// max_k sum_{j in J_k} a_kj and J_k holds the jobs whose cheapest agent is k.
func looseCapacity(cost, use [][]int64) int64 {
	m, n := len(use), len(use[0])
	sums := make([]int64, m)
	for j := 0; j < n; j++ {
		best := 0
		for i := 1; i < m; i++ {
			if cost[i][j] < cost[best][j] {
				best = i
			}
		}
		sums[best] += use[best][j]
	}
	s := int64(0)
	for _, v := range sums {
		s = max(s, v)
	}
	return 900*int64(n) + 40*int64(m)*s
}

// sumRuleCapacity is the C, D and E capacity of one agent:
// max(floor(0.8 sum_j a_ij / m), max_j a_ij).
func sumRuleCapacity(use []int64, agents int) int64 {
	var sum, top int64
	for _, a := range use {
		sum += a
		top = max(top, a)
	}
	return max(8*sum/(10*int64(agents)), top)
}
