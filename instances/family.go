// Package instances holds what every problem family shares with the command
// line: the Family and Model interfaces, option descriptions the command
// line turns into validated flags, and the one parse-error shape all readers
// use. It does not depend on any command-line library.
//
// A family implements Family and Model; optional abilities (verify, MPS
// export, plan files, generators, demos) are separate small interfaces that
// the command line discovers by type assertion.
package instances

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"pincer/decomp"
)

// Family reads the input formats of one kind of planning problem.
type Family interface {
	// Name is a short lowercase word, e.g. "gap".
	Name() string
	// Formats lists the --format values the family reads.
	Formats() []Format
	// Options lists the family's model options; the command line offers
	// exactly these (and no other family's) for its formats.
	Options() []Option
	// Relaxations lists the accepted --relax values, the default first.
	Relaxations() []string
	// Load reads path (a file or folder, see Format.Folder) in format
	// with validated option values.
	Load(format, path string, v Values) (Model, error)
}

// Format is one input layout of a family.
type Format struct {
	Name   string // the --format value
	About  string // one line for help
	Folder bool   // the input is a folder, not a file
}

// Model is a loaded instance.
type Model interface {
	Name() string
	// Size describes the dimensions and variant in a few words.
	Size() string
	Sense() decomp.Sense
	// Problem builds the engine problem.
	Problem() (*decomp.Problem, error)
	// PlanJSON is the plan's entry in the JSON report (nil for no plan).
	PlanJSON(p *decomp.Plan) (any, error)
	// Extra adds family keys to the report's "family" object.
	Extra(res *decomp.Result) (map[string]any, error)
	// Resources lists the shared resources for the summary.
	Resources(res *decomp.Result) ([]Resource, error)
}

// Resource is one shared resource in a summary.
type Resource struct {
	Name     string
	Capacity float64
	Load     float64
	Price    float64 // value of one more unit
	Binding  bool
}

// Verdict is the outcome of an independent plan check.
type Verdict struct {
	Value    float64
	Feasible bool
	Problems []string
}

// Verifier checks a plan file by a path that shares nothing with the solver.
type Verifier interface {
	Verify(r io.Reader, file string) (Verdict, error)
}

// NoPlanNoter says, in the family's words, what a run without a plan
// means (for example which option always gives one); the command line
// adds it to its no-plan message.
type NoPlanNoter interface {
	NoPlanNote() string
}

// RuleChooser is a model that names its default price-update rule (one
// of decomp.Rules()), chosen from measurements on its family's benchmark
// sets. A rule given on the command line wins; a name the engine does not
// know, or a rule the problem is too large for, falls back to the
// engine's default.
type RuleChooser interface {
	DefaultRule() string
}

// MPSExporter writes the full model in free MPS.
type MPSExporter interface {
	WriteMPS(w io.Writer) error
}

// Tables creates the extra tables that go with a plan (e.g. a site table
// beside the lane plan). A nil Tables means no extra tables are wanted.
type Tables interface {
	// Create opens the table with the given suffix (e.g. "sites").
	Create(suffix string) (io.WriteCloser, error)
}

// PlanWriter writes a result's plan as CSV, with optional extra tables
// (which may show the result's prices beside the plan).
type PlanWriter interface {
	// PlanTables lists the suffixes of the extra tables WritePlan creates.
	PlanTables() []string
	WritePlan(w io.Writer, res *decomp.Result, extra Tables) error
}

// Sink receives the files a generator writes.
type Sink interface {
	// Create opens a file; name is "" for a single-file recipe.
	Create(name string) (io.WriteCloser, error)
}

// Recipe is one instance generator, `pincer gen NAME`.
type Recipe struct {
	Name    string
	Usage   string // argument synopsis after the name
	Short   string
	Options []Option
	// Files, when set, makes the output a folder holding these files;
	// otherwise the output is one file (standard output by default).
	Files []string
	// Run generates and writes the instance; the string summarises it.
	Run func(v Values, out Sink) (string, error)
}

// Generator offers instance generators.
type Generator interface {
	Recipes() []Recipe
}

// Scenario is an invented demo, `pincer demo --scenario NAME`.
type Scenario struct {
	Name    string
	About   string
	Options []Option
	// Rounds is the default round limit (0 none).
	Rounds int
	// Report is the report file name offered in the help.
	Report string
	// Load builds the scenario's model and writes its introduction.
	Load func(w io.Writer, v Values) (Model, error)
	// Explain writes what the result means in the scenario's words.
	Explain func(w io.Writer, m Model, res *decomp.Result) error
}

// Demo offers invented scenarios.
type Demo interface {
	Scenarios() []Scenario
}

// Adjuster is a model whose shared resources can be changed, for what-if
// questions ("pincer whatif"). Resources are named as Resources names
// them (a family may accept other names too, such as an id).
type Adjuster interface {
	// Capacity returns the named resource's capacity.
	Capacity(resource string) (float64, error)
	// WithCapacity returns a copy of the model with the named resource's
	// capacity set; the copy shares nothing mutable with the model. A
	// capacity the family cannot take (negative, or not whole where the
	// data are whole) is an error.
	WithCapacity(resource string, capacity float64) (Model, error)
}

// Explainer is a model that adds lines of its own to the run summary, in
// its users' words (for example "one more machine of class Press between
// hours 40 and 52 would save about 310").
type Explainer interface {
	Explain(res *decomp.Result) ([]string, error)
}

// Artefacts is a model that writes files of its own after a run (a Gantt
// chart, say), named by its options.
type Artefacts interface {
	// Outputs lists the files it will write, so that the command line can
	// check before solving that they can be written.
	Outputs() []string
	// WriteArtefacts writes them from the run's result.
	WriteArtefacts(res *decomp.Result) error
}

// Switcher is a model whose named parts (facility sites, say) can be
// forced open or closed, for what-if questions.
type Switcher interface {
	// WithSwitch returns a copy of the model with the named part forced
	// open (open true) or closed; the copy shares nothing mutable.
	WithSwitch(part string, open bool) (Model, error)
}

// Kind is the type of an option's value.
type Kind int8

// Option kinds.
const (
	String Kind = iota
	Int
	Float
	Bool
)

func (k Kind) String() string {
	return [...]string{"string", "int", "float", "bool"}[k]
}

// Option describes one model or recipe option.
type Option struct {
	Name    string
	Usage   string
	Kind    Kind
	Default string // in the text form a user types
	// Allowed lists the accepted values of a String option (empty: any);
	// the command line also offers them for shell completion.
	Allowed []string
	// Min and Max bound Int and Float options when HasMin/HasMax are set.
	Min, Max       float64
	HasMin, HasMax bool
}

// Range says which values the option accepts, for messages.
func (o Option) Range() string {
	switch {
	case len(o.Allowed) > 0:
		return "one of " + strings.Join(o.Allowed, ", ")
	case o.Kind == Bool:
		return "true or false"
	case o.HasMin && o.HasMax:
		return fmt.Sprintf("%s..%s", FormatNumber(o.Min), FormatNumber(o.Max))
	case o.HasMin:
		return "at least " + FormatNumber(o.Min)
	case o.HasMax:
		return "at most " + FormatNumber(o.Max)
	case o.Kind == Int:
		return "an integer"
	case o.Kind == Float:
		return "a number"
	}
	return "any text"
}

// Parse checks a value typed by the user and returns it as string, int,
// float64 or bool. The error names the option and the allowed range.
func (o Option) Parse(s string) (any, error) {
	bad := func() error { return fmt.Errorf("--%s %q: want %s", o.Name, s, o.Range()) }
	var v any
	var f float64
	switch o.Kind {
	case String:
		if len(o.Allowed) > 0 {
			ok := false
			for _, a := range o.Allowed {
				ok = ok || a == s
			}
			if !ok {
				return nil, bad()
			}
		}
		return s, nil
	case Bool:
		b, err := strconv.ParseBool(s)
		if err != nil {
			return nil, bad()
		}
		return b, nil
	case Int:
		n, err := strconv.Atoi(strings.TrimSpace(s))
		if err != nil {
			return nil, bad()
		}
		v, f = n, float64(n)
	case Float:
		x, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) {
			return nil, bad()
		}
		v, f = x, x
	}
	if (o.HasMin && f < o.Min) || (o.HasMax && f > o.Max) {
		return nil, bad()
	}
	return v, nil
}

// Values holds parsed option values by name; options the user left out hold
// their defaults.
type Values map[string]any

// Int returns an Int option (0 if absent).
func (v Values) Int(name string) int { n, _ := v[name].(int); return n }

// Float returns a Float option (0 if absent).
func (v Values) Float(name string) float64 { f, _ := v[name].(float64); return f }

// String returns a String option ("" if absent).
func (v Values) String(name string) string { s, _ := v[name].(string); return s }

// Bool returns a Bool option (false if absent).
func (v Values) Bool(name string) bool { b, _ := v[name].(bool); return b }

// Defaults parses every option's default.
func Defaults(opts []Option) (Values, error) {
	v := Values{}
	for _, o := range opts {
		x, err := o.Parse(o.Default)
		if err != nil {
			return nil, fmt.Errorf("default of %w", err)
		}
		v[o.Name] = x
	}
	return v, nil
}

// FormatNumber writes v in plain decimal notation with at most 10
// significant digits after rounding away binary noise
// (1862.9699999999998 -> 1862.97), so values computed from data read as the
// data do.
func FormatNumber(v float64) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return strconv.FormatFloat(v, 'g', -1, 64)
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 10, 64), 64)
	if r == 0 {
		r = 0 // no "-0"
	}
	return strconv.FormatFloat(r, 'f', -1, 64)
}

// RoundNumber is v rounded as FormatNumber writes it, for JSON.
func RoundNumber(v float64) float64 {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	r, _ := strconv.ParseFloat(strconv.FormatFloat(v, 'g', 10, 64), 64)
	return r
}

// ParseError is the one shape of a reader's fault: the file, the 1-based
// line and byte column (0 when unknown), the 1-based token number (for CSV
// files the field number; 0 when no single token is at fault), what was
// expected there, and in Err what was found instead.
type ParseError struct {
	File     string
	Line     int
	Column   int
	Token    int
	Expected string
	Err      error
}

// Error formats the fault as "file:line:column: token N: expected X: got Y".
func (e *ParseError) Error() string {
	var b strings.Builder
	file := e.File
	if file == "" {
		file = "<input>"
	}
	b.WriteString(file)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
		if e.Column > 0 {
			fmt.Fprintf(&b, ":%d", e.Column)
		}
	}
	b.WriteString(": ")
	if e.Token > 0 {
		fmt.Fprintf(&b, "token %d: ", e.Token)
	}
	b.WriteString("expected ")
	b.WriteString(e.Expected)
	if e.Err != nil {
		b.WriteString(": ")
		b.WriteString(e.Err.Error())
	}
	return b.String()
}

// Unwrap returns the underlying cause.
func (e *ParseError) Unwrap() error { return e.Err }

// Exact is a model that can be searched to proof (solve --exact): a
// Lagrangian branch and bound over its problem (decomp.Search), with the
// model's brancher splitting the nodes on the family's own variables.
type Exact interface {
	// ExactProblem builds a fresh copy of the problem the search bounds
	// and repairs at its nodes (it may differ from Problem in repair
	// effort only); the search calls it once per worker.
	ExactProblem() (*decomp.Problem, error)
	// Brancher returns the rule that splits a node.
	Brancher() (decomp.Brancher, error)
}
