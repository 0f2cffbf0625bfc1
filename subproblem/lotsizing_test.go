package subproblem

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"testing"

	"pincer/decomp"
	"pincer/internal/oracle"
)

// bruteLotSizing enumerates integer production plans (integral data have
// an integral optimum: every lot is a sum of demands) and returns the best
// priced cost, or +Inf when no plan honours the fixings. It shares nothing
// with the dynamic program: it simulates inventory directly.
func bruteLotSizing(b *LotSizing, prices []float64, fix []int8) float64 {
	T := len(b.Demand)
	total := 0
	for _, d := range b.Demand {
		total += int(d)
	}
	best := math.Inf(1)
	x := make([]int, T)
	var rec func(t int)
	rec = func(t int) {
		if t == T {
			inv, cost := b.InitialStock, 0.0
			for u := 0; u < T; u++ {
				inv += float64(x[u]) - b.Demand[u]
				if inv < 0 {
					return
				}
				y := 0.0
				if x[u] > 0 || fix[u] == 1 {
					y = 1
				}
				if y == 1 && fix[u] == 0 {
					return
				}
				lam := 0.0
				if b.Rows[u] >= 0 {
					lam = prices[b.Rows[u]]
				}
				cost += y*(b.SetupCost+lam*b.SetupTime) + float64(x[u])*lam*b.UnitTime + b.Holding*inv
			}
			best = math.Min(best, cost)
			return
		}
		for q := 0; q <= total; q++ {
			x[t] = q
			rec(t + 1)
		}
	}
	rec(0)
	return best
}

func randomLotSizing(r *rand.Rand, T int) (*LotSizing, []float64) {
	b := &LotSizing{
		Demand:       make([]float64, T),
		InitialStock: float64(r.IntN(3)),
		SetupCost:    float64(r.IntN(8)),
		SetupTime:    float64(r.IntN(4)),
		UnitTime:     float64(r.IntN(3)),
		Holding:      float64(r.IntN(4)),
		Rows:         make([]int, T),
	}
	prices := make([]float64, T)
	for t := range b.Demand {
		b.Demand[t] = float64(r.IntN(4))
		b.Rows[t] = t
		if r.IntN(5) == 0 {
			b.Rows[t] = -1
		}
		if r.IntN(3) > 0 {
			prices[t] = float64(r.IntN(7)) / 2
		}
	}
	return b, prices
}

// Source of the expected values: exhaustive enumeration of integer plans.
func TestLotSizingBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 1958))
	ctx := context.Background()
	for trial := 0; trial < 600; trial++ {
		T := 1 + r.IntN(4)
		b, prices := randomLotSizing(r, T)
		fix := make([]int8, T)
		var fixings []decomp.Fixing
		for u := range fix {
			fix[u] = -1
			if r.IntN(3) == 0 {
				fix[u] = int8(r.IntN(2))
				fixings = append(fixings, decomp.Fixing{Block: 3, Var: u, Value: float64(fix[u])})
			}
		}
		want := bruteLotSizing(b, prices, fix)
		var ans decomp.Answer
		err := b.Solve(ctx, &decomp.Request{Sense: decomp.Minimise, Prices: prices, Block: 3, Workers: 1, Fixings: fixings}, &ans)
		if math.IsInf(want, 1) {
			if !errors.Is(err, decomp.ErrInfeasible) {
				t.Fatalf("trial %d: brute force finds no plan, block says %v (value %v)", trial, err, ans.Value)
			}
			continue
		}
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		if math.Abs(ans.Value-want) > 1e-9 {
			t.Fatalf("trial %d: block %+v prices %v fix %v: value %v, brute force %v", trial, b, prices, fix, ans.Value, want)
		}
		checkLotAnswer(t, b, prices, fix, &ans)
	}
}

// checkLotAnswer rebuilds cost, value and use from the primal answer.
func checkLotAnswer(t *testing.T, b *LotSizing, prices []float64, fix []int8, ans *decomp.Answer) {
	t.Helper()
	T := len(b.Demand)
	y, x, s := make([]float64, T), make([]float64, T), make([]float64, T)
	for _, e := range ans.Primal {
		switch {
		case e.Index < T:
			y[e.Index] = e.Value
		case e.Index < 2*T:
			x[e.Index-T] = e.Value
		default:
			s[e.Index-2*T] = e.Value
		}
	}
	inv, cost, priced := b.InitialStock, 0.0, 0.0
	use := map[int]float64{}
	for u := 0; u < T; u++ {
		inv += x[u] - b.Demand[u]
		if math.Abs(inv-s[u]) > 1e-9 || inv < -1e-9 {
			t.Fatalf("period %d: inventory %v, answer says %v", u, inv, s[u])
		}
		if x[u] > 0 && y[u] != 1 || fix[u] >= 0 && y[u] != float64(fix[u]) {
			t.Fatalf("period %d: setup %v production %v fixing %d", u, y[u], x[u], fix[u])
		}
		cost += b.SetupCost*y[u] + b.Holding*s[u]
		if r := b.Rows[u]; r >= 0 {
			use[r] += b.SetupTime*y[u] + b.UnitTime*x[u]
			priced += prices[r] * (b.SetupTime*y[u] + b.UnitTime*x[u])
		}
	}
	for _, e := range ans.Use {
		if math.Abs(use[e.Index]-e.Value) > 1e-9 {
			t.Fatalf("row %d: use %v, answer says %v", e.Index, use[e.Index], e.Value)
		}
	}
	if math.Abs(cost-ans.Cost) > 1e-9 || math.Abs(cost+priced-ans.Value) > 1e-9 {
		t.Fatalf("cost %v value %v, answer says %v %v", cost, cost+priced, ans.Cost, ans.Value)
	}
}

func TestLotSizingInfeasibleFirstPeriod(t *testing.T) {
	// Period 0 has demand, no stock, and its setup is forbidden.
	b := &LotSizing{Demand: []float64{5, 1}, SetupCost: 1, Holding: 1, Rows: []int{0, 1}}
	var ans decomp.Answer
	err := b.Solve(context.Background(), &decomp.Request{Sense: decomp.Minimise, Prices: []float64{0, 0}, Workers: 1,
		Fixings: []decomp.Fixing{{Block: 0, Var: 0, Value: 0}}}, &ans)
	if !errors.Is(err, decomp.ErrInfeasible) {
		t.Fatalf("want ErrInfeasible, got %v", err)
	}
	// With enough initial stock the same fixing is feasible.
	b.InitialStock = 5
	if err := b.Solve(context.Background(), &decomp.Request{Sense: decomp.Minimise, Prices: []float64{0, 0}, Workers: 1,
		Fixings: []decomp.Fixing{{Block: 0, Var: 0, Value: 0}}}, &ans); err != nil {
		t.Fatal(err)
	}
	// Hand-computed: one setup in period 1 (cost 1); no stock is held.
	if ans.Value != 1 {
		t.Fatalf("value %v, want 1", ans.Value)
	}
}

// writeLotMPS writes the single-item MIP at fixed prices (x_t <= M_t y_t
// with M_t one more than the demand of periods t..T-1, valid and never
// zero so that every column has an entry) for the CBC oracle.
func writeLotMPS(w io.Writer, b *LotSizing, prices []float64, fix []int8) error {
	T := len(b.Demand)
	lam := func(t int) float64 {
		if b.Rows[t] < 0 {
			return 0
		}
		return prices[b.Rows[t]]
	}
	rem := make([]float64, T+1)
	for t := T - 1; t >= 0; t-- {
		rem[t] = rem[t+1] + b.Demand[t]
	}
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	p("NAME lot\nROWS\n N cost\n")
	for t := 0; t < T; t++ {
		p(" E bal%d\n L vub%d\n", t, t)
	}
	p("COLUMNS\n    M1 'MARKER' 'INTORG'\n")
	for t := 0; t < T; t++ {
		p(" y%d cost %g vub%d %g\n", t, b.SetupCost+lam(t)*b.SetupTime, t, -(rem[t] + 1))
	}
	p("    M2 'MARKER' 'INTEND'\n")
	for t := 0; t < T; t++ {
		p(" x%d cost %g bal%d 1\n x%d vub%d 1\n", t, lam(t)*b.UnitTime, t, t, t)
		p(" s%d cost %g bal%d -1\n", t, b.Holding, t)
		if t+1 < T {
			p(" s%d bal%d 1\n", t, t+1)
		}
	}
	p("RHS\n")
	for t := 0; t < T; t++ {
		rhs := b.Demand[t]
		if t == 0 {
			rhs -= b.InitialStock
		}
		p(" rhs bal%d %g\n", t, rhs)
	}
	p("BOUNDS\n")
	for t := 0; t < T; t++ {
		if fix[t] >= 0 {
			p(" FX bnd y%d %d\n", t, fix[t])
		} else {
			p(" UP bnd y%d 1\n", t)
		}
	}
	p("ENDATA\n")
	return nil
}

// Source of the expected values: CBC on the single-item MIP.
func TestLotSizingCBC(t *testing.T) {
	if testing.Short() {
		t.Skip("CBC oracle skipped in -short mode")
	}
	r := rand.New(rand.NewPCG(5, 89))
	for trial := 0; trial < 6; trial++ {
		T := 6 + r.IntN(6)
		b, prices := randomLotSizing(r, T)
		for u := range b.Demand {
			b.Demand[u] = float64(r.IntN(60))
		}
		b.SetupCost = float64(50 + r.IntN(200))
		fix := make([]int8, T)
		var fixings []decomp.Fixing
		for u := range fix {
			fix[u] = -1
			if u > 0 && r.IntN(4) == 0 {
				fix[u] = int8(r.IntN(2))
				fixings = append(fixings, decomp.Fixing{Var: u, Value: float64(fix[u])})
			}
		}
		fix[0], b.InitialStock = -1, 0
		var ans decomp.Answer
		if err := b.Solve(context.Background(), &decomp.Request{Sense: decomp.Minimise, Prices: prices, Workers: 1, Fixings: fixings}, &ans); err != nil {
			t.Fatal(err)
		}
		out := oracle.CBC(t, func(w io.Writer) error { return writeLotMPS(w, b, prices, fix) }, 20)
		if !out.Optimal || math.Abs(out.Objective-ans.Value) > 1e-6*math.Max(1, math.Abs(ans.Value)) {
			t.Fatalf("trial %d: block %v, CBC %v (optimal %v)", trial, ans.Value, out.Objective, out.Optimal)
		}
	}
}

func ExampleLotSizing() {
	// Four weeks of demand for one product; capacity in week 2 is priced at 3
	// per hour, so one lot in week 0 covers everything: setup 100 plus
	// holding 40+40+20 (hand-checked against the four other lot patterns).
	b := &LotSizing{Demand: []float64{10, 0, 20, 20}, SetupCost: 100, SetupTime: 5, UnitTime: 1, Holding: 1, Rows: []int{0, 1, 2, 3}}
	var ans decomp.Answer
	err := b.Solve(context.Background(), &decomp.Request{Sense: decomp.Minimise, Prices: []float64{0, 0, 3, 0}, Workers: 1}, &ans)
	fmt.Println(ans.Value, err)
	// Output: 200 <nil>
}
