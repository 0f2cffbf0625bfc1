package transport

import (
	"math"
	"math/rand/v2"
	"testing"
)

// planarProblem makes an m x n problem with sites and customers scattered
// in a square, unit costs proportional to distance (0 .. about 3000),
// demands 1..100 and every site given capacity cap, opening only the
// first `open` sites (the others get supply 0).
func planarProblem(seed uint64, m, n, open int, capacity float64) *Problem {
	rng := rand.New(rand.NewPCG(seed, 7))
	type pt struct{ x, y float64 }
	sites := make([]pt, m)
	for i := range sites {
		sites[i] = pt{rng.Float64(), rng.Float64()}
	}
	p := &Problem{Supply: make([]float64, m), Demand: make([]float64, n), Cost: make([][]float64, m)}
	cust := make([]pt, n)
	for j := range cust {
		cust[j] = pt{rng.Float64(), rng.Float64()}
		p.Demand[j] = float64(1 + rng.IntN(100))
	}
	for i := range m {
		if i < open {
			p.Supply[i] = capacity
		}
		p.Cost[i] = make([]float64, n)
		for j := range n {
			d := math.Hypot(sites[i].x-cust[j].x, sites[i].y-cust[j].y)
			p.Cost[i][j] = math.Round(2000*d*100) / 100
		}
	}
	return p
}

func benchSolve(b *testing.B, p *Problem) {
	b.ReportAllocs()
	pivots := 0
	for b.Loop() {
		sol, err := Solve(p)
		if err != nil {
			b.Fatal(err)
		}
		pivots = sol.Pivots
	}
	b.ReportMetric(float64(pivots), "pivots/op")
}

// Sizes of OR-Library sets IV..XIII: 16 sites, 50 customers, capacity 5000
// against a total demand of about 2500 here (all open, loose) and tight.
func BenchmarkSolve16x50(b *testing.B) {
	benchSolve(b, planarProblem(1, 16, 50, 16, 300))
}

// capa-like: 100 sites x 1000 customers, capacity 8000, 20 sites open (the
// closed ones have supply 0 and cost nothing in pricing).
func BenchmarkSolve100x1000Open20(b *testing.B) {
	benchSolve(b, planarProblem(2, 100, 1000, 20, 8000))
}

// capa-like, only the 20 open sites passed in.
func BenchmarkSolve20x1000(b *testing.B) {
	benchSolve(b, planarProblem(2, 20, 1000, 20, 8000))
}

// Tight: 8 open sites of 8000 for about 50500 units of demand.
func BenchmarkSolve100x1000Open8(b *testing.B) {
	benchSolve(b, planarProblem(2, 100, 1000, 8, 8000))
}

func BenchmarkSolve1000x1000(b *testing.B) {
	benchSolve(b, planarProblem(3, 1000, 1000, 1000, 100))
}

func BenchmarkSolve200x2000(b *testing.B) {
	benchSolve(b, planarProblem(4, 200, 2000, 200, 1000))
}

// BenchmarkWarm100x1000 is the local-search pattern: each operation closes
// one open site and opens one closed site of a 100 x 1000 capa-like
// problem with 20 sites open, and re-solves from the previous basis.
func BenchmarkWarm100x1000(b *testing.B) { benchWarm(b, false) }

// BenchmarkWarm100x1000NoDuals is the same with Solver.SkipDuals set.
func BenchmarkWarm100x1000NoDuals(b *testing.B) { benchWarm(b, true) }

func benchWarm(b *testing.B, skipDuals bool) {
	p := planarProblem(2, 100, 1000, 20, 8000)
	s, err := NewSolver(p)
	s.SkipDuals = skipDuals
	if err != nil {
		b.Fatal(err)
	}
	if _, err := s.Solve(); err != nil {
		b.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(5, 5))
	b.ReportAllocs()
	pivots, ops := 0, 0
	for b.Loop() {
		var openI, closedI int
		for {
			openI = rng.IntN(100)
			if s.Supply(openI) > 0 {
				break
			}
		}
		for {
			closedI = rng.IntN(100)
			if s.Supply(closedI) == 0 {
				break
			}
		}
		_ = s.SetSupply(openI, 0)
		_ = s.SetSupply(closedI, 8000)
		sol, err := s.Solve()
		if err != nil {
			b.Fatal(err)
		}
		pivots += sol.Pivots
		ops++
	}
	b.ReportMetric(float64(pivots)/float64(ops), "pivots/op")
}
