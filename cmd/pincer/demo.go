package main

import (
	"fmt"
	"strings"

	"github.com/spf13/cobra"

	"pincer/instances"
)

// scenarios lists the demo scenarios of every family, the first being the
// default.
func scenarios() []instances.Scenario {
	var out []instances.Scenario
	for _, f := range registry() {
		if d, ok := f.(instances.Demo); ok {
			out = append(out, d.Scenarios()...)
		}
	}
	return out
}

func newDemoCmd() *cobra.Command {
	var f runFlags
	var scenario string
	all := scenarios()
	var names []string
	var long strings.Builder
	long.WriteString("demo solves an invented scenario and explains its shadow prices:")
	for _, s := range all {
		names = append(names, s.Name)
		fmt.Fprintf(&long, "\n  %-8s %s", s.Name, s.About)
	}
	long.WriteString("\n\nThe report is written only when --report names a file (- for standard output).")
	opts := &optionSet{}
	cmd := &cobra.Command{
		Use:   "demo [--scenario " + strings.Join(names, "|") + "]",
		Short: "Solve an invented scenario and explain its shadow prices",
		Long:  long.String(),
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			var sc *instances.Scenario
			for k := range all {
				if all[k].Name == scenario {
					sc = &all[k]
				}
			}
			if sc == nil {
				return badInput(fmt.Errorf("--scenario %q: want one of %s", scenario, strings.Join(names, ", ")))
			}
			for _, o := range opts.vals {
				if cmd.Flags().Changed(o.opt.Name) && !declares(sc.Options, o.opt.Name) {
					return badInput(fmt.Errorf("--%s does not apply to --scenario %s", o.opt.Name, sc.Name))
				}
			}
			if err := f.check(cmd); err != nil {
				return err
			}
			out := cmd.OutOrStdout()
			m, err := sc.Load(out, opts.values())
			if err != nil {
				return &exitError{code: exitInternal, err: err}
			}
			f.format = "demo-" + sc.Name // report key "format"
			if sc == &all[0] {
				f.format = "demo" // the default scenario keeps its earlier name
			}
			if f.rounds == 0 && !cmd.Flags().Changed("rounds") {
				f.rounds = sc.Rounds
			}
			res, err := solveModel(cmd.Context(), out, cmd.ErrOrStderr(), &f, "(embedded)", m)
			if res != nil && sc.Explain != nil {
				if xerr := sc.Explain(out, m, res); xerr != nil && err == nil {
					err = &exitError{code: exitInternal, err: xerr}
				}
				if f.report != "" && f.report != stdoutPath {
					fmt.Fprintf(out, "Report written to %s.\n", f.report)
				}
			}
			return err
		},
	}
	f.opts = opts
	f.register(cmd)
	def := ""
	if len(names) > 0 {
		def = names[0]
	}
	cmd.Flags().StringVar(&scenario, "scenario", def, "which scenario: "+strings.Join(names, " or "))
	_ = cmd.RegisterFlagCompletionFunc("scenario", func(*cobra.Command, []string, string) ([]string, cobra.ShellCompDirective) {
		return names, cobra.ShellCompDirectiveNoFileComp
	})
	for _, s := range all {
		opts.add(cmd, s.Options)
	}
	cmd.Flags().Lookup("time").DefValue = "5s"
	_ = cmd.Flags().Set("time", "5s")
	return cmd
}

func declares(opts []instances.Option, name string) bool {
	for _, o := range opts {
		if o.Name == name {
			return true
		}
	}
	return false
}
