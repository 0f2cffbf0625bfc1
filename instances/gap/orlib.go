package gap

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"

	"pincer/instances"
)

// ParseError is the shared reader fault shape, [instances.ParseError]: file,
// 1-based line and byte column, the 1-based token number (for plan files the
// field number within the record; 0 when no single token is at fault) and
// what was expected there. Err says what was found instead and may wrap
// io.ErrUnexpectedEOF, strconv.ErrSyntax or strconv.ErrRange.
type ParseError = instances.ParseError

// gotError says what was found where something else was expected.
type gotError struct {
	got  string // the offending text; ignored when eof
	eof  bool
	note string // optional explanation, printed in parentheses
	err  error  // wrapped cause, may be nil
}

func (g *gotError) Error() string {
	var s string
	if g.eof {
		s = "got end of input"
	} else {
		s = "got " + strconv.Quote(shorten(g.got))
	}
	if g.note != "" {
		s += " (" + g.note + ")"
	}
	return s
}

func (g *gotError) Unwrap() error { return g.err }

// shorten keeps error messages readable when a token is enormous.
func shorten(s string) string {
	const limit = 40
	if len(s) <= limit {
		return s
	}
	return s[:limit] + "..."
}

// ReadORLib reads instance number index (1-based) from r, which holds GAP
// data in one of the two public layouts:
//
//   - several instances: a count P, then P blocks;
//   - one instance: a single block without the count.
//
// A block is "m n", the m×n cost matrix (agent-major), the m×n use matrix
// and the m capacities. Line breaks carry no meaning. The layout is decided
// by token counts: the file must match one of them exactly (the
// several-instance reading wins if both fit). For a one-instance file only
// index 1 is valid. file names the input in errors and in the instance name
// ("gap1.txt#3" for block 3 of a several-instance file, the base name for a
// one-instance file).
//
// The input is read whole into memory. Faults in the file are reported as
// *ParseError; every block is checked, not only the one requested, and no
// matrix is allocated before the tokens to fill it are known to be there.
// An index beyond the file's instances gives a plain error naming the count.
func ReadORLib(r io.Reader, file string, index int) (*Instance, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, fmt.Errorf("gap: reading %s: %w", file, err)
	}
	return readORLib(data, file, index)
}

// ReadFile reads instance number index (1-based) of the GAP file at path;
// see ReadORLib.
func ReadFile(path string, index int) (*Instance, error) {
	data, err := os.ReadFile(path)
	if err != nil {
		return nil, fmt.Errorf("gap: %w", err)
	}
	return readORLib(data, path, index)
}

func readORLib(data []byte, file string, index int) (*Instance, error) {
	if index < 1 {
		return nil, fmt.Errorf("gap: %s: instance number %d requested, numbers start at 1", file, index)
	}
	t := &tokens{file: file, data: data, offs: tokenize(data)}
	multi := t.chooseLayout()
	in, count, err := t.parse(multi, index)
	if err != nil {
		return nil, err
	}
	if index > count {
		if !multi {
			return nil, fmt.Errorf("gap: %s: instance %d requested, but the file holds 1 instance (one-instance layout, no leading count)", file, index)
		}
		return nil, fmt.Errorf("gap: %s: instance %d requested, but the file holds %d instances", file, index, count)
	}
	return in, nil
}

// tokens is a file split at white space; offs holds token start offsets.
type tokens struct {
	file string
	data []byte
	offs []int
}

func isSpace(c byte) bool {
	return c == ' ' || c == '\t' || c == '\n' || c == '\r' || c == '\v' || c == '\f'
}

func tokenize(data []byte) []int {
	n := 0
	in := false
	for _, c := range data {
		s := isSpace(c)
		if !s && !in {
			n++
		}
		in = !s
	}
	offs := make([]int, 0, n)
	in = false
	for k, c := range data {
		s := isSpace(c)
		if !s && !in {
			offs = append(offs, k)
		}
		in = !s
	}
	return offs
}

func (t *tokens) text(k int) []byte {
	s := t.offs[k]
	e := s
	for e < len(t.data) && !isSpace(t.data[e]) {
		e++
	}
	return t.data[s:e]
}

// position turns a byte offset into a 1-based line and column.
func position(data []byte, off int) (line, col int) {
	line = 1 + bytes.Count(data[:off], []byte{'\n'})
	col = off - (bytes.LastIndexByte(data[:off], '\n') + 1) + 1
	return line, col
}

// what describes the token expected at some place, built into text only
// when an error is reported.
type what struct {
	kind   byte // see the switch in String
	inst   int  // 1-based instance number, 0 for the one-instance layout
	i, j   int  // 1-based agent and job
	lo, hi int64
}

func (w what) String() string {
	of := ""
	if w.inst > 0 {
		of = fmt.Sprintf(" of instance %d", w.inst)
	}
	switch w.kind {
	case 'F':
		return "number of instances (several-instance layout) or number of agents (one-instance layout), a positive integer"
	case 'P':
		return "number of instances (positive integer)"
	case 'm':
		return fmt.Sprintf("number of agents%s (integer 1..%d)", of, w.hi)
	case 'n':
		return fmt.Sprintf("number of jobs%s (integer 1..%d, so that agents x jobs <= %d)", of, w.hi, maxCells)
	case 'c':
		return fmt.Sprintf("cost of agent %d for job %d%s (integer, magnitude <= %d)", w.i, w.j, of, maxValue)
	case 'a':
		return fmt.Sprintf("resource use of agent %d for job %d%s (non-negative integer <= %d)", w.i, w.j, of, maxValue)
	case 'b':
		return fmt.Sprintf("capacity of agent %d%s (non-negative integer <= %d)", w.i, of, maxValue)
	case 'E':
		if w.inst > 0 {
			return fmt.Sprintf("end of input after instance %d (the count says %d instances)", w.inst, w.inst)
		}
		return "end of input after the capacities (one-instance layout)"
	}
	return "token"
}

// fail builds the error for token k (0-based); k past the end means the
// input ended early and the error points just after the last token.
func (t *tokens) fail(k int, w what, err error) *ParseError {
	if k >= len(t.offs) {
		off := 0
		if n := len(t.offs); n > 0 {
			off = t.offs[n-1] + len(t.text(n-1))
		}
		line, col := position(t.data, off)
		return &ParseError{File: t.file, Line: line, Column: col, Token: len(t.offs) + 1,
			Expected: w.String(), Err: &gotError{eof: true, err: io.ErrUnexpectedEOF}}
	}
	line, col := position(t.data, t.offs[k])
	return &ParseError{File: t.file, Line: line, Column: col, Token: k + 1,
		Expected: w.String(), Err: &gotError{got: string(t.text(k)), err: err}}
}

// parseInt reads an optionally signed decimal integer. big reports a
// well-formed number too large in magnitude for any GAP datum.
func parseInt(b []byte) (v int64, ok, big bool) {
	neg := false
	if len(b) > 0 && (b[0] == '+' || b[0] == '-') {
		neg = b[0] == '-'
		b = b[1:]
	}
	if len(b) == 0 {
		return 0, false, false
	}
	for _, c := range b {
		if c < '0' || c > '9' {
			return 0, false, false
		}
		if v > 1e17 {
			big = true
			continue
		}
		v = v*10 + int64(c-'0')
	}
	if neg {
		v = -v
	}
	return v, true, big
}

// num reads token k as an integer in [w.lo, w.hi].
func (t *tokens) num(k int, w what) (int64, error) {
	if k >= len(t.offs) {
		return 0, t.fail(k, w, nil)
	}
	v, ok, big := parseInt(t.text(k))
	switch {
	case !ok:
		return 0, t.fail(k, w, strconv.ErrSyntax)
	case big:
		return 0, t.fail(k, w, strconv.ErrRange)
	case v < w.lo || v > w.hi:
		return 0, t.fail(k, w, nil)
	}
	return v, nil
}

// dims reads the "m n" header at token k.
func (t *tokens) dims(k, inst int) (m, n int, err error) {
	mv, err := t.num(k, what{kind: 'm', inst: inst, lo: 1, hi: maxCells})
	if err != nil {
		return 0, 0, err
	}
	nv, err := t.num(k+1, what{kind: 'n', inst: inst, lo: 1, hi: maxCells / mv})
	if err != nil {
		return 0, 0, err
	}
	return int(mv), int(nv), nil
}

// blockLen is the number of tokens after the header of an m×n block.
func blockLen(m, n int) int { return 2*m*n + m }

// chooseLayout reports whether to read the file as several instances. It
// looks at headers only: a layout whose headers are sound and whose token
// count fits exactly wins (the several-instance one first); failing that,
// the one whose count comes closer, so that errors are described in the
// layout the file most likely has.
func (t *tokens) chooseLayout() bool {
	total := len(t.offs)
	mNeed, mSound, mOK := t.needMulti()
	sNeed, sOK := 0, false
	if m, n, err := t.dims(0, 0); err == nil {
		sNeed, sOK = 2+blockLen(m, n), true
	}
	switch {
	case mOK && mSound && mNeed == total:
		return true
	case sOK && sNeed == total:
		return false
	case sOK && (!mOK || abs(sNeed-total) < abs(mNeed-total)):
		return false
	}
	return true
}

// needMulti returns how many tokens the several-instance layout needs
// according to its headers: exact when sound, else a lower bound (the file
// ends early or a block header is unreadable, counted as ending there). ok
// is false when the leading count itself is unreadable.
func (t *tokens) needMulti() (need int, sound, ok bool) {
	total := len(t.offs)
	p, err := t.num(0, what{kind: 'P', lo: 1, hi: int64(total)})
	if err != nil {
		return 0, false, false
	}
	pos := 1
	for k := 1; k <= int(p); k++ {
		if pos+2 > total {
			return pos + 2, true, true
		}
		m, n, err := t.dims(pos, k)
		if err != nil {
			return pos + 2, false, true
		}
		pos += 2 + blockLen(m, n)
		if pos > total {
			return pos, true, true
		}
	}
	return pos, true, true
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// parse reads the whole file in the given layout, keeping block index only.
// It returns the number of instances in the file.
func (t *tokens) parse(multi bool, index int) (*Instance, int, error) {
	total := len(t.offs)
	count, pos, inst := 1, 0, 0
	if multi {
		first := what{kind: 'P', lo: 1, hi: maxCells}
		if _, err := t.num(0, what{kind: 'm', lo: 1, hi: maxCells}); err != nil {
			first.kind = 'F' // layout unknown to the reader: describe both
		}
		p, err := t.num(0, first)
		if err != nil {
			return nil, 0, err
		}
		count, pos = int(p), 1
	}
	base := filepath.Base(t.file)
	if t.file == "" {
		base = "gap"
	}
	var out *Instance
	for k := 1; k <= count; k++ {
		if multi {
			inst = k
		}
		m, n, err := t.dims(pos, inst)
		if err != nil {
			return nil, 0, err
		}
		pos += 2
		var in *Instance
		// Allocate only when the tokens to fill the block are present.
		if k == index && pos+blockLen(m, n) <= total {
			in = &Instance{Name: base, Agents: m, Jobs: n,
				Cost: matrix(m, n), Use: matrix(m, n), Capacity: make([]int64, m)}
			if multi {
				in.Name = fmt.Sprintf("%s#%d", base, k)
			}
		}
		for _, kind := range []byte{'c', 'a'} {
			lo := int64(-maxValue)
			if kind == 'a' {
				lo = 0
			}
			for i := 0; i < m; i++ {
				for j := 0; j < n; j++ {
					v, err := t.num(pos, what{kind: kind, inst: inst, i: i + 1, j: j + 1, lo: lo, hi: maxValue})
					if err != nil {
						return nil, 0, err
					}
					pos++
					if in != nil {
						if kind == 'c' {
							in.Cost[i][j] = v
						} else {
							in.Use[i][j] = v
						}
					}
				}
			}
		}
		for i := 0; i < m; i++ {
			v, err := t.num(pos, what{kind: 'b', inst: inst, i: i + 1, lo: 0, hi: maxValue})
			if err != nil {
				return nil, 0, err
			}
			pos++
			if in != nil {
				in.Capacity[i] = v
			}
		}
		if in != nil {
			out = in
		}
	}
	if pos < total {
		return nil, 0, t.fail(pos, what{kind: 'E', inst: inst}, nil)
	}
	return out, count, nil
}

func matrix(m, n int) [][]int64 {
	flat := make([]int64, m*n)
	rows := make([][]int64, m)
	for i := range rows {
		rows[i] = flat[i*n : (i+1)*n : (i+1)*n]
	}
	return rows
}

// WriteORLib writes in to w in the one-instance layout: "m n", then one line
// per agent for the cost matrix, one per agent for the use matrix, and a
// line of capacities. ReadORLib reads it back unchanged (but for the name).
func WriteORLib(w io.Writer, in *Instance) error {
	if err := in.Validate(); err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	buf := make([]byte, 0, 32)
	line := func(vals []int64) {
		for j, v := range vals {
			buf = buf[:0]
			if j > 0 {
				buf = append(buf, ' ')
			}
			buf = strconv.AppendInt(buf, v, 10)
			bw.Write(buf)
		}
		bw.WriteByte('\n')
	}
	line([]int64{int64(in.Agents), int64(in.Jobs)})
	for _, row := range in.Cost {
		line(row)
	}
	for _, row := range in.Use {
		line(row)
	}
	line(in.Capacity)
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("gap: writing instance %q: %w", in.Name, err)
	}
	return nil
}
