package cflp

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// WriteMPS writes the model of the instance in free MPS format for a
// general-purpose MIP solver, minimising
//
//	Σ_i f_i y_i + Σ_ij c_ij x_ij
//
// with rows D<j> (E):  Σ_i x_ij = 1; C<i> (L):  Σ_j d_j x_ij − s_i y_i ≤ 0;
// L<i>_<j> (L):  x_ij − y_i ≤ 0; and AGG (G):  Σ_i s_i y_i ≥ Σ_j d_j.
// y_i is binary (fixed to 1 or 0 for forced sites); x_ij is continuous in
// [0,1], or binary when singleSource. Forbidden lanes have no column. The
// file starts with comment lines explaining the names.
//
// Names are at most 8 characters and every field starts where the older
// fixed-column MPS layout puts it, so readers that guess the layout from
// the text read the file the same way; numbers are written in at most 12
// characters (shortest exact form when it fits, otherwise rounded to the
// most significant digits that fit).
func WriteMPS(w io.Writer, in *Instance, singleSource bool) error {
	if err := in.Validate(); err != nil {
		return fmt.Errorf("cflp: writing MPS: %w", err)
	}
	nm, err := newMPSNames(len(in.Sites), len(in.Customers))
	if err != nil {
		return fmt.Errorf("cflp: writing MPS: %w", err)
	}
	bw := bufio.NewWriter(w)
	line := func(f ...string) {
		bw.WriteString(mpsLine(f...))
		bw.WriteByte('\n')
	}
	comment := func(s string) { bw.WriteString("* " + s + "\n") }

	variant := "split demand: X continuous in [0,1]"
	if singleSource {
		variant = "single source: X binary"
	}
	comment("capacitated facility location, instance " + in.Name + ", " + variant)
	comment("Y" + nm.example(true) + ": site i open; X" + nm.example(false) + ": share of customer j's demand served by site i")
	comment("D<j> demand rows, C<i> capacity rows, L" + nm.example(false) + " linking rows, AGG total capacity row")
	comment("i and j count from 1 " + nm.how())
	bw.WriteString("NAME          " + mpsName(in.Name) + "\n")
	bw.WriteString("ROWS\n")
	line("N", "COST")
	for j := range in.Customers {
		line("E", nm.row('D', j))
	}
	for i := range in.Sites {
		line("L", nm.row('C', i))
	}
	for i := range in.Sites {
		for j := range in.Customers {
			if in.Allowed(i, j) {
				line("L", nm.pair('L', i, j))
			}
		}
	}
	line("G", "AGG")

	bw.WriteString("COLUMNS\n")
	marker := func(kind string) { line("", "MARKER", "'MARKER'", "", "'"+kind+"'") }
	marker("INTORG")
	for i, s := range in.Sites {
		y := nm.row('Y', i)
		line("", y, "COST", mpsNumber(s.FixedCost))
		if s.Capacity != 0 {
			line("", y, nm.row('C', i), mpsNumber(-s.Capacity))
			line("", y, "AGG", mpsNumber(s.Capacity))
		}
		for j := range in.Customers {
			if in.Allowed(i, j) {
				line("", y, nm.pair('L', i, j), "-1")
			}
		}
	}
	if !singleSource {
		marker("INTEND")
	}
	for i := range in.Sites {
		for j, c := range in.Customers {
			if !in.Allowed(i, j) {
				continue
			}
			x := nm.pair('X', i, j)
			if in.Cost[i][j] != 0 {
				line("", x, "COST", mpsNumber(in.Cost[i][j]))
			}
			line("", x, nm.row('D', j), "1")
			line("", x, nm.row('C', i), mpsNumber(c.Demand))
			line("", x, nm.pair('L', i, j), "1")
		}
	}
	if singleSource {
		marker("INTEND")
	}

	bw.WriteString("RHS\n")
	for j := range in.Customers {
		line("", "RHS", nm.row('D', j), "1")
	}
	line("", "RHS", "AGG", mpsNumber(in.TotalDemand()))

	bw.WriteString("BOUNDS\n")
	for i, s := range in.Sites {
		switch s.Status {
		case ForcedOpen:
			line("FX", "BND", nm.row('Y', i), "1")
		case ForcedClosed:
			line("FX", "BND", nm.row('Y', i), "0")
		default:
			line("UP", "BND", nm.row('Y', i), "1")
		}
	}
	for i := range in.Sites {
		for j := range in.Customers {
			if in.Allowed(i, j) {
				line("UP", "BND", nm.pair('X', i, j), "1")
			}
		}
	}
	bw.WriteString("ENDATA\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("cflp: writing MPS: %w", err)
	}
	return nil
}

// mpsColumns are the 1-based starting columns of the six fields of a data
// line in the fixed layout; each field is followed by at least one blank.
func mpsColumns() [6]int { return [6]int{2, 5, 15, 25, 40, 50} }

// mpsLine places the fields at their fixed-layout columns.
func mpsLine(fields ...string) string {
	var b []byte
	for k, f := range fields {
		for len(b) < mpsColumns()[k]-1 {
			b = append(b, ' ')
		}
		b = append(b, f...)
	}
	return strings.TrimRight(string(b), " ")
}

// mpsNumber formats v in at most 12 characters, the width of a number field.
func mpsNumber(v float64) string {
	s := strconv.FormatFloat(v, 'g', -1, 64)
	for p := 12; len(s) > 12 && p > 0; p-- {
		s = strconv.FormatFloat(v, 'g', p, 64)
	}
	return s
}

// mpsName keeps letters, digits and a few marks of the instance name, so
// that it is a single token.
func mpsName(s string) string {
	var b strings.Builder
	for _, r := range s {
		if r < 128 && (r >= 'a' && r <= 'z' || r >= 'A' && r <= 'Z' || r >= '0' && r <= '9' || strings.ContainsRune("_.-", r)) {
			b.WriteRune(r)
		} else {
			b.WriteByte('_')
		}
	}
	if b.Len() == 0 {
		return "CFLP"
	}
	return b.String()
}

// mpsNames builds names of at most 8 characters: one letter, then the
// 1-based site and customer numbers, in decimal joined by '_' when that fits
// and otherwise in base 36 with fixed widths (no separator).
type mpsNames struct {
	decimal bool
	wi, wj  int // base-36 widths
}

func newMPSNames(m, n int) (mpsNames, error) {
	if len(strconv.Itoa(max(m, n))) > 7 {
		return mpsNames{}, fmt.Errorf("%d sites × %d customers is too many for 8-character names", m, n)
	}
	if len(strconv.Itoa(m))+len(strconv.Itoa(n)) <= 6 {
		return mpsNames{decimal: true}, nil
	}
	nm := mpsNames{wi: len(strconv.FormatInt(int64(m), 36)), wj: len(strconv.FormatInt(int64(n), 36))}
	if nm.wi+nm.wj > 7 {
		return nm, fmt.Errorf("%d sites × %d customers is too many for 8-character names", m, n)
	}
	return nm, nil
}

func (nm mpsNames) row(letter byte, k int) string {
	return string(letter) + strconv.Itoa(k+1)
}

func (nm mpsNames) pair(letter byte, i, j int) string {
	if nm.decimal {
		return string(letter) + strconv.Itoa(i+1) + "_" + strconv.Itoa(j+1)
	}
	return string(letter) + pad36(i+1, nm.wi) + pad36(j+1, nm.wj)
}

func (nm mpsNames) example(single bool) string {
	switch {
	case single:
		return "<i>"
	case nm.decimal:
		return "<i>_<j>"
	}
	return "<i><j>"
}

func (nm mpsNames) how() string {
	if nm.decimal {
		return "in decimal"
	}
	return fmt.Sprintf("(in single names; in pair names i and j are in base 36, digits 0-9a-z, %d and %d digits wide)", nm.wi, nm.wj)
}

func pad36(v, width int) string {
	s := strconv.FormatInt(int64(v), 36)
	return strings.Repeat("0", width-len(s)) + s
}
