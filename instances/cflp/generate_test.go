package cflp

import (
	"fmt"
	"math"
	"reflect"
	"testing"
)

func TestGenerateDeterministic(t *testing.T) {
	a, err := Generate(10, 30, 2, 42)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := Generate(10, 30, 2, 42)
	c, _ := Generate(10, 30, 2, 43)
	if !reflect.DeepEqual(a, b) {
		t.Error("same seed gave different instances")
	}
	if reflect.DeepEqual(a.Cost, c.Cost) {
		t.Error("seeds 42 and 43 gave the same costs")
	}
}

// TestGenerateShape checks the generator against its description (the
// Cornuéjols–Sridharan–Thizy style constants, from memory) and against
// geometry: unit costs are 10 × Euclidean distances in the unit square.
func TestGenerateShape(t *testing.T) {
	const m, n, ratio = 30, 2000, 3.5
	in, err := Generate(m, n, ratio, 7)
	if err != nil {
		t.Fatal(err)
	}
	if err := in.Validate(); err != nil {
		t.Fatal(err)
	}
	if in.Sites[0].ID != "S001" || in.Sites[29].ID != "S030" || in.Customers[0].ID != "C0001" || in.Customers[1999].ID != "C2000" {
		t.Errorf("ids %s %s %s %s", in.Sites[0].ID, in.Sites[29].ID, in.Customers[0].ID, in.Customers[1999].ID)
	}
	if in.Sites[0].Name == "" || in.Customers[0].Name == "" {
		t.Error("names missing")
	}
	// Capacities are rounded up to cents: the ratio is at least the one
	// asked for and above it by at most a cent per site.
	if got, slack := in.TotalCapacity()/in.TotalDemand(), 0.01*float64(len(in.Sites))/in.TotalDemand(); got < ratio-1e-12 || got > ratio+slack {
		t.Errorf("capacity / demand = %v, want %v (+ at most %v)", got, ratio, slack)
	}
	// Generated data carry at most two decimals.
	for _, c := range in.Customers {
		if r := math.Round(c.Demand * 100); math.Abs(r/100-c.Demand) > 1e-9 {
			t.Fatalf("demand %v has more than two decimals", c.Demand)
		}
	}
	// Demand ~ U[5,35]: mean 20, standard error of the mean of 2000 draws
	// 8.66/√2000 ≈ 0.19.
	for _, c := range in.Customers {
		if c.Demand < 5 || c.Demand > 35 {
			t.Fatalf("demand %v outside [5,35]", c.Demand)
		}
	}
	if mean := in.TotalDemand() / n; math.Abs(mean-20) > 1 {
		t.Errorf("mean demand %v, want about 20", mean)
	}
	// Raw capacities in [10,160] were scaled by one factor, so the ratio
	// of any two capacities is at most 16.
	lo, hi := math.Inf(1), 0.0
	for _, s := range in.Sites {
		lo, hi = min(lo, s.Capacity), max(hi, s.Capacity)
		// Fixed cost U[0,90] + U[100,110]·√s.
		r := math.Sqrt(s.Capacity)
		if s.FixedCost < 100*r || s.FixedCost > 90+110*r {
			t.Errorf("site %s: fixed cost %v outside [%v, %v]", s.ID, s.FixedCost, 100*r, 90+110*r)
		}
	}
	if hi/lo > 16 {
		t.Errorf("capacities range from %v to %v, more than the factor 16 of [10,160]", lo, hi)
	}
	unit := func(i, j int) float64 { return in.Cost[i][j] / in.Customers[j].Demand }
	for i := range m {
		for j := range n {
			if u := unit(i, j); u < 0 || u > 10*math.Sqrt2+1e-9 {
				t.Fatalf("unit cost %v outside [0, 10√2]", u)
			}
		}
	}
	// Distances obey the triangle inequality through any other site and
	// customer: d(i,j) ≤ d(i,j') + d(i',j') + d(i',j).
	for i := range 10 {
		for k := range 10 {
			for j := range 20 {
				for l := range 20 {
					if unit(i, j) > unit(i, l)+unit(k, l)+unit(k, j)+1e-9 {
						t.Fatalf("unit costs break the triangle inequality at %d %d %d %d", i, j, k, l)
					}
				}
			}
		}
	}
}

func TestGenerateErrors(t *testing.T) {
	for _, c := range []struct {
		m, n  int
		ratio float64
	}{{0, 5, 2}, {5, 0, 2}, {5, 5, 0.99}, {5, 5, math.NaN()}, {5, 5, math.Inf(1)}, {100000, 100000, 2}} {
		if _, err := Generate(c.m, c.n, c.ratio, 1); err == nil {
			t.Errorf("Generate(%d, %d, %v) gave no error", c.m, c.n, c.ratio)
		}
	}
	// Ratio exactly 1 must still be feasible after rounding.
	for seed := range uint64(50) {
		in, err := Generate(7, 11, 1, seed)
		if err != nil {
			t.Fatalf("seed %d: %v", seed, err)
		}
		if in.TotalCapacity() < in.TotalDemand() {
			t.Fatalf("seed %d: capacity below demand", seed)
		}
	}
}

func ExampleGenerate() {
	in, err := Generate(4, 25, 1.5, 2024)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(in.Name, len(in.Sites), len(in.Customers))
	fmt.Println(in.Sites[0].ID, in.Customers[0].ID)
	fmt.Printf("capacity/demand = %.3f\n", in.TotalCapacity()/in.TotalDemand())
	// Output:
	// gen-4x25-r1.5-s2024 4 25
	// S001 C0001
	// capacity/demand = 1.500
}
