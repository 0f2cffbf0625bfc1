package scheduling

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"pincer/instances"
)

// File names of a jobs-csv folder.
const (
	JobsFile     = "jobs.csv"
	MachinesFile = "machines.csv"
)

// EligibleSeparator separates the class ids in the eligible_classes column
// of jobs.csv ("press;bindery"). A semicolon is used because the comma
// already separates the fields and spreadsheets leave it alone inside a
// field.
const EligibleSeparator = ";"

// MaxCSVNumber is the largest number jobs.csv and machines.csv accept
// (processing time, weight, due and release dates, machine counts). It keeps
// every sum the family forms (horizons, completion times times weights over
// many jobs) far from integer overflow.
const MaxCSVNumber = 1_000_000_000

// ReadCSVFolder reads a scheduler's folder (`--format jobs-csv`) made of
// two CSV files with a header row each. Columns are found by name, in any
// order, ignoring case and surrounding blanks; unknown columns are ignored.
//
//   - machines.csv: class (a non-empty id, no ";"), count (machines in the
//     class, at least 1), optional name.
//   - jobs.csv: id, name (may be empty or left out), processing_time (at
//     least 1), weight, due (both at least 0), optional release (at least
//     0; empty means 0) and optional eligible_classes: class ids from
//     machines.csv separated by ";" (see EligibleSeparator); empty means
//     every class.
//
// Numbers are integers (time slots) up to MaxCSVNumber. The objective is
// WeightedTardiness; the instance is named after the folder. Errors are
// *instances.ParseError naming the file (joined to dir), the 1-based line,
// byte column and field number, and what was expected: malformed CSV, a
// missing or repeated column, empty or repeated ids, non-integers,
// negative or too large numbers, and unknown or repeated eligible classes.
func ReadCSVFolder(dir string) (*Instance, error) {
	mf, err := os.Open(filepath.Join(dir, MachinesFile))
	if err != nil {
		return nil, fmt.Errorf("scheduling: reading jobs-csv folder: %w", err)
	}
	defer mf.Close()
	jf, err := os.Open(filepath.Join(dir, JobsFile))
	if err != nil {
		return nil, fmt.Errorf("scheduling: reading jobs-csv folder: %w", err)
	}
	defer jf.Close()
	in, err := readCSVTables(jf, mf, filepath.Join(dir, JobsFile), filepath.Join(dir, MachinesFile))
	if err != nil {
		return nil, err
	}
	in.Name = filepath.Base(filepath.Clean(dir))
	return in, nil
}

// readCSVTables does the work of ReadCSVFolder on two readers; jobsFile and
// machinesFile are the names errors give.
func readCSVTables(jobs, machines io.Reader, jobsFile, machinesFile string) (*Instance, error) {
	in := &Instance{Objective: WeightedTardiness}
	classIndex := map[string]int{}
	classLine := map[string]int{}
	err := csvReadTable(machines, machinesFile, []string{"class", "count"}, func(row *csvRow) error {
		id, err := row.id("class", "class id", classLine)
		if err != nil {
			return err
		}
		if strings.Contains(id, EligibleSeparator) {
			return row.errorf("class", "a class id without \""+EligibleSeparator+"\" (it separates the eligible classes in "+filepath.Base(jobsFile)+")", "got %q", id)
		}
		n, err := row.integer("count", "machine count of class "+id, 1, false)
		if err != nil {
			return err
		}
		classIndex[id] = len(in.Classes)
		in.Classes = append(in.Classes, Class{ID: id, Name: row.text("name"), Machines: n})
		return nil
	})
	if err != nil {
		return nil, err
	}
	if len(in.Classes) == 0 {
		return nil, &instances.ParseError{File: machinesFile, Line: 1, Expected: "at least one machine class", Err: errors.New("no rows after the header")}
	}

	jobLine := map[string]int{}
	err = csvReadTable(jobs, jobsFile, []string{"id", "processing_time", "weight", "due"}, func(row *csvRow) error {
		id, err := row.id("id", "job id", jobLine)
		if err != nil {
			return err
		}
		jb := Job{ID: id, Name: row.text("name")}
		if jb.Processing, err = row.integer("processing_time", "processing time of job "+id, 1, false); err != nil {
			return err
		}
		if jb.Weight, err = row.integer("weight", "weight of job "+id, 0, false); err != nil {
			return err
		}
		if jb.Due, err = row.integer("due", "due date of job "+id, 0, false); err != nil {
			return err
		}
		if jb.Release, err = row.integer("release", "release date of job "+id, 0, true); err != nil {
			return err
		}
		if jb.Eligible, err = row.classList("eligible_classes", "eligible classes of job "+id, classIndex, machinesFile); err != nil {
			return err
		}
		in.Jobs = append(in.Jobs, jb)
		return nil
	})
	if err != nil {
		return nil, err
	}
	if len(in.Jobs) == 0 {
		return nil, &instances.ParseError{File: jobsFile, Line: 1, Expected: "at least one job", Err: errors.New("no rows after the header")}
	}
	if err := in.Validate(); err != nil {
		return nil, fmt.Errorf("scheduling: reading jobs-csv folder: %w", err)
	}
	return in, nil
}

// csvRow is one data record of a table, with its header map.
type csvRow struct {
	file   string
	line   int
	col    map[string]int // column name → 0-based field index
	fields []string
	bytes  []int // 1-based byte column of each field
}

// text returns the trimmed field of the named column, or "" when the column
// is absent or the record is short.
func (r *csvRow) text(name string) string {
	k, ok := r.col[name]
	if !ok || k >= len(r.fields) {
		return ""
	}
	return strings.TrimSpace(r.fields[k])
}

func (r *csvRow) errorf(name, expected, format string, args ...any) *instances.ParseError {
	k, ok := r.col[name]
	col, tok := 0, 0
	if ok {
		tok = k + 1
		if k < len(r.bytes) {
			col = r.bytes[k]
		}
	}
	return &instances.ParseError{File: r.file, Line: r.line, Column: col, Token: tok, Expected: expected, Err: fmt.Errorf(format, args...)}
}

// id returns a non-empty id not seen before in this file.
func (r *csvRow) id(name, what string, seen map[string]int) (string, error) {
	id := r.text(name)
	if id == "" {
		return "", r.errorf(name, "a "+what, "the field is empty")
	}
	if l, dup := seen[id]; dup {
		return "", r.errorf(name, "a "+what+" not used before", "%q is already used on line %d", id, l)
	}
	seen[id] = r.line
	return id, nil
}

// integer parses an integer in lo..MaxCSVNumber; an empty optional field
// gives 0.
func (r *csvRow) integer(name, what string, lo int, optional bool) (int, error) {
	s := r.text(name)
	kind := fmt.Sprintf(" (an integer from %d to %d)", lo, MaxCSVNumber)
	if s == "" {
		if optional {
			return 0, nil
		}
		return 0, r.errorf(name, what+kind, "the field is empty")
	}
	v, err := strconv.Atoi(s)
	if err != nil || v < lo || v > MaxCSVNumber {
		return 0, r.errorf(name, what+kind, "got %q", s)
	}
	return v, nil
}

// classList parses a EligibleSeparator-separated list of class ids into
// increasing class indices; an empty field gives nil (every class).
func (r *csvRow) classList(name, what string, index map[string]int, classesFile string) ([]int, error) {
	s := r.text(name)
	if s == "" {
		return nil, nil
	}
	var out []int
	seen := map[int]bool{}
	for _, part := range strings.Split(s, EligibleSeparator) {
		id := strings.TrimSpace(part)
		k, ok := index[id]
		if !ok {
			return nil, r.errorf(name, what+": class ids from "+filepath.Base(classesFile)+" separated by \""+EligibleSeparator+"\"", "unknown class %q in %q", id, s)
		}
		if seen[k] {
			return nil, r.errorf(name, what+": each class once", "class %q repeated in %q", id, s)
		}
		seen[k] = true
		out = append(out, k)
	}
	sort.Ints(out)
	return out, nil
}

// csvReadTable reads a CSV table whose first record is a header, checks
// that the required columns are present and calls row for every data
// record.
func csvReadTable(r io.Reader, file string, required []string, row func(*csvRow) error) error {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err != nil {
		if errors.Is(err, io.EOF) {
			return &instances.ParseError{File: file, Line: 1, Expected: "a header naming the columns " + strings.Join(required, ", "),
				Err: errors.New("the file is empty")}
		}
		return csvSyntaxError(file, err)
	}
	line, _ := cr.FieldPos(0)
	cols := make(map[string]int, len(header))
	for k, h := range header {
		if k == 0 {
			h = strings.TrimPrefix(h, "\ufeff") // byte order mark written by some spreadsheets
		}
		h = strings.ToLower(strings.TrimSpace(h))
		if h == "" {
			continue
		}
		if prev, dup := cols[h]; dup {
			_, c := cr.FieldPos(k)
			return &instances.ParseError{File: file, Line: line, Column: c, Token: k + 1, Expected: "each column named once",
				Err: fmt.Errorf("column %q is also column %d", h, prev+1)}
		}
		cols[h] = k
	}
	for _, name := range required {
		if _, ok := cols[name]; !ok {
			return &instances.ParseError{File: file, Line: line, Column: 1, Expected: "a column named " + name + " in the header",
				Err: fmt.Errorf("the header is %q", strings.Join(header, ","))}
		}
	}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			return nil
		}
		if err != nil {
			return csvSyntaxError(file, err)
		}
		l, _ := cr.FieldPos(0)
		rr := &csvRow{file: file, line: l, col: cols, fields: rec, bytes: make([]int, len(rec))}
		for k := range rec {
			_, rr.bytes[k] = cr.FieldPos(k)
		}
		for _, name := range required {
			if k := cols[name]; k >= len(rec) {
				last := rr.bytes[len(rec)-1]
				return &instances.ParseError{File: file, Line: l, Column: last, Token: k + 1,
					Expected: fmt.Sprintf("a field %d (%s)", k+1, name), Err: fmt.Errorf("the record has only %d fields", len(rec))}
			}
		}
		if err := row(rr); err != nil {
			return err
		}
	}
}

// csvSyntaxError turns a syntax error of encoding/csv into a ParseError.
func csvSyntaxError(file string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &instances.ParseError{File: file, Line: max(pe.Line, 1), Column: max(pe.Column, 1), Expected: "a well-formed CSV record", Err: pe.Err}
	}
	return &instances.ParseError{File: file, Line: 1, Expected: "a readable CSV file", Err: err}
}

// WriteCSVFolder writes in as a jobs-csv folder that ReadCSVFolder reads
// back (machines.csv and jobs.csv in dir, which is created if needed). The
// objective is not part of the folder.
func WriteCSVFolder(dir string, in *Instance) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("scheduling: writing jobs-csv folder: %w", err)
	}
	return WriteCSVTo(func(name string) (io.WriteCloser, error) { return os.Create(filepath.Join(dir, name)) }, in)
}

// WriteCSVTo writes the two tables of a jobs-csv folder through create,
// which opens a file of the folder by name (MachinesFile, JobsFile). It
// refuses an invalid instance and ids that would not read back (empty,
// repeated, or a class id holding EligibleSeparator).
func WriteCSVTo(create func(name string) (io.WriteCloser, error), in *Instance) error {
	if err := in.Validate(); err != nil {
		return fmt.Errorf("scheduling: writing jobs-csv folder: %w", err)
	}
	seen := map[string]bool{}
	machines := [][]string{{"class", "count", "name"}}
	for _, c := range in.Classes {
		if c.ID == "" || seen[c.ID] || strings.Contains(c.ID, EligibleSeparator) || strings.TrimSpace(c.ID) != c.ID {
			return fmt.Errorf("scheduling: writing jobs-csv folder: class id %q is empty, repeated, padded or holds %q", c.ID, EligibleSeparator)
		}
		seen[c.ID] = true
		machines = append(machines, []string{c.ID, strconv.Itoa(c.Machines), c.Name})
	}
	seen = map[string]bool{}
	jobs := [][]string{{"id", "name", "processing_time", "weight", "due", "release", "eligible_classes"}}
	for _, jb := range in.Jobs {
		if jb.ID == "" || seen[jb.ID] || strings.TrimSpace(jb.ID) != jb.ID {
			return fmt.Errorf("scheduling: writing jobs-csv folder: job id %q is empty, repeated or padded", jb.ID)
		}
		seen[jb.ID] = true
		var el []string
		for _, k := range jb.Eligible {
			el = append(el, in.Classes[k].ID)
		}
		jobs = append(jobs, []string{jb.ID, jb.Name, strconv.Itoa(jb.Processing), strconv.Itoa(jb.Weight),
			strconv.Itoa(jb.Due), strconv.Itoa(jb.Release), strings.Join(el, EligibleSeparator)})
	}
	for _, t := range []struct {
		name    string
		records [][]string
	}{{MachinesFile, machines}, {JobsFile, jobs}} {
		f, err := create(t.name)
		if err != nil {
			return fmt.Errorf("scheduling: writing jobs-csv folder: %w", err)
		}
		w := csv.NewWriter(f)
		if err := w.WriteAll(t.records); err != nil {
			f.Close()
			return fmt.Errorf("scheduling: writing %s: %w", t.name, err)
		}
		if err := f.Close(); err != nil {
			return fmt.Errorf("scheduling: writing %s: %w", t.name, err)
		}
	}
	return nil
}
