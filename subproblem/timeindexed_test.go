package subproblem

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
)

// TestTimeIndexedBruteForce checks the time-indexed job block against an
// enumeration of every (class, start) pair that honours eligibility, the
// release date, the horizon and random fixings (class, start and
// before-t indicators), at random prices (sign-valid and, to exercise the
// unpruned scan, also negative), with and without shared prefix sums.
func TestTimeIndexedBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(10, 3))
	ctx := context.Background()
	infeasible, solved := 0, 0
	for c := range 4000 {
		K := 1 + rng.IntN(3)
		lay := &SlotLayout{Offsets: make([]int, K), Horizons: make([]int, K)}
		rows := 0
		for k := range K {
			lay.Offsets[k] = rows
			lay.Horizons[k] = rng.IntN(9)
			rows += lay.Horizons[k]
		}
		b := &TimeIndexed{Layout: lay, Processing: 1 + rng.IntN(4), Release: rng.IntN(4),
			Flow: float64(rng.IntN(3)), Tardy: float64(rng.IntN(5)), Due: rng.IntN(8)}
		for k := range K {
			if rng.IntN(3) > 0 {
				b.Classes = append(b.Classes, k)
			}
		}
		if len(b.Classes) == 0 {
			b.Classes = []int{rng.IntN(K)}
		}
		prices := make([]float64, rows)
		neg := c%4 == 0
		for r := range prices {
			prices[r] = float64(rng.IntN(7)) * 0.5
			if neg {
				prices[r] -= 1.5
			}
		}
		var fix []decomp.Fixing
		used := map[int]bool{}
		for range rng.IntN(4) {
			var f decomp.Fixing
			switch rng.IntN(3) {
			case 0:
				f = decomp.Fixing{Block: 2, Var: rng.IntN(K), Value: float64(rng.IntN(2))}
			case 1:
				f = decomp.Fixing{Block: 2, Var: K, Value: float64(rng.IntN(8))}
			default:
				f = decomp.Fixing{Block: 2, Var: K + 1 + rng.IntN(9), Value: float64(rng.IntN(2))}
			}
			if rng.IntN(30) == 0 {
				f.Value = 0.5
			}
			if used[f.Var] {
				continue
			}
			used[f.Var] = true
			fix = append(fix, f)
		}
		if err := decomp.SortFixings(fix); err != nil {
			t.Fatal(err)
		}
		// Brute force.
		eligible := map[int]bool{}
		for _, k := range b.Classes {
			eligible[k] = true
		}
		want, ok := math.Inf(1), false
		for k := range K {
			for s := 0; s+b.Processing <= lay.Horizons[k]; s++ {
				if !eligible[k] || s < b.Release {
					continue
				}
				good := true
				for _, f := range fix {
					var x float64
					switch {
					case f.Var < K:
						if f.Var == k {
							x = 1
						}
					case f.Var == K:
						x = float64(s)
					default:
						if s < f.Var-K-1 {
							x = 1
						}
					}
					good = good && x == f.Value
				}
				if !good {
					continue
				}
				v := b.Cost(s + b.Processing)
				for u := s; u < s+b.Processing; u++ {
					v += prices[lay.Offsets[k]+u]
				}
				want, ok = math.Min(want, v), true
			}
		}
		for _, shared := range []bool{false, true} {
			req := &decomp.Request{Sense: decomp.Minimise, Prices: prices, Block: 2, Fixings: fix}
			if shared {
				p := &decomp.Problem{Share: func(r *decomp.Request) (any, error) { return NewSlotPrefix(r.Prices, lay) }}
				if err := p.Prepare(req); err != nil {
					t.Fatal(err)
				}
			}
			var ans decomp.Answer
			err := b.Solve(ctx, req, &ans)
			if !ok {
				if !errors.Is(err, decomp.ErrInfeasible) {
					t.Fatalf("case %d: no feasible point, got %v (answer %+v)", c, err, ans)
				}
				infeasible++
				continue
			}
			if err != nil {
				t.Fatalf("case %d: %v", c, err)
			}
			solved++
			if math.Abs(ans.Value-want) > 1e-9 {
				t.Fatalf("case %d (shared %v): value %v, brute force %v", c, shared, ans.Value, want)
			}
			k, s, has := TimeIndexedStart(ans.Primal, K)
			if !has || len(ans.Use) != b.Processing {
				t.Fatalf("case %d: primal %v use %v", c, ans.Primal, ans.Use)
			}
			v := b.Cost(s + b.Processing)
			for i, e := range ans.Use {
				if e.Index != lay.Offsets[k]+s+i || e.Value != 1 {
					t.Fatalf("case %d: use %v for class %d start %d", c, ans.Use, k, s)
				}
				v += prices[e.Index]
			}
			if v != ans.Value || ans.Cost != b.Cost(s+b.Processing) {
				t.Fatalf("case %d: value %v cost %v, recomputed %v", c, ans.Value, ans.Cost, v)
			}
		}
	}
	if infeasible < 100 || solved < 1000 {
		t.Fatalf("only %d infeasible and %d solved cases: the generator misses a case", infeasible, solved)
	}
}

// BenchmarkTimeIndexed solves one job block over three classes of 20,000
// slots at random non-negative prices, with shared prefix sums.
func BenchmarkTimeIndexed(b *testing.B) {
	rng := rand.New(rand.NewPCG(1, 2))
	lay := &SlotLayout{Offsets: []int{0, 20000, 40000}, Horizons: []int{20000, 20000, 20000}}
	prices := make([]float64, lay.Rows())
	for r := range prices {
		prices[r] = rng.Float64()
	}
	req := &decomp.Request{Sense: decomp.Minimise, Prices: prices}
	p := &decomp.Problem{Share: func(r *decomp.Request) (any, error) { return NewSlotPrefix(r.Prices, lay) }}
	if err := p.Prepare(req); err != nil {
		b.Fatal(err)
	}
	blk := &TimeIndexed{Layout: lay, Processing: 50, Tardy: 0.01, Due: 15000, Classes: []int{0, 1, 2}}
	var ans decomp.Answer
	b.ResetTimer()
	for range b.N {
		if err := blk.Solve(context.Background(), req, &ans); err != nil {
			b.Fatal(err)
		}
	}
}
