package main

import (
	"fmt"
	"image/color"
	"io"
	"math"
	"os"
	"sort"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"

	"pincer/decomp"
)

// priceTrace keeps snapshots of the prices during a run for the
// convergence plot's price panel. It holds at most priceTraceFloats
// numbers: when full it drops every other snapshot and records half as
// often, so a long run keeps an even trace in bounded memory.
type priceTrace struct {
	every   int
	rounds  []int
	seconds []float64
	prices  [][]float64
	limit   int // snapshots kept at most
}

const priceTraceFloats = 1 << 22 // 32 MiB of prices at most

func newPriceTrace(rows int) *priceTrace {
	return &priceTrace{every: 1, limit: max(8, min(256, priceTraceFloats/max(1, rows)))}
}

// Observe implements decomp.Observer.
func (t *priceTrace) Observe(p *decomp.Progress) {
	if p.Record.Round%t.every != 0 {
		return
	}
	if len(t.rounds) == t.limit {
		k := 0
		for i := range t.rounds {
			if (t.rounds[i]/t.every)%2 == 0 {
				t.rounds[k], t.seconds[k], t.prices[k] = t.rounds[i], t.seconds[i], t.prices[i]
				k++
			}
		}
		t.rounds, t.seconds, t.prices = t.rounds[:k], t.seconds[:k], t.prices[:k]
		t.every *= 2
		if p.Record.Round%t.every != 0 {
			return
		}
	}
	t.rounds = append(t.rounds, p.Record.Round)
	t.seconds = append(t.seconds, p.Record.Elapsed.Seconds())
	t.prices = append(t.prices, append([]float64(nil), p.Prices...))
}

// writePlotFile writes the convergence plot to path.
func writePlotFile(path, title string, res *decomp.Result, trace *priceTrace, top int) error {
	out, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("--plot: %w", err)
	}
	if err := writeConvergenceSVG(out, title, res, trace, top); err != nil {
		out.Close()
		return err
	}
	return out.Close()
}

// observers fans one round out to several observers, in order.
type observers []decomp.Observer

func (o observers) Observe(p *decomp.Progress) {
	for _, ob := range o {
		ob.Observe(p)
	}
}

// writeConvergenceSVG draws the run: the bound and the plan value over
// time with the gap between them shaded, and below it the prices of the
// most binding rows (the largest prices at the best bound) over the same
// time axis. The picture depends only on the result and the trace, so a
// given run always gives the same file.
func writeConvergenceSVG(w io.Writer, title string, res *decomp.Result, trace *priceTrace, top int) error {
	top = max(1, min(top, 6))
	upper, err := boundPanel(title, res)
	if err != nil {
		return err
	}
	lower, err := pricePanel(res, trace, top)
	if err != nil {
		return err
	}
	const width, height = 8 * vg.Inch, 7 * vg.Inch
	c := vgsvg.New(width, height)
	dc := draw.New(c)
	tiles := draw.Tiles{Rows: 2, Cols: 1, PadTop: vg.Points(4), PadBottom: vg.Points(4), PadLeft: vg.Points(4), PadRight: vg.Points(4), PadY: vg.Points(10)}
	canvases := plot.Align([][]*plot.Plot{{upper}, {lower}}, tiles, dc)
	upper.Draw(canvases[0][0])
	lower.Draw(canvases[1][0])
	if _, err := c.WriteTo(w); err != nil {
		return fmt.Errorf("writing the convergence plot: %w", err)
	}
	return nil
}

var (
	boundColour = color.RGBA{R: 31, G: 94, B: 160, A: 255}
	planColour  = color.RGBA{R: 196, G: 78, B: 32, A: 255}
	gapColour   = color.RGBA{R: 230, G: 170, B: 60, A: 90}
	rowColours  = []color.RGBA{
		{R: 31, G: 94, B: 160, A: 255}, {R: 196, G: 78, B: 32, A: 255}, {R: 60, G: 140, B: 60, A: 255},
		{R: 130, G: 60, B: 150, A: 255}, {R: 120, G: 120, B: 120, A: 255}, {R: 170, G: 130, B: 20, A: 255},
	}
)

func boundPanel(title string, res *decomp.Result) (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = "time (s)"
	p.Y.Label.Text = "objective"
	p.Legend.Top = false // the lines meet at the top once the gap closes
	var bound, plan plotter.XYs
	var gapTop, gapBottom plotter.XYs
	for _, h := range res.History {
		x := h.Elapsed.Seconds()
		if !math.IsInf(h.Bound, 0) && !math.IsNaN(h.Bound) {
			bound = append(bound, plotter.XY{X: x, Y: h.Bound})
		}
		if !math.IsNaN(h.PlanValue) {
			plan = append(plan, plotter.XY{X: x, Y: h.PlanValue})
			if !math.IsNaN(h.Bound) && !math.IsInf(h.Bound, 0) {
				gapTop = append(gapTop, plotter.XY{X: x, Y: h.PlanValue})
				gapBottom = append(gapBottom, plotter.XY{X: x, Y: h.Bound})
			}
		}
	}
	if len(gapTop) > 1 {
		ring := append(plotter.XYs(nil), gapTop...)
		for i := len(gapBottom) - 1; i >= 0; i-- {
			ring = append(ring, gapBottom[i])
		}
		poly, err := plotter.NewPolygon(ring)
		if err != nil {
			return nil, err
		}
		poly.Color = gapColour
		poly.LineStyle.Width = 0
		p.Add(poly)
		p.Legend.Add("gap", poly)
	}
	if len(bound) > 0 {
		l, err := plotter.NewLine(bound)
		if err != nil {
			return nil, err
		}
		l.Color, l.StepStyle = boundColour, plotter.PostStep
		p.Add(l)
		p.Legend.Add("bound", l)
	}
	if len(plan) > 0 {
		l, err := plotter.NewLine(plan)
		if err != nil {
			return nil, err
		}
		l.Color, l.StepStyle = planColour, plotter.PostStep
		p.Add(l)
		p.Legend.Add("plan value", l)
	}
	return p, nil
}

func pricePanel(res *decomp.Result, trace *priceTrace, top int) (*plot.Plot, error) {
	p := plot.New()
	p.Title.Text = "prices of the most binding rows"
	p.X.Label.Text = "time (s)"
	p.Y.Label.Text = "price"
	p.Legend.Top = true
	rows := make([]int, len(res.Prices))
	for r := range rows {
		rows[r] = r
	}
	sort.SliceStable(rows, func(a, b int) bool { return math.Abs(res.Prices[rows[a]]) > math.Abs(res.Prices[rows[b]]) })
	if len(rows) > top {
		rows = rows[:top]
	}
	for k, r := range rows {
		if res.Prices[r] == 0 {
			break // no binding rows beyond
		}
		var pts plotter.XYs
		if trace != nil {
			for i, snap := range trace.prices {
				if r < len(snap) {
					pts = append(pts, plotter.XY{X: trace.seconds[i], Y: snap[r]})
				}
			}
		}
		if len(pts) == 0 {
			continue
		}
		l, err := plotter.NewLine(pts)
		if err != nil {
			return nil, err
		}
		l.Color = rowColours[k%len(rowColours)]
		p.Add(l)
		name := fmt.Sprintf("row %d", r+1)
		if r < len(res.Rows) && res.Rows[r].Name != "" {
			name = res.Rows[r].Name
		}
		p.Legend.Add(name, l)
	}
	return p, nil
}
