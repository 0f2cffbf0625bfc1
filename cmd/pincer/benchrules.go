package main

import (
	"fmt"
	"io"
	"math"
	"slices"
	"strings"
	"text/tabwriter"
	"time"

	"pincer/decomp"
)

// parseRuleList reads --rule for bench: rule names separated by commas
// (the flag may also be repeated, which cobra joins into the list). Each
// name must be a rule and appear once; an empty list means each row's
// default rule.
func parseRuleList(vals []string) ([]string, error) {
	var out []string
	for _, v := range vals {
		for _, name := range strings.Split(v, ",") {
			name = strings.TrimSpace(name)
			switch {
			case !slices.Contains(decomp.Rules(), name):
				return nil, badInput(fmt.Errorf("--rule %s: want one of %s (several separated by commas)", name, strings.Join(decomp.Rules(), ", ")))
			case slices.Contains(out, name):
				return nil, badInput(fmt.Errorf("--rule %s: the rule is given twice; want each rule once", name))
			}
			out = append(out, name)
		}
	}
	return out, nil
}

// parseMarks reads --marks: durations separated by commas, each more
// than 0 and at most the time limit, in increasing order after sorting
// and each once. An empty text means no marks.
func parseMarks(text string, limit time.Duration) ([]time.Duration, error) {
	if strings.TrimSpace(text) == "" {
		return nil, nil
	}
	var out []time.Duration
	for _, s := range strings.Split(text, ",") {
		s = strings.TrimSpace(s)
		d, err := time.ParseDuration(s)
		switch {
		case err != nil:
			return nil, badInput(fmt.Errorf("--marks %s: %q is not a duration; want durations separated by commas, e.g. 1s,10s,60s", text, s))
		case d <= 0:
			return nil, badInput(fmt.Errorf("--marks %s: %s: want a duration more than 0", text, s))
		case d > limit:
			return nil, badInput(fmt.Errorf("--marks %s: %s is past --time %s; want marks at most the time limit", text, s, limit))
		case slices.Contains(out, d):
			return nil, badInput(fmt.Errorf("--marks %s: %s is given twice; want each mark once", text, s))
		}
		out = append(out, d)
	}
	slices.Sort(out)
	return out, nil
}

// markName is a mark as it heads a column: "1s", "1m0s" becomes "60s",
// "500ms" stays.
func markName(d time.Duration) string {
	if d%time.Second == 0 {
		return fmt.Sprintf("%ds", d/time.Second)
	}
	return d.String()
}

// markValue is a run's best bound and plan at a mark.
type markValue struct {
	at       time.Duration
	bound    float64
	hasBound bool
	plan     float64
	hasPlan  bool
}

// valuesAtMarks reads the bound and plan at each mark from a run's round
// history: the last round that ended by the mark. A mark at or past the
// time limit, or past the end of a run that stopped earlier, takes the
// run's final values (the last repair may have improved the plan after
// the last round). A mark before the first round has no values.
func valuesAtMarks(res *decomp.Result, limit time.Duration, marks []time.Duration) []markValue {
	out := make([]markValue, len(marks))
	for k, at := range marks {
		mv := markValue{at: at}
		if at >= limit || res.Elapsed <= at {
			mv.bound, mv.hasBound = res.Bound, res.HasBound
			if res.Plan != nil {
				mv.plan, mv.hasPlan = res.Plan.Value, true
			}
		} else {
			// History is in round order, so Elapsed only grows.
			n, _ := slices.BinarySearchFunc(res.History, at, func(r decomp.RoundRecord, at time.Duration) int {
				if r.Elapsed <= at {
					return -1
				}
				return 1
			})
			if n > 0 {
				rec := res.History[n-1]
				mv.bound, mv.hasBound = rec.Bound, true
				if !math.IsNaN(rec.PlanValue) {
					mv.plan, mv.hasPlan = rec.PlanValue, true
				}
			}
		}
		out[k] = mv
	}
	return out
}

// boundGap is how far a bound falls short of the reference, as a
// fraction of max(1, |reference|): positive when short (below for min,
// above for max). NaN without both.
func boundGap(v float64, ok bool, r *benchResult) float64 {
	return -deviation(v, ok, r)
}

// ruleMarkSummary is the mean bound gap and plan deviation over the rows
// of one rule at one mark that have a reference and a value.
type ruleMarkSummary struct {
	rule              string
	mark              string
	rows              int // rows of this rule that ran
	bounds, plans     int // rows with a bound (plan) and a reference
	meanGap, meanDev  float64
	worstGap, maxDevs float64
}

// summariseMarks averages per rule and mark (the final values make a
// last mark "end"), in the order the rules ran.
func summariseMarks(results []*benchResult, marks []time.Duration) []ruleMarkSummary {
	var rules []string
	for _, r := range results {
		if !slices.Contains(rules, r.rule) {
			rules = append(rules, r.rule)
		}
	}
	var out []ruleMarkSummary
	for _, rule := range rules {
		for k := 0; k <= len(marks); k++ {
			s := ruleMarkSummary{rule: rule, mark: "end", worstGap: math.NaN(), maxDevs: math.NaN()}
			if k < len(marks) {
				s.mark = markName(marks[k])
			}
			var sumGap, sumDev float64
			for _, r := range results {
				if r.rule != rule || r.status == "error" {
					continue
				}
				s.rows++
				bound, hasBound, plan, hasPlan := r.bound, r.hasBound, r.plan, r.hasPlan
				if k < len(marks) {
					mv := r.marks[k]
					bound, hasBound, plan, hasPlan = mv.bound, mv.hasBound, mv.plan, mv.hasPlan
				}
				if g := boundGap(bound, hasBound, r); !math.IsNaN(g) {
					s.bounds++
					sumGap += g
					if math.IsNaN(s.worstGap) || g > s.worstGap {
						s.worstGap = g
					}
				}
				if d := deviation(plan, hasPlan, r); !math.IsNaN(d) {
					s.plans++
					sumDev += d
					if math.IsNaN(s.maxDevs) || d > s.maxDevs {
						s.maxDevs = d
					}
				}
			}
			s.meanGap, s.meanDev = math.NaN(), math.NaN()
			if s.bounds > 0 {
				s.meanGap = sumGap / float64(s.bounds)
			}
			if s.plans > 0 {
				s.meanDev = sumDev / float64(s.plans)
			}
			out = append(out, s)
		}
	}
	return out
}

// printMarkSummary writes the per-rule, per-mark means under the table.
// Only rows with a reference count; a rule that could not run on a row
// (boxstep past its row limit) has fewer rows, which the counts show.
func printMarkSummary(w io.Writer, results []*benchResult, marks []time.Duration) {
	sums := summariseMarks(results, marks)
	if len(sums) == 0 {
		return
	}
	fmt.Fprintln(w, "\nper rule and mark (bound gap = (reference − bound) / |reference|, positive when the bound is short; deviation as above):")
	tw := tabwriter.NewWriter(w, 2, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "rule\tmark\trows\tmean bound gap\tworst bound gap\tmean deviation\tworst deviation\tplans")
	for _, s := range sums {
		fmt.Fprintf(tw, "%s\t%s\t%d\t%s\t%s\t%s\t%s\t%d\n", s.rule, s.mark, s.bounds, pct(s.meanGap), pct(s.worstGap), pct(s.meanDev), pct(s.maxDevs), s.plans)
	}
	tw.Flush()
}

// benchLabel names one run of a bench row: the row's name, with the rule
// when several rules run.
func benchLabel(name, rule string, several bool) string {
	if !several {
		return name
	}
	return name + " " + rule
}
