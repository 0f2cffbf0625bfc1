package instances

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"strings"
)

// CSVRow is one data record of a header-named CSV table (see
// ReadCSVTable), with the positions a ParseError needs.
type CSVRow struct {
	File   string
	Line   int
	Fields []string
	cols   map[string]int // column name → 0-based field index
	bytes  []int          // 1-based byte column of each field
}

// Text returns the trimmed field of the named column, or "" when the
// column is absent or the record is short.
func (r *CSVRow) Text(name string) string {
	k, ok := r.cols[name]
	if !ok || k >= len(r.Fields) {
		return ""
	}
	return strings.TrimSpace(r.Fields[k])
}

// Has reports whether the table has the named column.
func (r *CSVRow) Has(name string) bool {
	_, ok := r.cols[name]
	return ok
}

// Errorf is a ParseError at the named column of this record.
func (r *CSVRow) Errorf(name, expected, format string, args ...any) *ParseError {
	k, ok := r.cols[name]
	col, tok := 0, 0
	if ok {
		tok = k + 1
		if k < len(r.bytes) {
			col = r.bytes[k]
		}
	}
	return &ParseError{File: r.File, Line: r.Line, Column: col, Token: tok, Expected: expected, Err: fmt.Errorf(format, args...)}
}

// ID returns the named column's non-empty id, not seen before in this
// file; seen maps ids to their lines and is updated.
func (r *CSVRow) ID(name, expected string, seen map[string]int) (string, error) {
	id := r.Text(name)
	if id == "" {
		return "", r.Errorf(name, expected, "the field is empty")
	}
	if l, dup := seen[id]; dup {
		return "", r.Errorf(name, expected+" not used before", "%q is already used on line %d", id, l)
	}
	seen[id] = r.Line
	return id, nil
}

// ReadCSVTable reads a CSV table whose first record is a header (column
// names, any order, case and surrounding space ignored, a spreadsheet's
// byte order mark dropped), checks that the required columns are present
// and calls row for every data record. Every fault is a *ParseError with
// file, line, byte column and field number.
func ReadCSVTable(r io.Reader, file string, required []string, row func(*CSVRow) error) error {
	cr := csv.NewReader(r)
	cr.FieldsPerRecord = -1
	header, err := cr.Read()
	if err != nil {
		if errors.Is(err, io.EOF) {
			return &ParseError{File: file, Line: 1, Expected: "a header naming the columns " + strings.Join(required, ", "),
				Err: errors.New("the file is empty")}
		}
		return csvSyntaxError(file, err)
	}
	line, _ := cr.FieldPos(0)
	cols := make(map[string]int, len(header))
	for k, h := range header {
		if k == 0 {
			h = strings.TrimPrefix(h, "\ufeff")
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
			return &ParseError{File: file, Line: line, Column: 1, Expected: "a column named " + name + " in the header",
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
		rr := &CSVRow{File: file, Line: l, cols: cols, Fields: rec, bytes: make([]int, len(rec))}
		for k := range rec {
			_, rr.bytes[k] = cr.FieldPos(k)
		}
		for _, name := range required {
			if k := cols[name]; k >= len(rec) {
				last := rr.bytes[len(rec)-1]
				return &ParseError{File: file, Line: l, Column: last, Token: k + 1,
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
		return &ParseError{File: file, Line: max(pe.Line, 1), Column: max(pe.Column, 1), Expected: "a well-formed CSV record", Err: pe.Err}
	}
	return &ParseError{File: file, Line: 1, Expected: "a readable CSV file", Err: err}
}

// Token is the named column's 1-based field number, 0 when the table
// lacks it.
func (r *CSVRow) Token(name string) int {
	k, ok := r.cols[name]
	if !ok {
		return 0
	}
	return k + 1
}
