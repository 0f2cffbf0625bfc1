package cflp

import (
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// Site capacity and fixed cost of the first site by file, from the table of
// section 5 of the benchmark folder's SOURCES.md.
var orlibSets = map[string]struct {
	capacity, fixed float64
}{
	"cap41": {5000, 7500}, "cap42": {5000, 12500}, "cap43": {5000, 17500}, "cap44": {5000, 25000},
	"cap51": {10000, 17500},
	"cap61": {15000, 7500}, "cap62": {15000, 12500}, "cap63": {15000, 17500}, "cap64": {15000, 25000},
	"cap71": {58268, 7500}, "cap72": {58268, 12500}, "cap73": {58268, 17500}, "cap74": {58268, 25000},
	"cap81": {5000, 7500}, "cap82": {5000, 12500}, "cap83": {5000, 17500}, "cap84": {5000, 25000},
	"cap91": {15000, 7500}, "cap92": {15000, 12500}, "cap93": {15000, 17500}, "cap94": {15000, 25000},
	"cap101": {58268, 7500}, "cap102": {58268, 12500}, "cap103": {58268, 17500}, "cap104": {58268, 25000},
	"cap111": {5000, 7500}, "cap112": {5000, 12500}, "cap113": {5000, 17500}, "cap114": {5000, 25000},
	"cap121": {15000, 7500}, "cap122": {15000, 12500}, "cap123": {15000, 17500}, "cap124": {15000, 25000},
	"cap131": {58268, 7500}, "cap132": {58268, 12500}, "cap133": {58268, 17500}, "cap134": {58268, 25000},
}

func readORLibFile(t testing.TB, name string, index int) *Instance {
	t.Helper()
	path := filepath.Join(benchDir(t), "orlib", name)
	f, err := os.Open(path)
	if err != nil {
		t.Skipf("%s absent: %v", name, err)
	}
	defer f.Close()
	in, err := ReadORLib(f, name, index)
	if err != nil {
		t.Fatal(err)
	}
	return in
}

func TestReadORLibSmallFiles(t *testing.T) {
	refs := readReference(t)
	seen := 0
	for _, ref := range refs {
		if !strings.HasPrefix(ref.name, "cap") || strings.HasPrefix(ref.name, "capa") ||
			strings.HasPrefix(ref.name, "capb") || strings.HasPrefix(ref.name, "capc") {
			continue
		}
		seen++
		in := readORLibFile(t, filepath.Base(ref.file), 0)
		set := orlibSets[ref.name]
		// Sizes from reference.csv; demands, capacity and fixed costs from
		// SOURCES.md section 2 and 5.
		if in.Name != ref.name || len(in.Sites) != ref.sites || len(in.Customers) != ref.customers {
			t.Errorf("%s: got %s with %d×%d, want %d×%d", ref.file, in.Name, len(in.Sites), len(in.Customers), ref.sites, ref.customers)
		}
		if got := in.TotalDemand(); got != 58268 {
			t.Errorf("%s: total demand %v, want 58268", ref.name, got)
		}
		maxD := 0.0
		for _, c := range in.Customers {
			maxD = max(maxD, c.Demand)
		}
		if maxD != 12912 {
			t.Errorf("%s: largest demand %v, want 12912", ref.name, maxD)
		}
		zero := 11
		if ref.sites == 50 {
			zero = 23
		}
		for i, s := range in.Sites {
			want := set.fixed
			if i+1 == zero {
				want = 0
			}
			if s.Capacity != set.capacity || s.FixedCost != want {
				t.Errorf("%s site %d: capacity %v fixed %v, want %v and %v", ref.name, i+1, s.Capacity, s.FixedCost, set.capacity, want)
			}
		}
	}
	if seen != 37 {
		t.Errorf("reference.csv lists %d small instances, SOURCES.md says 37", seen)
	}
}

func TestReadORLibCapacityWord(t *testing.T) {
	// Capacities and total demands from SOURCES.md sections 2 and 2.1.
	families := []struct {
		file       string
		capacities [4]float64
		demand     float64
	}{
		{"capa.txt", [4]float64{8000, 10000, 12000, 14000}, 50886},
		{"capb.txt", [4]float64{5000, 6000, 7000, 8000}, 51406},
		{"capc.txt", [4]float64{5000, 5750, 6500, 7250}, 50937},
	}
	for _, fam := range families {
		path := filepath.Join(benchDir(t), "orlib", fam.file)
		data, err := os.ReadFile(path)
		if err != nil {
			t.Logf("%s absent, not checked (SOURCES.md says capb and capc are kept aside)", fam.file)
			continue
		}
		for k := 1; k <= 4; k++ {
			in, err := ReadORLib(strings.NewReader(string(data)), fam.file, k)
			if err != nil {
				t.Fatal(err)
			}
			want := fmt.Sprintf("%s%d", fam.file[:4], k)
			if in.Name != want || len(in.Sites) != 100 || len(in.Customers) != 1000 {
				t.Errorf("%s index %d: %s %d×%d, want %s 100×1000", fam.file, k, in.Name, len(in.Sites), len(in.Customers), want)
			}
			for _, s := range in.Sites {
				if s.Capacity != fam.capacities[k-1] {
					t.Fatalf("%s: capacity %v, want %v", want, s.Capacity, fam.capacities[k-1])
				}
			}
			if got := in.TotalDemand(); got != fam.demand {
				t.Errorf("%s: total demand %v, want %v", want, got, fam.demand)
			}
		}
		_, err = ReadORLib(strings.NewReader(string(data)), fam.file, 0)
		var pe *ParseError
		if !errors.As(err, &pe) || pe.Line != 2 || pe.Column != 2 {
			t.Errorf("%s with index 0: got %v, want a *ParseError at 2:2", fam.file, err)
		}
	}
}

func TestReadORLibForms(t *testing.T) {
	// Trailing-dot and leading-dot decimals, as in the OR-Library files
	// (SOURCES.md section 2); line breaks anywhere. Costs by hand below.
	src := "2 2\n100 7500. 80\n0.\n30 .00000 12.5\n1.5e1 3 4\n"
	in, err := ReadORLib(strings.NewReader(src), "dir/mini.txt", 1)
	if err != nil {
		t.Fatal(err)
	}
	if in.Name != "mini" || in.Sites[0].Capacity != 100 || in.Sites[0].FixedCost != 7500 ||
		in.Sites[1].Capacity != 80 || in.Sites[1].FixedCost != 0 {
		t.Errorf("sites: %+v", in.Sites)
	}
	if in.Customers[1].Demand != 15 || in.Cost[0][0] != 0 || in.Cost[1][0] != 12.5 || in.Cost[0][1] != 3 || in.Cost[1][1] != 4 {
		t.Errorf("customers %+v cost %v", in.Customers, in.Cost)
	}
}

func TestReadORLibErrors(t *testing.T) {
	cases := []struct {
		name, file, src string
		index           int
		line, col       int
		want            string
	}{
		{"bad demand", "cap41.txt", "2 2\n1 1 1 1\n5 1 1\n x 1 1\n", 0, 4, 2,
			`cap41.txt:4:2: expected demand of customer 2 (positive number): got "x"`},
		{"zero demand", "a.txt", "1 1 5 5 0 1", 0, 1, 9, "demand of customer 1 (positive number)"},
		{"negative cost", "a.txt", "1 1 5 5 1 -1", 0, 1, 11, "cost of serving customer 1 from site 1"},
		{"nan", "a.txt", "1 1 nan 5 1 1", 0, 1, 5, "capacity of site 1"},
		{"header", "a.txt", "0 3", 0, 1, 1, "number of sites"},
		{"short", "a.txt", "1 2\n5 5\n1 1\n", 0, 4, 1, "demand of customer 2"},
		{"extra", "a.txt", "1 1 5 5 1 1 9", 0, 1, 13, "end of file after 1 sites and 1 customers"},
		{"word elsewhere", "mine.txt", "1 1 capacity 5 1 1", 1, 1, 5, `files named capa*, capb* or capc*`},
		{"variant 5", "capa.txt", "1 1\n capacity 5 1 1", 5, 2, 2, "index is 5"},
		{"index on numeric", "cap41.txt", "1 1\n 5 5 1 1", 2, 2, 2, "index 0 or 1"},
		{"infeasible", "a.txt", "1 1 5 5 9 1", 0, 0, 0, "total demand 9 exceeds total capacity 5 by 4"},
		{"long token", "a.txt", "1 " + strings.Repeat("1", 100), 0, 1, 3, "longer than"},
	}
	for _, c := range cases {
		_, err := ReadORLib(strings.NewReader(c.src), c.file, c.index)
		var pe *ParseError
		if !errors.As(err, &pe) {
			t.Errorf("%s: got %v, want a *ParseError", c.name, err)
			continue
		}
		if pe.File != c.file || pe.Line != c.line || pe.Column != c.col || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: got %q (%s:%d:%d), want %s:%d:%d and %q", c.name, err, pe.File, pe.Line, pe.Column, c.file, c.line, c.col, c.want)
		}
	}
	_, err := ReadORLib(strings.NewReader("1 2\n5 5\n1 1\n"), "a.txt", 0)
	if !errors.Is(err, io.ErrUnexpectedEOF) {
		t.Errorf("short input: %v does not wrap io.ErrUnexpectedEOF", err)
	}
}

func FuzzReadORLib(f *testing.F) {
	f.Add([]byte("2 2\n100 7500. 80 0.\n30 .00000 12.5\n20 3 4\n"), "cap41.txt", 0)
	f.Add([]byte("1 1\n capacity 5 1 1"), "capb.txt", 3)
	f.Add([]byte("1 1 capacity 5 1 1"), "x.txt", 1)
	f.Add([]byte("3 1 1 1 1 1 1 1 1 1 1 1"), "a", 0)
	f.Fuzz(func(t *testing.T, data []byte, file string, index int) {
		in, err := ReadORLib(strings.NewReader(string(data)), file, index)
		if err != nil {
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("error %v is not a *ParseError", err)
			}
			return
		}
		if err := in.Validate(); err != nil {
			t.Fatalf("accepted an invalid instance: %v", err)
		}
	})
}
