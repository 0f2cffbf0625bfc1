package scheduling

import (
	"context"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pincer/decomp"
	"pincer/instances"
)

func TestFamilyLoad(t *testing.T) {
	path := filepath.Join(t.TempDir(), "wt5.txt")
	if err := os.WriteFile(path, []byte(orlibText(5)), 0o644); err != nil {
		t.Fatal(err)
	}
	v, err := instances.Defaults(Family{}.Options())
	if err != nil {
		t.Fatal(err)
	}
	v["index"], v["machines"], v["objective"] = 4, 2, "weighted-completion"
	m, err := Family{}.Load("wt-orlib", path, v)
	if err != nil {
		t.Fatal(err)
	}
	sm := m.(*Model)
	if sm.In.Objective != WeightedCompletion || sm.In.Classes[0].Machines != 2 || sm.In.Jobs[0].Processing != 4 {
		t.Fatalf("loaded %+v", sm.In)
	}
	if !strings.Contains(m.Size(), "5 jobs on 2 machines") {
		t.Errorf("size %q", m.Size())
	}
	p, err := m.Problem()
	if err != nil {
		t.Fatal(err)
	}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 30, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	plan, err := m.PlanJSON(res.Plan)
	if err != nil {
		t.Fatal(err)
	}
	extra, err := m.Extra(res)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := json.Marshal(map[string]any{"plan": plan, "family": extra}); err != nil {
		t.Fatal(err)
	}
	placed := plan.([]PlacedJob)
	var sum int64
	for _, pj := range placed {
		sum += pj.Cost
	}
	if len(placed) != 5 || float64(sum) != res.Plan.Value {
		t.Fatalf("plan %+v does not add up to %v", placed, res.Plan.Value)
	}
	if rs, err := m.Resources(res); err != nil || len(rs) != 1 {
		t.Fatalf("resources %v %v", rs, err)
	}

	bad := filepath.Join(t.TempDir(), "bad.txt")
	if err := os.WriteFile(bad, []byte("  1  2\n  3 x\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = Family{}.Load("wt-orlib", bad, v)
	var pe *instances.ParseError
	if !errors.As(err, &pe) || pe.File != bad || pe.Line != 2 || pe.Column != 5 {
		t.Fatalf("want a parse error at %s:2:5, got %v", bad, err)
	}
	if _, err := (Family{}).Load("jobs-xml", path, v); err == nil {
		t.Fatal("unknown format accepted")
	}
}

func TestScheduleOfRejectsForeignDetail(t *testing.T) {
	in := &Instance{Name: "x", Classes: []Class{{ID: "A", Machines: 1}}, Jobs: []Job{{ID: "1", Processing: 1, Weight: 1}}}
	m, err := NewModel(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range []any{nil, "schedule", (*Schedule)(nil), &Schedule{}} {
		if _, err := m.ScheduleOf(&decomp.Plan{Detail: d}); err == nil {
			t.Errorf("detail %#v accepted", d)
		}
		if _, err := m.PlanJSON(&decomp.Plan{Detail: d}); err == nil {
			t.Errorf("detail %#v: PlanJSON accepted it", d)
		}
	}
}

// TestPlanCodec: the best plan survives a checkpoint's encoding.
func TestPlanCodec(t *testing.T) {
	in := &Instance{Name: "x", Classes: []Class{{ID: "A", Machines: 2}}, Jobs: []Job{
		{ID: "1", Processing: 2, Weight: 1, Due: 1}, {ID: "2", Processing: 3, Weight: 2}, {ID: "3", Processing: 1, Weight: 1, Release: 2}}}
	p, err := NewProblem(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 10, Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	data, err := p.Plans.EncodePlan(res.Plan.Detail)
	if err != nil {
		t.Fatal(err)
	}
	back, err := p.Plans.DecodePlan(data)
	if err != nil {
		t.Fatal(err)
	}
	v, err := in.Evaluate(back.(*Schedule))
	if err != nil || float64(v) != res.Plan.Value {
		t.Fatalf("decoded plan value %v (%v), want %v", v, err, res.Plan.Value)
	}
	if _, err := p.Plans.DecodePlan([]byte("not a plan")); err == nil {
		t.Fatal("foreign data decoded")
	}
}
