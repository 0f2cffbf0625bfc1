// Package oracle runs a general-purpose MIP solver (CBC, from Debian's
// coinor-cbc package) on a model that a family exported as MPS. Tests use
// it as an outside reference for bounds and plan values; pincer itself
// never depends on it.
package oracle

import (
	"context"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"
	"time"
)

// Outcome is what CBC reported.
type Outcome struct {
	Objective float64
	Optimal   bool   // CBC proved the objective optimal
	Output    string // everything CBC printed
}

// CBC writes the model with write into a temporary MPS file and solves it
// with cbc under a CPU limit of seconds. It skips the test when cbc is not
// installed and fails it when cbc rejects the model or prints no objective.
func CBC(tb testing.TB, write func(io.Writer) error, seconds int) Outcome {
	tb.Helper()
	bin, err := exec.LookPath("cbc")
	if err != nil {
		tb.Skipf("cbc not installed (apt-get install coinor-cbc); the oracle check is skipped: %v", err)
	}
	model := filepath.Join(tb.TempDir(), "model.mps")
	f, err := os.Create(model)
	if err != nil {
		tb.Fatal(err)
	}
	if err := write(f); err != nil {
		tb.Fatal(err)
	}
	if err := f.Close(); err != nil {
		tb.Fatal(err)
	}
	// The wall-clock guard is far beyond the CPU limit; it only stops a
	// hung process.
	ctx, cancel := context.WithTimeout(context.Background(), time.Duration(10*seconds+60)*time.Second)
	defer cancel()
	out, err := exec.CommandContext(ctx, bin, model, "sec", strconv.Itoa(seconds), "solve").CombinedOutput()
	text := string(out)
	if err != nil {
		tb.Fatalf("cbc: %v\n%s", err, text)
	}
	if strings.Contains(text, "No match") || !strings.Contains(text, "read with 0 errors") {
		tb.Fatalf("cbc complained about the model:\n%s", text)
	}
	m := regexp.MustCompile(`(?m)^Objective value:\s+(\S+)`).FindStringSubmatch(text)
	if m == nil {
		tb.Fatalf("cbc printed no objective value:\n%s", text)
	}
	obj, err := strconv.ParseFloat(m[1], 64)
	if err != nil {
		tb.Fatalf("cbc objective %q: %v", m[1], err)
	}
	return Outcome{Objective: obj, Optimal: strings.Contains(text, "Result - Optimal solution found"), Output: text}
}
