package main

import (
	"bufio"
	"errors"
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"pincer/instances"
)

func newVerifyCmd(chosen string) *cobra.Command {
	var format string
	var opts *optionSet
	cmd := &cobra.Command{
		Use:   "verify --format FORMAT [--index K] FILE PLAN",
		Short: "Recompute a plan's value and check its feasibility independently of the solver",
		Args:  cobra.ExactArgs(2),
		RunE: func(cmd *cobra.Command, args []string) error {
			m, err := load(format, args[0], opts)
			if err != nil {
				return err
			}
			vf, ok := m.(instances.Verifier)
			if !ok {
				return badInput(fmt.Errorf("--format %s cannot verify plans", format))
			}
			f, err := os.Open(args[1])
			if err != nil {
				return badInput(err)
			}
			defer f.Close()
			v, err := vf.Verify(f, args[1])
			if err != nil {
				return badInput(err)
			}
			out := cmd.OutOrStdout()
			fmt.Fprintf(out, "instance  %s (%s)\n", m.Name(), m.Size())
			fmt.Fprintf(out, "value     %s\n", fmtNum(v.Value))
			if v.Feasible {
				fmt.Fprintf(out, "feasible  yes\n")
				return nil
			}
			fmt.Fprintf(out, "feasible  no\n")
			for _, p := range v.Problems {
				fmt.Fprintf(out, "  %s\n", p)
			}
			return &exitError{code: exitNoPlan, err: fmt.Errorf("plan %s is infeasible (%d problems)", args[1], len(v.Problems))}
		},
	}
	opts = familyOptions(cmd, &format, chosen)
	return cmd
}

func newExportCmd(chosen string) *cobra.Command {
	export := &cobra.Command{Use: "export", Short: "Write a model in an open exchange format"}
	var format, out string
	var opts *optionSet
	mps := &cobra.Command{
		Use:   "mps --format FORMAT [--index K] FILE -o model.mps",
		Short: "Write the full model as free MPS (for a general-purpose solver)",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if out == "" {
				return badInput(errors.New("-o is required (a file, or - for standard output)"))
			}
			if err := checkWritable("-o", out); err != nil {
				return err
			}
			m, err := load(format, args[0], opts)
			if err != nil {
				return err
			}
			ex, ok := m.(instances.MPSExporter)
			if !ok {
				return badInput(fmt.Errorf("--format %s cannot be exported as MPS", format))
			}
			f, err := createOutput(out, cmd.OutOrStdout())
			if err != nil {
				return badInput(err)
			}
			w := bufio.NewWriter(f)
			if err := ex.WriteMPS(w); err != nil {
				f.Close()
				return &exitError{code: exitInternal, err: err}
			}
			if err := w.Flush(); err != nil {
				f.Close()
				return &exitError{code: exitInternal, err: err}
			}
			if err := f.Close(); err != nil {
				return &exitError{code: exitInternal, err: err}
			}
			return nil
		},
	}
	opts = familyOptions(mps, &format, chosen)
	mps.Flags().StringVarP(&out, "output", "o", "", "MPS file to write (- for standard output)")
	export.AddCommand(mps)
	return export
}

func newGenCmd() *cobra.Command {
	gen := &cobra.Command{Use: "gen", Short: "Generate instances following published recipes"}
	for _, f := range registry() {
		g, ok := f.(instances.Generator)
		if !ok {
			continue
		}
		for _, r := range g.Recipes() {
			gen.AddCommand(newRecipeCmd(r))
		}
	}
	return gen
}

func newRecipeCmd(r instances.Recipe) *cobra.Command {
	var out string
	var force bool
	opts := &optionSet{}
	cmd := &cobra.Command{
		Use:   r.Name + " " + r.Usage,
		Short: r.Short,
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			var sink instances.Sink
			if len(r.Files) > 0 {
				if out == "" || out == stdoutPath {
					return badInput(errors.New("-o DIR is required (the output is a folder)"))
				}
				if err := prepareFolder(out, r.Files, force); err != nil {
					return err
				}
				sink = folderSink{out}
			} else {
				if err := checkWritable("-o", out); err != nil {
					return err
				}
				sink = fileSink{path: out, stdout: cmd.OutOrStdout()}
			}
			summary, err := r.Run(opts.values(), sink)
			if err != nil {
				return badInput(err)
			}
			if summary != "" {
				fmt.Fprintf(cmd.OutOrStdout(), "wrote %s: %s\n", out, summary)
			}
			return nil
		},
	}
	opts.add(cmd, r.Options)
	if len(r.Files) > 0 {
		cmd.Flags().StringVarP(&out, "output", "o", "", "folder to write")
		cmd.Flags().BoolVar(&force, "force", false, "write into a non-empty folder (only the generated files are replaced)")
	} else {
		cmd.Flags().StringVarP(&out, "output", "o", "", "file to write (default or -: standard output)")
	}
	return cmd
}
