// Command pincer solves large separable planning problems by Lagrangian
// decomposition: it squeezes the optimum between a relaxed bound and a
// repaired feasible plan, and reports shadow prices of the shared
// resources.
//
// Exit codes: 0 a plan was found (or, for verify, the plan is feasible);
// 1 internal error; 2 bad input or usage; 3 no feasible plan found (the
// report is still written) or, for verify, the plan is infeasible; 130
// interrupted (the report and best plan are written first).
package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"

	"github.com/spf13/cobra"
)

// Exit codes, documented in the README.
const (
	exitOK          = 0
	exitInternal    = 1
	exitBadInput    = 2
	exitNoPlan      = 3
	exitInterrupted = 130
)

// exitError carries an exit code with its cause.
type exitError struct {
	code int
	err  error
}

func (e *exitError) Error() string {
	if e.err == nil {
		return fmt.Sprintf("exit %d", e.code)
	}
	return e.err.Error()
}
func (e *exitError) Unwrap() error { return e.err }

func badInput(err error) error { return &exitError{code: exitBadInput, err: err} }

func main() {
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	defer stop()
	code := run(ctx, os.Args[1:], os.Stdout, os.Stderr)
	stop()
	os.Exit(code)
}

// run executes the command line and returns the exit code.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	root := newRoot(stdout, stderr, formatArg(args))
	root.SetArgs(args)
	err := root.ExecuteContext(ctx)
	if err == nil {
		return exitOK
	}
	var ee *exitError
	if errors.As(err, &ee) {
		if ee.err != nil {
			fmt.Fprintln(stderr, "pincer:", ee.err)
		}
		return ee.code
	}
	// Anything cobra itself rejects (unknown flag, missing argument) is a
	// usage error.
	fmt.Fprintln(stderr, "pincer:", err)
	return exitBadInput
}

// newRoot builds the command tree; chosen is the --format given on the
// command line (if any), whose family's options alone are registered.
func newRoot(stdout, stderr io.Writer, chosen string) *cobra.Command {
	root := &cobra.Command{
		Use:   "pincer",
		Short: "Lagrangian decomposition for large separable planning problems",
		Long: `pincer squeezes the optimum of a large planning problem between two bounds:
a relaxed bound from pricing out the coupling rows, and a feasible plan
repaired from the relaxed answer. It reports the gap between them and the
shadow price of every shared resource.

Plans are decision support: check them against site rules and local
practice before use.`,
		SilenceUsage:  true,
		SilenceErrors: true,
		Version:       versionString(),
	}
	root.SetVersionTemplate("pincer {{.Version}}\n")
	root.SetFlagErrorFunc(flagHint)
	root.SetOut(stdout)
	root.SetErr(stderr)
	root.AddCommand(newSolveCmd(chosen), newVerifyCmd(chosen), newExportCmd(chosen), newWhatifCmd(chosen), newGenCmd(), newDemoCmd(), newVersionCmd())
	return root
}
