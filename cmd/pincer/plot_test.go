package main

import (
	"bytes"
	"context"
	"encoding/xml"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pincer/decomp"
	"pincer/subproblem"
)

// svgTexts parses an SVG document and returns its text elements; a file
// that is not well-formed XML fails the test.
func svgTexts(t *testing.T, data []byte) []string {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	var texts []string
	inText, sawSVG := false, false
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("the plot is not well-formed XML: %v", err)
		}
		switch el := tok.(type) {
		case xml.StartElement:
			sawSVG = sawSVG || el.Name.Local == "svg"
			inText = el.Name.Local == "text"
		case xml.EndElement:
			inText = false
		case xml.CharData:
			if inText {
				texts = append(texts, strings.TrimSpace(string(el)))
			}
		}
	}
	if !sawSVG {
		t.Fatal("no svg element")
	}
	return texts
}

// TestConvergencePlot: solve --plot writes an SVG with both panels, the
// legend entries and the names of binding rows, and the same run drawn
// twice gives the same bytes.
func TestConvergencePlot(t *testing.T) {
	path := filepath.Join(t.TempDir(), "run.svg")
	code, _, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--rounds", "60", "--relax", "choice",
		"--plot", path, testdata("gap-c-5x30.txt"))
	if code != exitOK && code != exitNoPlan {
		t.Fatalf("exit %d: %s", code, errs)
	}
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	texts := strings.Join(svgTexts(t, data), "|")
	for _, want := range []string{"bound", "plan value", "gap", "prices of the most binding rows", "time (s)", "agent"} {
		if !strings.Contains(texts, want) {
			t.Errorf("plot lacks %q; texts: %s", want, texts)
		}
	}

	p := manyRowsRun(t)
	trace := newPriceTrace(len(p.Rows))
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 700, Gap: -1, Observer: trace})
	if err != nil {
		t.Fatal(err)
	}
	if len(trace.rounds) > trace.limit || len(trace.rounds) < trace.limit/2 {
		t.Errorf("trace kept %d snapshots of 700 rounds, limit %d", len(trace.rounds), trace.limit)
	}
	var a, b bytes.Buffer
	if err := writeConvergenceSVG(&a, "same", res, trace, 5); err != nil {
		t.Fatal(err)
	}
	if err := writeConvergenceSVG(&b, "same", res, trace, 5); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(a.Bytes(), b.Bytes()) {
		t.Fatal("one run drawn twice gives different files")
	}
	svgTexts(t, a.Bytes())
}

// manyRowsRun is a small problem of choice blocks over 40 capacity rows,
// for the trace test.
func manyRowsRun(t *testing.T) *decomp.Problem {
	t.Helper()
	const n, m = 600, 40
	rows := make([]decomp.Row, m)
	for r := range rows {
		rows[r] = decomp.Row{Name: "slot", Sense: decomp.LessEqual, RHS: n / m / 2}
	}
	blocks := make([]decomp.Block, n)
	for k := range blocks {
		c := &subproblem.Choice{}
		for o := 0; o < 4; o++ {
			c.Options = append(c.Options, subproblem.Option{Cost: float64((k*31+o*17)%23) + 0.1*float64(o),
				Use: []decomp.Entry{{Index: (k*7 + o*13) % m, Value: 1}}})
		}
		blocks[k] = c
	}
	return &decomp.Problem{Name: "slots", Sense: decomp.Minimise, Rows: rows, Blocks: blocks}
}
