package main

import (
	"fmt"
	"runtime/debug"

	"github.com/spf13/cobra"
)

// versionString is the module version and, when the build recorded it, the
// commit (with "+dirty" for uncommitted changes).
func versionString() string {
	bi, ok := debug.ReadBuildInfo()
	if !ok {
		return "(unknown version)"
	}
	v := bi.Main.Version
	if v == "" {
		v = "(devel)"
	}
	var rev, modified string
	for _, s := range bi.Settings {
		switch s.Key {
		case "vcs.revision":
			rev = s.Value
		case "vcs.modified":
			if s.Value == "true" {
				modified = "+dirty"
			}
		}
	}
	if rev != "" {
		if len(rev) > 12 {
			rev = rev[:12]
		}
		v += " commit " + rev + modified
	} else {
		// go run, or a build with -buildvcs=false, carries no revision.
		v += " commit unknown (built without version-control stamping)"
	}
	return v + " " + bi.GoVersion
}

func newVersionCmd() *cobra.Command {
	return &cobra.Command{
		Use:   "version",
		Short: "Print the version and commit",
		Args:  cobra.NoArgs,
		RunE: func(cmd *cobra.Command, args []string) error {
			fmt.Fprintf(cmd.OutOrStdout(), "pincer %s\n", versionString())
			return nil
		},
	}
}
