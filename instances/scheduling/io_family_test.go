package scheduling

import (
	"bytes"
	"errors"
	"io"
	"reflect"
	"strings"
	"testing"

	"pincer/decomp"
	"pincer/instances"
)

// ioTables collects the extra tables of WritePlanFiles in memory.
type ioTables map[string]*bytes.Buffer

func (t ioTables) Create(suffix string) (io.WriteCloser, error) {
	t[suffix] = &bytes.Buffer{}
	return ioCloser{t[suffix]}, nil
}

// ioSink collects generated files in memory.
type ioSink map[string]*bytes.Buffer

func (s ioSink) Create(name string) (io.WriteCloser, error) {
	s[name] = &bytes.Buffer{}
	return ioCloser{s[name]}, nil
}

// slotPrices puts price v on slots from..to-1 of class k.
func ioSlotPrices(in *Instance, k, from, to int, v float64) []float64 {
	offsets, total := SlotRows(in.Horizons())
	p := make([]float64, total)
	for t := from; t < to; t++ {
		p[offsets[k]+t] = v
	}
	return p
}

func TestWritePlanFiles(t *testing.T) {
	in := ioSmallInstance(t)
	_, s := ioBruteForce(t, in)
	res := &decomp.Result{Plan: &decomp.Plan{Detail: s}, Prices: ioSlotPrices(in, 1, 2, 6, 1.5)}
	var plan bytes.Buffer
	tabs := ioTables{}
	if err := WritePlanFiles(&plan, in, res, tabs); err != nil {
		t.Fatal(err)
	}
	if got, err := ReadScheduleCSV(&plan, "schedule.csv", in); err != nil || !reflect.DeepEqual(got, s) {
		t.Fatalf("schedule.csv reads back as %+v (%v), want %+v", got, err, s)
	}
	// One window, mill slots 2..5, 4 × 1.5 = 6.
	if got := tabs["windows"].String(); got != "class,class_name,from,to,saving,peak_price\nmill,Five-axis mill,2,6,6,1.5\n" {
		t.Fatalf("windows table %q", got)
	}
	rs, err := WindowResources(in, s, res.Prices, 5)
	if err != nil || len(rs) != 1 || rs[0].Price != 6 || rs[0].Capacity != 1 || rs[0].Load != 1 || !rs[0].Binding {
		t.Fatalf("resources %+v %v", rs, err)
	}
	rows, err := WindowRows(in, res.Prices, 5)
	if err != nil || len(rows) != 1 || !strings.Contains(rows[0].Text, "Five-axis mill between 2 and 6 would save up to about 6") {
		t.Fatalf("window rows %+v %v", rows, err)
	}
	if _, err := ioScheduleOf(in, &decomp.Plan{Detail: "not a schedule"}); err == nil {
		t.Fatal("a plan of another kind was accepted")
	}
	if err := WritePlanFiles(&plan, in, &decomp.Result{}, nil); err == nil {
		t.Fatal("a result without a plan was written")
	}
}

func TestGenerateRecipe(t *testing.T) {
	r := GenerateRecipe()
	v, err := instances.Defaults(r.Options)
	if err != nil {
		t.Fatal(err)
	}
	v["classes"], v["machines"], v["release-factor"], v["eligible-share"] = 2, 3, 0.5, 0.5
	sink := ioSink{}
	summary, err := r.Run(v, sink)
	if err != nil || summary != "50 jobs, 3 machines in 2 classes (machines.csv, jobs.csv)" {
		t.Fatalf("%q %v", summary, err)
	}
	in, err := readCSVTables(sink[JobsFile], sink[MachinesFile], JobsFile, MachinesFile)
	if err != nil {
		t.Fatal(err)
	}
	want := Generate(GenerateConfig{Jobs: 50, Machines: 3, Classes: 2, TF: 0.6, RDD: 0.6, MaxProcessing: 100, ReleaseFactor: 0.5, EligibleShare: 0.5, Seed: 1})
	want.Name = ""
	in.Name = ""
	if !reflect.DeepEqual(in, want) {
		t.Fatal("the recipe's folder differs from Generate")
	}
	v["classes"], v["machines"] = 3, 2
	if _, err := r.Run(v, ioSink{}); err == nil {
		t.Fatal("2 machines in 3 classes accepted")
	}
}

// ioFakeModel stands for the family's model in the demo test.
type ioFakeModel struct{ in *Instance }

func (m ioFakeModel) Name() string                                           { return m.in.Name }
func (m ioFakeModel) Size() string                                           { return "" }
func (m ioFakeModel) Sense() decomp.Sense                                    { return decomp.Minimise }
func (m ioFakeModel) Problem() (*decomp.Problem, error)                      { return nil, errors.New("not built here") }
func (m ioFakeModel) PlanJSON(*decomp.Plan) (any, error)                     { return nil, nil }
func (m ioFakeModel) Extra(*decomp.Result) (map[string]any, error)           { return nil, nil }
func (m ioFakeModel) Resources(*decomp.Result) ([]instances.Resource, error) { return nil, nil }

func TestDemoScenario(t *testing.T) {
	sc := DemoScenario(func(in *Instance) (instances.Model, error) { return ioFakeModel{in}, nil },
		func(m instances.Model) (*Instance, error) { return m.(ioFakeModel).in, nil })
	var out bytes.Buffer
	m, err := sc.Load(&out, nil)
	if err != nil {
		t.Fatal(err)
	}
	in := m.(ioFakeModel).in
	if err := in.Validate(); err != nil {
		t.Fatal(err)
	}
	s := ioListSchedule(in)
	// Binding line priced from Wed 08:00 (hour 20) to the close of Wed (hour 30).
	res := &decomp.Result{Plan: &decomp.Plan{Detail: s}, Prices: ioSlotPrices(in, 2, 20, 30, 1)}
	if err := sc.Explain(&out, m, res); err != nil {
		t.Fatal(err)
	}
	text := out.String()
	for _, want := range []string{"Tidewater Print & Bind", "One more binding line (hired, or an extra crew) from Wed 08:00 to Wed 18:00 would save up to about 10.0 points", "decision support"} {
		if !strings.Contains(text, want) {
			t.Errorf("demo text lacks %q:\n%s", want, text)
		}
	}
}
