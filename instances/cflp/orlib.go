package cflp

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strconv"
	"strings"
)

// capacityWord stands for the site capacity in the OR-Library files capa,
// capb and capc; each such file holds four instances, one per capacity.
const capacityWord = "capacity"

// capacityVariants gives the capacities that replace capacityWord, by file
// family, for variants 1 to 4. Values from OR-Library's description
// (Beasley 1988, Table 1) as recorded in the benchmark folder's SOURCES.md,
// which notes they are from memory but corroborated by the published optima.
func capacityVariants() map[string][4]float64 {
	return map[string][4]float64{
		"capa": {8000, 10000, 12000, 14000},
		"capb": {5000, 6000, 7000, 8000},
		"capc": {5000, 5750, 6500, 7250},
	}
}

// maxToken bounds the length of one token; no number in the format needs
// more.
const maxToken = 64

// ReadORLib reads one instance in the OR-Library capacitated warehouse
// location format: the numbers of sites m and customers n; m pairs
// (capacity, fixed cost); then, for each customer, its demand followed by the
// m costs of serving all of that demand from site 1 … m. Tokens are separated
// by any white space; line breaks carry no meaning.
//
// file names the input in errors and gives the instance its name (the base
// name without extension). In the files capa*, capb* and capc* the capacity
// is the word "capacity", and index (1 to 4) selects which of the four
// capacities of that family replaces it; the instance is then named after
// the family and the index, such as "capa2". For files with numeric
// capacities index must be 0 or 1. Site and customer ids are their 1-based
// positions in the file. Errors are of type *ParseError.
func ReadORLib(r io.Reader, file string, index int) (*Instance, error) {
	t := &tokenizer{r: bufio.NewReader(r), file: file, line: 1}
	stem := strings.TrimSuffix(filepath.Base(file), filepath.Ext(file))

	m, err := t.count("number of sites (positive integer)")
	if err != nil {
		return nil, err
	}
	n, err := t.count("number of customers (positive integer)")
	if err != nil {
		return nil, err
	}

	in := &Instance{Name: stem}
	family := ""
	var firstCapacity token
	for i := 0; i < m; i++ {
		what := fmt.Sprintf("capacity of site %d (non-negative number)", i+1)
		tok, err := t.next(what)
		if err != nil {
			return nil, err
		}
		if i == 0 {
			firstCapacity = tok
		}
		var capacity float64
		if tok.text == capacityWord {
			variants, ok := capacityVariants()[familyOf(stem)]
			if !ok {
				return nil, t.errorAt(tok, fmt.Sprintf(
					"capacity of site %d (a number; the word %q stands for a capacity only in files named capa*, capb* or capc*, and this file is %q)",
					i+1, capacityWord, filepath.Base(file)), nil)
			}
			if index < 1 || index > len(variants) {
				return nil, t.errorAt(tok, fmt.Sprintf(
					"an index from 1 to %d choosing the capacity %v of file family %s",
					len(variants), variants, familyOf(stem)), fmt.Errorf("index is %d", index))
			}
			family = familyOf(stem)
			capacity = variants[index-1]
		} else if capacity, err = t.number(tok, what, false); err != nil {
			return nil, err
		}
		fixed, err := t.nextNumber(fmt.Sprintf("fixed cost of site %d (non-negative number)", i+1), false)
		if err != nil {
			return nil, err
		}
		id := strconv.Itoa(i + 1)
		in.Sites = append(in.Sites, Site{ID: id, Capacity: capacity, FixedCost: fixed})
	}
	if family == "" && index != 0 && index != 1 {
		return nil, t.errorAt(firstCapacity,
			"index 0 or 1, since this file gives numeric capacities and so holds a single instance",
			fmt.Errorf("index is %d", index))
	}
	if family != "" {
		in.Name = family + strconv.Itoa(index)
	}

	// The file lists costs customer by customer; keep them that way while
	// reading (memory grows only with the tokens actually read) and turn
	// them into site rows at the end.
	var byCustomer []float64
	for j := 0; j < n; j++ {
		d, err := t.nextNumber(fmt.Sprintf("demand of customer %d (positive number)", j+1), true)
		if err != nil {
			return nil, err
		}
		in.Customers = append(in.Customers, Customer{ID: strconv.Itoa(j + 1), Demand: d})
		for i := 0; i < m; i++ {
			c, err := t.nextNumber(fmt.Sprintf("cost of serving customer %d from site %d (non-negative number)", j+1, i+1), false)
			if err != nil {
				return nil, err
			}
			byCustomer = append(byCustomer, c)
		}
	}
	tok, err := t.next("")
	switch {
	case err == nil:
		return nil, t.errorAt(tok, fmt.Sprintf("end of file after %d sites and %d customers", m, n),
			fmt.Errorf("got %q", tok.text))
	case !errors.Is(err, io.EOF):
		return nil, err
	}

	in.Cost = make([][]float64, m)
	for i := range in.Cost {
		row := make([]float64, n)
		for j := range row {
			row[j] = byCustomer[j*m+i]
		}
		in.Cost[i] = row
	}
	if err := in.Validate(); err != nil {
		return nil, &ParseError{File: file, Expected: "a feasible instance", Err: err}
	}
	return in, nil
}

// familyOf returns "capa", "capb" or "capc" when the file stem names one of
// those families, and "" otherwise.
func familyOf(stem string) string {
	s := strings.ToLower(stem)
	for f := range capacityVariants() {
		if strings.HasPrefix(s, f) {
			return f
		}
	}
	return ""
}

type token struct {
	text      string
	line, col int
}

// tokenizer splits its input at white space and remembers where each token
// starts.
type tokenizer struct {
	r         *bufio.Reader
	file      string
	line, col int // position of the last byte read
	buf       []byte
}

func (t *tokenizer) errorAt(tok token, expected string, err error) *ParseError {
	if err == nil {
		err = fmt.Errorf("got %q", tok.text)
	}
	return &ParseError{File: t.file, Line: tok.line, Column: tok.col, Expected: expected, Err: err}
}

// next returns the next token. At the end of input it returns io.EOF when
// expected is empty and a *ParseError wrapping io.ErrUnexpectedEOF otherwise.
func (t *tokenizer) next(expected string) (token, error) {
	t.buf = t.buf[:0]
	var tok token
	for {
		b, err := t.r.ReadByte()
		if err != nil {
			if !errors.Is(err, io.EOF) {
				return token{}, &ParseError{File: t.file, Line: t.line, Column: t.col, Expected: expected, Err: err}
			}
			if len(t.buf) > 0 {
				tok.text = string(t.buf)
				return tok, nil
			}
			if expected == "" {
				return token{}, io.EOF
			}
			return token{}, &ParseError{File: t.file, Line: t.line, Column: t.col + 1, Expected: expected, Err: io.ErrUnexpectedEOF}
		}
		if b == '\n' {
			t.line++
			t.col = 0
		} else {
			t.col++
		}
		if isSpace(b) {
			if len(t.buf) > 0 {
				tok.text = string(t.buf)
				return tok, nil
			}
			continue
		}
		if len(t.buf) == 0 {
			tok.line, tok.col = t.line, t.col
		}
		if len(t.buf) == maxToken {
			return token{}, t.errorAt(tok, expected, fmt.Errorf("token longer than %d bytes", maxToken))
		}
		t.buf = append(t.buf, b)
	}
}

func isSpace(b byte) bool {
	return b == ' ' || b == '\t' || b == '\n' || b == '\r' || b == '\v' || b == '\f'
}

// count reads a positive integer.
func (t *tokenizer) count(expected string) (int, error) {
	tok, err := t.next(expected)
	if err != nil {
		return 0, err
	}
	v, err := strconv.Atoi(tok.text)
	if err != nil || v <= 0 {
		return 0, t.errorAt(tok, expected, nil)
	}
	return v, nil
}

func (t *tokenizer) nextNumber(expected string, positive bool) (float64, error) {
	tok, err := t.next(expected)
	if err != nil {
		return 0, err
	}
	return t.number(tok, expected, positive)
}

// number parses a finite decimal number such as "7500.", ".00000" or
// "1e3"; it must be positive or non-negative as asked.
func (t *tokenizer) number(tok token, expected string, positive bool) (float64, error) {
	v, ok := parseDecimal(tok.text)
	if !ok || v < 0 || (positive && v == 0) {
		return 0, t.errorAt(tok, expected, nil)
	}
	return v, nil
}

// parseDecimal accepts only plain decimal notation (digits, one point, an
// optional sign and exponent), so words such as "inf" or "nan" and hex
// floats are refused.
func parseDecimal(s string) (float64, bool) {
	if s == "" {
		return 0, false
	}
	for i := 0; i < len(s); i++ {
		c := s[i]
		if !(c >= '0' && c <= '9' || c == '.' || c == '-' || c == '+' || c == 'e' || c == 'E') {
			return 0, false
		}
	}
	v, err := strconv.ParseFloat(s, 64)
	if err != nil || math.IsInf(v, 0) || math.IsNaN(v) {
		return 0, false
	}
	if v == 0 {
		v = 0 // no negative zero
	}
	return v, true
}
