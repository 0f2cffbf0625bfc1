// Package benchdata locates the open benchmark files that tests and
// benchmarks read. The files are never copied into the repository: they
// live in $PINCER_BENCHMARKS, or else in ../shared/benchmarks beside the
// repository root (the folder holding go.mod).
package benchdata

import (
	"os"
	"path/filepath"
	"testing"
)

// Dir returns the benchmark folder of one family (e.g. "gap", "cflp"),
// or skips the test with a clear message when it is absent.
func Dir(tb testing.TB, family string) string {
	tb.Helper()
	root := os.Getenv("PINCER_BENCHMARKS")
	if root == "" {
		dir, err := os.Getwd()
		if err != nil {
			tb.Skipf("benchmark data not found: %v", err)
		}
		for {
			if _, err := os.Stat(filepath.Join(dir, "go.mod")); err == nil {
				break
			}
			parent := filepath.Dir(dir)
			if parent == dir {
				tb.Skip("benchmark data not found: no go.mod above the test directory and PINCER_BENCHMARKS unset")
			}
			dir = parent
		}
		root = filepath.Join(dir, "..", "shared", "benchmarks")
	}
	d := filepath.Join(root, family)
	if _, err := os.Stat(d); err != nil {
		tb.Skipf("benchmark folder %s absent (set PINCER_BENCHMARKS to the benchmarks folder): %v", d, err)
	}
	return d
}
