package gap

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// planHeader returns the first record of a plan file.
func planHeader() []string { return []string{"job", "agent", "cost", "use"} }

// WritePlanCSV writes plan assign (assign[j] = 0-based agent of job j) as
// CSV with the header "job,agent,cost,use" and one row per job in job order;
// job and agent are 1-based, cost and use are c_ij and a_ij. Every job must
// have an existing agent.
func WritePlanCSV(w io.Writer, in *Instance, assign []int) error {
	return WriteNamedPlanCSV(w, in, assign, nil)
}

// WriteNamedPlanCSV is WritePlanCSV with a fifth column agent_name taken
// from names (names[i] names agent i); with nil names it writes the plain
// four columns. ReadPlanCSV reads both layouts.
func WriteNamedPlanCSV(w io.Writer, in *Instance, assign []int, names []string) error {
	if names != nil && len(names) != in.Agents {
		return fmt.Errorf("gap: plan for %q: %d agent names for %d agents", in.Name, len(names), in.Agents)
	}
	if err := in.Validate(); err != nil {
		return err
	}
	if len(assign) != in.Jobs {
		return fmt.Errorf("gap: plan for %q has %d entries for %d jobs", in.Name, len(assign), in.Jobs)
	}
	cw := csv.NewWriter(w)
	header := planHeader()
	if names != nil {
		header = append(header, "agent_name")
	}
	if err := cw.Write(header); err != nil {
		return fmt.Errorf("gap: writing plan: %w", err)
	}
	rec := make([]string, len(header))
	for j, i := range assign {
		if i < 0 || i >= in.Agents {
			return fmt.Errorf("gap: plan for %q: job %d has agent index %d, want 0..%d", in.Name, j+1, i, in.Agents-1)
		}
		rec[0] = strconv.Itoa(j + 1)
		rec[1] = strconv.Itoa(i + 1)
		rec[2] = strconv.FormatInt(in.Cost[i][j], 10)
		rec[3] = strconv.FormatInt(in.Use[i][j], 10)
		if names != nil {
			rec[4] = names[i]
		}
		if err := cw.Write(rec); err != nil {
			return fmt.Errorf("gap: writing plan: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("gap: writing plan: %w", err)
	}
	return nil
}

// ReadPlanCSV reads a plan in the layout WritePlanCSV writes and returns
// assign (assign[j] = 0-based agent of job j). Rows may come in any order
// but every job of in must appear exactly once with an agent in range.
// A fifth column agent_name (as WriteNamedPlanCSV writes) is allowed and
// ignored. Fields are trimmed of blanks; the cost and use fields may be empty, and
// when given must equal c_ij and a_ij of in (a guard against reading a plan
// made for another instance). Faults are reported as *ParseError, with
// Token the 1-based field number.
func ReadPlanCSV(r io.Reader, file string, in *Instance) ([]int, error) {
	if err := in.Validate(); err != nil {
		return nil, err
	}
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = true
	fail := func(line, col, field int, expected string, err error) *ParseError {
		if line < 1 {
			line = 1
		}
		if col < 1 {
			col = 1
		}
		return &ParseError{File: file, Line: line, Column: col, Token: field, Expected: expected, Err: err}
	}
	got := func(s, note string) error { return &gotError{got: s, note: note} }
	readErr := func(err error) error {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			return fail(pe.Line, pe.Column, 0, "a well-formed CSV record", pe.Err)
		}
		return fmt.Errorf("gap: reading plan %s: %w", file, err)
	}
	eof := func(line int, expected string) error {
		return fail(line, 1, 0, expected, &gotError{eof: true, err: io.ErrUnexpectedEOF})
	}

	rec, err := cr.Read()
	if err == io.EOF {
		return nil, eof(1, "header job,agent,cost,use")
	}
	if err != nil {
		return nil, readErr(err)
	}
	line, _ := cr.FieldPos(0)
	header := planHeader()
	fields := len(header)
	if len(rec) == 5 && strings.EqualFold(strings.TrimSpace(rec[4]), "agent_name") {
		fields = 5 // the names are informative; the agent number decides
	}
	if len(rec) != fields {
		return nil, fail(line, 1, 0, "header job,agent,cost,use", got(strings.Join(rec, ","), fmt.Sprintf("%d fields", len(rec))))
	}
	for k, name := range header {
		if !strings.EqualFold(strings.TrimSpace(rec[k]), name) {
			l, c := cr.FieldPos(k)
			return nil, fail(l, c, k+1, fmt.Sprintf("header field %q", name), got(rec[k], ""))
		}
	}

	assign := make([]int, in.Jobs)
	seenOn := make([]int, in.Jobs) // line of the row for each job, 0 if none
	for k := range assign {
		assign[k] = -1
	}
	last := line
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, readErr(err)
		}
		line, _ := cr.FieldPos(0)
		last = line
		if len(rec) != fields {
			return nil, fail(line, 1, 0, fmt.Sprintf("%d fields as in the header", fields), got(strings.Join(rec, ","), fmt.Sprintf("%d fields", len(rec))))
		}
		field := func(k int, expected string, lo, hi int64) (int64, error) {
			s := strings.TrimSpace(rec[k])
			v, err := strconv.ParseInt(s, 10, 64)
			if err != nil || v < lo || v > hi {
				l, c := cr.FieldPos(k)
				var cause error
				if err != nil {
					cause = err.(*strconv.NumError).Err
				}
				return 0, fail(l, c, k+1, expected, &gotError{got: rec[k], err: cause})
			}
			return v, nil
		}
		jv, err := field(0, fmt.Sprintf("job number 1..%d", in.Jobs), 1, int64(in.Jobs))
		if err != nil {
			return nil, err
		}
		j := int(jv - 1)
		if seenOn[j] != 0 {
			l, c := cr.FieldPos(0)
			return nil, fail(l, c, 1, "each job once", got(rec[0], fmt.Sprintf("job %d already has a row on line %d", j+1, seenOn[j])))
		}
		iv, err := field(1, fmt.Sprintf("agent number 1..%d", in.Agents), 1, int64(in.Agents))
		if err != nil {
			return nil, err
		}
		i := int(iv - 1)
		for k, want := range []int64{in.Cost[i][j], in.Use[i][j]} {
			if strings.TrimSpace(rec[2+k]) == "" {
				continue
			}
			name := [2]string{"cost", "use"}[k]
			if _, err := field(2+k, fmt.Sprintf("%s %d (the instance's %s of agent %d for job %d) or an empty field", name, want, name, i+1, j+1), want, want); err != nil {
				return nil, err
			}
		}
		assign[j] = i
		seenOn[j] = line
	}
	for j, l := range seenOn {
		if l == 0 {
			return nil, eof(last, fmt.Sprintf("a row for job %d (every job 1..%d once)", j+1, in.Jobs))
		}
	}
	return assign, nil
}
