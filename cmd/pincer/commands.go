package main

import (
	"bufio"
	"errors"
	"fmt"
	"os"

	"github.com/spf13/cobra"

	"pincer/instances/gap"
)

func newVerifyCmd() *cobra.Command {
	var format string
	var o modelOptions
	cmd := &cobra.Command{
		Use:   "verify --format FORMAT [--index K] FILE PLAN",
		Short: "Recompute a plan's value and check its feasibility independently of the solver",
		Args:  cobra.ExactArgs(2),
		RunE: func(cmd *cobra.Command, args []string) error {
			fam, err := findFamily(format)
			if err != nil {
				return err
			}
			m, err := fam.load(args[0], o)
			if err != nil {
				return err
			}
			v, err := m.verify(args[1])
			if err != nil {
				return err
			}
			out := cmd.OutOrStdout()
			fmt.Fprintf(out, "instance  %s (%s)\n", m.name(), m.size())
			fmt.Fprintf(out, "value     %s\n", fmtNum(v.value))
			if v.feasible {
				fmt.Fprintf(out, "feasible  yes\n")
				return nil
			}
			fmt.Fprintf(out, "feasible  no\n")
			for _, p := range v.problems {
				fmt.Fprintf(out, "  %s\n", p)
			}
			return &exitError{code: exitNoPlan, err: fmt.Errorf("plan %s is infeasible (%d problems)", args[1], len(v.problems))}
		},
	}
	cmd.Flags().StringVar(&format, "format", "", formatHelp())
	cmd.Flags().IntVar(&o.index, "index", 0, "instance number or capacity variant (default 1)")
	cmd.Flags().StringVar(&o.sense, "sense", "", "objective sense: min or max (default min)")
	cmd.Flags().BoolVar(&o.singleSource, "single-source", false, "facility location: require one site per customer")
	return cmd
}

func newExportCmd() *cobra.Command {
	export := &cobra.Command{Use: "export", Short: "Write a model in an open exchange format"}
	var format, out string
	var o modelOptions
	mps := &cobra.Command{
		Use:   "mps --format FORMAT [--index K] FILE -o model.mps",
		Short: "Write the full model as free MPS (for a general-purpose solver)",
		Args:  cobra.ExactArgs(1),
		RunE: func(cmd *cobra.Command, args []string) error {
			if out == "" {
				return badInput(errors.New("-o is required"))
			}
			fam, err := findFamily(format)
			if err != nil {
				return err
			}
			m, err := fam.load(args[0], o)
			if err != nil {
				return err
			}
			f, err := os.Create(out)
			if err != nil {
				return badInput(err)
			}
			w := bufio.NewWriter(f)
			if err := m.exportMPS(w); err != nil {
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
	mps.Flags().StringVar(&format, "format", "", formatHelp())
	mps.Flags().IntVar(&o.index, "index", 0, "instance number or capacity variant (default 1)")
	mps.Flags().StringVar(&o.sense, "sense", "", "objective sense: min or max (default min)")
	mps.Flags().BoolVar(&o.singleSource, "single-source", false, "facility location: single-source variant")
	mps.Flags().StringVarP(&out, "output", "o", "", "MPS file to write")
	export.AddCommand(mps)
	return export
}

func newGenCmd() *cobra.Command {
	gen := &cobra.Command{Use: "gen", Short: "Generate instances following published recipes"}
	var typ, out string
	var agents, jobs int
	var seed uint64
	g := &cobra.Command{
		Use:   "gap --type a|b|c|d|e --agents M --jobs N --seed S [-o FILE]",
		Short: "Generalized assignment instance (Chu & Beasley 1997 types A-C; Laguna et al. 1995 type D; type E of Yagiura et al.)",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			if len(typ) != 1 {
				return badInput(fmt.Errorf("--type must be one of a, b, c, d, e; got %q", typ))
			}
			in, err := gap.Generate(typ[0], agents, jobs, seed)
			if err != nil {
				return badInput(err)
			}
			w := cmd.OutOrStdout()
			var f *os.File
			if out != "" {
				if f, err = os.Create(out); err != nil {
					return badInput(err)
				}
				w = f
			}
			bw := bufio.NewWriter(w)
			if err := gap.WriteORLib(bw, in); err != nil {
				return &exitError{code: exitInternal, err: err}
			}
			if err := bw.Flush(); err != nil {
				return &exitError{code: exitInternal, err: err}
			}
			if f != nil {
				return f.Close()
			}
			return nil
		},
	}
	g.Flags().StringVar(&typ, "type", "c", "instance type: a, b, c, d or e")
	g.Flags().IntVar(&agents, "agents", 10, "number of agents")
	g.Flags().IntVar(&jobs, "jobs", 100, "number of jobs")
	g.Flags().Uint64Var(&seed, "seed", 1, "random seed")
	g.Flags().StringVarP(&out, "output", "o", "", "file to write (default stdout)")
	gen.AddCommand(g, newGenCflpCmd())
	return gen
}
