package main

import (
	"fmt"
	"io"
	"sort"
	"strings"

	"pincer/decomp"
)

// modelOptions are the family-neutral choices a user makes on the command
// line; each family reads what applies to it.
type modelOptions struct {
	index        int
	sense        string // "", "min" or "max"
	relax        string
	singleSource bool
}

// family reads one input format into a model.
type family struct {
	format string
	about  string
	load   func(file string, o modelOptions) (model, error)
}

// model is a loaded instance as the command line sees it: it builds the
// engine problem and turns results back into the family's words.
type model interface {
	// name and size describe the instance for summaries.
	name() string
	size() string
	sense() decomp.Sense
	problem() (*decomp.Problem, error)
	// writePlan writes a plan as CSV.
	writePlan(w io.Writer, p *decomp.Plan) error
	// planJSON is the plan in the JSON report.
	planJSON(p *decomp.Plan) any
	// extra adds family keys to the JSON report (e.g. "resources").
	extra(res *decomp.Result) map[string]any
	// resources lists shared resources for the summary, most binding first.
	resources(res *decomp.Result) []resourceLine
	// verify checks a plan file by a path that shares nothing with the solver.
	verify(planFile string) (verdict, error)
	// exportMPS writes the full model in free MPS.
	exportMPS(w io.Writer) error
}

// resourceLine is one shared resource in the stdout summary.
type resourceLine struct {
	name     string
	capacity float64
	load     float64
	price    float64 // value of one more unit
	binding  bool
}

// verdict is the outcome of pincer verify.
type verdict struct {
	value    float64
	feasible bool
	problems []string
}

func families() []family {
	return []family{gapFamily(), cflpORLibFamily(), cflpCSVFamily()}
}

// formatHelp is the --format flag's help text, one line per family.
func formatHelp() string {
	var b strings.Builder
	b.WriteString("input format, one of:")
	for _, f := range families() {
		fmt.Fprintf(&b, "\n  %s: %s", f.format, f.about)
	}
	return b.String()
}

func findFamily(format string) (family, error) {
	var names []string
	for _, f := range families() {
		if f.format == format {
			return f, nil
		}
		names = append(names, f.format)
	}
	if format == "" {
		return family{}, badInput(fmt.Errorf("--format is required (one of %s)", strings.Join(names, ", ")))
	}
	return family{}, badInput(fmt.Errorf("unknown --format %q (want one of %s)", format, strings.Join(names, ", ")))
}

// sortResources puts binding resources first, then by price.
func sortResources(rs []resourceLine) {
	sort.SliceStable(rs, func(a, b int) bool {
		if rs[a].binding != rs[b].binding {
			return rs[a].binding
		}
		return rs[a].price > rs[b].price
	})
}

func parseSense(s string, def decomp.Sense) (decomp.Sense, error) {
	switch s {
	case "":
		return def, nil
	case "min":
		return decomp.Minimise, nil
	case "max":
		return decomp.Maximise, nil
	}
	return 0, badInput(fmt.Errorf("unknown --sense %q (want min or max)", s))
}
