package scheduling

import (
	"bytes"
	"encoding/xml"
	"io"
	"strings"
	"testing"
)

// ioSVGCount parses an SVG with encoding/xml and counts elements by name and
// class attribute ("rect", "rect.late", "g.job", "text").
func ioSVGCount(t *testing.T, data []byte) map[string]int {
	t.Helper()
	dec := xml.NewDecoder(bytes.NewReader(data))
	count := map[string]int{}
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("the SVG does not parse as XML: %v", err)
		}
		if se, ok := tok.(xml.StartElement); ok {
			count[se.Name.Local]++
			for _, a := range se.Attr {
				if a.Name.Local == "class" {
					count[se.Name.Local+"."+a.Value]++
				}
			}
		}
	}
	return count
}

func TestGanttDetail(t *testing.T) {
	in := Demo()
	s := ioListSchedule(in)
	var buf bytes.Buffer
	if err := WriteGanttSVG(&buf, in, s, GanttOptions{}); err != nil {
		t.Fatal(err)
	}
	c := ioSVGCount(t, buf.Bytes())
	if c["g.job"] != len(in.Jobs) {
		t.Fatalf("%d job bars, want %d", c["g.job"], len(in.Jobs))
	}
	late := 0
	for j, jb := range in.Jobs {
		if s.Start[j]+jb.Processing > jb.Due {
			late++
		}
	}
	if got := strings.Count(buf.String(), `fill="`+ganttLate+`" stroke="`+ganttLateEdge+`" stroke-width="1.5"`); got != late {
		t.Errorf("%d late bars drawn, the schedule has %d late jobs", got, late)
	}
	// Most bars carry their job's name, whole or shortened.
	labelled := 0
	for j := range in.Jobs {
		name := []rune(ganttEscape(ioJobName(in, j)))
		if strings.Contains(buf.String(), `fill="#ffffff">`+string(name[:3])) {
			labelled++
		}
	}
	if labelled < len(in.Jobs)*2/3 {
		t.Errorf("only %d of %d bars labelled", labelled, len(in.Jobs))
	}
	var again bytes.Buffer
	WriteGanttSVG(&again, in, s, GanttOptions{})
	if !bytes.Equal(buf.Bytes(), again.Bytes()) {
		t.Error("two drawings of the same schedule differ")
	}
}

func TestGanttAggregatesLargeSchedules(t *testing.T) {
	in := Generate(Benchmark5000(2))
	s := ioListSchedule(in)
	if _, err := in.Evaluate(s); err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := WriteGanttSVG(&buf, in, s, GanttOptions{Title: "5,000 jobs & 20 machines"}); err != nil {
		t.Fatal(err)
	}
	if buf.Len() > 2<<20 {
		t.Fatalf("the chart of 5,000 jobs takes %d bytes, want under 2 MB", buf.Len())
	}
	c := ioSVGCount(t, buf.Bytes())
	if c["g.job"] != 0 || c["rect.load"] == 0 || c["rect.late"] == 0 || c["rect"] > 20*2*250+100 {
		t.Fatalf("unexpected elements for an aggregated chart: %v", c)
	}
	var again bytes.Buffer
	WriteGanttSVG(&again, in, s, GanttOptions{Title: "5,000 jobs & 20 machines"})
	if !bytes.Equal(buf.Bytes(), again.Bytes()) {
		t.Error("two drawings of the same schedule differ")
	}
	t.Logf("5,000 jobs: %d bytes, %d rects", buf.Len(), c["rect"])

	// Many machines: one lane per class.
	many := Generate(GenerateConfig{Jobs: 2000, Machines: 300, Classes: 2, TF: 0.5, RDD: 0.5, Seed: 1})
	buf.Reset()
	if err := WriteGanttSVG(&buf, many, ioListSchedule(many), GanttOptions{}); err != nil {
		t.Fatal(err)
	}
	if c := ioSVGCount(t, buf.Bytes()); c["rect.load"] == 0 || c["rect"] > 2*2*250+100 || !strings.Contains(buf.String(), "K1 (150)") {
		t.Fatalf("300 machines: %v", c)
	}
}

func TestGanttStep(t *testing.T) {
	// Hand-worked: 0..730 in at most 12 ticks wants a step >= 60.8 -> 100.
	for _, c := range [][3]int{{730, 12, 100}, {10, 12, 1}, {50, 12, 5}, {3000, 12, 500}, {1, 12, 1}} {
		if got := ganttStep(c[0], c[1]); got != c[2] {
			t.Errorf("ganttStep(%d, %d) = %d, want %d", c[0], c[1], got, c[2])
		}
	}
}

// Many one-machine classes: 120 lanes are drawn, the rest is named.
func TestGanttCapsLanes(t *testing.T) {
	in := Generate(GenerateConfig{Jobs: 300, Machines: 200, Classes: 200, TF: 0.5, RDD: 0.5, Seed: 2})
	var buf bytes.Buffer
	if err := WriteGanttSVG(&buf, in, ioListSchedule(in), GanttOptions{}); err != nil {
		t.Fatal(err)
	}
	c := ioSVGCount(t, buf.Bytes())
	if c["g.job"] != 0 || !strings.Contains(buf.String(), "the last 80 classes are not drawn") || strings.Contains(buf.String(), ">K121 (1)<") {
		t.Fatalf("lane cap not applied: %v", c)
	}
}

// The due-date mark of a late job sits at its due date: one job, due 2,
// ends at 4 on a 1000-pixel axis over 0..4, so the mark is at left + 500.
func TestGanttDueMark(t *testing.T) {
	in := &Instance{Name: "one", Classes: []Class{{ID: "M", Machines: 1}}, Jobs: []Job{{ID: "a", Processing: 4, Weight: 1, Due: 2}}}
	var buf bytes.Buffer
	if err := WriteGanttSVG(&buf, in, &Schedule{Class: []int{0}, Machine: []int{0}, Start: []int{0}}, GanttOptions{}); err != nil {
		t.Fatal(err)
	}
	g := &gantt{in: in, s: &Schedule{Class: []int{0}, Machine: []int{0}, Start: []int{0}}, opt: GanttOptions{Width: 1000, DetailLimit: 400}}
	g.layout()
	want := `<path class="due" d="M` + ganttNum(g.left+500-3.5) + ` `
	if !strings.Contains(buf.String(), want) || !strings.Contains(buf.String(), "a: 0–4, due 2, 2 late") {
		t.Fatalf("no due mark %s or tooltip in\n%s", want, buf.String())
	}
}
