package decomp_test

import (
	"context"
	"math"
	"reflect"
	"testing"
	"time"

	"pgregory.net/rapid"

	"pincer/decomp"
	"pincer/subproblem"
)

// toy is a tiny random problem of choice blocks with an exhaustive
// optimum, the outside reference for the bound checks below: weak
// duality (common practice; any text on Lagrangian relaxation, e.g.
// Geoffrion 1974) says every sign-valid price vector gives a bound.
type toy struct {
	p        *decomp.Problem
	blocks   []*subproblem.Choice
	opt      float64
	feasible bool
}

func drawToy(t *rapid.T) *toy {
	nb := rapid.IntRange(1, 4).Draw(t, "blocks")
	nr := rapid.IntRange(1, 3).Draw(t, "rows")
	sense := decomp.Sense(rapid.IntRange(0, 1).Draw(t, "sense"))
	rows := make([]decomp.Row, nr)
	for r := range rows {
		rows[r] = decomp.Row{
			Name:  "r",
			Sense: decomp.RowSense(rapid.IntRange(0, 2).Draw(t, "rowsense")),
			RHS:   float64(rapid.IntRange(0, 8).Draw(t, "rhs")),
		}
	}
	tb := &toy{}
	blocks := make([]decomp.Block, nb)
	for b := range blocks {
		no := rapid.IntRange(1, 4).Draw(t, "options")
		c := &subproblem.Choice{}
		for o := 0; o < no; o++ {
			opt := subproblem.Option{Cost: float64(rapid.IntRange(-10, 10).Draw(t, "cost"))}
			for r := 0; r < nr; r++ {
				if u := rapid.IntRange(0, 4).Draw(t, "use"); u > 0 {
					opt.Use = append(opt.Use, decomp.Entry{Index: r, Value: float64(u)})
				}
			}
			c.Options = append(c.Options, opt)
		}
		blocks[b] = c
		tb.blocks = append(tb.blocks, c)
	}
	tb.p = &decomp.Problem{Name: "toy", Sense: sense, Rows: rows, Blocks: blocks, IntegralObjective: true}
	tb.p.Repair = toyRepair{tb}
	tb.bruteForce()
	return tb
}

// bruteForce enumerates every combination of options.
func (tb *toy) bruteForce() {
	pick := make([]int, len(tb.blocks))
	var rec func(k int)
	rec = func(k int) {
		if k == len(tb.blocks) {
			if v, ok := tb.value(pick); ok {
				if !tb.feasible || tb.p.Sense.Better(v, tb.opt) {
					tb.opt, tb.feasible = v, true
				}
			}
			return
		}
		for o := range tb.blocks[k].Options {
			pick[k] = o
			rec(k + 1)
		}
	}
	rec(0)
}

func (tb *toy) use(pick []int) []float64 {
	use := make([]float64, len(tb.p.Rows))
	for k, o := range pick {
		for _, e := range tb.blocks[k].Options[o].Use {
			use[e.Index] += e.Value
		}
	}
	return use
}

func (tb *toy) value(pick []int) (float64, bool) {
	v := 0.0
	for k, o := range pick {
		v += tb.blocks[k].Options[o].Cost
	}
	use := tb.use(pick)
	for r, row := range tb.p.Rows {
		switch row.Sense {
		case decomp.LessEqual:
			if use[r] > row.RHS {
				return v, false
			}
		case decomp.GreaterEqual:
			if use[r] < row.RHS {
				return v, false
			}
		default:
			if use[r] != row.RHS {
				return v, false
			}
		}
	}
	return v, true
}

// toyRepair accepts the relaxed choice when it happens to be feasible.
type toyRepair struct{ tb *toy }

func (tr toyRepair) Repair(_ context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	pick := make([]int, len(in.Answers))
	for k, a := range in.Answers {
		pick[k] = a.Primal[0].Index
	}
	v, ok := tr.tb.value(pick)
	if !ok {
		return nil, nil
	}
	return &decomp.Plan{Value: v, Use: tr.tb.use(pick), Detail: pick}, nil
}

func (tb *toy) boundValid(b float64) bool {
	if !tb.feasible {
		return true
	}
	if tb.p.Sense == decomp.Minimise {
		return b <= tb.opt+1e-9
	}
	return b >= tb.opt-1e-9
}

func TestWeakDualityRandomPrices(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		tb := drawToy(t)
		prices := make([]float64, len(tb.p.Rows))
		for r, row := range tb.p.Rows {
			mag := rapid.Float64Range(0, 20).Draw(t, "price")
			switch decomp.PriceSign(tb.p.Sense, row.Sense) {
			case 1:
				prices[r] = mag
			case -1:
				prices[r] = -mag
			default:
				prices[r] = mag - 10
			}
		}
		l, _, err := decomp.Relaxed(context.Background(), tb.p, prices, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !tb.boundValid(l) {
			t.Fatalf("%s problem: L = %v at prices %v passes the optimum %v", tb.p.Sense, l, prices, tb.opt)
		}
	})
}

func TestWeakDualityAlongRuns(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		tb := drawToy(t)
		var bad []decomp.RoundRecord
		obs := decomp.ObserverFunc(func(p *decomp.Progress) {
			if !tb.boundValid(p.Record.Value) || !tb.boundValid(p.Record.Bound) {
				bad = append(bad, p.Record)
			}
		})
		res, err := decomp.Solve(context.Background(), tb.p, decomp.Settings{Rounds: 60, Observer: obs, RepairEvery: 1})
		if err != nil {
			t.Fatal(err)
		}
		if len(bad) > 0 {
			t.Fatalf("bound passes optimum %v: %+v", tb.opt, bad[0])
		}
		if !tb.boundValid(res.Bound) {
			t.Fatalf("final bound %v passes optimum %v", res.Bound, tb.opt)
		}
		if res.Plan != nil {
			if !tb.feasible {
				t.Fatalf("plan found for an infeasible problem")
			}
			if tb.p.Sense.Better(res.Plan.Value, tb.opt) {
				t.Fatalf("plan value %v better than optimum %v", res.Plan.Value, tb.opt)
			}
			if res.ProvedOptimal && res.Plan.Value != tb.opt {
				t.Fatalf("claimed proof, plan %v optimum %v", res.Plan.Value, tb.opt)
			}
		}
	})
}

func TestRelaxedRejectsWrongSigns(t *testing.T) {
	c := &subproblem.Choice{Options: []subproblem.Option{{Cost: 1, Use: []decomp.Entry{{Index: 0, Value: 1}}}}}
	p := &decomp.Problem{Sense: decomp.Minimise, Rows: []decomp.Row{{Name: "cap", Sense: decomp.LessEqual, RHS: 1}}, Blocks: []decomp.Block{c}}
	if _, _, err := decomp.Relaxed(context.Background(), p, []float64{-1}, nil); err == nil {
		t.Fatal("a negative price on a <= row of a min problem was accepted")
	}
}

// manyBlocks builds a problem of n choice blocks over m rows.
func manyBlocks(n, m int) *decomp.Problem {
	rows := make([]decomp.Row, m)
	for r := range rows {
		rows[r] = decomp.Row{Name: "slot", Sense: decomp.LessEqual, RHS: float64(n / m / 2)}
	}
	blocks := make([]decomp.Block, n)
	for k := range blocks {
		c := &subproblem.Choice{}
		for o := 0; o < 4; o++ {
			r := (k*7 + o*13) % m
			c.Options = append(c.Options, subproblem.Option{Cost: float64((k*31+o*17)%23) + 0.1*float64(o), Use: []decomp.Entry{{Index: r, Value: 1}}})
		}
		blocks[k] = c
	}
	return &decomp.Problem{Name: "many", Sense: decomp.Minimise, Rows: rows, Blocks: blocks}
}

func TestSameResultAnyWorkerCount(t *testing.T) {
	var ref *decomp.Result
	for _, w := range []int{1, 2, 8} {
		p := manyBlocks(3000, 40)
		res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 50, Evaluator: decomp.Pool{Workers: w}})
		if err != nil {
			t.Fatal(err)
		}
		for i := range res.History {
			res.History[i].Elapsed = 0
			if math.IsNaN(res.History[i].PlanValue) {
				res.History[i].PlanValue = -1 // NaN never equals itself
			}
		}
		res.Elapsed = 0
		if ref == nil {
			ref = res
			continue
		}
		if !reflect.DeepEqual(ref.History, res.History) || !reflect.DeepEqual(ref.Prices, res.Prices) {
			t.Fatalf("workers=%d gives a different run than workers=1", w)
		}
	}
}

func TestCancelKeepsBest(t *testing.T) {
	p := manyBlocks(2000, 30)
	ctx, cancel := context.WithCancel(context.Background())
	obs := decomp.ObserverFunc(func(pr *decomp.Progress) {
		if pr.Record.Round == 10 {
			cancel()
		}
	})
	res, err := decomp.Solve(ctx, p, decomp.Settings{Observer: obs, Gap: -1})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != decomp.Interrupted || !res.HasBound || res.Rounds != 10 {
		t.Fatalf("status %v, bound %v, rounds %d", res.Status, res.HasBound, res.Rounds)
	}
	if math.IsNaN(res.Bound) {
		t.Fatal("no bound kept")
	}
}

func TestTimeLimit(t *testing.T) {
	p := manyBlocks(2000, 30)
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Time: 50 * time.Millisecond, Gap: -1, StallRounds: 1 << 30})
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != decomp.TimeLimit && res.Status != decomp.PricesSettled {
		t.Fatalf("status %v", res.Status)
	}
}

// TestRoundingNoiseIsNotASubgradient: uses 0.1 + 0.2 against a right-hand
// side of 0.3 leave a subgradient of about 5.6e-17 (IEEE 754 rounding,
// common knowledge). Stepping along it would divide by its square and throw
// the price to about 1e33, where the relaxed value is meaningless; the
// engine must treat it as zero and stop with the exact value.
func TestRoundingNoiseIsNotASubgradient(t *testing.T) {
	row := []decomp.Row{{Name: "shared", Sense: decomp.Equal, RHS: 0.3}}
	a := &subproblem.Choice{Options: []subproblem.Option{{Cost: 5, Use: []decomp.Entry{{Index: 0, Value: 0.1}}}}}
	b := &subproblem.Choice{Options: []subproblem.Option{{Cost: 7, Use: []decomp.Entry{{Index: 0, Value: 0.2}}}}}
	p := &decomp.Problem{Sense: decomp.Minimise, Rows: row, Blocks: []decomp.Block{a, b}}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 20, Gap: -1})
	if err != nil {
		t.Fatal(err)
	}
	for _, h := range res.History {
		if math.Abs(h.Value-12) > 1e-9 {
			t.Fatalf("round %d: L = %v, want 12", h.Round, h.Value)
		}
	}
	if res.Status != decomp.PricesSettled {
		t.Fatalf("status %v, want prices-settled", res.Status)
	}
}

// TestChunks: the ranges cover 0..n-1 once, in order (checked by counting).
func TestChunks(t *testing.T) {
	for _, n := range []int{0, 1, 7, 100, 12345} {
		for _, w := range []int{0, 1, 2, 8} {
			next := 0
			for _, c := range decomp.Chunks(n, w) {
				if c[0] != next || c[1] <= c[0] {
					t.Fatalf("n=%d w=%d: range %v after %d", n, w, c, next)
				}
				next = c[1]
			}
			if next != n {
				t.Fatalf("n=%d w=%d: covered %d", n, w, next)
			}
		}
	}
}
