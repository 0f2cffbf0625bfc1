package lotsizing

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pincer/decomp"
	"pincer/instances"
)

func TestFamilyLoadGivesSharedParseError(t *testing.T) {
	path := filepath.Join(t.TempDir(), "bad.dat")
	// "2 x" : the period count is not a number (line 1, column 3).
	if err := os.WriteFile(path, []byte("2 x\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	v, err := instances.Defaults(Family{}.Options())
	if err != nil {
		t.Fatal(err)
	}
	_, err = Family{}.Load("lotsizing-ttm", path, v)
	var pe *instances.ParseError
	if !errors.As(err, &pe) || pe.File != path || pe.Line != 1 || pe.Column != 3 {
		t.Fatalf("want an instances.ParseError at %s:1:3, got %v", path, err)
	}
	bad := map[string]string{}
	for k, s := range goodFolder {
		bad[k] = s
	}
	bad["demand.csv"] = "item,period,quantity\nA,1,10\nB,7,30\n"
	dir := writeFolder(t, bad)
	_, err = Family{}.Load("lotsizing-csv", dir, v)
	if !errors.As(err, &pe) || pe.File != filepath.Join(dir, "demand.csv") || pe.Line != 3 || pe.Column != 2 {
		t.Fatalf("want an instances.ParseError at demand.csv:3:2 in the folder, got %v", err)
	}
}

func TestScheduleOfRejectsForeignDetail(t *testing.T) {
	m, err := NewModel(Demo(), Options{OvertimeCost: 90})
	if err != nil {
		t.Fatal(err)
	}
	for _, d := range []any{nil, "schedule", (*Schedule)(nil), &Schedule{}} {
		if _, err := m.ScheduleOf(&decomp.Plan{Detail: d}); err == nil || !strings.Contains(err.Error(), "plan detail") {
			t.Errorf("detail %#v: err %v", d, err)
		}
		if err := m.WritePlan(&strings.Builder{}, &decomp.Result{Plan: &decomp.Plan{Detail: d}}, nil); err == nil {
			t.Errorf("detail %#v: WritePlan accepted it", d)
		}
	}
	if s, err := m.ScheduleOf(nil); s != nil || err != nil {
		t.Errorf("no plan: %v %v", s, err)
	}
	if _, err := NewModel(Demo(), Options{OvertimeCost: -1}); err == nil {
		t.Error("negative overtime cost accepted")
	}
}
