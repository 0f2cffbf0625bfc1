package main

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestCPUProfile: --cpuprofile writes a non-empty profile beside a normal
// run, and a path that cannot be created is a bad flag value (exit 2)
// reported before any solving.
func TestCPUProfile(t *testing.T) {
	dir := t.TempDir()
	prof := filepath.Join(dir, "run.prof")
	code, _, errs := runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--rounds", "30",
		"--cpuprofile", prof, testdata("gap-c-5x30.txt"))
	if code != exitOK && code != exitNoPlan {
		t.Fatalf("exit %d: %s", code, errs)
	}
	if st, err := os.Stat(prof); err != nil || st.Size() == 0 {
		t.Fatalf("no profile written: %v", err)
	}
	bad := filepath.Join(dir, "missing", "run.prof")
	code, _, errs = runCLI(t, context.Background(), "solve", "--format", "gap-orlib", "--quiet", "--rounds", "30",
		"--cpuprofile", bad, testdata("gap-c-5x30.txt"))
	if code != exitBadInput || !strings.Contains(errs, "--cpuprofile") {
		t.Errorf("unwritable profile path: exit %d, err %q", code, errs)
	}
}
