package main

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"time"

	"pincer/decomp"
	"pincer/instances"
)

// The bench's peer is a general-purpose MIP solver, cbc (Debian's
// coinor-cbc), run on the model the family exports as MPS, with the same
// wall time and thread count as pincer. pincer itself never depends on it.

// peerOutcome is what the peer reported for one row, in the model's own
// sense (a maximisation written negated in the MPS is turned back).
type peerOutcome struct {
	status   string // optimal, time-limit, infeasible, stopped, guard, no-answer, failed, not-run
	plan     float64
	hasPlan  bool
	bound    float64
	hasBound bool
	seconds  float64 // wall-clock time measured here
	threads  int
	note     string
}

// gap is |plan − bound| / max(1, |plan|), +Inf without both.
func (o *peerOutcome) gap() float64 {
	if o == nil || !o.hasPlan || !o.hasBound {
		return math.Inf(1)
	}
	return math.Abs(o.plan-o.bound) / math.Max(1, math.Abs(o.plan))
}

// cbcParsed is what cbc's printed output says, in the MPS's minimisation
// sense.
type cbcParsed struct {
	status       string
	objective    float64
	hasObjective bool
	bound        float64
	hasBound     bool
	statusLine   string // the "Result - ..." line, when printed
}

var (
	cbcResult     = regexp.MustCompile(`(?m)^Result - (.*?)\s*$`)
	cbcObjective  = regexp.MustCompile(`(?m)^Objective value:\s+(\S+)`)
	cbcLowerBound = regexp.MustCompile(`(?m)^Lower bound:\s+(\S+)`)
	// Progress lines, used when the summary is missing (a run stopped by
	// the wall-clock guard): the latest incumbent and best possible value.
	cbcNodeLine    = regexp.MustCompile(`(?m)^Cbc0010I After \d+ nodes, \d+ on tree, (\S+) best solution, best possible (\S+)`)
	cbcIntegerLine = regexp.MustCompile(`(?m)^Cbc0012I Integer solution of (\S+) found`)
	cbcPartialLine = regexp.MustCompile(`(?m)^Cbc0005I Partial search - best objective (\S+) \(best possible (\S+)\)`)
	cbcDoneLine    = regexp.MustCompile(`(?m)^Cbc0001I Search completed - best objective (\S+),`)
	cbcRootLine    = regexp.MustCompile(`(?m)^Cuts at root node changed objective from \S+ to (\S+)`)
	cbcLPLine      = regexp.MustCompile(`(?m)^Continuous objective value is (\S+)`)
)

// noIncumbent is the value cbc prints for "no solution yet".
const noIncumbent = 1e49

// parseCBC reads cbc's output. The summary after "Result -" wins; without
// one, the last progress lines give the incumbent and the bound (the root
// LP value is a valid bound once printed).
func parseCBC(text string) cbcParsed {
	var p cbcParsed
	num := func(s string) (float64, bool) {
		v, err := strconv.ParseFloat(s, 64)
		return v, err == nil && !math.IsNaN(v) && !math.IsInf(v, 0)
	}
	last := func(re *regexp.Regexp) []string {
		all := re.FindAllStringSubmatch(text, -1)
		if len(all) == 0 {
			return nil
		}
		return all[len(all)-1]
	}
	setObj := func(s string) {
		if v, ok := num(s); ok && math.Abs(v) < noIncumbent {
			p.objective, p.hasObjective = v, true
		}
	}
	setBound := func(s string) {
		if v, ok := num(s); ok && math.Abs(v) < noIncumbent {
			p.bound, p.hasBound = v, true
		}
	}
	// Fallbacks first, in increasing order of authority.
	if m := last(cbcLPLine); m != nil {
		setBound(m[1])
	}
	if m := last(cbcRootLine); m != nil {
		setBound(m[1])
	}
	if m := last(cbcIntegerLine); m != nil {
		setObj(m[1])
	}
	if m := last(cbcNodeLine); m != nil {
		setObj(m[1])
		setBound(m[2])
	}
	if m := last(cbcPartialLine); m != nil {
		setObj(m[1])
		setBound(m[2])
	}
	if m := last(cbcDoneLine); m != nil {
		setObj(m[1])
	}
	res := last(cbcResult)
	infeasible := strings.Contains(text, "Pre-processing says infeasible") || strings.Contains(text, "Problem is infeasible")
	switch {
	case res != nil:
		p.statusLine = res[1]
		line := strings.ToLower(res[1])
		switch {
		case strings.HasPrefix(line, "optimal"):
			p.status = "optimal"
		case strings.Contains(line, "infeasible"):
			p.status = "infeasible"
		case strings.Contains(line, "time limit"):
			p.status = "time-limit"
		default:
			p.status = "stopped"
		}
		if strings.Contains(text, "No feasible solution found") {
			p.hasObjective = false
		}
		if m := cbcObjective.FindStringSubmatch(text); m != nil && !strings.Contains(text, "No feasible solution found") {
			setObj(m[1])
		}
		if m := cbcLowerBound.FindStringSubmatch(text); m != nil {
			setBound(m[1])
		}
		if p.status == "optimal" && p.hasObjective {
			p.bound, p.hasBound = p.objective, true
		}
	case infeasible:
		p.status = "infeasible"
		p.hasObjective, p.hasBound = false, false
	case p.hasObjective || p.hasBound:
		p.status = "stopped"
	default:
		p.status = "no-answer"
	}
	return p
}

// peerGrace is how long past the time limit the peer may run before the
// wall-clock guard stops it (its own limit is not always honoured while
// it reads the model or solves the root LP).
func peerGrace(limit time.Duration) time.Duration {
	return 5*time.Second + limit/10
}

// runCBC exports m as MPS to a temporary file and runs cbc on it with the
// wall time limit and thread count; past limit+grace the guard stops it. A
// cancelled ctx stops cbc too; whatever it printed by then is read.
func runCBC(ctx context.Context, bin string, m instances.Model, limit, grace time.Duration, threads int) *peerOutcome {
	out := &peerOutcome{threads: threads}
	ex, ok := m.(instances.MPSExporter)
	if !ok {
		out.status, out.note = "not-run", "the format cannot be exported as MPS"
		return out
	}
	dir, err := os.MkdirTemp("", "pincer-bench-")
	if err != nil {
		out.status, out.note = "failed", err.Error()
		return out
	}
	defer os.RemoveAll(dir)
	model := filepath.Join(dir, "model.mps")
	if err := writeMPSFile(model, ex); err != nil {
		out.status, out.note = "failed", err.Error()
		return out
	}
	if declares, err := mpsDeclaresSense(model); err != nil || declares {
		out.status, out.note = "not-run", "the MPS file declares its objective sense, which the bench does not read"
		if err != nil {
			out.note = err.Error()
		}
		return out
	}
	secs := strconv.FormatFloat(limit.Seconds(), 'f', -1, 64)
	args := []string{model, "-threads", strconv.Itoa(threads), "-sec", secs, "-timeMode", "elapsed", "-solve", "-quit"}
	name := bin
	// Line-buffered output keeps what cbc printed when the guard stops it.
	if sb, err := exec.LookPath("stdbuf"); err == nil {
		name, args = sb, append([]string{"-oL", bin}, args...)
	}
	runCtx, cancel := context.WithTimeout(ctx, limit+grace)
	defer cancel()
	cmd := exec.CommandContext(runCtx, name, args...)
	cmd.Cancel = func() error { return cmd.Process.Signal(os.Interrupt) }
	cmd.WaitDelay = 2 * time.Second
	var buf bytes.Buffer
	cmd.Stdout, cmd.Stderr = &buf, &buf
	start := time.Now()
	err = cmd.Run()
	out.seconds = time.Since(start).Seconds()
	p := parseCBC(buf.String())
	out.status = p.status
	switch {
	case ctx.Err() != nil:
		out.status, out.note = "stopped", "interrupted"
	case runCtx.Err() != nil:
		out.status, out.note = "guard", fmt.Sprintf("stopped by the wall-clock guard after %.1f s", out.seconds)
	case err != nil && p.status == "no-answer":
		out.status, out.note = "failed", fmt.Sprintf("cbc: %v: %s", err, lastLines(buf.String(), 3))
	}
	if p.status == "no-answer" && out.note == "" {
		out.note = lastLines(buf.String(), 3)
	}
	sign := 1.0
	if m.Sense() == decomp.Maximise {
		sign = -1 // the MPS minimises the negated objective
	}
	if p.hasObjective {
		out.plan, out.hasPlan = sign*p.objective, true
	}
	if p.hasBound {
		out.bound, out.hasBound = sign*p.bound, true
	}
	return out
}

func writeMPSFile(path string, ex instances.MPSExporter) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriter(f)
	if err := ex.WriteMPS(w); err != nil {
		f.Close()
		return fmt.Errorf("writing MPS: %w", err)
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// mpsDeclaresSense reports whether the MPS file has an OBJSENSE section.
// The families write minimisation models (a maximisation negated), which
// is what the bench reads back.
func mpsDeclaresSense(path string) (bool, error) {
	f, err := os.Open(path)
	if err != nil {
		return false, err
	}
	defer f.Close()
	r := bufio.NewReaderSize(f, 64<<10)
	for {
		line, err := r.ReadSlice('\n')
		if bytes.HasPrefix(line, []byte("OBJSENSE")) {
			return true, nil
		}
		if errors.Is(err, bufio.ErrBufferFull) {
			// A long line: skip the rest of it.
			for errors.Is(err, bufio.ErrBufferFull) {
				_, err = r.ReadSlice('\n')
			}
		}
		if err == io.EOF {
			return false, nil
		}
		if err != nil {
			return false, err
		}
	}
}

// lastLines returns the last n non-empty lines of text, joined by " / ".
func lastLines(text string, n int) string {
	var lines []string
	for _, l := range strings.Split(text, "\n") {
		if l = strings.TrimSpace(l); l != "" {
			lines = append(lines, l)
		}
	}
	if len(lines) > n {
		lines = lines[len(lines)-n:]
	}
	return strings.Join(lines, " / ")
}
