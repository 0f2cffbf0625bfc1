package cflp

import (
	"encoding/csv"
	"math"
	"os"
	"path/filepath"
	"pincer/internal/benchdata"
	"strconv"
	"strings"
	"testing"
)

// benchDir returns the shared benchmark folder for this family, or skips.
func benchDir(t testing.TB) string { return benchdata.Dir(t, "cflp") }

// reference is one row of the benchmark folder's reference.csv.
type reference struct {
	file, name       string
	sites, customers int
	value            float64
}

func readReference(t testing.TB) []reference {
	t.Helper()
	f, err := os.Open(filepath.Join(benchDir(t), "reference.csv"))
	if err != nil {
		t.Skipf("reference.csv absent: %v", err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var out []reference
	for _, r := range recs[1:] {
		m, _ := strconv.Atoi(r[2])
		n, _ := strconv.Atoi(r[3])
		v, _ := strconv.ParseFloat(r[4], 64)
		out = append(out, reference{r[0], r[1], m, n, v})
	}
	return out
}

// tiny is a hand-made instance: two sites, three customers.
func tiny() *Instance {
	return &Instance{
		Name: "tiny",
		Sites: []Site{
			{ID: "N", Name: "North", Capacity: 50, FixedCost: 100},
			{ID: "S", Name: "South", Capacity: 40, FixedCost: 80},
		},
		Customers: []Customer{
			{ID: "a", Demand: 20}, {ID: "b", Demand: 30}, {ID: "c", Demand: 10},
		},
		Cost: [][]float64{
			{40, 90, math.Inf(1)},
			{60, 30, 20},
		},
	}
}

func TestValidate(t *testing.T) {
	if err := tiny().Validate(); err != nil {
		t.Fatalf("tiny instance: %v", err)
	}
	cases := []struct {
		name   string
		modify func(*Instance)
		want   string
	}{
		{"no sites", func(in *Instance) { in.Sites = nil; in.Cost = nil }, "no sites"},
		{"duplicate site", func(in *Instance) { in.Sites[1].ID = "N" }, "share the id"},
		{"empty customer id", func(in *Instance) { in.Customers[0].ID = "" }, "empty id"},
		{"negative capacity", func(in *Instance) { in.Sites[0].Capacity = -1 }, "capacity"},
		{"zero demand", func(in *Instance) { in.Customers[2].Demand = 0 }, "not a positive number"},
		{"NaN cost", func(in *Instance) { in.Cost[0][0] = math.NaN() }, "cost of site"},
		{"short row", func(in *Instance) { in.Cost[1] = in.Cost[1][:2] }, "2 entries"},
		{"bad status", func(in *Instance) { in.Sites[0].Status = 7 }, "unknown status"},
		{"no lane", func(in *Instance) { in.Sites[1].Status = ForcedClosed }, `customer "c" has no allowed lane`},
		// Demand 60 against capacity 50+40; closing S leaves 50.
		{"capacity", func(in *Instance) { in.Cost[0][2] = 1; in.Sites[1].Status = ForcedClosed },
			"total demand 60 exceeds total capacity 50 by 10"},
	}
	for _, c := range cases {
		in := tiny()
		c.modify(in)
		err := in.Validate()
		if err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %v, want an error containing %q", c.name, err, c.want)
		}
	}
}

func TestTotals(t *testing.T) {
	in := tiny()
	// Hand sums: 20+30+10 and 50+40.
	if got := in.TotalDemand(); got != 60 {
		t.Errorf("TotalDemand = %v, want 60", got)
	}
	if got := in.TotalCapacity(); got != 90 {
		t.Errorf("TotalCapacity = %v, want 90", got)
	}
	in.Sites[0].Status = ForcedClosed
	if got := in.TotalCapacity(); got != 40 {
		t.Errorf("TotalCapacity with N closed = %v, want 40", got)
	}
}
