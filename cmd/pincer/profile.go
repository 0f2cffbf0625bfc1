package main

import (
	"fmt"
	"os"
	"runtime/pprof"

	"github.com/spf13/cobra"
)

// profileFlags holds --cpuprofile: a CPU profile of the run, in the
// runtime's own profile format, for `go tool pprof`.
type profileFlags struct {
	cpu string
}

func (p *profileFlags) register(cmd *cobra.Command) {
	cmd.Flags().StringVar(&p.cpu, "cpuprofile", "", "write a CPU profile of the run to this file (read it with go tool pprof)")
}

// start begins the profile when asked for; the returned function ends it.
// A file that cannot be created is a bad flag value (exit 2).
func (p *profileFlags) start() (func(), error) {
	if p.cpu == "" {
		return func() {}, nil
	}
	f, err := os.Create(p.cpu)
	if err != nil {
		return nil, badInput(fmt.Errorf("--cpuprofile: %w", err))
	}
	if err := pprof.StartCPUProfile(f); err != nil {
		f.Close()
		return nil, badInput(fmt.Errorf("--cpuprofile %s: %w", p.cpu, err))
	}
	return func() {
		pprof.StopCPUProfile()
		f.Close()
	}, nil
}
