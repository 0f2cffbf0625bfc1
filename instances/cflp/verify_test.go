package cflp

import (
	"math"
	"strings"
	"testing"
)

func TestVerifyHandExample(t *testing.T) {
	in := tiny()
	// Split plan: N sends a 20 and b 10; S sends b 20 and c 10. By hand:
	// fixed 100 + 80; lanes 40·20/20 + 90·10/30 + 30·20/30 + 20·10/10
	// = 40 + 30 + 20 + 20; total 290. Loads 30 and 30.
	split := [][]float64{{20, 10, 0}, {0, 20, 10}}
	v := Verify(in, split, false)
	if !v.Feasible || v.Value != 290 || v.Load[0] != 30 || v.Load[1] != 30 || !v.Open[0] || !v.Open[1] {
		t.Errorf("split plan: %+v, want feasible, value 290, loads 30 and 30", v)
	}
	v = Verify(in, split, true)
	if v.Feasible || len(v.Problems) != 1 || !strings.Contains(v.Problems[0], "customer b is served by 2 sites") {
		t.Errorf("split plan as single source: %+v", v)
	}
	// Single source: N serves a, S serves b and c: 180 + 40 + 30 + 20 = 270.
	single := [][]float64{{20, 0, 0}, {0, 30, 10}}
	if v := Verify(in, single, true); !v.Feasible || v.Value != 270 {
		t.Errorf("single plan: %+v, want feasible with value 270", v)
	}
	// Only S used: 80 + 60 + 30 + 20 = 190, but S would carry 60 > 40.
	v = Verify(in, [][]float64{{0, 0, 0}, {20, 30, 10}}, true)
	if v.Feasible || v.Value != 190 || v.Open[0] || !strings.Contains(strings.Join(v.Problems, ";"), "site S ships 60, above its capacity 40 by 20") {
		t.Errorf("overloaded plan: %+v", v)
	}
	// With N forced open, the S-only plan also pays N's fixed cost:
	// 190 + 100 = 290.
	in.Sites[0].Status = ForcedOpen
	if v := Verify(in, [][]float64{{0, 0, 0}, {20, 30, 10}}, false); v.Value != 290 || !v.Open[0] {
		t.Errorf("forced-open N idle: value %v open %v, want 290 (190 + N's 100) and N open", v.Value, v.Open)
	}
}

func TestVerifyProblems(t *testing.T) {
	good := func() [][]float64 { return [][]float64{{20, 10, 0}, {0, 20, 10}} }
	cases := []struct {
		name   string
		modify func(*Instance, [][]float64) [][]float64
		want   string
	}{
		{"forbidden lane", func(in *Instance, f [][]float64) [][]float64 { f[0][2], f[1][2] = 5, 5; return f }, "lane is not allowed"},
		{"forced closed", func(in *Instance, f [][]float64) [][]float64 { in.Sites[0].Status = ForcedClosed; return f }, "site N is forced closed but ships 30"},
		{"short demand", func(in *Instance, f [][]float64) [][]float64 { f[1][1] = 19; return f }, "customer b receives 29 of its demand 30"},
		{"negative", func(in *Instance, f [][]float64) [][]float64 { f[0][1] = -1; return f }, "quantity -1 is not a non-negative number"},
		{"NaN", func(in *Instance, f [][]float64) [][]float64 { f[0][1] = math.NaN(); return f }, "quantity NaN"},
		{"rows", func(in *Instance, f [][]float64) [][]float64 { return f[:1] }, "plan has 1 site rows"},
		{"columns", func(in *Instance, f [][]float64) [][]float64 { f[1] = f[1][:2]; return f }, "2 entries"},
	}
	for _, c := range cases {
		in := tiny()
		v := Verify(in, c.modify(in, good()), false)
		if v.Feasible || !strings.Contains(strings.Join(v.Problems, "; "), c.want) {
			t.Errorf("%s: %+v, want a problem containing %q", c.name, v, c.want)
		}
	}
	// Within the relative tolerance 1e-6 a plan is still feasible.
	f := good()
	f[1][1] += 20 * 1e-7
	if v := Verify(tiny(), f, false); !v.Feasible {
		t.Errorf("plan off by 1e-7 relative: %v", v.Problems)
	}
	// Many problems are cut to 20 plus a summary.
	in, _ := Generate(3, 40, 2, 1)
	flow := [][]float64{make([]float64, 40), make([]float64, 40), make([]float64, 40)}
	v := Verify(in, flow, false)
	if len(v.Problems) != 21 || !strings.Contains(v.Problems[20], "and 20 more") {
		t.Errorf("40 unserved customers: %d problems, last %q", len(v.Problems), v.Problems[len(v.Problems)-1])
	}
}
