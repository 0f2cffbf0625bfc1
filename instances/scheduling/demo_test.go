package scheduling

import "testing"

func TestDemoClock(t *testing.T) {
	// By hand: ten working hours a day from Monday 08:00.
	for _, c := range []struct {
		t          int
		start, end string
	}{{0, "Mon 08:00", "Mon 08:00"}, {9, "Mon 17:00", "Mon 17:00"}, {10, "Tue 08:00", "Mon 18:00"}, {25, "Wed 13:00", "Wed 13:00"}, {70, "hour 70", "Sun 18:00"}, {80, "hour 80", "hour 80"}} {
		if s, e := demoClock(c.t), demoClockEnd(c.t); s != c.start || e != c.end {
			t.Errorf("hour %d: %q and %q, want %q and %q", c.t, s, e, c.start, c.end)
		}
	}
}

func TestDemoInstance(t *testing.T) {
	in := Demo()
	if err := in.Validate(); err != nil {
		t.Fatal(err)
	}
	if len(in.Jobs) != 40 || len(in.Classes) != 3 {
		t.Fatalf("%d jobs, %d classes", len(in.Jobs), len(in.Classes))
	}
	// The week is not trivial: the plain list schedule of the tests leaves
	// jobs late.
	if v, err := in.Evaluate(ioListSchedule(in)); err != nil || v == 0 {
		t.Fatalf("list schedule value %d, %v", v, err)
	}
}
