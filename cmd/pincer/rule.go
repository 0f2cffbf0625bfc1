package main

import (
	"slices"
	"strings"

	"pincer/decomp"
	"pincer/instances"
)

// Where a run's price rule came from, as the report's rule_chosen_by
// says it.
const (
	ruleByFlag    = "--rule"
	ruleByFamily  = "family default"
	ruleByDefault = "engine default"
)

// ruleHelp is the --rule help of solve and whatif.
func ruleHelp() string {
	return "price-update rule: " + strings.Join(decomp.Rules(), ", ") + " (default: the family's choice for the model, else " + decomp.Rules()[0] + ")"
}

// chooseRule picks the price rule of a run: the one given (non-empty)
// wins; else the model's own default when it names one (instances.
// RuleChooser) and the problem fits it; else the engine's default,
// decomp.Rules()[0]. by says which of the three it was.
func chooseRule(given string, m instances.Model, p *decomp.Problem) (rule, by string) {
	if given != "" {
		return given, ruleByFlag
	}
	if rc, ok := m.(instances.RuleChooser); ok {
		if r := rc.DefaultRule(); slices.Contains(decomp.Rules(), r) && ruleFits(r, p) == nil {
			return r, ruleByFamily
		}
	}
	return decomp.Rules()[0], ruleByDefault
}
