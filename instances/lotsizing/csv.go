package lotsizing

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"
)

// ReadTTMFile reads a TTM-layout file from disk (see ReadTTM).
func ReadTTMFile(path string) (*Instance, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("lotsizing: %w", err)
	}
	defer f.Close()
	return ReadTTM(f, filepath.Base(path))
}

// csvTable reads a CSV file with a header and returns, per wanted column,
// its index (-1 when optional and absent) and the records with their lines.
type csvTable struct {
	file  string
	col   map[string]int
	recs  [][]string
	lines []int
}

func readTable(r io.Reader, file string, required, optional []string) (*csvTable, error) {
	cr := csv.NewReader(r)
	cr.TrimLeadingSpace = true
	cr.FieldsPerRecord = -1
	tb := &csvTable{file: file, col: map[string]int{}}
	head, err := cr.Read()
	if err != nil {
		return nil, csvErr(file, err, "a header line")
	}
	for j, h := range head {
		tb.col[strings.ToLower(strings.TrimSpace(h))] = j
	}
	for _, c := range required {
		if _, ok := tb.col[c]; !ok {
			return nil, &ParseError{File: file, Line: 1, Column: 1, Expected: "a column " + c, Err: fmt.Errorf("header %q", strings.Join(head, ","))}
		}
	}
	for _, c := range optional {
		if _, ok := tb.col[c]; !ok {
			tb.col[c] = -1
		}
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvErr(file, err, "a CSV record")
		}
		line, _ := cr.FieldPos(0)
		tb.recs = append(tb.recs, rec)
		tb.lines = append(tb.lines, line)
	}
	return tb, nil
}

func csvErr(file string, err error, what string) error {
	var pe *csv.ParseError
	if errors.As(err, &pe) {
		return &ParseError{File: file, Line: max(pe.Line, 1), Column: max(pe.Column, 1), Expected: what, Err: pe.Err}
	}
	return &ParseError{File: file, Line: 1, Column: 1, Expected: what, Err: err}
}

// field returns record k's value in column c ("" when absent).
func (tb *csvTable) field(k int, c string) (string, int) {
	j := tb.col[c]
	if j < 0 || j >= len(tb.recs[k]) {
		return "", j + 1
	}
	return strings.TrimSpace(tb.recs[k][j]), j + 1
}

func (tb *csvTable) number(k int, c string, optional bool, def float64) (float64, error) {
	s, col := tb.field(k, c)
	if s == "" && optional {
		return def, nil
	}
	v, err := strconv.ParseFloat(s, 64)
	if err == nil && (math.IsNaN(v) || math.IsInf(v, 0) || v < 0) {
		err = errors.New("not a finite non-negative number")
	}
	if err != nil {
		return 0, &ParseError{File: tb.file, Line: tb.lines[k], Column: max(col, 1), Expected: c + " as a non-negative number", Err: fmt.Errorf("%q: %w", s, errorsCause(err))}
	}
	return v, nil
}

// ReadCSVFolder reads a planner's folder: items.csv (id, name, unit_time,
// setup_time, setup_cost, holding_cost, optional initial_stock),
// demand.csv (item, period, quantity; missing pairs mean no demand) and
// capacity.csv (period, capacity, optional overtime_cost). Periods are
// numbered 1..T with every period listed in capacity.csv.
func ReadCSVFolder(dir string) (*Instance, error) {
	open := func(name string, req, opt []string) (*csvTable, error) {
		f, err := os.Open(filepath.Join(dir, name))
		if err != nil {
			return nil, fmt.Errorf("lotsizing: %w", err)
		}
		defer f.Close()
		return readTable(f, name, req, opt)
	}
	items, err := open("items.csv", []string{"id", "unit_time", "setup_time", "setup_cost", "holding_cost"}, []string{"name", "initial_stock"})
	if err != nil {
		return nil, err
	}
	capt, err := open("capacity.csv", []string{"period", "capacity"}, []string{"overtime_cost"})
	if err != nil {
		return nil, err
	}
	dem, err := open("demand.csv", []string{"item", "period", "quantity"}, nil)
	if err != nil {
		return nil, err
	}
	return fromTables(filepath.Base(dir), items, capt, dem)
}

func fromTables(name string, items, capt, dem *csvTable) (*Instance, error) {
	in := &Instance{Name: name}
	index := map[string]int{}
	for k := range items.recs {
		id, col := items.field(k, "id")
		if id == "" || index[id] > 0 {
			return nil, &ParseError{File: items.file, Line: items.lines[k], Column: col, Expected: "a new, non-empty item id", Err: fmt.Errorf("%q", id)}
		}
		index[id] = len(in.Items) + 1
		it := Item{Name: id}
		if nm, _ := items.field(k, "name"); nm != "" {
			it.Name = nm
		}
		var err error
		for _, f := range []struct {
			p   *float64
			c   string
			opt bool
		}{{&it.UnitTime, "unit_time", false}, {&it.SetupTime, "setup_time", false}, {&it.SetupCost, "setup_cost", false}, {&it.Holding, "holding_cost", false}, {&it.InitialStock, "initial_stock", true}} {
			if *f.p, err = items.number(k, f.c, f.opt, 0); err != nil {
				return nil, err
			}
		}
		in.Items = append(in.Items, it)
	}
	if len(in.Items) == 0 {
		return nil, &ParseError{File: items.file, Line: 2, Column: 1, Expected: "at least one item", Err: io.EOF}
	}
	T := len(capt.recs)
	if T == 0 {
		return nil, &ParseError{File: capt.file, Line: 2, Column: 1, Expected: "at least one period", Err: io.EOF}
	}
	in.Capacity = make([]float64, T)
	seen := make([]bool, T)
	for k := range capt.recs {
		pv, err := capt.number(k, "period", false, 0)
		if err == nil && (pv != math.Trunc(pv) || pv < 1 || pv > float64(T) || seen[int(pv)-1]) {
			_, col := capt.field(k, "period")
			err = &ParseError{File: capt.file, Line: capt.lines[k], Column: col, Expected: fmt.Sprintf("a new period number in 1..%d", T), Err: fmt.Errorf("%v", pv)}
		}
		if err != nil {
			return nil, err
		}
		t := int(pv) - 1
		seen[t] = true
		if in.Capacity[t], err = capt.number(k, "capacity", false, 0); err != nil {
			return nil, err
		}
		oc, err := capt.number(k, "overtime_cost", true, -1)
		if err != nil {
			return nil, err
		}
		if oc >= 0 {
			if in.OvertimeCost == nil {
				in.OvertimeCost = make([]float64, T)
				for u := range in.OvertimeCost {
					in.OvertimeCost[u] = -1
				}
			}
			in.OvertimeCost[t] = oc
		}
	}
	in.Demand = make([][]float64, len(in.Items))
	for i := range in.Demand {
		in.Demand[i] = make([]float64, T)
	}
	for k := range dem.recs {
		id, col := dem.field(k, "item")
		i := index[id] - 1
		if i < 0 {
			return nil, &ParseError{File: dem.file, Line: dem.lines[k], Column: col, Expected: "an item id from items.csv", Err: fmt.Errorf("%q", id)}
		}
		pv, err := dem.number(k, "period", false, 0)
		if err == nil && (pv != math.Trunc(pv) || pv < 1 || pv > float64(T)) {
			_, col := dem.field(k, "period")
			err = &ParseError{File: dem.file, Line: dem.lines[k], Column: col, Expected: fmt.Sprintf("a period number in 1..%d", T), Err: fmt.Errorf("%v", pv)}
		}
		if err != nil {
			return nil, err
		}
		q, err := dem.number(k, "quantity", false, 0)
		if err != nil {
			return nil, err
		}
		in.Demand[i][int(pv)-1] += q
	}
	if err := in.Validate(); err != nil {
		return nil, &ParseError{File: items.file, Line: 1, Column: 1, Expected: "a valid instance", Err: err}
	}
	return in, nil
}
