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
	err := instances.ReadCSVTable(sites, SitesFile, []string{"id", "capacity", "fixed_cost"},
		func(row *instances.CSVRow) error {
			id, err := row.ID("id", "site id", siteLine)
			if err != nil {
				return err
			}
			s := Site{ID: id, Name: row.Text("name")}
			if s.Capacity, err = csvNumber(row, "capacity", "capacity of site "+id, false); err != nil {
				return err
			}
			if s.FixedCost, err = csvNumber(row, "fixed_cost", "fixed cost of site "+id, false); err != nil {
				return err
			}
			switch w := strings.ToLower(row.Text("status")); w {
			case "", "free":
				s.Status = Free
			case "open":
				s.Status = ForcedOpen
			case "closed":
				s.Status = ForcedClosed
			default:
				return row.Errorf("status", "status of site "+id+" (open, closed or free)", "got %q", row.Text("status"))
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
	err = instances.ReadCSVTable(customers, CustomersFile, []string{"id", "demand"},
		func(row *instances.CSVRow) error {
			id, err := row.ID("id", "customer id", custLine)
			if err != nil {
				return err
			}
			idCol, demandCol = row.Token("id"), row.Token("demand")
			c := Customer{ID: id, Name: row.Text("name")}
			if c.Demand, err = csvNumber(row, "demand", "demand of customer "+id, true); err != nil {
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
	err = instances.ReadCSVTable(lanes, LanesFile, []string{"site", "customer", "unit_cost"},
		func(row *instances.CSVRow) error {
			sid, cid := row.Text("site"), row.Text("customer")
			i, ok := siteIndex[sid]
			if !ok {
				return row.Errorf("site", "a site id from "+SitesFile, "got %q", sid)
			}
			j, ok := custIndex[cid]
			if !ok {
				return row.Errorf("customer", "a customer id from "+CustomersFile, "got %q", cid)
			}
			if l, dup := laneLine[[2]int{i, j}]; dup {
				return row.Errorf("site", "one row per lane", "lane %s → %s already given on line %d", sid, cid, l)
			}
			laneLine[[2]int{i, j}] = row.Line
			u, err := csvNumber(row, "unit_cost", "unit cost of lane "+sid+" → "+cid, false)
			if err != nil {
				return err
			}
			in.Cost[i][j] = u * in.Customers[j].Demand
			if math.IsInf(in.Cost[i][j], 0) {
				return row.Errorf("unit_cost", "unit cost of lane "+sid+" → "+cid+" whose cost of the whole demand is finite",
					"got %q", row.Text("unit_cost"))
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

// number parses a finite non-negative (or positive) decimal number.
func csvNumber(r *instances.CSVRow, name, what string, positive bool) (float64, error) {
	s := r.Text(name)
	kind := " (non-negative number)"
	if positive {
		kind = " (positive number)"
	}
	if s == "" {
		return 0, r.Errorf(name, what+kind, "the field is empty")
	}
	v, ok := parseDecimal(s)
	if !ok || v < 0 || (positive && v == 0) {
		return 0, r.Errorf(name, what+kind, "got %q", s)
	}
	return v, nil
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
