package cflp

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"

	"pincer/decomp"
)

// randomTiny draws a small valid instance: 2-4 sites, 3-6 customers,
// integer or one-decimal data (capacities sometimes arbitrary reals), some forbidden lanes and forced statuses.
func randomTiny(rng *rand.Rand) *Instance {
	for {
		m, n := 2+rng.IntN(3), 3+rng.IntN(4)
		decimals := rng.IntN(4) == 0
		num := func(lo, hi int) float64 {
			v := float64(lo + rng.IntN(hi-lo+1))
			if decimals {
				v += float64(rng.IntN(10)) / 10
			}
			return v
		}
		in := &Instance{Name: "rand"}
		total := 0.0
		for j := 0; j < n; j++ {
			d := num(1, 20)
			total += d
			in.Customers = append(in.Customers, Customer{ID: "c" + strconv.Itoa(j), Demand: d})
		}
		for i := 0; i < m; i++ {
			s := Site{ID: "s" + strconv.Itoa(i), Capacity: math.Round(total*(0.3+0.6*rng.Float64())*10) / 10,
				FixedCost: num(0, 60)}
			switch {
			case !decimals:
				s.Capacity = math.Round(s.Capacity)
			case rng.IntN(2) == 0:
				// Not a short decimal: the covering knapsack rounds it.
				s.Capacity = total * (0.3 + 0.6*rng.Float64())
			}
			switch rng.IntN(10) {
			case 0:
				s.Status = ForcedOpen
			case 1:
				s.Status = ForcedClosed
			}
			in.Sites = append(in.Sites, s)
			row := make([]float64, n)
			for j := range row {
				row[j] = num(0, 80)
				if rng.IntN(8) == 0 {
					row[j] = math.Inf(1)
				}
			}
			in.Cost = append(in.Cost, row)
		}
		if in.Validate() == nil {
			return in
		}
	}
}

// splitLP solves the allocation with the given open sites by gonum's
// lp.Simplex (an outside oracle): variables x_ij on open allowed lanes plus
// one slack per open site, Σ_i x_ij = 1, Σ_j d_j x_ij + slack_i = s_i. It
// returns +Inf when no allocation exists.
func splitLP(t testing.TB, in *Instance, open []bool) float64 {
	m, n := len(in.Sites), len(in.Customers)
	type lane struct{ i, j int }
	var lanes []lane
	var sites []int
	capacity := 0.0
	for i := 0; i < m; i++ {
		if !open[i] {
			continue
		}
		sites = append(sites, i)
		capacity += in.Sites[i].Capacity
		for j := 0; j < n; j++ {
			if in.Allowed(i, j) {
				lanes = append(lanes, lane{i, j})
			}
		}
	}
	if capacity < in.TotalDemand() {
		return math.Inf(1)
	}
	for j := 0; j < n; j++ {
		ok := false
		for _, l := range lanes {
			ok = ok || l.j == j
		}
		if !ok {
			return math.Inf(1)
		}
	}
	nv := len(lanes) + len(sites)
	A := mat.NewDense(n+len(sites), nv, nil)
	b := make([]float64, n+len(sites))
	c := make([]float64, nv)
	row := map[int]int{}
	for k, i := range sites {
		row[i] = n + k
		A.Set(n+k, len(lanes)+k, 1)
		b[n+k] = in.Sites[i].Capacity
	}
	for j := 0; j < n; j++ {
		b[j] = 1
	}
	for v, l := range lanes {
		c[v] = in.Cost[l.i][l.j]
		A.Set(l.j, v, 1)
		A.Set(row[l.i], v, in.Customers[l.j].Demand)
	}
	opt, _, err := lp.Simplex(c, A, b, 1e-10, nil)
	if errors.Is(err, lp.ErrInfeasible) {
		return math.Inf(1)
	}
	if err != nil {
		t.Fatalf("lp.Simplex: %v", err)
	}
	return opt
}

// bruteForce returns the optimum by enumeration: every open set that
// respects the statuses, allocated by lp.Simplex (split demand), or every
// assignment of customers to sites (single source).
func bruteForce(t testing.TB, in *Instance, single bool) float64 {
	m, n := len(in.Sites), len(in.Customers)
	best := math.Inf(1)
	if !single {
		for mask := 0; mask < 1<<m; mask++ {
			open := make([]bool, m)
			fixed, ok := 0.0, true
			for i := range open {
				open[i] = mask&(1<<i) != 0
				st := in.Sites[i].Status
				if open[i] && st == ForcedClosed || !open[i] && st == ForcedOpen {
					ok = false
				}
				if open[i] {
					fixed += in.Sites[i].FixedCost
				}
			}
			if ok {
				best = math.Min(best, fixed+splitLP(t, in, open))
			}
		}
		return best
	}
	asg := make([]int, n)
	var rec func(j int)
	load := make([]float64, m)
	rec = func(j int) {
		if j == n {
			v := 0.0
			used := make([]bool, m)
			for k, i := range asg {
				v += in.Cost[i][k]
				used[i] = true
			}
			for i, s := range in.Sites {
				if used[i] || s.Status == ForcedOpen {
					v += s.FixedCost
				}
			}
			best = math.Min(best, v)
			return
		}
		for i, s := range in.Sites {
			if s.Status == ForcedClosed || !in.Allowed(i, j) || load[i]+in.Customers[j].Demand > s.Capacity+1e-9 {
				continue
			}
			asg[j] = i
			load[i] += in.Customers[j].Demand
			rec(j + 1)
			load[i] -= in.Customers[j].Demand
		}
	}
	rec(0)
	return best
}

// TestBoundsAgainstBruteForce checks on random tiny instances, for both
// variants and both relaxations, that the relaxed value at random prices
// and at every round of a run never exceeds the optimum found by brute
// force (enumeration plus gonum's lp.Simplex), that the plans are feasible
// by Verify and never below the optimum, and that split-demand runs reach
// the optimum (the branch and bound of the last repair is exact).
func TestBoundsAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	cases := 1500
	if testing.Short() {
		cases = 60
	}
	ctx := context.Background()
	checked := 0
	for c := 0; c < cases; c++ {
		in := randomTiny(rng)
		for _, single := range []bool{false, true} {
			opt := bruteForce(t, in, single)
			if math.IsInf(opt, 1) {
				continue // single source infeasible
			}
			tol := 1e-7 * math.Max(1, math.Abs(opt))
			for _, relax := range []Relaxation{AggregateRelaxation, SiteRelaxation} {
				p, err := NewProblem(in, Options{SingleSource: single, Relaxation: relax})
				if err != nil {
					t.Fatal(err)
				}
				maxCost := 0.0
				for _, row := range in.Cost {
					for _, v := range row {
						if !math.IsInf(v, 1) {
							maxCost = math.Max(maxCost, v)
						}
					}
				}
				prices := make([]float64, len(in.Customers))
				for k := 0; k < 5; k++ {
					for j := range prices {
						prices[j] = (rng.Float64()*3 - 2) * (maxCost + 60)
					}
					L, _, err := decomp.Relaxed(ctx, p, prices, nil)
					if err != nil {
						t.Fatal(err)
					}
					checked++
					if L > opt+tol {
						t.Fatalf("case %d single=%v relax=%v: L(λ)=%v > optimum %v at λ=%v\n%+v", c, single, relax, L, opt, prices, in)
					}
				}
				var worst float64 = math.Inf(-1)
				obs := decomp.ObserverFunc(func(pr *decomp.Progress) { worst = math.Max(worst, pr.Record.Value) })
				res, err := decomp.Solve(ctx, p, decomp.Settings{Gap: -1, Rounds: 60, StallRounds: 30, Observer: obs, Seed: uint64(c)})
				if err != nil {
					t.Fatal(err)
				}
				checked += res.Rounds
				if worst > opt+tol {
					t.Fatalf("case %d single=%v relax=%v: a round's L %v > optimum %v", c, single, relax, worst, opt)
				}
				if res.Plan == nil {
					t.Fatalf("case %d single=%v relax=%v: no plan (optimum %v)", c, single, relax, opt)
				}
				sol := res.Plan.Detail.(*Solution)
				ver := Verify(in, sol.Flow, single)
				if !ver.Feasible || math.Abs(ver.Value-res.Plan.Value) > tol {
					t.Fatalf("case %d single=%v relax=%v: plan %v, Verify %v %v", c, single, relax, res.Plan.Value, ver.Value, ver.Problems)
				}
				if res.Plan.Value < opt-tol {
					t.Fatalf("case %d single=%v: plan %v below the optimum %v\n%+v\n%v", c, single, res.Plan.Value, opt, in, sol.Flow)
				}
				if !single && res.Plan.Value > opt+tol {
					t.Errorf("case %d relax=%v: split plan %v, optimum %v", c, relax, res.Plan.Value, opt)
				}
			}
		}
	}
	t.Logf("%d relaxed values checked", checked)
}
