package main

import (
	"encoding/csv"
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/schollz/progressbar/v3"
	"golang.org/x/term"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"pincer/instances"
)

// benchProgress shows the bench's progress on stderr: a bar with the
// count and the time left on a terminal, one line per finished row
// otherwise.
type benchProgress struct {
	w        io.Writer
	bar      *progressbar.ProgressBar
	total    int
	finished int
}

func newBenchProgress(stderr io.Writer, total int) *benchProgress {
	p := &benchProgress{w: stderr, total: total}
	if f, ok := stderr.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		p.bar = newBenchBar(stderr, total)
	}
	return p
}

// newBenchBar is the terminal bar: rows done of total, elapsed time and
// the predicted time left.
func newBenchBar(w io.Writer, total int) *progressbar.ProgressBar {
	return progressbar.NewOptions(total,
		progressbar.OptionSetWriter(w),
		progressbar.OptionSetDescription("bench"),
		progressbar.OptionShowCount(),
		progressbar.OptionSetWidth(30),
		progressbar.OptionSetElapsedTime(true),
		progressbar.OptionSetPredictTime(true),
		progressbar.OptionSetRenderBlankState(true),
	)
}

func (p *benchProgress) start(name string) {
	if p.bar != nil {
		p.bar.Describe(name)
	}
}

func (p *benchProgress) finish(r *benchResult) {
	p.finished++
	if p.bar != nil {
		_ = p.bar.Add(1)
		return
	}
	name := r.row.name
	if r.rule != "" {
		name += " (" + r.rule + ")"
	}
	fmt.Fprintf(p.w, "bench %d/%d %s: %s\n", p.finished, p.total, name, r.describe())
}

func (p *benchProgress) done() {
	if p.bar == nil {
		return
	}
	if p.finished == p.total {
		_ = p.bar.Finish() // renders the full bar past the throttle
	} else {
		_ = p.bar.Exit()
	}
	fmt.Fprintln(p.w)
}

// pct writes a fraction as a signed percent, "-" for NaN.
func pct(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "-"
	}
	s := strconv.FormatFloat(math.Abs(100*v), 'f', 3, 64)
	switch {
	case s == "0.000": // zero at the shown precision: no sign
	case v > 0:
		s = "+" + s
	default:
		s = "-" + s
	}
	return s + " %"
}

// printBenchTable writes the side-by-side table.
func printBenchTable(w io.Writer, f *benchFlags, peer bool, rows []*benchResult, total int, interrupted bool) {
	rules := "each row's default"
	if len(f.rules) > 0 {
		rules = strings.Join(f.rules, ", ")
	}
	fmt.Fprintf(w, "bench: %d of %d runs, %s per run, %d threads, rule %s\n\n", len(rows), total, f.time, f.workers, rules)
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	head := "instance\trule\treference\tplan\tbound\tgap\t"
	for _, at := range f.marks {
		mk := markName(at)
		head += "bound " + mk + "\tplan " + mk + "\t"
	}
	if peer {
		head += "cbc plan\tcbc bound\tcbc gap\t"
	}
	head += "time s\t"
	if peer {
		head += "cbc s\t"
	}
	head += "deviation\t"
	if peer {
		head += "cbc deviation\t"
	}
	head += "notes"
	fmt.Fprintln(tw, head)
	for _, r := range rows {
		var c []string
		c = append(c, r.row.name, r.ruleText(), r.referenceText())
		if r.status == "error" {
			c = append(c, "-", "-", "-")
		} else {
			c = append(c, dash(r.planOrNaN()), dash(r.boundOrNaN()), fmtGap(r.gap))
		}
		for k := range f.marks {
			if k < len(r.marks) {
				mv := r.marks[k]
				c = append(c, dash(orNaN(mv.bound, mv.hasBound)), dash(orNaN(mv.plan, mv.hasPlan)))
			} else {
				c = append(c, "-", "-")
			}
		}
		if peer {
			c = append(c, dash(r.peer.planOrNaN()), dash(r.peer.boundOrNaN()), fmtGap(r.peer.gap()))
		}
		if r.status == "error" {
			c = append(c, "-")
		} else {
			c = append(c, fmt.Sprintf("%.1f", r.seconds))
		}
		if peer {
			if r.peer != nil && r.peer.status != "not-run" {
				c = append(c, fmt.Sprintf("%.1f", r.peer.seconds))
			} else {
				c = append(c, "-")
			}
		}
		c = append(c, pct(deviation(r.plan, r.hasPlan, r)))
		if peer {
			c = append(c, pct(deviation(r.peer.planOrNaN(), r.peer != nil && r.peer.hasPlan, r)))
		}
		c = append(c, strings.Join(r.notes(peer), "; "))
		fmt.Fprintln(tw, strings.Join(c, "\t"))
	}
	tw.Flush()
	fmt.Fprintln(w, "\ndeviation = (plan − reference) / |reference|, positive when the plan is worse (for max, reference − plan);")
	fmt.Fprintln(w, "gap = |plan − bound| / max(1, |plan|). A bound never passes an optimal or best-known reference, and no plan")
	fmt.Fprintln(w, "beats an optimal one: a note says so when one does.")
	fmt.Fprintln(w, "rule*: the family's default rule for the instance (no --rule given).")
	if len(f.marks) > 0 {
		fmt.Fprintln(w, "bound T, plan T: the best bound and plan after T of the run (the final ones when the run ended earlier).")
	}
	if len(f.marks) > 0 || len(f.rules) > 1 {
		printMarkSummary(w, rows, f.marks)
	}
	if interrupted {
		fmt.Fprintf(w, "Interrupted: %d of %d runs done; the last one stopped early with its best plan and bound.\n", len(rows), total)
	}
	fmt.Fprintln(w, caution)
}

// ruleText is the rule column: the rule, starred when it is the row's
// family default.
func (r *benchResult) ruleText() string {
	switch {
	case r.rule == "":
		return "-"
	case r.ruleBy == ruleByFamily:
		return r.rule + "*"
	}
	return r.rule
}

func orNaN(v float64, ok bool) float64 {
	if !ok {
		return math.NaN()
	}
	return v
}

// notes are a row's status words for the table: errors, stops that are
// not the time limit, the peer's status, and conflicts with the reference.
func (r *benchResult) notes(peer bool) []string {
	if r.status == "error" {
		return []string{r.note}
	}
	var out []string
	if r.proved {
		out = append(out, "proved")
	}
	if r.stop != "time-limit" && r.stop != "" {
		out = append(out, r.stop)
	}
	if p := r.peer; peer && p != nil && (p.status != "time-limit" || p.note != "") {
		s := "cbc " + p.status
		if p.note != "" {
			s += " (" + p.note + ")"
		}
		out = append(out, s)
	}
	return append(out, conflicts(r)...)
}

// writeBenchCSVFile writes the CSV table to path ("-" is stdout).
func writeBenchCSVFile(path string, stdout io.Writer, peer bool, marks []time.Duration, rows []*benchResult) error {
	out, err := createOutput(path, stdout)
	if err != nil {
		return fmt.Errorf("--csv: %w", err)
	}
	if err := writeBenchCSV(out, peer, marks, rows); err != nil {
		out.Close()
		return fmt.Errorf("--csv %s: %w", path, err)
	}
	return out.Close()
}

// writeBenchCSV writes one line per row. gap and deviation are fractions,
// as in the report; empty cells mean no value.
//
// Each mark T adds bound_T, plan_T, bound_gap_T (how far the bound falls
// short of the reference, a fraction) and deviation_T.
func writeBenchCSV(w io.Writer, peer bool, marks []time.Duration, rows []*benchResult) error {
	cw := csv.NewWriter(w)
	head := []string{"name", "rule", "rule_chosen_by", "format", "file", "index", "sense", "size", "reference", "kind", "status", "plan", "bound", "gap", "proved", "stop", "rounds", "seconds", "threads"}
	for _, at := range marks {
		mk := markName(at)
		head = append(head, "bound_"+mk, "plan_"+mk, "bound_gap_"+mk, "deviation_"+mk)
	}
	if peer {
		head = append(head, "cbc_status", "cbc_plan", "cbc_bound", "cbc_gap", "cbc_seconds", "cbc_threads")
	}
	head = append(head, "deviation")
	if peer {
		head = append(head, "cbc_deviation")
	}
	head = append(head, "conflicts", "note")
	_ = cw.Write(head)
	num := func(v float64, ok bool) string {
		if !ok || math.IsNaN(v) || math.IsInf(v, 0) {
			return ""
		}
		return instances.FormatNumber(v)
	}
	frac := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return ""
		}
		if math.Abs(v) < 1e-12 {
			return "0" // rounding noise, and no "-0"
		}
		return strconv.FormatFloat(v, 'g', 6, 64)
	}
	for _, r := range rows {
		sense := ""
		if r.status != "error" || r.size != "" {
			sense = r.sense.String()
		}
		ref := "" // as written in the manifest, every digit kept
		if r.row.hasReference {
			ref = strconv.FormatFloat(r.row.reference, 'f', -1, 64)
		}
		rec := []string{r.row.name, r.rule, r.ruleBy, r.row.format, r.row.file, r.row.index, sense, r.size, ref, r.row.kind, r.status}
		if r.status == "error" {
			rec = append(rec, "", "", "", "", "", "", "")
		} else {
			rec = append(rec, num(r.plan, r.hasPlan), num(r.bound, r.hasBound), frac(r.gap), strconv.FormatBool(r.proved),
				r.stop, strconv.Itoa(r.rounds), strconv.FormatFloat(r.seconds, 'f', 2, 64))
		}
		rec = append(rec, strconv.Itoa(r.threads))
		for k := range marks {
			if k >= len(r.marks) {
				rec = append(rec, "", "", "", "")
				continue
			}
			mv := r.marks[k]
			rec = append(rec, num(mv.bound, mv.hasBound), num(mv.plan, mv.hasPlan),
				frac(boundGap(mv.bound, mv.hasBound, r)), frac(deviation(mv.plan, mv.hasPlan, r)))
		}
		if peer {
			if p := r.peer; p != nil {
				secs := ""
				if p.status != "not-run" {
					secs = strconv.FormatFloat(p.seconds, 'f', 2, 64)
				}
				rec = append(rec, p.status, num(p.plan, p.hasPlan), num(p.bound, p.hasBound), frac(p.gap()), secs, strconv.Itoa(p.threads))
			} else {
				rec = append(rec, "", "", "", "", "", "")
			}
		}
		rec = append(rec, frac(deviation(r.plan, r.hasPlan, r)))
		if peer {
			rec = append(rec, frac(deviation(r.peer.planOrNaN(), r.peer != nil && r.peer.hasPlan, r)))
		}
		note := r.note
		if p := r.peer; p != nil && p.note != "" {
			if note != "" {
				note += "; "
			}
			note += "cbc: " + p.note
		}
		rec = append(rec, strings.Join(conflicts(r), "; "), note)
		_ = cw.Write(rec)
	}
	cw.Flush()
	return cw.Error()
}

// writeBenchChartFile draws the chart to path.
func writeBenchChartFile(path, manifest string, peer, several bool, rows []*benchResult) error {
	out, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("--chart: %w", err)
	}
	if err := writeBenchChart(out, filepath.Base(manifest), peer, several, rows); err != nil {
		out.Close()
		return fmt.Errorf("--chart %s: %w", path, err)
	}
	return out.Close()
}

var (
	benchPincerColour = color.RGBA{R: 31, G: 94, B: 160, A: 255}
	benchPeerColour   = color.RGBA{R: 196, G: 78, B: 32, A: 255}
)

// writeBenchChart draws each row's deviation from the reference in
// percent, pincer's and the peer's side by side at the instance's
// position; rows without a plan or a reference have no point. The chart
// depends only on the rows, so the same table gives the same file.
func writeBenchChart(w io.Writer, title string, peer, several bool, rows []*benchResult) error {
	p := plot.New()
	p.Title.Text = title + ": plan deviation from the reference (positive: worse)"
	p.Y.Label.Text = "deviation (%)"
	names := make([]string, len(rows))
	var ours, theirs plotter.XYs
	const shift = 0.15
	for k, r := range rows {
		names[k] = benchLabel(r.row.name, r.rule, several)
		if d := deviation(r.plan, r.hasPlan, r); !math.IsNaN(d) {
			ours = append(ours, plotter.XY{X: float64(k) - shift, Y: 100 * d})
		}
		if peer {
			if d := deviation(r.peer.planOrNaN(), r.peer != nil && r.peer.hasPlan, r); !math.IsNaN(d) {
				theirs = append(theirs, plotter.XY{X: float64(k) + shift, Y: 100 * d})
			}
		}
	}
	p.NominalX(names...)
	p.X.Tick.Label.Rotation = math.Pi / 2
	p.X.Tick.Label.XAlign = draw.XRight
	p.X.Tick.Label.YAlign = draw.YCenter
	p.Add(plotter.NewGrid())
	zero, err := plotter.NewLine(plotter.XYs{{X: -0.5, Y: 0}, {X: float64(len(rows)) - 0.5, Y: 0}})
	if err != nil {
		return err
	}
	zero.Color = color.Gray{Y: 100}
	p.Add(zero)
	series := func(pts plotter.XYs, label string, c color.Color, shape draw.GlyphDrawer) error {
		if len(pts) == 0 {
			return nil
		}
		s, err := plotter.NewScatter(pts)
		if err != nil {
			return err
		}
		s.GlyphStyle.Color, s.GlyphStyle.Shape, s.GlyphStyle.Radius = c, shape, vg.Points(3)
		p.Add(s)
		p.Legend.Add(label, s)
		return nil
	}
	if err := series(ours, "pincer", benchPincerColour, draw.CircleGlyph{}); err != nil {
		return err
	}
	if err := series(theirs, "cbc", benchPeerColour, draw.PyramidGlyph{}); err != nil {
		return err
	}
	p.Legend.Top = true
	// Room above the highest point for the legend.
	lo, hi := 0.0, 0.0
	for _, pts := range []plotter.XYs{ours, theirs} {
		for _, q := range pts {
			lo, hi = math.Min(lo, q.Y), math.Max(hi, q.Y)
		}
	}
	// At least 0.1 percentage points tall, so that rounding in the
	// references (a few 1e-8 %) does not fill the chart.
	if hi-lo < 0.1 {
		hi = lo + 0.1
	}
	p.Y.Min, p.Y.Max = lo-0.05*(hi-lo), hi+0.25*(hi-lo)
	p.X.Min, p.X.Max = -0.5, math.Max(0.5, float64(len(rows))-0.5)
	width := vg.Length(math.Max(6, 0.22*float64(len(rows)))) * vg.Inch
	c := vgsvg.New(width, 5*vg.Inch)
	p.Draw(draw.New(c))
	if _, err := c.WriteTo(w); err != nil {
		return fmt.Errorf("writing the chart: %w", err)
	}
	return nil
}
