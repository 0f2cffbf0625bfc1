package scheduling

import (
	"fmt"
	"io"
	"sort"
	"strings"
)

// Demo is a scenario of our own invention: Tidewater Print & Bind (a
// fictional harbour-town print shop) plans one working week. Time runs in
// working hours from Monday 08:00 (slot 0), ten hours a day. The shop has
// one offset press (long runs; the second is in for repair), two digital presses (short runs and
// personalised work) and one binding line; 40 jobs, some of which may go
// to either kind of press. A job's release is when its paper, proofs or
// printed sheets are ready; its due date is the hour the customer collects;
// its weight is how much a late hour hurts (a council agenda needed for a
// meeting weighs more than wrapping paper). The objective is weighted
// tardiness, in penalty points.
func Demo() *Instance {
	in := &Instance{
		Name:      "tidewater-week",
		Objective: WeightedTardiness,
		Classes: []Class{
			{ID: "offset", Name: "offset press", Machines: 1}, // the second is in for repair this week
			{ID: "digital", Name: "digital press", Machines: 2},
			{ID: "bindery", Name: "binding line", Machines: 1},
		},
	}
	classes := map[string]int{"offset": 0, "digital": 1, "bindery": 2}
	for i, r := range []struct {
		name               string
		p, w, due, release int
		eligible           string
	}{
		{"Harbour ferry timetable", 6, 5, 20, 0, "offset"},
		{"Parish newsletter", 3, 2, 16, 0, "digital"},
		{"Spring seed catalogue", 10, 4, 40, 0, "offset"},
		{"Alder-Moss wedding invitations", 2, 8, 10, 2, "digital"},
		{"Museum exhibition posters", 5, 3, 24, 4, "offset;digital"},
		{"Brewery beer-mat run", 8, 2, 36, 0, "offset"},
		{"Town council agenda", 2, 9, 8, 0, "digital"},
		{"Bakery menu cards", 3, 3, 18, 6, "digital"},
		{"School yearbook binding", 7, 6, 30, 10, "bindery"},
		{"Lighthouse trust calendar", 9, 4, 44, 0, "offset"},
		{"Marathon race bibs", 4, 7, 14, 0, "offset;digital"},
		{"Orchard cider labels", 6, 3, 28, 8, "offset"},
		{"Poetry chapbook binding", 4, 2, 34, 12, "bindery"},
		{"Choir concert programmes", 2, 5, 12, 4, "digital"},
		{"Ferry company annual report", 8, 5, 38, 6, "offset;digital"},
		{"Garden centre price tags", 3, 1, 26, 0, "digital"},
		{"Maritime atlas binding", 9, 4, 48, 16, "bindery"},
		{"Farmers' market flyers", 2, 2, 10, 0, "offset;digital"},
		{"Sailing club handbook", 5, 4, 32, 10, "offset"},
		{"Library reading-list booklets", 4, 2, 40, 14, "digital"},
		{"Art college degree show catalogue", 7, 6, 26, 6, "offset"},
		{"Fishmonger wrapping paper", 6, 1, 50, 0, "offset"},
		{"Theatre season brochure", 5, 7, 22, 8, "offset;digital"},
		{"Pocket tide tables", 3, 8, 16, 2, "digital"},
		{"Guesthouse welcome packs", 2, 2, 30, 12, "digital"},
		{"Quayside Kitchen recipe book binding", 6, 5, 42, 20, "bindery"},
		{"Lifeboat appeal envelopes", 7, 3, 34, 0, "offset"},
		{"Walking-trail maps", 4, 4, 20, 4, "offset;digital"},
		{"Puppet festival tickets", 2, 6, 9, 0, "digital"},
		{"Shipyard safety manuals", 8, 5, 46, 18, "offset"},
		{"Historical society journal binding", 5, 3, 52, 24, "bindery"},
		{"Cafe loyalty cards", 1, 2, 12, 6, "digital"},
		{"Regatta posters", 4, 6, 18, 2, "offset"},
		{"Birdwatch field notebook binding", 4, 2, 56, 30, "bindery"},
		{"Estate agent brochures", 3, 3, 24, 10, "digital"},
		{"Harvest fair banners", 5, 4, 30, 14, "offset;digital"},
		{"Knitting pattern leaflets", 2, 1, 36, 20, "digital"},
		{"Ferry timetable reprint", 3, 9, 28, 22, "offset"},
		{"Chamber music CD inserts", 2, 4, 26, 16, "digital"},
		{"Year-end greeting cards", 6, 3, 54, 26, "offset;digital"},
	} {
		jb := Job{ID: fmt.Sprintf("T%02d", i+1), Name: r.name, Processing: r.p, Weight: r.w, Due: r.due, Release: r.release}
		for _, c := range strings.Split(r.eligible, ";") {
			jb.Eligible = append(jb.Eligible, classes[c])
		}
		sort.Ints(jb.Eligible)
		in.Jobs = append(in.Jobs, jb)
	}
	return in
}

// demoClock names working hour t of the demo week (ten hours a day from
// 08:00, Monday first).
func demoClock(t int) string {
	days := [...]string{"Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"}
	d := t / 10
	if d >= len(days) {
		return fmt.Sprintf("hour %d", t)
	}
	return fmt.Sprintf("%s %02d:00", days[d], 8+t%10)
}

// demoClockEnd names the end of working hour t−1: the close of the day
// (18:00) rather than the next morning.
func demoClockEnd(t int) string {
	if t > 0 && t%10 == 0 {
		s := demoClock(t - 1)
		if strings.HasPrefix(s, "hour") {
			return fmt.Sprintf("hour %d", t)
		}
		return s[:4] + "18:00"
	}
	return demoClock(t)
}

// WriteDemoIntro introduces the demo scenario (see Demo).
func WriteDemoIntro(w io.Writer, in *Instance) error {
	_, err := fmt.Fprintf(w, `Tidewater Print & Bind (invented) plans its week: %d jobs for one offset press (the
second is in for repair this week), two digital presses and one binding line, ten
working hours a day from Monday 08:00. Which job runs where and when, so that as few
penalty points as possible are lost to late collections?

`, len(in.Jobs))
	if err != nil {
		return fmt.Errorf("scheduling: writing demo introduction: %w", err)
	}
	return nil
}

// WriteDemoExplanation says, in the demo's words, what the plan and the
// slot prices mean: each slot price is what one more machine of that kind
// during that working hour would be worth in penalty points, so a run of
// priced hours is a stretch where hiring a machine or adding a shift would
// pay; windows are from BusiestWindows.
func WriteDemoExplanation(w io.Writer, in *Instance, s *Schedule, windows []BusyWindow) error {
	if err := ioCheckShape(in, s); err != nil {
		return err
	}
	var lost int64
	late := 0
	for j, jb := range in.Jobs {
		if c := s.Start[j] + jb.Processing; c > jb.Due {
			late++
			lost += in.Cost(j, c)
		}
	}
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	p("\nThe plan collects %d of %d jobs on time; the %d late ones cost %d penalty points.\n", len(in.Jobs)-late, len(in.Jobs), late, lost)
	p("What the hour prices say (the value of one more machine in that hour, in penalty points):\n")
	if len(windows) == 0 {
		p("  No hour of any machine is priced: another machine would not save points.\n")
	}
	for _, win := range windows {
		if win.Saving > float64(lost) {
			// The summed prices are a first-order estimate; no machine can
			// save more than all the points lost.
			p("  One more %s (hired, or an extra crew) from %s to %s could save up to all %d points\n    (its hour prices sum to %.1f, which overstates a change this large).\n",
				ioClassName(in, win.Class), demoClock(win.From), demoClockEnd(win.To), lost, win.Saving)
			continue
		}
		p("  One more %s (hired, or an extra crew) from %s to %s would save up to about %.1f points.\n",
			ioClassName(in, win.Class), demoClock(win.From), demoClockEnd(win.To), win.Saving)
	}
	_, err := fmt.Fprintln(w, "The plan is decision support: the shop floor checks it against its own rules before use.")
	if err != nil {
		return fmt.Errorf("scheduling: writing demo explanation: %w", err)
	}
	return nil
}
