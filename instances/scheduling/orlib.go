package scheduling

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"pincer/instances"
)

// ORLibInstances is the number of instances in one OR-Library weighted
// tardiness file (wt40, wt50, wt100).
const ORLibInstances = 125

// maxORLibValue keeps every time and weight far from overflow in sums of
// completion times and weighted costs.
const maxORLibValue = 1_000_000

// ReadORLib reads instance index (1-based) of an OR-Library weighted
// tardiness file: a stream of whitespace-separated integers holding 125
// blocks of 3n (n processing times, n weights, n due dates; line breaks
// carry no meaning), so n is the token count over 375. All jobs are
// released at 0. The jobs run on one class "M" of machines identical
// machines (1: the published single-machine problem). file names the
// input in errors, which are *instances.ParseError for bad content.
func ReadORLib(r io.Reader, file string, index, machines int) (*Instance, error) {
	if machines < 1 {
		return nil, fmt.Errorf("scheduling: %d machines, want at least 1", machines)
	}
	toks, err := scanInts(r, file)
	if err != nil {
		return nil, err
	}
	if len(toks) == 0 || len(toks)%(3*ORLibInstances) != 0 {
		line, col := 1, 1
		if len(toks) > 0 {
			line, col = toks[len(toks)-1].line, toks[len(toks)-1].col
		}
		return nil, &instances.ParseError{File: file, Line: line, Column: col, Token: len(toks),
			Expected: fmt.Sprintf("%d blocks of 3n integers (processing times, weights, due dates)", ORLibInstances),
			Err:      fmt.Errorf("the file holds %d integers, not a positive multiple of %d", len(toks), 3*ORLibInstances)}
	}
	if index < 1 || index > ORLibInstances {
		return nil, fmt.Errorf("scheduling: %s: instance index %d, want 1..%d", file, index, ORLibInstances)
	}
	n := len(toks) / (3 * ORLibInstances)
	block := toks[(index-1)*3*n : index*3*n]
	in := &Instance{
		Name:    fmt.Sprintf("%s#%d", strings.TrimSuffix(filepath.Base(file), filepath.Ext(file)), index),
		Classes: []Class{{ID: "M", Machines: machines}},
		Jobs:    make([]Job, n),
	}
	first := (index - 1) * 3 * n
	for j := range n {
		p, w, d := block[j], block[n+j], block[2*n+j]
		check := func(tk token, pos int, what string, least int64) error {
			if tk.v < least || tk.v > maxORLibValue {
				return &instances.ParseError{File: file, Line: tk.line, Column: tk.col, Token: first + pos + 1,
					Expected: fmt.Sprintf("%s of job %d of instance %d, an integer in %d..%d", what, j+1, index, least, maxORLibValue),
					Err:      fmt.Errorf("got %d", tk.v)}
			}
			return nil
		}
		if err := check(p, j, "processing time", 1); err != nil {
			return nil, err
		}
		if err := check(w, n+j, "weight", 0); err != nil {
			return nil, err
		}
		if err := check(d, 2*n+j, "due date", 0); err != nil {
			return nil, err
		}
		in.Jobs[j] = Job{ID: strconv.Itoa(j + 1), Processing: int(p.v), Weight: int(w.v), Due: int(d.v)}
	}
	return in, in.Validate()
}

// ReadORLibFile opens path and reads instance index with ReadORLib.
func ReadORLibFile(path string, index, machines int) (*Instance, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, fmt.Errorf("scheduling: %w", err)
	}
	defer f.Close()
	return ReadORLib(f, path, index, machines)
}

type token struct {
	v         int64
	line, col int
}

// scanInts reads whitespace-separated integers, remembering where each
// starts.
func scanInts(r io.Reader, file string) ([]token, error) {
	br := bufio.NewReader(r)
	var toks []token
	line, col := 1, 0
	var cur []byte
	startLine, startCol := 0, 0
	flush := func() error {
		if len(cur) == 0 {
			return nil
		}
		v, err := strconv.ParseInt(string(cur), 10, 64)
		if err != nil {
			var ne *strconv.NumError
			if errors.As(err, &ne) {
				err = ne.Err
			}
			return &instances.ParseError{File: file, Line: startLine, Column: startCol, Token: len(toks) + 1,
				Expected: "an integer", Err: fmt.Errorf("got %q: %w", cur, err)}
		}
		toks = append(toks, token{v: v, line: startLine, col: startCol})
		cur = cur[:0]
		return nil
	}
	for {
		c, err := br.ReadByte()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("scheduling: reading %s: %w", file, err)
		}
		col++
		switch c {
		case ' ', '\t', '\r', '\n', '\f', '\v':
			if err := flush(); err != nil {
				return nil, err
			}
			if c == '\n' {
				line, col = line+1, 0
			}
		default:
			if len(cur) == 0 {
				startLine, startCol = line, col
			}
			if len(cur) > 32 {
				return nil, &instances.ParseError{File: file, Line: startLine, Column: startCol, Token: len(toks) + 1,
					Expected: "an integer", Err: errors.New("token longer than 32 bytes")}
			}
			cur = append(cur, c)
		}
	}
	if err := flush(); err != nil {
		return nil, err
	}
	return toks, nil
}
