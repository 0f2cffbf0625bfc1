package main

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"strconv"

	"pincer/decomp"
	"pincer/instances"
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

// rnum is a value computed from data: written without binary noise
// (1862.9699999999998 -> 1862.97), null when NaN or infinite.
type rnum float64

func (n rnum) MarshalJSON() ([]byte, error) {
	return num(instances.RoundNumber(float64(n))).MarshalJSON()
}

type rowJSON struct {
	Name    string `json:"name"`
	Sense   string `json:"sense"`
	Price   rnum   `json:"price"`
	Use     rnum   `json:"use"`
	RHS     rnum   `json:"rhs"`
	Slack   rnum   `json:"slack"`
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
	ReportVersion int    `json:"report_version"`
	Format        string `json:"format"`
	File          string `json:"file"`
	Index         int    `json:"index"`
	Instance      string `json:"instance"`
	Size          string `json:"size"`
	Sense         string `json:"sense"`
	PlanValue     *rnum  `json:"plan_value"`
	Bound         num    `json:"bound"`
	BoundKind     string `json:"bound_kind"`
	// RoundedBound is the bound rounded to the next integer toward the
	// plan when the objective is integral (null otherwise).
	RoundedBound  *num   `json:"rounded_bound"`
	Gap           num    `json:"gap"`
	ProvedOptimal bool   `json:"proved_optimal"`
	Stop          string `json:"stop"`
	Rounds        int    `json:"rounds"`
	Seconds       num    `json:"seconds"`
	Workers       int    `json:"workers"`
	Seed          uint64 `json:"seed"`
	Rule          string `json:"rule"` // the price-update rule that ran
	// RuleChosenBy says where Rule came from: "--rule", "family default"
	// (the model's own choice) or "engine default".
	RuleChosenBy string `json:"rule_chosen_by"`
	// WarmStart says where the starting prices came from (null: zero).
	WarmStart *warmJSON `json:"warm_start"`
	// PrimalAverage is the volume rule's fractional primal solution, when
	// asked for (--primal-average): per block, its variables at their
	// averaged values, numbered as the family documents its blocks.
	PrimalAverage []primalBlockJSON `json:"primal_average,omitempty"`
	Caution       string            `json:"caution"`
	Rows          []rowJSON         `json:"rows"`
	Family        map[string]any    `json:"family"`
	History       []historyJSON     `json:"history"`
	// HistoryKept says which rounds history holds: "full" or "summary"
	// (every improvement plus a thinned trace).
	HistoryKept string `json:"history_kept"`
	Plan        any    `json:"plan"`
}

type primalBlockJSON struct {
	Block int           `json:"block"` // 1-based, in the family's block order
	Vars  []primalJSONE `json:"vars"`
}

type primalJSONE struct {
	Var   int  `json:"var"` // the block's own variable number (0-based)
	Value rnum `json:"value"`
}

func primalJSON(p [][]decomp.Entry) []primalBlockJSON {
	out := make([]primalBlockJSON, 0, len(p))
	for k, entries := range p {
		b := primalBlockJSON{Block: k + 1, Vars: make([]primalJSONE, len(entries))}
		for i, e := range entries {
			b.Vars[i] = primalJSONE{Var: e.Index, Value: rnum(e.Value)}
		}
		out = append(out, b)
	}
	return out
}

func buildReport(format, file string, index, workers int, seed uint64, full bool, m instances.Model, res *decomp.Result) (*report, error) {
	extra, err := m.Extra(res)
	if err != nil {
		return nil, err
	}
	plan, err := m.PlanJSON(res.Plan)
	if err != nil {
		return nil, err
	}
	r := &report{
		ReportVersion: reportVersion, Format: format, File: file, Index: index,
		Instance: m.Name(), Size: m.Size(), Sense: m.Sense().String(),
		Bound: num(res.Bound), Gap: num(res.Gap), ProvedOptimal: res.ProvedOptimal,
		Stop: res.Status.String(), Rounds: res.Rounds, Seconds: num(res.Elapsed.Seconds()),
		Workers: workers, Seed: seed, Caution: caution, Family: extra, Plan: plan,
	}
	r.BoundKind = "lower"
	if m.Sense() == decomp.Maximise {
		r.BoundKind = "upper"
	}
	if res.Plan != nil {
		v := rnum(res.Plan.Value)
		r.PlanValue = &v
	}
	r.Rows = make([]rowJSON, len(res.Rows))
	for i, row := range res.Rows {
		r.Rows[i] = rowJSON{Name: row.Name, Sense: row.Sense.String(), Price: rnum(row.Price), Use: rnum(row.Use),
			RHS: rnum(row.RHS), Slack: rnum(row.Slack), Binding: row.Binding}
	}
	hist := res.History
	r.HistoryKept = "full"
	if !full {
		hist = thinHistory(hist, maxHistory)
		r.HistoryKept = "summary"
	}
	r.History = make([]historyJSON, len(hist))
	for i, h := range hist {
		r.History[i] = historyJSON{Round: h.Round, Seconds: num(h.Elapsed.Seconds()), Value: num(h.Value),
			Bound: num(h.Bound), PlanValue: num(h.PlanValue), Step: num(h.Step), Norm: num(h.Norm)}
	}
	return r, nil
}

// withRounded sets the report's rounded bound.
func (r *report) withRounded(b float64, ok bool) *report {
	if ok {
		v := num(b)
		r.RoundedBound = &v
	}
	return r
}

// maxHistory bounds the summary history.
const maxHistory = 2000

// thinHistory keeps the first and last round, every round that improved
// the bound or the plan, and evenly spaced rounds in between, at most about
// limit rounds in all (improvements are always kept).
func thinHistory(h []decomp.RoundRecord, limit int) []decomp.RoundRecord {
	if len(h) <= limit {
		return h
	}
	keep := make([]bool, len(h))
	kept := 0
	mark := func(k int) {
		if !keep[k] {
			keep[k] = true
			kept++
		}
	}
	mark(0)
	mark(len(h) - 1)
	for k := 1; k < len(h); k++ {
		better := h[k].Bound != h[k-1].Bound ||
			(h[k].PlanValue != h[k-1].PlanValue && !(math.IsNaN(h[k].PlanValue) && math.IsNaN(h[k-1].PlanValue)))
		if better {
			mark(k)
		}
	}
	if room := limit - kept; room > 0 {
		step := float64(len(h)) / float64(room)
		for x := 0.0; int(x) < len(h); x += step {
			mark(int(x))
		}
	}
	out := make([]decomp.RoundRecord, 0, kept)
	for k, ok := range keep {
		if ok {
			out = append(out, h[k])
		}
	}
	return out
}

func writeJSON(path string, stdout io.Writer, v any) error {
	f, err := createOutput(path, stdout)
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

func writePlan(path string, stdout io.Writer, m instances.Model, res *decomp.Result) error {
	pw, ok := m.(instances.PlanWriter)
	if !ok {
		return fmt.Errorf("this format cannot write plan files")
	}
	f, err := createOutput(path, stdout)
	if err != nil {
		return fmt.Errorf("writing plan: %w", err)
	}
	var tables instances.Tables
	if path != stdoutPath {
		tables = sideTables{plan: path}
	}
	if err := pw.WritePlan(f, res, tables); err != nil {
		f.Close()
		return fmt.Errorf("writing plan %s: %w", path, err)
	}
	if err := f.Close(); err != nil {
		return fmt.Errorf("writing plan %s: %w", path, err)
	}
	return nil
}

// roundedBound is the bound rounded toward the plan for an integral
// objective, and whether rounding changes it.
func roundedBound(b float64, integral bool, sense decomp.Sense) (float64, bool) {
	if !integral || math.IsInf(b, 0) || math.IsNaN(b) {
		return b, false
	}
	tol := 1e-7 * math.Max(1, math.Abs(b))
	r := math.Ceil(b - tol)
	if sense == decomp.Maximise {
		r = math.Floor(b + tol)
	}
	return r, r != b
}

// printSummary writes the short summary.
func printSummary(w io.Writer, m instances.Model, integral bool, res *decomp.Result, top int) error {
	kind := "lower"
	if m.Sense() == decomp.Maximise {
		kind = "upper"
	}
	fmt.Fprintf(w, "instance    %s (%s, %s)\n", m.Name(), m.Size(), m.Sense())
	if res.Plan != nil {
		fmt.Fprintf(w, "plan value  %s\n", fmtNum(res.Plan.Value))
	} else {
		fmt.Fprintf(w, "plan value  none found\n")
	}
	rb, rounds := roundedBound(res.Bound, integral, m.Sense())
	if rounds {
		fmt.Fprintf(w, "bound       %s, rounds to %s (%s; the objective takes whole values)\n", fmtNum(res.Bound), fmtNum(rb), kind)
	} else {
		fmt.Fprintf(w, "bound       %s (%s)\n", fmtNum(res.Bound), kind)
	}
	if math.IsInf(res.Gap, 0) {
		fmt.Fprintf(w, "gap         unknown (no plan)\n")
	} else {
		fmt.Fprintf(w, "gap         %s\n", fmtGap(res.Gap))
	}
	proved := "no"
	if res.ProvedOptimal {
		proved = "yes"
		if rounds && res.Plan != nil && res.Plan.Value == rb {
			proved = "yes (the plan value meets the rounded bound: no plan with whole values can do better)"
		}
	}
	fmt.Fprintf(w, "proved      %s\n", proved)
	fmt.Fprintf(w, "stop        %s\n", res.Status)
	fmt.Fprintf(w, "time        %.2f s, %d rounds\n", res.Elapsed.Seconds(), res.Rounds)
	rs, err := m.Resources(res)
	if err != nil {
		return err
	}
	sortResources(rs)
	if len(rs) > 0 && top > 0 {
		fmt.Fprintf(w, "most binding shared resources (price = value of one more unit):\n")
		for k, r := range rs {
			if k >= top {
				break
			}
			flag := ""
			if r.Binding {
				flag = "  binding"
			}
			fmt.Fprintf(w, "  %-22s load %s of %s  price %s%s\n", r.Name, fmtNum(r.Load), fmtNum(r.Capacity), fmtNum(r.Price), flag)
		}
	}
	if ex, ok := m.(instances.Explainer); ok {
		lines, err := ex.Explain(res)
		if err != nil {
			return err
		}
		for _, l := range lines {
			fmt.Fprintln(w, l)
		}
	}
	fmt.Fprintln(w, caution)
	return nil
}

// fmtGap writes a gap fraction as a percent, the same way everywhere.
func fmtGap(g float64) string {
	if math.IsInf(g, 0) || math.IsNaN(g) {
		return "-"
	}
	return fmt.Sprintf("%.4f %%", 100*g)
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
