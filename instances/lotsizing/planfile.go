package lotsizing

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"pincer/instances"
)

// PlanFile is a production plan read from a schedule.csv file: per item
// and period the setup and the quantity made, and the stock the file
// states (NaN where it states none).
type PlanFile struct {
	Setup     [][]bool
	Quantity  [][]float64
	Inventory [][]float64
}

// ReadScheduleCSV reads a plan in the layout [WriteScheduleCSV] writes:
// a header naming the columns item, period, quantity and optionally setup
// (0 or 1) and inventory; one line per item and period, items by name as
// the instance names them, periods 1..T. Item-period pairs without a line
// make nothing; a quantity above zero implies a setup. Faults are
// *instances.ParseError values naming file, line, column and field.
func ReadScheduleCSV(r io.Reader, file string, in *Instance) (*PlanFile, error) {
	n, T := len(in.Items), in.Periods()
	index := make(map[string]int, n)
	for i, it := range in.Items {
		if _, dup := index[it.Name]; dup {
			return nil, fmt.Errorf("lotsizing: items %d and %d are both named %q, so a plan cannot name them", index[it.Name]+1, i+1, it.Name)
		}
		index[it.Name] = i
	}
	pf := &PlanFile{Setup: make([][]bool, n), Quantity: make([][]float64, n), Inventory: make([][]float64, n)}
	seen := make([][]bool, n)
	for i := range pf.Setup {
		pf.Setup[i], pf.Quantity[i], pf.Inventory[i], seen[i] = make([]bool, T), make([]float64, T), make([]float64, T), make([]bool, T)
		for t := range pf.Inventory[i] {
			pf.Inventory[i][t] = math.NaN()
		}
	}
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	perr := func(line, col, field int, expected string, err error) error {
		return &instances.ParseError{File: file, Line: max(line, 1), Column: max(col, 1), Token: field, Expected: expected, Err: err}
	}
	head, err := cr.Read()
	if err != nil {
		if err == io.EOF {
			return nil, perr(1, 1, 0, "a header line item,period,setup,quantity,inventory", errors.New("empty file"))
		}
		return nil, csvParseError(file, err, "a header line")
	}
	col := map[string]int{"setup": -1, "inventory": -1}
	for j, h := range head {
		col[strings.ToLower(strings.TrimSpace(strings.TrimPrefix(h, "\ufeff")))] = j
	}
	for _, c := range []string{"item", "period", "quantity"} {
		if _, ok := col[c]; !ok {
			return nil, perr(1, 1, 0, "a column "+c, fmt.Errorf("header %q", strings.Join(head, ",")))
		}
	}
	for {
		rec, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, csvParseError(file, err, "a CSV record")
		}
		line, _ := cr.FieldPos(0)
		field := func(c string) (string, int, int) {
			j := col[c]
			if j < 0 || j >= len(rec) {
				return "", 0, 0
			}
			_, cpos := cr.FieldPos(j)
			return strings.TrimSpace(rec[j]), cpos, j + 1
		}
		name, cpos, fno := field("item")
		i, ok := index[name]
		if !ok {
			return nil, perr(line, cpos, fno, "an item of the instance", fmt.Errorf("%q", name))
		}
		ps, cpos, fno := field("period")
		p, err := strconv.Atoi(ps)
		if err != nil || p < 1 || p > T {
			return nil, perr(line, cpos, fno, fmt.Sprintf("a period number in 1..%d", T), fmt.Errorf("%q", ps))
		}
		t := p - 1
		if seen[i][t] {
			return nil, perr(line, cpos, fno, "one line per item and period", fmt.Errorf("item %q period %d again", name, p))
		}
		seen[i][t] = true
		number := func(c string, optional bool) (float64, error) {
			s, cpos, fno := field(c)
			if s == "" && optional {
				return math.NaN(), nil
			}
			v, err := strconv.ParseFloat(s, 64)
			if err == nil && (math.IsNaN(v) || math.IsInf(v, 0) || v < 0) {
				err = errors.New("not a finite non-negative number")
			}
			if err != nil {
				return 0, perr(line, cpos, fno, c+" as a non-negative number", fmt.Errorf("%q: %w", s, errorsCause(err)))
			}
			return v, nil
		}
		if pf.Quantity[i][t], err = number("quantity", false); err != nil {
			return nil, err
		}
		if pf.Inventory[i][t], err = number("inventory", true); err != nil {
			return nil, err
		}
		if s, cpos, fno := field("setup"); s != "" {
			switch s {
			case "0":
			case "1":
				pf.Setup[i][t] = true
			default:
				return nil, perr(line, cpos, fno, "setup 0 or 1", fmt.Errorf("%q", s))
			}
		}
	}
	return pf, nil
}

func csvParseError(file string, err error, what string) error {
	var ce *csv.ParseError
	if errors.As(err, &ce) {
		return &instances.ParseError{File: file, Line: max(ce.Line, 1), Column: max(ce.Column, 1), Expected: what, Err: ce.Err}
	}
	return &instances.ParseError{File: file, Line: 1, Column: 1, Expected: what, Err: err}
}

// Check recomputes a plan file on its own, sharing nothing with the
// solver: stock from the quantities, demand met without backlog, a setup
// wherever something is made, capacity per period (exceeded only where
// overtime is allowed, at its cost per capacity unit; overtime nil means
// none) and stock equal to what the file states. The value is setup
// costs, holding cost and overtime cost; problems are listed, the first
// twenty in full.
func Check(in *Instance, pf *PlanFile, overtime []float64) instances.Verdict {
	T := in.Periods()
	var v instances.Verdict
	more := 0
	problem := func(format string, a ...any) {
		if len(v.Problems) < 20 {
			v.Problems = append(v.Problems, fmt.Sprintf(format, a...))
		} else {
			more++
		}
	}
	load := make([]float64, T)
	for i, it := range in.Items {
		stock := it.InitialStock
		unmet := false
		for t := 0; t < T; t++ {
			q := pf.Quantity[i][t]
			setup := pf.Setup[i][t] || q > 0
			if q > 0 && !pf.Setup[i][t] {
				problem("item %s period %d: quantity %s made without a setup", it.Name, t+1, instances.FormatNumber(q))
			}
			if setup {
				v.Value += it.SetupCost
				load[t] += it.SetupTime
			}
			load[t] += it.UnitTime * q
			stock += q - in.Demand[i][t]
			if stock < -1e-6*math.Max(1, in.Demand[i][t]) && !unmet {
				problem("item %s period %d: demand unmet by %s (no backlog allowed)", it.Name, t+1, instances.FormatNumber(-stock))
				unmet = true
			}
			if s := pf.Inventory[i][t]; !math.IsNaN(s) && math.Abs(s-math.Max(stock, 0)) > 1e-6*math.Max(1, s) {
				problem("item %s period %d: the file states stock %s, the quantities give %s", it.Name, t+1, instances.FormatNumber(s), instances.FormatNumber(math.Max(stock, 0)))
			}
			v.Value += it.Holding * math.Max(stock, 0)
		}
	}
	for t := 0; t < T; t++ {
		e := load[t] - in.Capacity[t]
		if e <= 1e-6*math.Max(1, in.Capacity[t]) {
			continue
		}
		if overtime == nil || t >= len(overtime) || overtime[t] < 0 {
			problem("period %d: load %s over capacity %s, and no overtime is allowed", t+1, instances.FormatNumber(load[t]), instances.FormatNumber(in.Capacity[t]))
			continue
		}
		v.Value += overtime[t] * e
	}
	if more > 0 {
		v.Problems = append(v.Problems, fmt.Sprintf("... and %d more", more))
	}
	v.Feasible = len(v.Problems) == 0
	return v
}
