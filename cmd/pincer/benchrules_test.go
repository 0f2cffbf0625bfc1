package main

import (
	"context"
	"errors"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"pincer/decomp"
	"pincer/instances"
)

// TestParseRuleList: names separated by commas or the flag repeated, each
// a rule and given once.
func TestParseRuleList(t *testing.T) {
	got, err := parseRuleList([]string{"volume, subgradient", "boxstep"})
	if err != nil || !slices.Equal(got, []string{"volume", "subgradient", "boxstep"}) {
		t.Errorf("got %v, %v", got, err)
	}
	if got, err := parseRuleList(nil); err != nil || len(got) != 0 {
		t.Errorf("no flag: got %v, %v", got, err)
	}
	for _, c := range []struct {
		in   []string
		want string
	}{
		{[]string{"fastest"}, "--rule fastest: want one of"},
		{[]string{"volume,"}, "--rule : want one of"},
		{[]string{"volume", "volume"}, "--rule volume: the rule is given twice"},
	} {
		_, err := parseRuleList(c.in)
		var ee *exitError
		if !errors.As(err, &ee) || ee.code != exitBadInput || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%v: got %v, want exit 2 with %q", c.in, err, c.want)
		}
	}
}

// TestParseMarks: durations separated by commas, sorted, each more than 0,
// at most the limit and given once.
func TestParseMarks(t *testing.T) {
	got, err := parseMarks("60s, 1s,10s", time.Minute)
	if err != nil || !slices.Equal(got, []time.Duration{time.Second, 10 * time.Second, time.Minute}) {
		t.Errorf("got %v, %v", got, err)
	}
	if got, err := parseMarks("", time.Second); err != nil || got != nil {
		t.Errorf("empty: got %v, %v", got, err)
	}
	for _, c := range []struct{ in, want string }{
		{"1x", `"1x" is not a duration`},
		{"1s,,2s", `"" is not a duration`},
		{"0s", "0s: want a duration more than 0"},
		{"-1s", "-1s: want a duration more than 0"},
		{"1s,11s", "11s is past --time 10s"},
		{"1s,1000ms", "1000ms is given twice"},
	} {
		_, err := parseMarks(c.in, 10*time.Second)
		var ee *exitError
		if !errors.As(err, &ee) || ee.code != exitBadInput || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%q: got %v, want exit 2 with %q", c.in, err, c.want)
		}
	}
	for d, want := range map[time.Duration]string{time.Minute: "60s", 500 * time.Millisecond: "500ms", 1500 * time.Millisecond: "1.5s"} {
		if got := markName(d); got != want {
			t.Errorf("markName(%v) = %s, want %s", d, got, want)
		}
	}
}

// TestValuesAtMarks: a mark takes the last round ended by it; before the
// first round it has nothing; at the limit, or after a run that ended
// early, it takes the final values (which a last repair may have moved).
func TestValuesAtMarks(t *testing.T) {
	rec := func(ms int, bound, plan float64) decomp.RoundRecord {
		return decomp.RoundRecord{Elapsed: time.Duration(ms) * time.Millisecond, Bound: bound, PlanValue: plan}
	}
	res := &decomp.Result{
		Bound: 95, HasBound: true, Plan: &decomp.Plan{Value: 100}, Elapsed: 10 * time.Second,
		History: []decomp.RoundRecord{rec(200, 50, math.NaN()), rec(900, 70, 130), rec(1000, 80, 120), rec(4000, 94, 104)},
	}
	marks := []time.Duration{100 * time.Millisecond, time.Second, 2 * time.Second, 5 * time.Second, 10 * time.Second}
	got := valuesAtMarks(res, 10*time.Second, marks)
	want := []markValue{
		{at: marks[0]},
		{at: marks[1], bound: 80, hasBound: true, plan: 120, hasPlan: true},
		{at: marks[2], bound: 80, hasBound: true, plan: 120, hasPlan: true},
		{at: marks[3], bound: 94, hasBound: true, plan: 104, hasPlan: true},
		{at: marks[4], bound: 95, hasBound: true, plan: 100, hasPlan: true},
	}
	if !slices.Equal(got, want) {
		t.Errorf("got %+v\nwant %+v", got, want)
	}
	// A round with no plan yet gives a bound and no plan.
	if mv := valuesAtMarks(res, 10*time.Second, []time.Duration{500 * time.Millisecond})[0]; !mv.hasBound || mv.bound != 50 || mv.hasPlan {
		t.Errorf("before the first plan: %+v", mv)
	}
	// A run that ended at 5 s (gap closed): a 6 s mark takes the final values.
	res.Elapsed = 5 * time.Second
	if mv := valuesAtMarks(res, 10*time.Second, []time.Duration{6 * time.Second})[0]; mv.bound != 95 || mv.plan != 100 {
		t.Errorf("after an early end: %+v", mv)
	}
}

// TestBenchRulesAndMarks: each row runs under each rule in turn, in the
// order given; the CSV has the rule and, per mark, the bound, plan, bound
// gap and deviation; every mark's bound is valid (at most the optimum
// 571 of c530, from cbc 2.10.8 as in the other bench tests) and no
// better than the final bound; the last mark, at the limit, is the final
// result. No assertion depends on the machine's speed.
func TestBenchRulesAndMarks(t *testing.T) {
	manifest := benchManifest(t,
		"c530,gap-orlib,gap-c-5x30.txt,1,min,,571,optimal,cbc 2.10.8",
		"c530-choice,gap-orlib,gap-c-5x30.txt,1,min,relax=choice,571,optimal,cbc 2.10.8",
	)
	csvPath := filepath.Join(t.TempDir(), "out.csv")
	code, out, errs := runCLI(t, context.Background(), "bench", manifest, "--benchmarks", "../../testdata", "--time", "600ms",
		"--workers", "1", "--rule", "volume,subgradient", "--rule", "deflected", "--marks", "600ms,200ms", "--csv", csvPath)
	if code != exitOK {
		t.Fatalf("exit %d\n%s\n%s", code, out, errs)
	}
	rows := readBenchCSV(t, csvPath)
	var got []string
	for _, r := range rows {
		got = append(got, r["name"]+" "+r["rule"]+" "+r["rule_chosen_by"])
	}
	want := []string{"c530 volume --rule", "c530 subgradient --rule", "c530 deflected --rule",
		"c530-choice volume --rule", "c530-choice subgradient --rule", "c530-choice deflected --rule"}
	if !slices.Equal(got, want) {
		t.Fatalf("runs %v, want %v", got, want)
	}
	num := func(r map[string]string, key string) float64 {
		v, err := strconv.ParseFloat(r[key], 64)
		if err != nil {
			t.Fatalf("%s %s: column %s = %q: %v", r["name"], r["rule"], key, r[key], err)
		}
		return v
	}
	for _, r := range rows {
		if r["status"] != "done" {
			t.Fatalf("%s %s: status %s (%s)", r["name"], r["rule"], r["status"], r["note"])
		}
		final := num(r, "bound")
		if b := num(r, "bound_600ms"); b != final || r["plan_600ms"] != r["plan"] {
			t.Errorf("%s %s: the mark at the limit has bound %v plan %s, the run ended with %v and %s", r["name"], r["rule"], b, r["plan_600ms"], final, r["plan"])
		}
		if r["bound_200ms"] == "" { // a round of c530 takes well under 0.2 s
			t.Errorf("%s %s: no bound at 200ms", r["name"], r["rule"])
			continue
		}
		b := num(r, "bound_200ms")
		if b > 571+1e-6 || b > final+1e-9 {
			t.Errorf("%s %s: bound at 200ms %v, final %v, optimum 571", r["name"], r["rule"], b, final)
		}
		if g := num(r, "bound_gap_200ms"); math.Abs(g-(571-b)/571) > 1e-5 {
			t.Errorf("%s %s: bound_gap_200ms %v for bound %v", r["name"], r["rule"], g, b)
		}
	}
	for _, s := range []string{"c530-choice  deflected", "bound 200ms", "per rule and mark", "volume       200ms  2"} {
		if !strings.Contains(out, s) {
			t.Errorf("table lacks %q:\n%s", s, out)
		}
	}
}

// ruleModel is a model that names a default rule; only DefaultRule is
// called on it.
type ruleModel struct {
	instances.Model
	rule string
}

func (m ruleModel) DefaultRule() string { return m.rule }

// TestChooseRule: a given rule wins; else the model's default when the
// engine knows it and the problem fits it; else the engine's default.
func TestChooseRule(t *testing.T) {
	small := &decomp.Problem{Rows: make([]decomp.Row, 3)}
	large := &decomp.Problem{Rows: make([]decomp.Row, decomp.BoxstepMaxRows+1)}
	def := decomp.Rules()[0]
	for _, c := range []struct {
		given string
		m     instances.Model
		p     *decomp.Problem
		rule  string
		by    string
	}{
		{"volume", ruleModel{rule: "deflected"}, small, "volume", ruleByFlag},
		{"", ruleModel{rule: "deflected"}, small, "deflected", ruleByFamily},
		{"", ruleModel{rule: "boxstep"}, small, "boxstep", ruleByFamily},
		{"", ruleModel{rule: "boxstep"}, large, def, ruleByDefault},
		{"", ruleModel{rule: "fastest"}, small, def, ruleByDefault},
		{"", struct{ instances.Model }{}, small, def, ruleByDefault},
	} {
		rule, by := chooseRule(c.given, c.m, c.p)
		if rule != c.rule || by != c.by {
			t.Errorf("given %q, model %+v, %d rows: got %s (%s), want %s (%s)", c.given, c.m, len(c.p.Rows), rule, by, c.rule, c.by)
		}
	}
}

// TestSolveReportsRuleChoice: without --rule a run uses the family's
// default rule for the model, or the engine's when the family names none
// (the choice relaxation of the assignment family); --rule given wins.
// The report's rule and rule_chosen_by keys say which.
func TestSolveReportsRuleChoice(t *testing.T) {
	dir := t.TempDir()
	for k, c := range []struct {
		args     []string
		rule, by string
	}{
		{[]string{"--format", "gap-orlib", "../../testdata/gap-c-5x30.txt"}, "deflected", ruleByFamily},
		{[]string{"--format", "gap-orlib", "--relax", "choice", "../../testdata/gap-c-5x30.txt"}, decomp.Rules()[0], ruleByDefault},
		{[]string{"--format", "gap-orlib", "--rule", "volume", "../../testdata/gap-c-5x30.txt"}, "volume", ruleByFlag},
	} {
		rep := filepath.Join(dir, strconv.Itoa(k)+".json")
		args := append([]string{"solve", "--rounds", "20", "--quiet", "--report", rep}, c.args...)
		if code, out, errs := runCLI(t, context.Background(), args...); code != exitOK {
			t.Fatalf("%v: exit %d\n%s%s", c.args, code, out, errs)
		}
		m := readReport(t, rep)
		if m["rule"] != c.rule || m["rule_chosen_by"] != c.by {
			t.Errorf("%v: rule %v chosen by %v, want %s (%s)", c.args, m["rule"], m["rule_chosen_by"], c.rule, c.by)
		}
	}
}
