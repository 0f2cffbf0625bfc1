package cflp

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
)

// siteFix is a fixing of one site's variables in the test's own terms.
type siteFix struct {
	y    float64         // -1 free, else 0 or 1
	x    map[int]float64 // customer -> share
	open bool            // some fixing (or the status) forces the site open
}

// bruteSiteOpen enumerates the points of open site i under the share
// fixings: every 0-1 vector over its lanes (single source), or every vertex
// of the continuous knapsack {0 <= x <= 1, Σ d_j x_j <= room} (at most one
// share fractional, and then the capacity is tight), which is where a
// linear objective attains its optimum. It is the outside reference (brute
// force) for the site knapsacks under fixings; ok is false when no point
// exists.
func bruteSiteOpen(in *Instance, i int, prices []float64, single bool, x map[int]float64) (float64, bool) {
	s := in.Sites[i]
	base, used := s.FixedCost, 0.0
	var free []int
	for j := range in.Customers {
		allowed := in.Allowed(i, j) && (!single || in.Customers[j].Demand <= s.Capacity)
		v, has := x[j]
		switch {
		case !has && allowed:
			free = append(free, j)
		case has && v != 0:
			if !allowed || v < 0 || v > 1 || (single && v != 1) {
				return 0, false
			}
			base += (in.Cost[i][j] + prices[j]) * v
			used += in.Customers[j].Demand * v
		}
	}
	tol := 1e-9 * math.Max(1, s.Capacity)
	if used > s.Capacity+tol {
		return 0, false
	}
	room := math.Max(0, s.Capacity-used)
	best := math.Inf(1)
	for mask := 0; mask < 1<<len(free); mask++ {
		w, v := 0.0, base
		for k, j := range free {
			if mask&(1<<k) != 0 {
				w += in.Customers[j].Demand
				v += in.Cost[i][j] + prices[j]
			}
		}
		if w > room+tol {
			continue
		}
		best = math.Min(best, v)
		if single {
			continue
		}
		for k, j := range free {
			if mask&(1<<k) == 0 && w+in.Customers[j].Demand > room {
				share := (room - w) / in.Customers[j].Demand
				best = math.Min(best, v+(in.Cost[i][j]+prices[j])*share)
			}
		}
	}
	return best, true
}

// randomSiteFixes draws fixings for every site of a tiny instance and
// writes them in both blocks' numberings.
func randomSiteFixes(rng *rand.Rand, in *Instance, single bool) ([]siteFix, []decomp.Fixing, []decomp.Fixing) {
	m, n := len(in.Sites), len(in.Customers)
	fx := make([]siteFix, m)
	var siteF, aggF []decomp.Fixing
	for i := range fx {
		fx[i] = siteFix{y: -1, x: map[int]float64{}}
		if rng.IntN(4) == 0 {
			fx[i].y = float64(rng.IntN(2))
			siteF = append(siteF, decomp.Fixing{Block: i, Var: 0, Value: fx[i].y})
			aggF = append(aggF, decomp.Fixing{Block: 0, Var: i, Value: fx[i].y})
		}
		for range rng.IntN(3) {
			j := rng.IntN(n)
			v := float64(rng.IntN(2))
			if !single && rng.IntN(3) == 0 {
				v = float64(rng.IntN(5)) / 4
			}
			if rng.IntN(30) == 0 {
				v = 1.5 // never allowed
			}
			if _, has := fx[i].x[j]; has {
				continue
			}
			fx[i].x[j] = v
			siteF = append(siteF, decomp.Fixing{Block: i, Var: 1 + j, Value: v})
			aggF = append(aggF, decomp.Fixing{Block: 0, Var: m + i*n + j, Value: v})
		}
	}
	if decomp.SortFixings(siteF) != nil || decomp.SortFixings(aggF) != nil {
		panic("duplicate fixing")
	}
	return fx, siteF, aggF
}

// bruteSite is the site block's optimum under fixings by enumeration:
// closed (value 0) when allowed, or the best open point.
func bruteSite(in *Instance, i int, prices []float64, single bool, f siteFix) (float64, bool) {
	mustOpen := f.y == 1 || in.Sites[i].Status == ForcedOpen
	for _, v := range f.x {
		mustOpen = mustOpen || v != 0
	}
	mustClose := f.y == 0 || in.Sites[i].Status == ForcedClosed
	best, ok := math.Inf(1), false
	if !mustOpen {
		best, ok = 0, true
	}
	if !mustClose {
		if v, okOpen := bruteSiteOpen(in, i, prices, single, f.x); okOpen {
			best, ok = math.Min(best, v), true
		}
	}
	return best, ok
}

// bruteAggregate is the aggregate block's optimum under fixings by
// enumeration of every open set that covers the demand.
func bruteAggregate(in *Instance, prices []float64, single bool, fx []siteFix) (float64, bool) {
	m := len(in.Sites)
	demand := in.TotalDemand()
	best, ok := math.Inf(1), false
	for mask := 0; mask < 1<<m; mask++ {
		v, capacity, good := 0.0, 0.0, true
		for i := 0; i < m && good; i++ {
			open := mask&(1<<i) != 0
			mustOpen := fx[i].y == 1 || in.Sites[i].Status == ForcedOpen
			for _, x := range fx[i].x {
				mustOpen = mustOpen || x != 0
			}
			mustClose := fx[i].y == 0 || in.Sites[i].Status == ForcedClosed
			if (open && mustClose) || (!open && mustOpen) {
				good = false
				break
			}
			if !open {
				continue
			}
			sv, okOpen := bruteSiteOpen(in, i, prices, single, fx[i].x)
			good = okOpen
			v += sv
			capacity += in.Sites[i].Capacity
		}
		if good && capacity >= demand-1e-9*math.Max(1, demand) {
			best, ok = math.Min(best, v), true
		}
	}
	return best, ok
}

// fixedInstance writes site fixings into a copy of the instance: y as
// forced statuses, a share fixed to 0 as a forbidden lane, a share fixed to
// 1 as every other lane of the customer forbidden and the site forced open.
// Fractional or invalid fixed shares are reported by ok = false.
func fixedInstance(in *Instance, fx []siteFix) (*Instance, bool) {
	c := *in
	c.Sites = append([]Site(nil), in.Sites...)
	c.Cost = make([][]float64, len(in.Cost))
	for i := range in.Cost {
		c.Cost[i] = append([]float64(nil), in.Cost[i]...)
	}
	for i, f := range fx {
		switch {
		case f.y == 1 && c.Sites[i].Status == ForcedClosed, f.y == 0 && c.Sites[i].Status == ForcedOpen:
			return nil, false
		case f.y == 1:
			c.Sites[i].Status = ForcedOpen
		case f.y == 0:
			c.Sites[i].Status = ForcedClosed
		}
	}
	for i, f := range fx {
		for j, v := range f.x {
			switch v {
			case 0:
				c.Cost[i][j] = math.Inf(1)
			case 1:
				if c.Sites[i].Status == ForcedClosed || !in.Allowed(i, j) {
					return nil, false
				}
				c.Sites[i].Status = ForcedOpen
				for a := range c.Cost {
					if a != i {
						c.Cost[a][j] = math.Inf(1)
					}
				}
			default:
				return nil, false
			}
		}
	}
	return &c, true
}

// TestBlocksHonourFixings checks the site and aggregate blocks under random
// fixings at random (free) prices against brute force over the block's own
// points, for split demand and single source; and, where the fixings can be
// written into the instance, the relaxed value under them against the
// brute-force optimum (enumeration plus gonum's lp.Simplex) of the fixed
// instance (weak duality). The family only minimises.
func TestBlocksHonourFixings(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 5))
	ctx := context.Background()
	cases := 400
	if testing.Short() {
		cases = 80
	}
	var blocks, infeasible, bounds int
	for c := range cases {
		in := randomTiny(rng)
		for _, single := range []bool{false, true} {
			for _, relax := range []Relaxation{SiteRelaxation, AggregateRelaxation} {
				md, err := newModel(in, Options{SingleSource: single, Relaxation: relax})
				if err != nil {
					t.Fatal(err)
				}
				if single && !md.knap01 {
					continue // the block then prices a continuous relaxation, not the 0-1 points
				}
				if _, note := ResolveRelaxation(in, relax); note != "" {
					continue // rounded covering knapsack: valid but looser than the enumeration
				}
				p, err := NewProblem(in, Options{SingleSource: single, Relaxation: relax})
				if err != nil {
					t.Fatal(err)
				}
				fx, siteF, aggF := randomSiteFixes(rng, in, single)
				prices := make([]float64, len(in.Customers))
				for j := range prices {
					prices[j] = float64(rng.IntN(200) - 150)
				}
				req := &decomp.Request{Sense: decomp.Minimise, Prices: prices, Workers: 1 + rng.IntN(3), Fixings: siteF}
				if relax == AggregateRelaxation {
					req.Fixings = aggF
				}
				L, blockInfeasible := 0.0, false
				for k, b := range p.Blocks {
					req.Block = k
					var ans decomp.Answer
					err := b.Solve(ctx, req, &ans)
					var want float64
					var ok bool
					if relax == SiteRelaxation {
						want, ok = bruteSite(in, k, prices, single, fx[k])
					} else {
						want, ok = bruteAggregate(in, prices, single, fx)
					}
					blocks++
					if !ok {
						infeasible++
						blockInfeasible = true
						if !errors.Is(err, decomp.ErrInfeasible) {
							t.Fatalf("case %d single=%v %v block %d fixings %v: brute force finds no point, Solve gave %v (err %v)", c, single, relax, k, req.Fixed(), ans.Value, err)
						}
						continue
					}
					if err != nil {
						t.Fatalf("case %d single=%v %v block %d fixings %v: %v (brute force %v)", c, single, relax, k, req.Fixed(), err, want)
					}
					if math.Abs(ans.Value-want) > 1e-7*math.Max(1, math.Abs(want)) {
						t.Fatalf("case %d single=%v %v block %d fixings %v: value %v, brute force %v\n%+v", c, single, relax, k, req.Fixed(), ans.Value, want, in)
					}
					L += ans.Value
				}
				fin, expressible := fixedInstance(in, fx)
				if !expressible {
					continue
				}
				opt := bruteForce(t, fin, single)
				if blockInfeasible {
					if !math.IsInf(opt, 1) {
						t.Fatalf("case %d single=%v %v: a block is infeasible under the fixings, brute force finds %v", c, single, relax, opt)
					}
					continue
				}
				for _, pr := range prices {
					L -= pr // rhs 1 on every demand row
				}
				if math.IsInf(opt, 1) {
					continue
				}
				bounds++
				if L > opt+1e-7*math.Max(1, math.Abs(opt)) {
					t.Fatalf("case %d single=%v %v: L = %v above the brute-force optimum %v under fixings %v", c, single, relax, L, opt, fx)
				}
			}
		}
	}
	t.Logf("%d block answers checked (%d infeasible), %d bounds under fixings", blocks, infeasible, bounds)
}

// TestAggregateWorkersIdentical checks that the aggregate block's answer
// is bit-identical for any worker share, with and without fixings.
func TestAggregateWorkersIdentical(t *testing.T) {
	ctx := context.Background()
	in, err := Generate(40, 80, 3, 9)
	if err != nil {
		t.Fatal(err)
	}
	for _, single := range []bool{false, true} {
		p, err := NewProblem(in, Options{SingleSource: single})
		if err != nil {
			t.Fatal(err)
		}
		rng := rand.New(rand.NewPCG(1, 2))
		for round := range 6 {
			req := &decomp.Request{Sense: decomp.Minimise, Prices: make([]float64, len(in.Customers))}
			for j := range req.Prices {
				req.Prices[j] = p.Prices[j] * (0.5 + rng.Float64())
			}
			if round%2 == 1 {
				req.Fixings = []decomp.Fixing{{Var: rng.IntN(40), Value: 1}, {Var: 40 + rng.IntN(40), Value: 0}}
				decomp.SortFixings(req.Fixings)
			}
			var ref decomp.Answer
			for _, w := range []int{1, 2, 4} {
				req.Workers = w
				var ans decomp.Answer
				errW := p.Blocks[0].Solve(ctx, req, &ans)
				if errW != nil {
					t.Fatalf("workers %d: %v", w, errW)
				}
				if w == 1 {
					ref = ans
					continue
				}
				if ans.Value != ref.Value || ans.Cost != ref.Cost || len(ans.Use) != len(ref.Use) || len(ans.Primal) != len(ref.Primal) {
					t.Fatalf("single=%v round %d: workers %d gave %v, workers 1 gave %v", single, round, w, ans.Value, ref.Value)
				}
				for k := range ans.Primal {
					if ans.Primal[k] != ref.Primal[k] {
						t.Fatalf("single=%v round %d: workers %d primal differs at %d", single, round, w, k)
					}
				}
				for k := range ans.Use {
					if ans.Use[k] != ref.Use[k] {
						t.Fatalf("single=%v round %d: workers %d use differs at %d", single, round, w, k)
					}
				}
			}
		}
	}
}
