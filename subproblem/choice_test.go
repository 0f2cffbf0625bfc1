package subproblem

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
)

// TestChoiceFixings checks the choice block under random fixings, both
// senses and random prices, against brute force (a scan of every option
// that honours the fixings), including the infeasible cases.
func TestChoiceFixings(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 8))
	ctx := context.Background()
	var infeasible int
	for c := range 3000 {
		rows := 1 + rng.IntN(3)
		ch := &Choice{Options: make([]Option, 1+rng.IntN(5))}
		for k := range ch.Options {
			ch.Options[k].Cost = float64(rng.IntN(21) - 10)
			for r := range rows {
				if rng.IntN(2) == 0 {
					ch.Options[k].Use = append(ch.Options[k].Use, decomp.Entry{Index: r, Value: float64(1 + rng.IntN(4))})
				}
			}
		}
		prices := make([]float64, rows)
		for r := range prices {
			prices[r] = float64(rng.IntN(11) - 5)
		}
		value := make(map[int]float64)
		var fixings []decomp.Fixing
		for range rng.IntN(len(ch.Options) + 1) {
			k := rng.IntN(len(ch.Options))
			if _, has := value[k]; has {
				continue
			}
			v := float64(rng.IntN(2))
			if rng.IntN(20) == 0 {
				v = 0.5
			}
			value[k] = v
			fixings = append(fixings, decomp.Fixing{Block: 3, Var: k, Value: v})
		}
		if err := decomp.SortFixings(fixings); err != nil {
			t.Fatal(err)
		}
		for _, sense := range []decomp.Sense{decomp.Minimise, decomp.Maximise} {
			// Brute force: every option whose own variable is 1 and all
			// others 0 must agree with every fixing.
			want, ok := 0.0, false
			for k, o := range ch.Options {
				good := true
				for _, f := range fixings {
					x := 0.0
					if f.Var == k {
						x = 1
					}
					good = good && f.Value == x
				}
				if !good {
					continue
				}
				v := o.Cost
				for _, e := range o.Use {
					v += prices[e.Index] * e.Value
				}
				if !ok || sense.Better(v, want) {
					want, ok = v, true
				}
			}
			var ans decomp.Answer
			err := ch.Solve(ctx, &decomp.Request{Sense: sense, Prices: prices, Block: 3, Fixings: fixings}, &ans)
			if !ok {
				infeasible++
				if !errors.Is(err, decomp.ErrInfeasible) {
					t.Fatalf("case %d %v fixings %v: brute force finds no option, Solve gave %v (err %v)", c, sense, fixings, ans.Value, err)
				}
				continue
			}
			if err != nil || math.Abs(ans.Value-want) > 1e-12 {
				t.Fatalf("case %d %v fixings %v: value %v (err %v), brute force %v", c, sense, fixings, ans.Value, err, want)
			}
			if f, has := value[ans.Primal[0].Index]; has && f != 1 {
				t.Fatalf("case %d: chose option %d fixed to %v", c, ans.Primal[0].Index, f)
			}
		}
	}
	if infeasible == 0 {
		t.Fatal("no infeasible case drawn")
	}
	// Fixings of other blocks are not this block's.
	ch := &Choice{Options: []Option{{Cost: 1}, {Cost: 2}}}
	var ans decomp.Answer
	err := ch.Solve(ctx, &decomp.Request{Prices: nil, Block: 0, Fixings: []decomp.Fixing{{Block: 1, Var: 0, Value: 0}}}, &ans)
	if err != nil || ans.Value != 1 {
		t.Fatalf("another block's fixing changed the answer: %v %v", ans.Value, err)
	}
	err = ch.Solve(ctx, &decomp.Request{Block: 0, Fixings: []decomp.Fixing{{Block: 0, Var: 2, Value: 1}}}, &ans)
	if err == nil || errors.Is(err, decomp.ErrInfeasible) {
		t.Fatalf("fixing of a missing option: got %v, want a plain error", err)
	}
}
