package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"

	"pincer/decomp"
)

// reportVersion is bumped whenever a key changes meaning or disappears.
const reportVersion = 1

// caution is carried by every report and summary.
const caution = "Plans are decision support: check them against site rules and local practice before use."

// num is a float that is written as null when it is NaN or infinite.
type num float64

func (n num) MarshalJSON() ([]byte, error) {
	f := float64(n)
	if math.IsNaN(f) || math.IsInf(f, 0) {
		return []byte("null"), nil
	}
	return strconv.AppendFloat(nil, f, 'g', -1, 64), nil
}

type rowJSON struct {
	Name    string `json:"name"`
	Sense   string `json:"sense"`
	Price   num    `json:"price"`
	Use     num    `json:"use"`
	RHS     num    `json:"rhs"`
	Slack   num    `json:"slack"`
	Binding bool   `json:"binding"`
}

type historyJSON struct {
	Round     int `json:"round"`
	Seconds   num `json:"seconds"`
	Value     num `json:"value"`
	Bound     num `json:"bound"`
	PlanValue num `json:"plan_value"`
	Step      num `json:"step"`
	Norm      num `json:"norm"`
}

// report is the JSON report; its keys are a contract documented in the
// README.
type report struct {
	ReportVersion int            `json:"report_version"`
	Format        string         `json:"format"`
	File          string         `json:"file"`
	Index         int            `json:"index"`
	Instance      string         `json:"instance"`
	Size          string         `json:"size"`
	Sense         string         `json:"sense"`
	PlanValue     *num           `json:"plan_value"`
	Bound         num            `json:"bound"`
	BoundKind     string         `json:"bound_kind"`
	Gap           num            `json:"gap"`
	ProvedOptimal bool           `json:"proved_optimal"`
	Stop          string         `json:"stop"`
	Rounds        int            `json:"rounds"`
	Seconds       num            `json:"seconds"`
	Workers       int            `json:"workers"`
	Seed          uint64         `json:"seed"`
	Caution       string         `json:"caution"`
	Rows          []rowJSON      `json:"rows"`
	Family        map[string]any `json:"family"`
	History       []historyJSON  `json:"history"`
	Plan          any            `json:"plan"`
}

func buildReport(format, file string, index, workers int, seed uint64, m model, res *decomp.Result) *report {
	r := &report{
		ReportVersion: reportVersion, Format: format, File: file, Index: index,
		Instance: m.name(), Size: m.size(), Sense: m.sense().String(),
		Bound: num(res.Bound), Gap: num(res.Gap), ProvedOptimal: res.Proved,
		Stop: res.Status.String(), Rounds: res.Rounds, Seconds: num(res.Elapsed.Seconds()),
		Workers: workers, Seed: seed, Caution: caution, Family: m.extra(res),
		Plan: m.planJSON(res.Plan),
	}
	r.BoundKind = "lower"
	if m.sense() == decomp.Maximise {
		r.BoundKind = "upper"
	}
	if res.Plan != nil {
		v := num(res.Plan.Value)
		r.PlanValue = &v
	}
	r.Rows = make([]rowJSON, len(res.Rows))
	for i, row := range res.Rows {
		r.Rows[i] = rowJSON{Name: row.Name, Sense: row.Sense.String(), Price: num(row.Price), Use: num(row.Use),
			RHS: num(row.RHS), Slack: num(row.Slack), Binding: row.Binding}
	}
	r.History = make([]historyJSON, len(res.History))
	for i, h := range res.History {
		r.History[i] = historyJSON{Round: h.Round, Seconds: num(h.Elapsed.Seconds()), Value: num(h.Value),
			Bound: num(h.Bound), PlanValue: num(h.PlanValue), Step: num(h.Step), Norm: num(h.Norm)}
	}
	return r
}

func writeJSONFile(path string, v any) error {
	f, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("writing report: %w", err)
	}
	enc := json.NewEncoder(f)
	enc.SetIndent("", "  ")
	if err := enc.Encode(v); err != nil {
		f.Close()
		return fmt.Errorf("writing report %s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("writing report %s: %w", path, err)
	}
	return nil
}

func writePlanFile(path string, m model, p *decomp.Plan) error {
	f, err := os.Create(path)
	if err != nil {
		return fmt.Errorf("writing plan: %w", err)
	}
	if err := m.writePlan(f, p); err != nil {
		f.Close()
		return fmt.Errorf("writing plan %s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("writing plan %s: %w", path, err)
	}
	return nil
}

// printSummary writes the short stdout summary.
func printSummary(w io.Writer, m model, res *decomp.Result, top int) {
	kind := "lower"
	if m.sense() == decomp.Maximise {
		kind = "upper"
	}
	fmt.Fprintf(w, "instance    %s (%s, %s)\n", m.name(), m.size(), m.sense())
	if res.Plan != nil {
		fmt.Fprintf(w, "plan value  %s\n", fmtNum(res.Plan.Value))
	} else {
		fmt.Fprintf(w, "plan value  none found\n")
	}
	fmt.Fprintf(w, "bound       %s (%s)\n", fmtNum(res.Bound), kind)
	if math.IsInf(res.Gap, 0) {
		fmt.Fprintf(w, "gap         unknown (no plan)\n")
	} else {
		fmt.Fprintf(w, "gap         %.4f %%\n", 100*res.Gap)
	}
	proved := "no"
	if res.Proved {
		proved = "yes"
	}
	fmt.Fprintf(w, "proved      %s\n", proved)
	fmt.Fprintf(w, "stop        %s\n", res.Status)
	fmt.Fprintf(w, "time        %.2f s, %d rounds\n", res.Elapsed.Seconds(), res.Rounds)
	rs := m.resources(res)
	if len(rs) > 0 && top > 0 {
		fmt.Fprintf(w, "most binding shared resources (price = value of one more unit):\n")
		for k, r := range rs {
			if k >= top {
				break
			}
			flag := ""
			if r.binding {
				flag = "  binding"
			}
			fmt.Fprintf(w, "  %-22s load %s of %s  price %s%s\n", r.name, fmtNum(r.load), fmtNum(r.capacity), fmtNum(r.price), flag)
		}
	}
	fmt.Fprintln(w, caution)
}

func fmtNum(f float64) string {
	if math.IsNaN(f) {
		return "n/a"
	}
	if f == math.Trunc(f) && math.Abs(f) < 1e15 {
		return strconv.FormatFloat(f, 'f', 0, 64)
	}
	return strconv.FormatFloat(f, 'f', 4, 64)
}
