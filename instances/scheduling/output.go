package scheduling

import (
	"encoding/csv"
	"fmt"
	"io"
	"sort"
	"strconv"

	"pincer/instances"
)

// ioScheduleHeader is the header of schedule.csv.
func ioScheduleHeader() []string {
	return []string{"job", "name", "class", "machine", "start", "end", "tardiness"}
}

// WriteScheduleCSV writes schedule.csv, one row per job with the columns
// job (the job id), name, class (the class id), machine (1-based within the
// class), start, end (start + processing time) and tardiness (max(0, end −
// due), unweighted). Rows run class by class, machine by machine, in order
// of start (ties by job order), so that each machine's sequence reads top to
// bottom. s must place every job (see Instance.Evaluate); it need not be
// feasible.
func WriteScheduleCSV(w io.Writer, in *Instance, s *Schedule) error {
	if err := ioCheckShape(in, s); err != nil {
		return err
	}
	cw := csv.NewWriter(w)
	cw.Write(ioScheduleHeader())
	for _, j := range ioScheduleOrder(in, s) {
		jb := in.Jobs[j]
		end := s.Start[j] + jb.Processing
		cw.Write([]string{jb.ID, jb.Name, in.Classes[s.Class[j]].ID, strconv.Itoa(s.Machine[j] + 1),
			strconv.Itoa(s.Start[j]), strconv.Itoa(end), strconv.Itoa(max(0, end-jb.Due))})
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("scheduling: writing schedule: %w", err)
	}
	return nil
}

// ioCheckShape checks that s has one entry per job with an existing class
// and machine.
func ioCheckShape(in *Instance, s *Schedule) error {
	n := len(in.Jobs)
	if s == nil || len(s.Class) != n || len(s.Machine) != n || len(s.Start) != n {
		return fmt.Errorf("scheduling: schedule does not place all %d jobs", n)
	}
	for j := range in.Jobs {
		k := s.Class[j]
		if k < 0 || k >= len(in.Classes) || s.Machine[j] < 0 || s.Machine[j] >= in.Classes[k].Machines {
			return fmt.Errorf("scheduling: job %s on class %d machine %d, which does not exist", in.Jobs[j].ID, k, s.Machine[j])
		}
	}
	return nil
}

// ioScheduleOrder lists the jobs by class, machine, start and job index.
func ioScheduleOrder(in *Instance, s *Schedule) []int {
	order := make([]int, len(in.Jobs))
	for j := range order {
		order[j] = j
	}
	sort.SliceStable(order, func(a, b int) bool {
		ja, jb := order[a], order[b]
		if s.Class[ja] != s.Class[jb] {
			return s.Class[ja] < s.Class[jb]
		}
		if s.Machine[ja] != s.Machine[jb] {
			return s.Machine[ja] < s.Machine[jb]
		}
		return s.Start[ja] < s.Start[jb]
	})
	return order
}

// BusyWindow is a stretch of slots of one class where the capacity rows
// carry a positive price.
type BusyWindow struct {
	Class int // index into Instance.Classes
	// From and To bound the window: slots From..To−1, i.e. the time
	// interval [From, To).
	From, To int
	// Saving is the summed slot price over the window: the first-order
	// estimate of what one more machine of the class during the window
	// would save (see BusiestWindows).
	Saving float64
	// Peak is the largest slot price in the window.
	Peak float64
}

// BusiestWindows finds the maximal runs of consecutive slots of one class
// whose capacity-row price is positive (above 1e-9), ranks them by summed
// price (ties by class, then start) and returns at most limit of them (all
// when limit <= 0). prices are indexed like the capacity rows of
// SlotRows(horizons) (decomp.Result.Prices at the best bound); horizons nil
// means in.Horizons().
//
// Why the summed price is the value of a machine: the capacity row of class
// k and slot t reads "at most m_k jobs in process", a <= row of a
// minimisation, so its price λ_kt >= 0 enters the Lagrangian bound as
// −λ_kt·m_k. One more machine during slots t1..t2−1 raises those right-hand
// sides by 1, which at fixed prices lowers the bound by Σ_{t1<=t<t2} λ_kt.
// At optimal prices of the time-indexed linear relaxation (which this
// relaxation's bound equals) this is a subgradient of its value, so the
// linear relaxation improves by at most that much; for the schedule
// itself it is an estimate ("about Y"), good for small changes and for
// ranking where capacity is short, not a promise.
func BusiestWindows(in *Instance, horizons []int, prices []float64, limit int) ([]BusyWindow, error) {
	if horizons == nil {
		horizons = in.Horizons()
	}
	if len(horizons) != len(in.Classes) {
		return nil, fmt.Errorf("scheduling: %d horizons for %d classes", len(horizons), len(in.Classes))
	}
	offsets, total := SlotRows(horizons)
	if len(prices) != total {
		return nil, fmt.Errorf("scheduling: %d prices, want one per slot row (%d)", len(prices), total)
	}
	const eps = 1e-9
	var out []BusyWindow
	for k, h := range horizons {
		for t := 0; t < h; {
			if !(prices[offsets[k]+t] > eps) {
				t++
				continue
			}
			win := BusyWindow{Class: k, From: t}
			for ; t < h && prices[offsets[k]+t] > eps; t++ {
				p := prices[offsets[k]+t]
				win.Saving += p
				win.Peak = max(win.Peak, p)
			}
			win.To = t
			out = append(out, win)
		}
	}
	sort.SliceStable(out, func(a, b int) bool { return out[a].Saving > out[b].Saving })
	if limit > 0 && len(out) > limit {
		out = out[:limit]
	}
	return out, nil
}

// WriteWindowsCSV writes the busy windows as a table: class, class_name,
// from, to, saving, peak_price (from inclusive, to exclusive).
func WriteWindowsCSV(w io.Writer, in *Instance, windows []BusyWindow) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"class", "class_name", "from", "to", "saving", "peak_price"})
	for _, win := range windows {
		c := in.Classes[win.Class]
		cw.Write([]string{c.ID, c.Name, strconv.Itoa(win.From), strconv.Itoa(win.To),
			instances.FormatNumber(win.Saving), instances.FormatNumber(win.Peak)})
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("scheduling: writing busy windows: %w", err)
	}
	return nil
}

// ioClassName is the class's name for people (its id when unnamed).
func ioClassName(in *Instance, k int) string {
	if in.Classes[k].Name != "" {
		return in.Classes[k].Name
	}
	return in.Classes[k].ID
}

// ioJobName is the job's name for people (its id when unnamed).
func ioJobName(in *Instance, j int) string {
	if in.Jobs[j].Name != "" {
		return in.Jobs[j].Name
	}
	return in.Jobs[j].ID
}

// WindowSentence says what a busy window is worth, in the words of the
// issue: "one more machine of class X between t1 and t2 would save up to about Y".
func WindowSentence(in *Instance, win BusyWindow) string {
	return fmt.Sprintf("one more machine of class %s between %d and %d would save up to about %s",
		ioClassName(in, win.Class), win.From, win.To, instances.FormatNumber(ioRound(win.Saving, 2)))
}

// CappedWindowSentence is WindowSentence for a plan of value planValue: a
// summed price beyond the plan's value (which no extra machine can save
// more than) is a first-order estimate stretched past its range, and the
// sentence says so instead of promising it.
func CappedWindowSentence(in *Instance, win BusyWindow, planValue float64) string {
	if win.Saving <= planValue {
		return WindowSentence(in, win)
	}
	return fmt.Sprintf("one more machine of class %s between %d and %d could save up to the plan's whole %s (the window's summed slot prices, %s, overstate a change this large)",
		ioClassName(in, win.Class), win.From, win.To, instances.FormatNumber(planValue), instances.FormatNumber(ioRound(win.Saving, 2)))
}

// ioRound rounds v to d decimals for people.
func ioRound(v float64, d int) float64 {
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'f', d, 64), 64)
	return r
}

// WriteSummary writes a short account of a schedule for people, using the
// names from the input: the objective value, the tardy jobs (the heaviest
// few by weighted tardiness), each class's load and the busiest windows
// (see BusiestWindows; nil for none). It says that the schedule is decision
// support, to be checked against the shop's own rules.
func WriteSummary(w io.Writer, in *Instance, s *Schedule, windows []BusyWindow) error {
	if err := ioCheckShape(in, s); err != nil {
		return err
	}
	const shown = 5
	var total int64
	type late struct {
		job  int
		tard int
		cost int64
	}
	var tardy []late
	makespan := 0
	load := make([]int, len(in.Classes))
	for j, jb := range in.Jobs {
		end := s.Start[j] + jb.Processing
		total += in.Cost(j, end)
		makespan = max(makespan, end)
		load[s.Class[j]] += jb.Processing
		if end > jb.Due {
			tardy = append(tardy, late{j, end - jb.Due, int64(jb.Weight) * int64(end-jb.Due)})
		}
	}
	sort.SliceStable(tardy, func(a, b int) bool { return tardy[a].cost > tardy[b].cost })
	p := func(format string, a ...any) { fmt.Fprintf(w, format, a...) }
	what := "total weighted tardiness"
	if in.Objective == WeightedCompletion {
		what = "total weighted completion time"
	}
	p("Schedule for %s: %d jobs on %d machine classes, %s %d, last job ends at %d.\n",
		in.Name, len(in.Jobs), len(in.Classes), what, total, makespan)
	switch {
	case len(tardy) == 0:
		p("Every job ends by its due date.\n")
	default:
		p("%d of %d jobs end after their due date", len(tardy), len(in.Jobs))
		if len(tardy) > shown {
			p("; the %d costliest", shown)
		}
		p(":\n")
		for _, l := range tardy[:min(shown, len(tardy))] {
			p("  %s: %d late (weight %d, cost %d)\n", ioJobName(in, l.job), l.tard, in.Jobs[l.job].Weight, l.cost)
		}
	}
	p("Load per class:\n")
	for k, c := range in.Classes {
		util := 0.0
		if makespan > 0 {
			util = float64(load[k]) / float64(c.Machines*makespan)
		}
		p("  %s: %d machine(s), %d time units of work, %.0f%% busy until the last job ends\n",
			ioClassName(in, k), c.Machines, load[k], 100*util)
	}
	if len(windows) > 0 {
		p("Where capacity is short (slot prices at the best bound):\n")
		for _, win := range windows {
			p("  %s.\n", WindowSentence(in, win))
		}
	}
	_, err := fmt.Fprintln(w, "This schedule is decision support: check it against the shop's own rules and practice before use.")
	if err != nil {
		return fmt.Errorf("scheduling: writing summary: %w", err)
	}
	return nil
}
