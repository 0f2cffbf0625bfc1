package lotsizing

import (
	"bytes"
	"context"
	"errors"
	"strings"
	"testing"

	"pincer/decomp"
	"pincer/instances"
)

// A generated instance written in the TTM layout reads back the same.
func TestWriteTTMRoundTrip(t *testing.T) {
	in, err := Generate(GenerateConfig{Items: 17, Periods: 9, Seed: 4}) // 17 items: two demand blocks
	if err != nil {
		t.Fatal(err)
	}
	var b bytes.Buffer
	if err := WriteTTM(&b, in); err != nil {
		t.Fatal(err)
	}
	back, err := ReadTTM(&b, "gen.dat")
	if err != nil {
		t.Fatal(err)
	}
	for i := range in.Items {
		a, c := in.Items[i], back.Items[i]
		if a.UnitTime != c.UnitTime || a.Holding != c.Holding || a.SetupTime != c.SetupTime || a.SetupCost != c.SetupCost {
			t.Fatalf("item %d: wrote %+v, read %+v", i+1, a, c)
		}
		for u := range in.Demand[i] {
			if in.Demand[i][u] != back.Demand[i][u] || in.Capacity[u] != back.Capacity[u] {
				t.Fatalf("item %d period %d differs", i+1, u+1)
			}
		}
	}
	in.Items[0].InitialStock = 1
	if err := WriteTTM(&b, in); err == nil {
		t.Error("initial stock written in a layout without it")
	}
}

// A solved plan written as schedule.csv passes the independent check with
// the plan's own value; damaged copies are caught. Expected problems are
// read off the damage by hand.
func TestVerifySchedule(t *testing.T) {
	in := Demo()
	m, err := NewModel(in, Options{OvertimeCost: 90})
	if err != nil {
		t.Fatal(err)
	}
	p, err := m.Problem()
	if err != nil {
		t.Fatal(err)
	}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 30})
	if err != nil || res.Plan == nil {
		t.Fatalf("no plan: %v", err)
	}
	var b strings.Builder
	if err := m.WritePlan(&b, res, nil); err != nil {
		t.Fatal(err)
	}
	v, err := m.Verify(strings.NewReader(b.String()), "schedule.csv")
	if err != nil {
		t.Fatal(err)
	}
	if !v.Feasible || v.Value < res.Plan.Value-1e-6*res.Plan.Value || v.Value > res.Plan.Value+1e-6*res.Plan.Value {
		t.Fatalf("verdict %+v for plan value %v", v, res.Plan.Value)
	}
	// Drop every line making something: demand unmet, stock mismatches.
	var kept []string
	for k, line := range strings.Split(strings.TrimSpace(b.String()), "\n") {
		if k == 0 || strings.Split(line, ",")[2] == "0" {
			kept = append(kept, line)
		}
	}
	v, err = m.Verify(strings.NewReader(strings.Join(kept, "\n")), "schedule.csv")
	if err != nil {
		t.Fatal(err)
	}
	if v.Feasible || !strings.Contains(strings.Join(v.Problems, "\n"), "demand unmet") {
		t.Fatalf("empty plan judged %+v", v)
	}
	// Without overtime the plant's first week is over capacity (see the
	// scenario: its orders exceed one week of line hours).
	strict, _ := NewModel(in, Options{})
	v, _ = strict.Verify(strings.NewReader(b.String()), "schedule.csv")
	if v.Feasible || !strings.Contains(strings.Join(v.Problems, "\n"), "over capacity") {
		t.Fatalf("plan with overtime judged %+v without overtime", v)
	}
}

func TestReadScheduleCSVErrors(t *testing.T) {
	in := Demo()
	name := in.Items[0].Name
	for _, c := range []struct {
		data       string
		line, col  int
		wantInText string
	}{
		{"item,period\n", 1, 1, "a column quantity"},
		{"item,period,quantity\nnobody,1,3\n", 2, 1, "an item of the instance"},
		{"item,period,quantity\n" + name + ",99,3\n", 2, len(name) + 2, "a period number"},
		{"item,period,quantity\n" + name + ",1,-3\n", 2, len(name) + 4, "non-negative"},
		{"item,period,quantity\n" + name + ",1,3\n" + name + ",1,4\n", 3, len(name) + 2, "one line per item and period"},
		{"item,period,setup,quantity\n" + name + ",1,2,3\n", 2, len(name) + 4, "setup 0 or 1"},
		{"item,period,quantity\n\"" + name + ",1,3\n", 2, 0, "CSV"},
		{"", 1, 1, "header"},
	} {
		_, err := ReadScheduleCSV(strings.NewReader(c.data), "plan.csv", in)
		var pe *instances.ParseError
		if !errors.As(err, &pe) || pe.File != "plan.csv" || pe.Line != c.line || (c.col > 0 && pe.Column != c.col) || !strings.Contains(err.Error(), c.wantInText) {
			t.Errorf("%q: want plan.csv:%d:%d (%s), got %v", c.data, c.line, c.col, c.wantInText, err)
		}
	}
}

func FuzzReadScheduleCSV(f *testing.F) {
	in, err := Generate(GenerateConfig{Items: 2, Periods: 3, Seed: 1})
	if err != nil {
		f.Fatal(err)
	}
	f.Add([]byte("item,period,setup,quantity,inventory\nitem1,1,1,5,0\nitem2,3,0,0,0\n"))
	f.Add([]byte("item,period,quantity\nitem1,2,1e3\n"))
	f.Add([]byte("quantity,period,item\n\"x\",1,item2\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		pf, err := ReadScheduleCSV(bytes.NewReader(data), "fuzz.csv", in)
		if err != nil {
			var pe *instances.ParseError
			if !errors.As(err, &pe) || pe.Line < 1 || pe.Column < 1 || pe.File != "fuzz.csv" {
				t.Fatalf("error %v (%T) is not a positioned *instances.ParseError", err, err)
			}
			return
		}
		v := Check(in, pf, nil)
		if v.Feasible != (len(v.Problems) == 0) || v.Value < 0 {
			t.Fatalf("verdict %+v", v)
		}
	})
}
