package cflp

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strings"

	"pincer/instances"
)

// File names of a scenario folder.
const (
	SitesFile     = "sites.csv"
	CustomersFile = "customers.csv"
	LanesFile     = "lanes.csv"
)

// ReadScenario reads a scenario folder made of three CSV files with a header
// row each; columns are found by name (in any order, case and surrounding
// blanks ignored) and unknown columns are ignored:
//
//   - sites.csv: id, capacity, fixed_cost, and optionally name and status
//     (open, closed or free; empty means free);
//   - customers.csv: id, demand (positive), and optionally name;
//   - lanes.csv: site, customer, unit_cost — the cost per unit of demand
//     shipped on the lane. The instance's cost of serving a customer's whole
//     demand is unit_cost × demand. A pair without a row is not allowed.
//
// Errors are of type *ParseError, with the 1-based line, byte column and
// field number (Token):
// malformed CSV, a missing column, empty, duplicate or unknown ids, missing,
// negative or non-numeric numbers, bad status words, repeated lanes, a
// customer with no lane from a site that is not forced closed, and a total
// demand above the total capacity of the sites that are not forced closed.
func ReadScenario(dir string) (*Instance, error) {
	var rs [3]io.Reader
	for k, name := range []string{SitesFile, CustomersFile, LanesFile} {
		f, err := os.Open(filepath.Join(dir, name))
		if err != nil {
			return nil, fmt.Errorf("cflp: reading scenario: %w", err)
		}
		defer f.Close()
		rs[k] = f
	}
	in, err := readScenario(rs[0], rs[1], rs[2])
	if err != nil {
		return nil, err
	}
	in.Name = filepath.Base(filepath.Clean(dir))
	return in, nil
}

// readScenario does the work of ReadScenario on three readers.
func readScenario(sites, customers, lanes io.Reader) (*Instance, error) {
	in := &Instance{}
	siteIndex := map[string]int{}
	siteLine := map[string]int{}
	err := readTable(sites, SitesFile, []string{"id", "capacity", "fixed_cost"},
		func(row *csvRow) error {
			id, err := row.id("id", "site id", siteLine)
			if err != nil {
				return err
			}
			s := Site{ID: id, Name: row.text("name")}
			if s.Capacity, err = row.number("capacity", "capacity of site "+id, false); err != nil {
				return err
			}
			if s.FixedCost, err = row.number("fixed_cost", "fixed cost of site "+id, false); err != nil {
				return err
			}
			switch w := strings.ToLower(row.text("status")); w {
			case "", "free":
				s.Status = Free
			case "open":
				s.Status = ForcedOpen
			case "closed":
				s.Status = ForcedClosed
			default:
				return row.errorf("status", "status of site "+id+" (open, closed or free)", "got %q", row.text("status"))
			}
			siteIndex[id] = len(in.Sites)
			in.Sites = append(in.Sites, s)
			return nil
		})
	if err != nil {
		return nil, err
	}
	if len(in.Sites) == 0 {
		return nil, &ParseError{File: SitesFile, Line: 1, Expected: "at least one site", Err: errors.New("no rows after the header")}
	}

	custIndex := map[string]int{}
	custLine := map[string]int{}
	idCol, demandCol := 0, 0 // 1-based, for errors about a customer as a whole
	err = readTable(customers, CustomersFile, []string{"id", "demand"},
		func(row *csvRow) error {
			id, err := row.id("id", "customer id", custLine)
			if err != nil {
				return err
			}
			idCol, demandCol = row.col["id"]+1, row.col["demand"]+1
			c := Customer{ID: id, Name: row.text("name")}
			if c.Demand, err = row.number("demand", "demand of customer "+id, true); err != nil {
				return err
			}
			custIndex[id] = len(in.Customers)
			in.Customers = append(in.Customers, c)
			return nil
		})
	if err != nil {
		return nil, err
	}
	if len(in.Customers) == 0 {
		return nil, &ParseError{File: CustomersFile, Line: 1, Expected: "at least one customer", Err: errors.New("no rows after the header")}
	}

	m, n := len(in.Sites), len(in.Customers)
	in.Cost = make([][]float64, m)
	for i := range in.Cost {
		in.Cost[i] = make([]float64, n)
		for j := range in.Cost[i] {
			in.Cost[i][j] = math.Inf(1)
		}
	}
	laneLine := map[[2]int]int{}
	err = readTable(lanes, LanesFile, []string{"site", "customer", "unit_cost"},
		func(row *csvRow) error {
			sid, cid := row.text("site"), row.text("customer")
			i, ok := siteIndex[sid]
			if !ok {
				return row.errorf("site", "a site id from "+SitesFile, "got %q", sid)
			}
			j, ok := custIndex[cid]
			if !ok {
				return row.errorf("customer", "a customer id from "+CustomersFile, "got %q", cid)
			}
			if l, dup := laneLine[[2]int{i, j}]; dup {
				return row.errorf("site", "one row per lane", "lane %s → %s already given on line %d", sid, cid, l)
			}
			laneLine[[2]int{i, j}] = row.line
			u, err := row.number("unit_cost", "unit cost of lane "+sid+" → "+cid, false)
			if err != nil {
				return err
			}
			in.Cost[i][j] = u * in.Customers[j].Demand
			if math.IsInf(in.Cost[i][j], 0) {
				return row.errorf("unit_cost", "unit cost of lane "+sid+" → "+cid+" whose cost of the whole demand is finite",
					"got %q", row.text("unit_cost"))
			}
			return nil
		})
	if err != nil {
		return nil, err
	}

	for j, c := range in.Customers {
		ok := false
		for i, s := range in.Sites {
			if s.Status != ForcedClosed && in.Allowed(i, j) {
				ok = true
				break
			}
		}
		if !ok {
			return nil, &ParseError{File: CustomersFile, Line: custLine[c.ID], Token: idCol,
				Expected: "customer " + c.ID + " to have a lane in " + LanesFile + " from a site that is not forced closed",
				Err:      errors.New("no such lane")}
		}
	}
	capacity := in.TotalCapacity()
	if demand := in.TotalDemand(); demand > capacity {
		// Point at the customer whose demand brings the running total past
		// the capacity.
		run, at := 0.0, in.Customers[n-1]
		for _, c := range in.Customers {
			run += c.Demand
			if run > capacity {
				at = c
				break
			}
		}
		return nil, &ParseError{File: CustomersFile, Line: custLine[at.ID], Token: demandCol,
			Expected: "total demand within the total capacity of the sites that are not forced closed",
			Err: fmt.Errorf("total demand %s exceeds total capacity %s by %s (the running total passes the capacity at customer %s)",
				formatNumber(demand), formatNumber(capacity), formatNumber(demand-capacity), at.ID)}
	}
	if err := in.Validate(); err != nil {
		return nil, fmt.Errorf("cflp: reading scenario: %w", err)
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

func (r *csvRow) errorf(name, expected, format string, args ...any) *ParseError {
	k := r.col[name]
	col := 0
	if k < len(r.bytes) {
		col = r.bytes[k]
	}
	return &ParseError{File: r.file, Line: r.line, Column: col, Token: k + 1, Expected: expected, Err: fmt.Errorf(format, args...)}
}

// id returns a non-empty id not seen before in this file.
func (r *csvRow) id(name, what string, seen map[string]int) (string, error) {
	id := r.text(name)
	if id == "" {
		return "", r.errorf(name, what, "the field is empty")
	}
	if l, dup := seen[id]; dup {
		return "", r.errorf(name, "a "+what+" not used before", "%q is already used on line %d", id, l)
	}
	seen[id] = r.line
	return id, nil
}

// number parses a finite non-negative (or positive) decimal number.
func (r *csvRow) number(name, what string, positive bool) (float64, error) {
	s := r.text(name)
	kind := " (non-negative number)"
	if positive {
		kind = " (positive number)"
	}
	if s == "" {
		return 0, r.errorf(name, what+kind, "the field is empty")
	}
	v, ok := parseDecimal(s)
	if !ok || v < 0 || (positive && v == 0) {
		return 0, r.errorf(name, what+kind, "got %q", s)
	}
	return v, nil
}

// readTable reads a CSV table whose first record is a header, checks that
// the required columns are present and calls row for every data record.
func readTable(r io.Reader, file string, required []string, row func(*csvRow) error) error {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.ReuseRecord = false
	header, err := cr.Read()
	if err != nil {
		if errors.Is(err, io.EOF) {
			return &ParseError{File: file, Line: 1, Expected: "a header naming the columns " + strings.Join(required, ", "),
				Err: errors.New("the file is empty")}
		}
		return csvError(file, err)
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
			return &ParseError{File: file, Line: line, Column: c, Token: k + 1, Expected: "each column named once",
				Err: fmt.Errorf("column %q is also column %d", h, prev+1)}
		}
		cols[h] = k
	}
	for _, name := range required {
		if _, ok := cols[name]; !ok {
			return &ParseError{File: file, Line: line, Expected: "a column named " + name + " in the header",
				Err: fmt.Errorf("the header has %q", strings.Join(header, ","))}
		}
	}
	for {
		rec, err := cr.Read()
		if errors.Is(err, io.EOF) {
			return nil
		}
		if err != nil {
			return csvError(file, err)
		}
		l, _ := cr.FieldPos(0)
		rr := &csvRow{file: file, line: l, col: cols, fields: rec, bytes: make([]int, len(rec))}
		for k := range rec {
			_, rr.bytes[k] = cr.FieldPos(k)
		}
		for _, name := range required {
			if k := cols[name]; k >= len(rec) {
				return rr.errorf(name, name+" (field "+fmt.Sprint(k+1)+")",
					"the record has only %d fields", len(rec))
			}
		}
		if err := row(rr); err != nil {
			return err
		}
	}
}

// csvError turns a syntax error of encoding/csv into a *ParseError; the field
// is unknown, so the byte position goes into the message.
func csvError(file string, err error) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &ParseError{File: file, Line: pe.Line, Column: pe.Column, Expected: "a well-formed CSV record", Err: pe.Err}
	}
	return &ParseError{File: file, Expected: "a readable CSV file", Err: err}
}

// WriteScenario writes the instance as a scenario folder that ReadScenario
// reads back: sites.csv, customers.csv and lanes.csv in dir, which is created
// if needed. Lanes carry the unit cost Cost[i][j] / demand; forbidden lanes
// are left out. The instance must be valid.
func WriteScenario(dir string, in *Instance) error {
	if err := in.Validate(); err != nil {
		return fmt.Errorf("cflp: writing scenario: %w", err)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return fmt.Errorf("cflp: writing scenario: %w", err)
	}
	return WriteScenarioTo(func(name string) (io.WriteCloser, error) { return os.Create(filepath.Join(dir, name)) }, in)
}

// quotientNumber writes a computed unit cost: without the binary noise of
// the division when the rounded text reads back within 1e-13 relative.
func quotientNumber(v float64) string {
	r := instances.RoundNumber(v)
	if math.Abs(r-v) <= 1e-13*math.Abs(v) {
		return instances.FormatNumber(v)
	}
	return formatNumber(v)
}

// WriteScenarioTo writes the three tables of a scenario folder through
// create, which opens a file of the folder by name (SitesFile,
// CustomersFile, LanesFile).
func WriteScenarioTo(create func(name string) (io.WriteCloser, error), in *Instance) error {
	if err := in.Validate(); err != nil {
		return fmt.Errorf("cflp: writing scenario: %w", err)
	}
	sites := [][]string{{"id", "name", "capacity", "fixed_cost", "status"}}
	for _, s := range in.Sites {
		sites = append(sites, []string{s.ID, s.Name, formatNumber(s.Capacity), formatNumber(s.FixedCost), s.Status.String()})
	}
	customers := [][]string{{"id", "name", "demand"}}
	for _, c := range in.Customers {
		customers = append(customers, []string{c.ID, c.Name, formatNumber(c.Demand)})
	}
	lanes := [][]string{{"site", "customer", "unit_cost"}}
	for i, s := range in.Sites {
		for j, c := range in.Customers {
			if in.Allowed(i, j) {
				lanes = append(lanes, []string{s.ID, c.ID, quotientNumber(in.Cost[i][j] / c.Demand)})
			}
		}
	}
	for _, t := range []struct {
		name    string
		records [][]string
	}{{SitesFile, sites}, {CustomersFile, customers}, {LanesFile, lanes}} {
		f, err := create(t.name)
		if err != nil {
			return fmt.Errorf("cflp: writing scenario: %w", err)
		}
		w := csv.NewWriter(f)
		if err := w.WriteAll(t.records); err != nil {
			f.Close()
			return fmt.Errorf("cflp: writing scenario %s: %w", t.name, err)
		}
		if err := f.Close(); err != nil {
			return fmt.Errorf("cflp: writing scenario %s: %w", t.name, err)
		}
	}
	return nil
}
