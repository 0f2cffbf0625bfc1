package gap

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"runtime"
	"strconv"
	"strings"
	"testing"
)

// orlibMultiText holds two instances in the several-instance layout: a 2x3 and a
// 1x2 one. Line numbers below are counted by hand.
const orlibMultiText = `2
 2 3
 1 2 3
 4 5 6
 1 1 1
 2 2 2
 3 4
 1 2
 7 8
 9 5
 10
`

const orlibSingleText = "2 3\n1 2 3\n4 5 6\n1 1 1\n2 2 2\n3 4\n"

func TestReadORLibLayouts(t *testing.T) {
	first := &Instance{Name: "tiny.txt#1", Agents: 2, Jobs: 3,
		Cost:     [][]int64{{1, 2, 3}, {4, 5, 6}},
		Use:      [][]int64{{1, 1, 1}, {2, 2, 2}},
		Capacity: []int64{3, 4}}
	second := &Instance{Name: "tiny.txt#2", Agents: 1, Jobs: 2,
		Cost: [][]int64{{7, 8}}, Use: [][]int64{{9, 5}}, Capacity: []int64{10}}
	for _, tc := range []struct {
		text  string
		index int
		want  *Instance
	}{
		{orlibMultiText, 1, first},
		{orlibMultiText, 2, second},
		{orlibSingleText, 1, &Instance{Name: "tiny.txt", Agents: 2, Jobs: 3, Cost: first.Cost, Use: first.Use, Capacity: first.Capacity}},
		// Line breaks carry no meaning (SOURCES.md 2.1).
		{strings.Join(strings.Fields(orlibMultiText), "\t"), 2, second},
	} {
		got, err := ReadORLib(strings.NewReader(tc.text), "dir/tiny.txt", tc.index)
		if err != nil {
			t.Fatalf("index %d: %v", tc.index, err)
		}
		if !reflect.DeepEqual(got, tc.want) {
			t.Errorf("index %d: got %+v, want %+v", tc.index, got, tc.want)
		}
	}
}

func TestReadORLibErrors(t *testing.T) {
	for _, tc := range []struct {
		name, text       string
		index            int
		line, col, token int
		wantIn           []string // substrings of the message
		cause            error
	}{
		{name: "truncated", text: "2 3\n1 2 3\n4 5 6\n1 1 1\n2 2 2\n3", index: 1,
			line: 6, col: 2, token: 16, wantIn: []string{"capacity of agent 2", "got end of input"}, cause: io.ErrUnexpectedEOF},
		{name: "negative capacity", text: "2 3\n1 2 3\n4 5 6\n1 1 1\n2 2 2\n3 -4\n", index: 1,
			line: 6, col: 3, token: 16, wantIn: []string{"capacity of agent 2 (non-negative", `got "-4"`}},
		{name: "negative use", text: "2 3\n1 2 3\n4 5 6\n1 1 -1\n2 2 2\n3 4\n", index: 1,
			line: 4, col: 5, token: 11, wantIn: []string{"resource use of agent 1 for job 3", `got "-1"`}},
		{name: "non-number", text: "2 3\n1 2 3\n4 5 6\n1 x 1\n2 2 2\n3 4\n", index: 1,
			line: 4, col: 3, token: 10, wantIn: []string{"resource use of agent 1 for job 2", `got "x"`}, cause: strconv.ErrSyntax},
		{name: "huge number", text: "2 3\n1 2 3\n4 5 99999999999999999999999\n1 1 1\n2 2 2\n3 4\n", index: 1,
			line: 3, col: 5, token: 8, wantIn: []string{"cost of agent 2 for job 3"}, cause: strconv.ErrRange},
		{name: "extra token", text: orlibMultiText + "99\n", index: 1,
			line: 12, col: 1, token: 25, wantIn: []string{"end of input after instance 2", `got "99"`}},
		{name: "count too high", text: "3" + orlibMultiText[1:], index: 1,
			line: 11, col: 4, token: 25, wantIn: []string{"number of agents of instance 3", "got end of input"}, cause: io.ErrUnexpectedEOF},
		{name: "count too low", text: "1" + orlibMultiText[1:], index: 1,
			line: 8, col: 2, token: 18, wantIn: []string{"end of input after instance 1", `got "1"`}},
		{name: "bad header in block 2", text: strings.Replace(orlibMultiText, " 1 2\n", " x 2\n", 1), index: 1,
			line: 8, col: 2, token: 18, wantIn: []string{"number of agents of instance 2", `got "x"`}, cause: strconv.ErrSyntax},
		{name: "empty", text: "", index: 1,
			line: 1, col: 1, token: 1, wantIn: []string{"number of instances", "number of agents", "end of input"}},
		{name: "blank", text: "\n\n  \n", index: 1,
			line: 1, col: 1, token: 1, wantIn: []string{"end of input"}},
		{name: "zero agents", text: "0 3 1 2 3", index: 1,
			line: 1, col: 1, token: 1, wantIn: []string{"number of agents", `got "0"`}},
		{name: "zero jobs", text: "1\n2 0\n", index: 1,
			line: 2, col: 3, token: 3, wantIn: []string{"number of jobs of instance 1", `got "0"`}},
		{name: "too many pairs", text: "1\n100000 100000\n", index: 1,
			line: 2, col: 8, token: 3, wantIn: []string{"number of jobs of instance 1 (integer 1..500", `got "100000"`}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadORLib(strings.NewReader(tc.text), "bad.txt", tc.index)
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("got %v (%T), want *ParseError", err, err)
			}
			if pe.File != "bad.txt" || pe.Line != tc.line || pe.Column != tc.col || pe.Token != tc.token {
				t.Errorf("got %s:%d:%d token %d, want bad.txt:%d:%d token %d (%v)", pe.File, pe.Line, pe.Column, pe.Token, tc.line, tc.col, tc.token, err)
			}
			msg := err.Error()
			prefix := fmt.Sprintf("bad.txt:%d:%d: token %d: expected ", tc.line, tc.col, tc.token)
			if !strings.HasPrefix(msg, prefix) {
				t.Errorf("message %q does not start with %q", msg, prefix)
			}
			for _, s := range tc.wantIn {
				if !strings.Contains(msg, s) {
					t.Errorf("message %q lacks %q", msg, s)
				}
			}
			if tc.cause != nil && !errors.Is(err, tc.cause) {
				t.Errorf("error %v does not wrap %v", err, tc.cause)
			}
		})
	}
}

func TestReadORLibIndex(t *testing.T) {
	for _, tc := range []struct {
		text  string
		index int
		want  string
	}{
		{orlibMultiText, 3, "holds 2 instances"},
		{orlibSingleText, 2, "holds 1 instance"},
		{orlibMultiText, 0, "numbers start at 1"},
	} {
		_, err := ReadORLib(strings.NewReader(tc.text), "x.txt", tc.index)
		if err == nil || !strings.Contains(err.Error(), tc.want) || !strings.Contains(err.Error(), "x.txt") {
			t.Errorf("index %d: got %v, want an error naming x.txt and %q", tc.index, err, tc.want)
		}
	}
}

// A header asking for the largest allowed size with no data behind it must
// fail on the missing data without allocating the matrices (5e7 pairs would
// take 800 MB).
func TestReadORLibNoAllocationBeforeData(t *testing.T) {
	text := "1\n5000 10000\n1 2 3\n"
	var before, after runtime.MemStats
	runtime.GC()
	runtime.ReadMemStats(&before)
	_, err := ReadORLib(strings.NewReader(text), "big.txt", 1)
	runtime.ReadMemStats(&after)
	var pe *ParseError
	if !errors.As(err, &pe) || !errors.Is(err, io.ErrUnexpectedEOF) {
		t.Fatalf("got %v, want an end-of-input *ParseError", err)
	}
	if grew := after.TotalAlloc - before.TotalAlloc; grew > 1<<20 {
		t.Errorf("allocated %d bytes for a 20-byte file", grew)
	}
}

func TestWriteORLibRoundTrip(t *testing.T) {
	for _, kind := range []byte("abcde") {
		in, err := Generate(kind, 7, 23, 11)
		if err != nil {
			t.Fatal(err)
		}
		var buf bytes.Buffer
		if err := WriteORLib(&buf, in); err != nil {
			t.Fatal(err)
		}
		got, err := ReadORLib(bytes.NewReader(buf.Bytes()), in.Name, 1)
		if err != nil {
			t.Fatalf("type %c: %v", kind, err)
		}
		if !reflect.DeepEqual(got, in) {
			t.Errorf("type %c: round trip changed the instance", kind)
		}
		// Prefixing a count turns the output into the several-instance
		// layout (SOURCES.md 2.2).
		got, err = ReadORLib(io.MultiReader(strings.NewReader("1\n"), &buf), in.Name, 1)
		if err != nil {
			t.Fatal(err)
		}
		if got.Name != in.Name+"#1" || !reflect.DeepEqual(got.Use, in.Use) {
			t.Errorf("type %c: several-instance reading differs", kind)
		}
	}
}

// Every instance listed in the shared reference.csv parses with the agent
// and job counts that table states; each file holds the number of instances
// SOURCES.md gives (5 in gap1-gap12, 6 in gapa-gapd, 1 in yagiura/).
func TestBenchmarkFilesParse(t *testing.T) {
	dir := gapBenchDir(t)
	rows := readGapReference(t, dir)
	seen := map[string]bool{}
	for _, r := range rows {
		key := fmt.Sprintf("%s#%d", r.file, r.index)
		if seen[key] {
			continue
		}
		seen[key] = true
		path := filepath.Join(dir, r.file)
		if _, err := os.Stat(path); err != nil {
			continue // kept aside, see SOURCES.md
		}
		in, err := ReadFile(path, r.index)
		if err != nil {
			t.Errorf("%s: %v", key, err)
			continue
		}
		if in.Agents != r.agents || in.Jobs != r.jobs {
			t.Errorf("%s: %dx%d, reference.csv says %dx%d", key, in.Agents, in.Jobs, r.agents, r.jobs)
		}
		if err := in.Validate(); err != nil {
			t.Errorf("%s: %v", key, err)
		}
	}
	count := map[string]int{}
	for _, sub := range []string{"orlib", "yagiura"} {
		entries, err := os.ReadDir(filepath.Join(dir, sub))
		if err != nil {
			t.Fatal(err)
		}
		for _, e := range entries {
			count[sub]++
			path := filepath.Join(dir, sub, e.Name())
			want := 1
			switch {
			case strings.HasPrefix(e.Name(), "gap") && len(e.Name()) == len("gapa.txt") && e.Name()[3] >= 'a':
				want = 6
			case sub == "orlib":
				want = 5
			}
			_, err := ReadFile(path, want+1)
			if err == nil || !strings.Contains(err.Error(), fmt.Sprintf("holds %d instance", want)) {
				t.Errorf("%s: asking for instance %d gave %v, want it to say the file holds %d", path, want+1, err, want)
			}
		}
	}
	if count["orlib"] != 16 {
		t.Errorf("%d files in orlib/, SOURCES.md lists 16", count["orlib"])
	}
	t.Logf("checked %d instances from reference.csv, %d orlib and %d yagiura files", len(seen), count["orlib"], count["yagiura"])
}

// SOURCES.md 2.3: the yagiura A-D files with n <= 200 are the gapa-gapd
// blocks, in the order 5x100, 5x200, 10x100, 10x200, 20x100, 20x200.
func TestBenchmarkLayoutsAgree(t *testing.T) {
	dir := gapBenchDir(t)
	names := []string{"05100", "05200", "10100", "10200", "20100", "20200"}
	for _, kind := range "abcd" {
		for k, size := range names {
			multi, err := ReadFile(filepath.Join(dir, "orlib", "gap"+string(kind)+".txt"), k+1)
			if err != nil {
				t.Fatal(err)
			}
			single, err := ReadFile(filepath.Join(dir, "yagiura", string(kind)+size), 1)
			if err != nil {
				t.Fatal(err)
			}
			single.Name = multi.Name
			if !reflect.DeepEqual(multi, single) {
				t.Errorf("gap%c.txt#%d differs from yagiura/%c%s", kind, k+1, kind, size)
			}
		}
	}
}

func BenchmarkReadLargest(b *testing.B) {
	path := filepath.Join(gapBenchDir(b), "yagiura", "e801600")
	data, err := os.ReadFile(path)
	if err != nil {
		b.Skip(err)
	}
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, err := ReadORLib(bytes.NewReader(data), path, 1); err != nil {
			b.Fatal(err)
		}
	}
}
