package gap

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
)

// randomFixings fixes a few x_ij of a tiny instance (only on pairs whose
// use fits the agent, so that both relaxations can express them): map key
// i*Jobs+j, value 0 or 1.
func randomFixings(rng *rand.Rand, in *Instance) map[int]float64 {
	fix := map[int]float64{}
	for range rng.IntN(5) {
		i, j := rng.IntN(in.Agents), rng.IntN(in.Jobs)
		if in.Use[i][j] > in.Capacity[i] {
			continue
		}
		fix[i*in.Jobs+j] = float64(rng.IntN(2))
	}
	return fix
}

// engineFixings writes x_ij fixings in the numbering of the relaxation's
// blocks (agent block i, variable j; or job block j, variable = option of
// agent i).
func engineFixings(in *Instance, relax Relaxation, fix map[int]float64) []decomp.Fixing {
	var out []decomp.Fixing
	for key, v := range fix {
		i, j := key/in.Jobs, key%in.Jobs
		if relax == KnapsackRelaxation {
			out = append(out, decomp.Fixing{Block: i, Var: j, Value: v})
			continue
		}
		for k, a := range jobAgents(in, j) {
			if a == i {
				out = append(out, decomp.Fixing{Block: j, Var: k, Value: v})
			}
		}
	}
	if err := decomp.SortFixings(out); err != nil {
		panic(err)
	}
	return out
}

// bruteAgent enumerates every subset of jobs of agent i that honours the
// fixings and fits: the outside reference (brute force) for agentBlock.
func bruteAgent(in *Instance, i int, prices []float64, maximise bool, fixed []decomp.Fixing) (float64, bool) {
	best, ok := 0.0, false
	for mask := 0; mask < 1<<in.Jobs; mask++ {
		var w int64
		v := 0.0
		good := true
		for _, f := range fixed {
			if float64((mask>>f.Var)&1) != f.Value {
				good = false
			}
		}
		for j := 0; j < in.Jobs && good; j++ {
			if mask&(1<<j) != 0 {
				w += in.Use[i][j]
				v += float64(in.Cost[i][j]) + prices[j]
			}
		}
		if !good || w > in.Capacity[i] {
			continue
		}
		if !ok || (maximise && v > best) || (!maximise && v < best) {
			best, ok = v, true
		}
	}
	return best, ok
}

// bruteChoice scans every option of job j's block that honours the
// fixings: the outside reference (brute force) for the choice block.
func bruteChoice(in *Instance, j int, prices []float64, maximise bool, fixed []decomp.Fixing) (float64, bool) {
	best, ok := 0.0, false
	for k, i := range jobAgents(in, j) {
		good := true
		for _, f := range fixed {
			if (f.Var == k) != (f.Value == 1) && (f.Var == k || f.Value == 1) {
				good = false
			}
		}
		if !good {
			continue
		}
		v := float64(in.Cost[i][j]) + prices[i]*float64(in.Use[i][j])
		if !ok || (maximise && v > best) || (!maximise && v < best) {
			best, ok = v, true
		}
	}
	return best, ok
}

// bruteFixed enumerates every feasible assignment that honours x_ij
// fixings: the outside reference (brute force) for the bound under fixings.
func bruteFixed(in *Instance, maximise bool, fix map[int]float64) (best int64, ok bool) {
	load := make([]int64, in.Agents)
	var rec func(j int, v int64)
	rec = func(j int, v int64) {
		if j == in.Jobs {
			if !ok || (maximise && v > best) || (!maximise && v < best) {
				best, ok = v, true
			}
			return
		}
		for i := 0; i < in.Agents; i++ {
			if f, has := fix[i*in.Jobs+j]; has && f == 0 {
				continue
			}
			must := false
			for a := 0; a < in.Agents; a++ {
				if f, has := fix[a*in.Jobs+j]; has && f == 1 && a != i {
					must = true
				}
			}
			if must || load[i]+in.Use[i][j] > in.Capacity[i] {
				continue
			}
			load[i] += in.Use[i][j]
			rec(j+1, v+in.Cost[i][j])
			load[i] -= in.Use[i][j]
		}
	}
	rec(0, 0)
	return best, ok
}

// TestBlocksHonourFixings checks every block kind of the family (agent
// knapsacks, job choice blocks) under random fixings, at random sign-valid
// prices of both senses, against brute force over the block's own points;
// and the relaxed value under the same fixings against the brute-force
// optimum of the whole instance under them (weak duality).
func TestBlocksHonourFixings(t *testing.T) {
	rng := rand.New(rand.NewPCG(17, 4))
	ctx := context.Background()
	cases := 400
	if testing.Short() {
		cases = 60
	}
	var blocks, infeasible, bounds int
	for c := range cases {
		in := randomTiny(rng)
		for _, maximise := range []bool{false, true} {
			for _, relax := range []Relaxation{KnapsackRelaxation, ChoiceRelaxation} {
				p, err := NewProblem(in, Options{Maximise: maximise, Relaxation: relax})
				if err != nil {
					continue // a job fits no agent
				}
				fix := randomFixings(rng, in)
				fixings := engineFixings(in, relax, fix)
				prices := randomPrices(rng, p)
				req := &decomp.Request{Sense: p.Sense, Prices: prices, Workers: 1, Fixings: fixings}
				L, anyInfeasible := 0.0, false
				for k, b := range p.Blocks {
					req.Block = k
					var ans decomp.Answer
					err := b.Solve(ctx, req, &ans)
					var want float64
					var ok bool
					if relax == KnapsackRelaxation {
						want, ok = bruteAgent(in, k, prices, maximise, req.Fixed())
					} else {
						want, ok = bruteChoice(in, k, prices, maximise, req.Fixed())
					}
					blocks++
					if !ok {
						infeasible++
						anyInfeasible = true
						if !errors.Is(err, decomp.ErrInfeasible) {
							t.Fatalf("case %d %v %s block %d fixings %v: brute force finds no point, Solve gave %v (err %v)", c, relax, sense(maximise), k, req.Fixed(), ans.Value, err)
						}
						continue
					}
					if err != nil {
						t.Fatalf("case %d %v %s block %d fixings %v: %v (brute force %v)", c, relax, sense(maximise), k, req.Fixed(), err, want)
					}
					if math.Abs(ans.Value-want) > 1e-9*math.Max(1, math.Abs(want)) {
						t.Fatalf("case %d %v %s block %d fixings %v: value %v, brute force %v", c, relax, sense(maximise), k, req.Fixed(), ans.Value, want)
					}
					for _, e := range ans.Primal {
						for _, f := range req.Fixed() {
							if f.Var == e.Index && f.Value == 0 {
								t.Fatalf("case %d: block %d takes variable %d fixed to 0", c, k, e.Index)
							}
						}
					}
					L += ans.Value
				}
				opt, feasible := bruteFixed(in, maximise, fix)
				if anyInfeasible {
					// A block without a point means the instance has none.
					if feasible {
						t.Fatalf("case %d %v: a block is infeasible under %v, but brute force finds %d", c, relax, fix, opt)
					}
					continue
				}
				for r, row := range p.Rows {
					L -= prices[r] * row.RHS
				}
				if !feasible {
					continue
				}
				bounds++
				tol := 1e-7 * math.Max(1, math.Abs(float64(opt)))
				if (!maximise && L > float64(opt)+tol) || (maximise && L < float64(opt)-tol) {
					t.Fatalf("case %d %v %s fixings %v: L = %v beyond the brute-force optimum %d", c, relax, sense(maximise), fix, L, opt)
				}
			}
		}
	}
	t.Logf("%d block answers checked (%d infeasible), %d bounds under fixings", blocks, infeasible, bounds)
}
