package scheduling

import (
	"bytes"
	"strings"
	"testing"
)

// Windows worked by hand from the prices below.
func TestBusiestWindows(t *testing.T) {
	in := &Instance{Name: "w", Classes: []Class{{ID: "A", Name: "presses", Machines: 1}, {ID: "B", Machines: 2}},
		Jobs: []Job{{ID: "a", Processing: 1}}}
	horizons := []int{6, 4}
	prices := []float64{
		0, 2, 3, 0, 1e-12, 4, // class A: window 1..3 sums 5, window 5..6 sums 4 (1e-12 counts as zero)
		1, 1, 1, 0.5, // class B: window 0..4 sums 3.5
	}
	got, err := BusiestWindows(in, horizons, prices, 0)
	if err != nil {
		t.Fatal(err)
	}
	want := []BusyWindow{{0, 1, 3, 5, 3}, {0, 5, 6, 4, 4}, {1, 0, 4, 3.5, 1}}
	if len(got) != len(want) {
		t.Fatalf("got %+v, want %+v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("window %d: got %+v, want %+v", i, got[i], want[i])
		}
	}
	if top, _ := BusiestWindows(in, horizons, prices, 1); len(top) != 1 || top[0] != want[0] {
		t.Fatalf("limit 1: %+v", top)
	}
	if s := WindowSentence(in, got[0]); s != "one more machine of class presses between 1 and 3 would save up to about 5" {
		t.Fatalf("sentence %q", s)
	}
	if _, err := BusiestWindows(in, horizons, prices[:3], 0); err == nil {
		t.Fatal("short price vector accepted")
	}
	var buf bytes.Buffer
	if err := WriteWindowsCSV(&buf, in, got[:1]); err != nil || buf.String() != "class,class_name,from,to,saving,peak_price\nA,presses,1,3,5,3\n" {
		t.Fatalf("windows table %q %v", buf.String(), err)
	}
}

func TestWriteSummary(t *testing.T) {
	in := ioSmallInstance(t)
	_, s := ioBruteForce(t, in)
	var buf bytes.Buffer
	wins := []BusyWindow{{Class: 1, From: 0, To: 8, Saving: 12.345}}
	if err := WriteSummary(&buf, in, s, wins); err != nil {
		t.Fatal(err)
	}
	text := buf.String()
	for _, want := range []string{"5 jobs on 2 machine classes", "CNC lathes: 2 machine(s)",
		"one more machine of class Five-axis mill between 0 and 8 would save up to about 12.35", "decision support"} {
		if !strings.Contains(text, want) {
			t.Errorf("summary lacks %q:\n%s", want, text)
		}
	}
}
