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
	err := instances.ReadCSVTable(machines, machinesFile, []string{"class", "count"}, func(row *instances.CSVRow) error {
		id, err := row.ID("class", "a class id", classLine)
		if err != nil {
			return err
		}
		if strings.Contains(id, EligibleSeparator) {
			return row.Errorf("class", "a class id without \""+EligibleSeparator+"\" (it separates the eligible classes in "+filepath.Base(jobsFile)+")", "got %q", id)
		}
		n, err := csvInteger(row, "count", "machine count of class "+id, 1, false)
		if err != nil {
			return err
		}
		classIndex[id] = len(in.Classes)
		in.Classes = append(in.Classes, Class{ID: id, Name: row.Text("name"), Machines: n})
		return nil
	})
	if err != nil {
		return nil, err
	}
	if len(in.Classes) == 0 {
		return nil, &instances.ParseError{File: machinesFile, Line: 1, Expected: "at least one machine class", Err: errors.New("no rows after the header")}
	}

	jobLine := map[string]int{}
	err = instances.ReadCSVTable(jobs, jobsFile, []string{"id", "processing_time", "weight", "due"}, func(row *instances.CSVRow) error {
		id, err := row.ID("id", "a job id", jobLine)
		if err != nil {
			return err
		}
		jb := Job{ID: id, Name: row.Text("name")}
		if jb.Processing, err = csvInteger(row, "processing_time", "processing time of job "+id, 1, false); err != nil {
			return err
		}
		if jb.Weight, err = csvInteger(row, "weight", "weight of job "+id, 0, false); err != nil {
			return err
		}
		if jb.Due, err = csvInteger(row, "due", "due date of job "+id, 0, false); err != nil {
			return err
		}
		if jb.Release, err = csvInteger(row, "release", "release date of job "+id, 0, true); err != nil {
			return err
		}
		if jb.Eligible, err = csvClassList(row, "eligible_classes", "eligible classes of job "+id, classIndex, machinesFile); err != nil {
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

// integer parses an integer in lo..MaxCSVNumber; an empty optional field
// gives 0.
func csvInteger(r *instances.CSVRow, name, what string, lo int, optional bool) (int, error) {
	s := r.Text(name)
	kind := fmt.Sprintf(" (an integer from %d to %d)", lo, MaxCSVNumber)
	if s == "" {
		if optional {
			return 0, nil
		}
		return 0, r.Errorf(name, what+kind, "the field is empty")
	}
	v, err := strconv.Atoi(s)
	if err != nil || v < lo || v > MaxCSVNumber {
		return 0, r.Errorf(name, what+kind, "got %q", s)
	}
	return v, nil
}

// classList parses a EligibleSeparator-separated list of class ids into
// increasing class indices; an empty field gives nil (every class).
func csvClassList(r *instances.CSVRow, name, what string, index map[string]int, classesFile string) ([]int, error) {
	s := r.Text(name)
	if s == "" {
		return nil, nil
	}
	var out []int
	seen := map[int]bool{}
	for _, part := range strings.Split(s, EligibleSeparator) {
		id := strings.TrimSpace(part)
		k, ok := index[id]
		if !ok {
			return nil, r.Errorf(name, what+": class ids from "+filepath.Base(classesFile)+" separated by \""+EligibleSeparator+"\"", "unknown class %q in %q", id, s)
		}
		if seen[k] {
			return nil, r.Errorf(name, what+": each class once", "class %q repeated in %q", id, s)
		}
		seen[k] = true
		out = append(out, k)
	}
	sort.Ints(out)
	return out, nil
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
