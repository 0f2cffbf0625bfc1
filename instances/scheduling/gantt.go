package scheduling

import (
	"bufio"
	"encoding/xml"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// GanttOptions shape the chart WriteGanttSVG draws. The zero value gives
// the defaults.
type GanttOptions struct {
	// Width is the width of the time axis in pixels (0: 1000).
	Width int
	// Title heads the chart (empty: the instance name).
	Title string
	// DetailLimit is the most jobs drawn as one bar each (0: 400); past it
	// the chart aggregates time into buckets.
	DetailLimit int
	// Buckets is the number of time buckets of an aggregated chart (0: 250).
	Buckets int
}

// Limits of the drawing.
const (
	ganttMaxLanes   = 120  // most machine lanes; more machines are drawn one lane per class
	ganttMaxBuckets = 2000 // most time buckets of an aggregated chart
)

// Colours: one fill per class for jobs on time, one for late jobs.
func ganttPalette() [6]string {
	return [...]string{"#4e79a7", "#59a14f", "#9c755f", "#76b7b2", "#b07aa1", "#8c8c8c"}
}

const (
	ganttLate     = "#e15759"
	ganttLateEdge = "#7a0f12"
)

// WriteGanttSVG draws the schedule as an SVG Gantt chart: one lane per
// machine (class by class), a time axis with ticks, and a legend.
//
// Up to opt.DetailLimit jobs on at most 120 machines, every job is a bar
// coloured by class, labelled with its name (shortened if need be) where
// the bar is wide enough, with a tooltip giving start, end, due date and
// tardiness; late jobs are drawn in red with a dark outline and a small
// triangle at their due date. Past that the
// chart aggregates: time is cut into opt.Buckets buckets, each lane shows
// per bucket the share of time its machine is busy (darker is busier) and
// a red strip where late jobs end (redder is more of them). With more than
// 120 machines the lanes are the classes (busy share over the class's
// machines), at most 120 of them. The file then has at most a few thousand
// elements whatever the number of jobs (at most 2 per lane and bucket). The
// output depends only on the arguments.
func WriteGanttSVG(w io.Writer, in *Instance, s *Schedule, opt GanttOptions) error {
	if err := ioCheckShape(in, s); err != nil {
		return err
	}
	if opt.Width <= 0 {
		opt.Width = 1000
	}
	if opt.Title == "" {
		opt.Title = in.Name
	}
	if opt.DetailLimit <= 0 {
		opt.DetailLimit = 400
	}
	if opt.Buckets <= 0 {
		opt.Buckets = 250
	}
	opt.Buckets = min(opt.Buckets, ganttMaxBuckets)
	g := &gantt{in: in, s: s, opt: opt}
	g.layout()
	bw := bufio.NewWriter(w)
	g.w = bw
	g.header()
	g.axis() // before the bars, so that grid lines stay behind them
	if g.detailed {
		g.detail()
	} else {
		g.aggregate()
	}
	g.p("</svg>\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("scheduling: writing Gantt chart: %w", err)
	}
	return nil
}

type gantt struct {
	in  *Instance
	s   *Schedule
	opt GanttOptions
	w   *bufio.Writer

	perClass bool // one lane per class instead of per machine
	detailed bool // one bar per job
	hidden   int  // classes beyond the lane limit, not drawn
	lanes    int
	laneOf   func(j int) int
	span     int // time axis runs 0..span
	left     float64
	top      float64
	laneH    float64
	height   float64
	tardy    int
}

func (g *gantt) p(format string, a ...any) { fmt.Fprintf(g.w, format, a...) }

// ganttNum writes a pixel coordinate with one decimal.
func ganttNum(v float64) string { return strconv.FormatFloat(v, 'f', 1, 64) }

func (g *gantt) x(t float64) float64 { return g.left + t*float64(g.opt.Width)/float64(g.span) }

func (g *gantt) layout() {
	in, s := g.in, g.s
	machines := 0
	first := make([]int, len(in.Classes))
	for k, c := range in.Classes {
		first[k] = machines
		machines += c.Machines
	}
	g.perClass = machines > ganttMaxLanes
	g.detailed = len(in.Jobs) <= g.opt.DetailLimit && !g.perClass
	if g.perClass {
		g.lanes = min(len(in.Classes), ganttMaxLanes)
		g.hidden = len(in.Classes) - g.lanes
		g.laneOf = func(j int) int {
			if s.Class[j] >= g.lanes {
				return -1
			}
			return s.Class[j]
		}
	} else {
		g.lanes = machines
		g.laneOf = func(j int) int { return first[s.Class[j]] + s.Machine[j] }
	}
	g.span = 1
	for j, jb := range in.Jobs {
		end := s.Start[j] + jb.Processing
		g.span = max(g.span, end)
		if end > jb.Due {
			g.tardy++
		}
	}
	longest := 0
	for k := range in.Classes {
		longest = max(longest, len([]rune(ioClassName(in, k))))
	}
	g.left = math.Min(260, 20+7*float64(longest+4))
	g.top = 62
	g.laneH = 24
	if !g.detailed {
		g.laneH = 16
	}
	g.height = g.top + float64(g.lanes)*g.laneH + 50
}

// laneLabel names lane l.
func (g *gantt) laneLabel(l int) string {
	if g.perClass {
		return fmt.Sprintf("%s (%d)", ioClassName(g.in, l), g.in.Classes[l].Machines)
	}
	for k, c := range g.in.Classes {
		if l < c.Machines {
			return fmt.Sprintf("%s %d", ioClassName(g.in, k), l+1)
		}
		l -= c.Machines
	}
	return ""
}

// laneClass is the class drawn in lane l.
func (g *gantt) laneClass(l int) int {
	if g.perClass {
		return l
	}
	for k, c := range g.in.Classes {
		if l < c.Machines {
			return k
		}
		l -= c.Machines
	}
	return 0
}

func (g *gantt) header() {
	width := g.left + float64(g.opt.Width) + 30
	g.p(`<svg xmlns="http://www.w3.org/2000/svg" width="%s" height="%s" viewBox="0 0 %s %s" font-family="sans-serif" font-size="11">`+"\n",
		ganttNum(width), ganttNum(g.height), ganttNum(width), ganttNum(g.height))
	g.p(`<rect width="100%%" height="100%%" fill="#ffffff"/>` + "\n")
	g.p(`<text x="10" y="20" font-size="15" font-weight="bold">%s</text>`+"\n", ganttEscape(g.opt.Title))
	var note string
	if g.detailed {
		note = fmt.Sprintf("%d jobs, %d late (red; a triangle marks the due date); bars are labelled where there is room", len(g.in.Jobs), g.tardy)
	} else {
		lanes := "machine"
		if g.perClass {
			lanes = "class (number of machines)"
		}
		note = fmt.Sprintf("%d jobs, %d late; one lane per %s, time in buckets of %s: shade = share of time busy, red strip = late jobs ending",
			len(g.in.Jobs), g.tardy, lanes, strconv.FormatFloat(g.bucketWidth(), 'f', -1, 64))
		if g.hidden > 0 {
			note += fmt.Sprintf("; the last %d classes are not drawn", g.hidden)
		}
	}
	g.p(`<text x="10" y="36" fill="#444444">%s</text>`+"\n", ganttEscape(note))
	g.legend()
	for l := 0; l < g.lanes; l++ {
		y := g.top + float64(l)*g.laneH
		if l%2 == 1 {
			g.p(`<rect x="%s" y="%s" width="%d" height="%s" fill="#f3f3f3"/>`+"\n", ganttNum(g.left), ganttNum(y), g.opt.Width, ganttNum(g.laneH))
		}
		g.p(`<text x="%s" y="%s" text-anchor="end">%s</text>`+"\n", ganttNum(g.left-6), ganttNum(y+g.laneH/2+4), ganttEscape(g.laneLabel(l)))
	}
}

// legend names the class colours and the late colour in one row.
func (g *gantt) legend() {
	pal := ganttPalette()
	x := 10.0
	item := func(fill, edge, label string) {
		g.p(`<rect x="%s" y="44" width="10" height="10" fill="%s" stroke="%s"/><text x="%s" y="53">%s</text>`+"\n",
			ganttNum(x), fill, edge, ganttNum(x+14), ganttEscape(label))
		x += 14 + 6.2*float64(len([]rune(label))) + 14
	}
	for k := range g.in.Classes {
		if k == len(pal) { // the palette repeats; so would the legend
			break
		}
		item(pal[k], pal[k], ioClassName(g.in, k))
	}
	item(ganttLate, ganttLateEdge, "late")
}

// ganttEscape escapes text for XML.
func ganttEscape(s string) string {
	var b strings.Builder
	xml.EscapeText(&b, []byte(s))
	return b.String()
}

func (g *gantt) detail() {
	in, s := g.in, g.s
	pal := ganttPalette()
	for _, j := range ioScheduleOrder(in, s) {
		jb := in.Jobs[j]
		st, end := s.Start[j], s.Start[j]+jb.Processing
		l := g.laneOf(j)
		x0, x1 := g.x(float64(st)), g.x(float64(end))
		y := g.top + float64(l)*g.laneH + 3
		h := g.laneH - 6
		fill, edge := pal[s.Class[j]%len(pal)], "#ffffff"
		late := end > jb.Due
		if late {
			fill, edge = ganttLate, ganttLateEdge
		}
		name := ioJobName(in, j)
		tip := fmt.Sprintf("%s: %d–%d, due %d", name, st, end, jb.Due)
		if late {
			tip += fmt.Sprintf(", %d late", end-jb.Due)
		}
		stroke := "0.5"
		if late {
			stroke = "1.5"
		}
		g.p(`<g class="job"><title>%s</title><rect x="%s" y="%s" width="%s" height="%s" fill="%s" stroke="%s" stroke-width="%s"/>`,
			ganttEscape(tip), ganttNum(x0), ganttNum(y), ganttNum(math.Max(x1-x0, 0.5)), ganttNum(h), fill, edge, stroke)
		if label := ganttLabel(name, x1-x0); label != "" {
			g.p(`<text x="%s" y="%s" fill="#ffffff">%s</text>`, ganttNum(x0+3), ganttNum(y+h/2+4), ganttEscape(label))
		}
		if late {
			// The due date as a small triangle on the lane's top edge, so
			// the eye sees how late without a line across other bars.
			xd := g.x(float64(jb.Due))
			g.p(`<path class="due" d="M%s %sL%s %sL%s %sZ" fill="%s"/>`,
				ganttNum(xd-3.5), ganttNum(y-3), ganttNum(xd+3.5), ganttNum(y-3), ganttNum(xd), ganttNum(y+3), ganttLateEdge)
		}
		g.p("</g>\n")
	}
}

// bucketWidth is the time span of one bucket of an aggregated chart.
func (g *gantt) bucketWidth() float64 {
	return math.Max(1, math.Ceil(float64(g.span)/float64(g.opt.Buckets)))
}

func (g *gantt) aggregate() {
	in, s := g.in, g.s
	bwid := int(g.bucketWidth())
	nb := (g.span + bwid - 1) / bwid
	busy := make([][]int, g.lanes)
	late := make([][]int, g.lanes)
	for l := range busy {
		busy[l] = make([]int, nb)
		late[l] = make([]int, nb)
	}
	for j, jb := range in.Jobs {
		l := g.laneOf(j)
		if l < 0 {
			continue
		}
		st, end := s.Start[j], s.Start[j]+jb.Processing
		for b := st / bwid; b < nb && b*bwid < end; b++ {
			lo, hi := max(st, b*bwid), min(end, (b+1)*bwid)
			busy[l][b] += hi - lo
		}
		if end > jb.Due {
			late[l][min((end-1)/bwid, nb-1)]++
		}
	}
	pal := ganttPalette()
	maxLate := 1
	for l := range late {
		for _, c := range late[l] {
			maxLate = max(maxLate, c)
		}
	}
	for l := 0; l < g.lanes; l++ {
		k := g.laneClass(l)
		capacity := bwid
		if g.perClass {
			capacity *= in.Classes[k].Machines
		}
		y := g.top + float64(l)*g.laneH
		// Runs of buckets with the same shade (tenths) become one rect.
		shade := func(b int) int { return int(math.Ceil(10 * float64(busy[l][b]) / float64(capacity))) }
		for b := 0; b < nb; {
			sh := shade(b)
			e := b + 1
			for e < nb && shade(e) == sh {
				e++
			}
			if sh > 0 {
				g.p(`<rect class="load" x="%s" y="%s" width="%s" height="%s" fill="%s" fill-opacity="%s"/>`+"\n",
					ganttNum(g.x(float64(b*bwid))), ganttNum(y+2), ganttNum(g.x(float64(min(e*bwid, g.span)))-g.x(float64(b*bwid))), ganttNum(g.laneH-7),
					pal[k%len(pal)], strconv.FormatFloat(float64(sh)/10, 'f', 1, 64))
			}
			b = e
		}
		for b := 0; b < nb; b++ {
			if c := late[l][b]; c > 0 {
				g.p(`<rect class="late" x="%s" y="%s" width="%s" height="4" fill="%s" fill-opacity="%s"/>`+"\n",
					ganttNum(g.x(float64(b*bwid))), ganttNum(y+g.laneH-5), ganttNum(g.x(float64(min((b+1)*bwid, g.span)))-g.x(float64(b*bwid))),
					ganttLate, strconv.FormatFloat(0.3+0.7*float64(c)/float64(maxLate), 'f', 2, 64))
			}
		}
	}
}

// axis draws the time axis with ticks at a round step.
func (g *gantt) axis() {
	y := g.top + float64(g.lanes)*g.laneH
	g.p(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#000000"/>`+"\n", ganttNum(g.left), ganttNum(y), ganttNum(g.x(float64(g.span))), ganttNum(y))
	step := ganttStep(g.span, max(2, g.opt.Width/80))
	for t := 0; t <= g.span; t += step {
		x := g.x(float64(t))
		g.p(`<line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#000000"/><line x1="%s" y1="%s" x2="%s" y2="%s" stroke="#dddddd"/>`+
			`<text x="%s" y="%s" text-anchor="middle">%d</text>`+"\n",
			ganttNum(x), ganttNum(y), ganttNum(x), ganttNum(y+5), ganttNum(x), ganttNum(g.top), ganttNum(x), ganttNum(y), ganttNum(x), ganttNum(y+17), t)
	}
	g.p(`<text x="%s" y="%s" text-anchor="middle" fill="#444444">time</text>`+"\n", ganttNum(g.left+float64(g.opt.Width)/2), ganttNum(y+34))
}

// ganttStep is a round tick step (1, 2 or 5 times a power of ten) giving at
// most about ticks ticks over 0..span.
func ganttStep(span, ticks int) int {
	raw := float64(span) / float64(ticks)
	for p := 1; ; p *= 10 {
		for _, m := range []int{1, 2, 5} {
			if float64(m*p) >= raw {
				return m * p
			}
		}
	}
}

// ganttLabel is the part of name that fits a bar of the given pixel width
// (about 6.2 pixels a character at 11 px), shortened with "…" when needed;
// "" when not even three characters fit.
func ganttLabel(name string, width float64) string {
	r := []rune(name)
	fit := int((width - 6) / 6.2)
	switch {
	case fit >= len(r):
		return name
	case fit >= 4:
		return strings.TrimSpace(string(r[:fit-1])) + "…"
	}
	return ""
}
