package lotsizing

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// ParseError is a reader fault with its place.
type ParseError struct {
	File     string
	Line     int
	Column   int
	Expected string
	Err      error
}

// Error formats the fault as "file:line:column: expected X: cause".
func (e *ParseError) Error() string {
	return fmt.Sprintf("%s:%d:%d: expected %s: %v", e.File, e.Line, e.Column, e.Expected, e.Err)
}

// Unwrap returns the cause.
func (e *ParseError) Unwrap() error { return e.Err }

type token struct {
	text      string
	line, col int
}

// ReadTTM reads a file in the layout of the Trigeiro, Thomas & McClain
// (1989) test problems: "n T", a line "1" (ignored), capacity, n item lines
// "b h st sc", then n·T demands period by period (item columns in blocks of
// at most 15), then free text.
func ReadTTM(r io.Reader, file string) (*Instance, error) {
	var toks []token
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), 1<<20)
	line := 0
	for sc.Scan() {
		line++
		s := sc.Text()
		col := 0
		for col < len(s) {
			for col < len(s) && (s[col] == ' ' || s[col] == '\t' || s[col] == '\r') {
				col++
			}
			start := col
			for col < len(s) && !(s[col] == ' ' || s[col] == '\t' || s[col] == '\r') {
				col++
			}
			if col > start {
				toks = append(toks, token{s[start:col], line, start + 1})
			}
		}
	}
	if err := sc.Err(); err != nil {
		return nil, &ParseError{File: file, Line: line + 1, Column: 1, Expected: "readable text", Err: err}
	}
	k := 0
	next := func(what string, integer bool) (float64, error) {
		if k >= len(toks) {
			return 0, &ParseError{File: file, Line: line + 1, Column: 1, Expected: what, Err: errors.New("end of file")}
		}
		tk := toks[k]
		k++
		v, err := strconv.ParseFloat(tk.text, 64)
		if err == nil && (math.IsNaN(v) || math.IsInf(v, 0) || v < 0) {
			err = errors.New("not a finite non-negative number")
		}
		if err == nil && integer && (v != math.Trunc(v) || v < 1 || v > 100000) {
			err = errors.New("not a whole number in 1..100000")
		}
		if err != nil {
			return 0, &ParseError{File: file, Line: tk.line, Column: tk.col, Expected: what, Err: fmt.Errorf("%q: %w", tk.text, errorsCause(err))}
		}
		return v, nil
	}
	nf, err := next("number of items", true)
	if err != nil {
		return nil, err
	}
	tf, err := next("number of periods", true)
	if err != nil {
		return nil, err
	}
	n, T := int(nf), int(tf)
	if n*T > 10000000 {
		return nil, &ParseError{File: file, Line: toks[0].line, Column: toks[0].col, Expected: "a size of at most 10^7 demands", Err: fmt.Errorf("%d x %d", n, T)}
	}
	if _, err := next("the resource count 1 on line 2", false); err != nil {
		return nil, err
	}
	c, err := next("capacity per period", false)
	if err != nil {
		return nil, err
	}
	in := &Instance{Name: strings.TrimSuffix(file, ".dat"), Items: make([]Item, n), Demand: make([][]float64, n), Capacity: make([]float64, T)}
	for t := range in.Capacity {
		in.Capacity[t] = c
	}
	for i := range in.Items {
		it := &in.Items[i]
		it.Name = strconv.Itoa(i + 1)
		for _, f := range []struct {
			p    *float64
			what string
		}{{&it.UnitTime, "unit time"}, {&it.Holding, "holding cost"}, {&it.SetupTime, "setup time"}, {&it.SetupCost, "setup cost"}} {
			if *f.p, err = next(fmt.Sprintf("%s of item %d", f.what, i+1), false); err != nil {
				return nil, err
			}
		}
		in.Demand[i] = make([]float64, T)
	}
	for lo := 0; lo < n; lo += 15 {
		hi := min(lo+15, n)
		for t := 0; t < T; t++ {
			for i := lo; i < hi; i++ {
				if in.Demand[i][t], err = next(fmt.Sprintf("demand of item %d in period %d", i+1, t+1), false); err != nil {
					return nil, err
				}
			}
		}
	}
	if k < len(toks) && isNumber(toks[k].text) {
		// The published files end with a free-text trailer, which is
		// ignored; more numbers after the demands mean another layout (or a
		// damaged file), and accepting them would make other formats' files
		// parse here.
		tk := toks[k]
		return nil, &ParseError{File: file, Line: tk.line, Column: tk.col, Expected: fmt.Sprintf("the end of the file after %d demands", n*T), Err: fmt.Errorf("%q", tk.text)}
	}
	if err := in.Validate(); err != nil {
		return nil, &ParseError{File: file, Line: 1, Column: 1, Expected: "a valid instance", Err: err}
	}
	return in, nil
}

func errorsCause(err error) error {
	var ne *strconv.NumError
	if errors.As(err, &ne) {
		return ne.Err
	}
	return err
}

func isNumber(s string) bool {
	_, err := strconv.ParseFloat(s, 64)
	return err == nil
}
