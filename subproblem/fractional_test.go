package subproblem

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
	"pgregory.net/rapid"
)

// simplexFractional solves the continuous knapsack with gonum's simplex, the
// outside oracle. Standard form over z = (x_1..x_n, s, u_1..u_n) >= 0:
//
//	min -p.x  s.t.  w.x + s = C,  x_j + u_j = 1.
func simplexFractional(profit, weight []float64, capacity float64) (float64, error) {
	n := len(profit)
	cols := 2*n + 1
	A := mat.NewDense(n+1, cols, nil)
	b := make([]float64, n+1)
	c := make([]float64, cols)
	for j := range n {
		c[j] = -profit[j]
		A.Set(0, j, weight[j])
		A.Set(j+1, j, 1)
		A.Set(j+1, n+1+j, 1)
		b[j+1] = 1
	}
	A.Set(0, n, 1)
	b[0] = capacity
	f, _, err := lp.Simplex(c, A, b, 1e-10, nil)
	return -f, err
}

func TestFractionalMatchesSimplex(t *testing.T) {
	var k Knapsack
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 12).Draw(t, "n")
		integral := rapid.Bool().Draw(t, "integral")
		profit := make([]float64, n)
		weight := make([]float64, n)
		total := 0.0
		for j := range n {
			if integral {
				profit[j] = float64(rapid.IntRange(-5, 10).Draw(t, "p"))
				weight[j] = float64(rapid.IntRange(0, 10).Draw(t, "w"))
			} else {
				profit[j] = rapid.Float64Range(-50, 100).Draw(t, "p")
				// Hundredths keep weights well above the oracle's
				// tolerance; zero weights stay possible.
				weight[j] = float64(rapid.IntRange(0, 2000).Draw(t, "w")) / 100
			}
			total += weight[j]
		}
		capacity := rapid.Float64Range(0, total*1.2+1).Draw(t, "c")
		if rapid.IntRange(0, 6).Draw(t, "zerocap") == 0 {
			capacity = 0
		}
		x := make([]float64, n)
		got, err := k.SolveFractional(profit, weight, capacity, x)
		if err != nil {
			t.Fatalf("SolveFractional: %v", err)
		}
		used, v, fractional := 0.0, 0.0, 0
		for j := range n {
			if x[j] < 0 || x[j] > 1 {
				t.Fatalf("x[%d] = %v outside [0,1]", j, x[j])
			}
			if x[j] > 0 && x[j] < 1 {
				fractional++
			}
			if profit[j] <= 0 && x[j] != 0 {
				t.Fatalf("item %d with profit %v has x = %v", j, profit[j], x[j])
			}
			used += weight[j] * x[j]
			v += profit[j] * x[j]
		}
		if fractional > 1 {
			t.Fatalf("%d fractional items, want at most 1", fractional)
		}
		if used > capacity*(1+1e-12)+1e-12 {
			t.Fatalf("uses %v of capacity %v", used, capacity)
		}
		if math.Abs(v-got) > 1e-9*math.Max(1, math.Abs(v)) {
			t.Fatalf("returned %v, x gives %v", got, v)
		}
		// Reference: gonum's simplex on the same linear program.
		want, err := simplexFractional(profit, weight, capacity)
		if err != nil {
			t.Fatalf("simplex oracle: %v", err)
		}
		if math.Abs(got-want) > 1e-7*math.Max(1, math.Abs(want)) {
			t.Fatalf("value %v, simplex %v", got, want)
		}
	})
}

func TestFractionalInfiniteCapacity(t *testing.T) {
	x := make([]float64, 3)
	v, err := FractionalKnapsack([]float64{3, -1, 2}, []float64{5, 1, 1e300}, math.Inf(1), x)
	if err != nil {
		t.Fatal(err)
	}
	// By hand: every positive item is taken whole, 3 + 2.
	if v != 5 || x[0] != 1 || x[1] != 0 || x[2] != 1 {
		t.Fatalf("v=%v x=%v, want 5 and [1 0 1]", v, x)
	}
}

func TestFractionalErrors(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	cases := []struct {
		name     string
		profit   []float64
		weight   []float64
		capacity float64
		x        []float64
	}{
		{"weight length", []float64{1, 2}, []float64{1}, 3, make([]float64, 2)},
		{"x length", []float64{1}, []float64{1}, 3, nil},
		{"negative capacity", []float64{1}, []float64{1}, -1, make([]float64, 1)},
		{"NaN capacity", []float64{1}, []float64{1}, nan, make([]float64, 1)},
		{"negative weight", []float64{1}, []float64{-1}, 3, make([]float64, 1)},
		{"Inf weight", []float64{1}, []float64{inf}, 3, make([]float64, 1)},
		{"NaN weight", []float64{1}, []float64{nan}, 3, make([]float64, 1)},
		{"NaN profit", []float64{nan}, []float64{1}, 3, make([]float64, 1)},
		{"Inf profit", []float64{-inf}, []float64{1}, 3, make([]float64, 1)},
	}
	for _, c := range cases {
		_, err := FractionalKnapsack(c.profit, c.weight, c.capacity, c.x)
		if !errors.Is(err, ErrInvalidInput) {
			t.Errorf("%s: got error %v, want ErrInvalidInput", c.name, err)
		}
	}
}

// dualBound is min over lambda >= 0 of lambda*C + sum_j max(0, p_j - lambda*w_j),
// the Lagrangian dual of the continuous knapsack, which equals its optimum
// by LP duality. The minimum of this convex piecewise linear function is at
// lambda = 0 or at a ratio p_j/w_j, so all are tried (an O(n^2) reference
// computed independently of the greedy).
func dualBound(profit, weight []float64, capacity float64) float64 {
	d := func(lambda float64) float64 {
		v := lambda * capacity
		for j, p := range profit {
			v += math.Max(0, p-lambda*weight[j])
		}
		return v
	}
	best := d(0)
	for j, p := range profit {
		if p > 0 && weight[j] > 0 {
			best = math.Min(best, d(p/weight[j]))
		}
	}
	return best
}

func TestFractionalMatchesDualBound(t *testing.T) {
	var k Knapsack
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(0, 150).Draw(t, "n")
		integral := rapid.Bool().Draw(t, "integral")
		profit := make([]float64, n)
		weight := make([]float64, n)
		total := 0.0
		for j := range n {
			if integral {
				// Many equal ratios.
				weight[j] = float64(rapid.IntRange(0, 10).Draw(t, "w"))
				profit[j] = float64(rapid.IntRange(-3, 3).Draw(t, "p")) + 2*weight[j]
			} else {
				weight[j] = rapid.Float64Range(0, 20).Draw(t, "w")
				profit[j] = rapid.Float64Range(-50, 100).Draw(t, "p")
			}
			total += weight[j]
		}
		capacity := rapid.Float64Range(0, total*1.1+1).Draw(t, "c")
		x := make([]float64, n)
		got, err := k.SolveFractional(profit, weight, capacity, x)
		if err != nil {
			t.Fatalf("SolveFractional: %v", err)
		}
		used, fractional := 0.0, 0
		for j := range n {
			if x[j] < 0 || x[j] > 1 {
				t.Fatalf("x[%d] = %v outside [0,1]", j, x[j])
			}
			if x[j] > 0 && x[j] < 1 {
				fractional++
			}
			used += weight[j] * x[j]
		}
		if fractional > 1 {
			t.Fatalf("%d fractional items, want at most 1", fractional)
		}
		if used > capacity*(1+1e-12)+1e-12 {
			t.Fatalf("uses %v of capacity %v", used, capacity)
		}
		// Reference: the Lagrangian dual minimum (LP duality).
		want := dualBound(profit, weight, capacity)
		if math.Abs(got-want) > 1e-9*math.Max(1, math.Abs(want)) {
			t.Fatalf("value %v, dual bound %v", got, want)
		}
	})
}
