package scheduling

import (
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"testing"

	"pincer/instances"
)

// orlibText writes 125 instances of n jobs: instance k's job j has
// processing time k+j, weight 1+j%10 and due date 10*j.
func orlibText(n int) string {
	var b strings.Builder
	for k := 1; k <= ORLibInstances; k++ {
		for part := range 3 {
			for j := range n {
				v := []int{k + j, 1 + j%10, 10 * j}[part]
				fmt.Fprintf(&b, "%6d", v)
				if (j+1)%20 == 0 || j == n-1 {
					b.WriteByte('\n')
				}
			}
		}
	}
	return b.String()
}

func TestReadORLib(t *testing.T) {
	in, err := ReadORLib(strings.NewReader(orlibText(7)), "wt7.txt", 3, 2)
	if err != nil {
		t.Fatal(err)
	}
	if in.Name != "wt7#3" || len(in.Jobs) != 7 || in.Classes[0].Machines != 2 {
		t.Fatalf("got %s with %d jobs on %d machines", in.Name, len(in.Jobs), in.Classes[0].Machines)
	}
	if j := in.Jobs[4]; j.Processing != 7 || j.Weight != 5 || j.Due != 40 || j.Release != 0 || j.ID != "5" {
		t.Fatalf("job 5: %+v", j)
	}
	if _, err := ReadORLib(strings.NewReader(orlibText(7)), "wt7.txt", 126, 1); err == nil {
		t.Fatal("index 126 accepted")
	}
}

// TestReadORLibPublished reads the shared files: wt40 instance 1 starts
// with processing times 26 24 79 46 32 35 73 74 14 67 (the first line of
// wt40.txt) and sums to 2065 (the horizon quoted for it in SOURCES.md is
// the range 1463-2467, which it is inside).
func TestReadORLibPublished(t *testing.T) {
	dir, _ := references(t)
	in, err := ReadORLibFile(filepath.Join(dir, "wt40.txt"), 1, 1)
	if err != nil {
		t.Fatal(err)
	}
	sum := 0
	for _, j := range in.Jobs {
		sum += j.Processing
	}
	if len(in.Jobs) != 40 || in.Jobs[0].Processing != 26 || in.Jobs[2].Processing != 79 || sum != 2065 {
		t.Fatalf("wt40 #1: %d jobs, first %+v, sum %d", len(in.Jobs), in.Jobs[0], sum)
	}
	in, err = ReadORLibFile(filepath.Join(dir, "wt50.txt"), 125, 1)
	if err != nil || len(in.Jobs) != 50 {
		t.Fatalf("wt50 #125: %v", err)
	}
}

func TestReadORLibErrors(t *testing.T) {
	good := orlibText(2)
	cases := []struct {
		name, text       string
		line, col, token int
		want             string
	}{
		{"letter", "     1   x2\n" + good[12:], 1, 10, 2, "an integer"},
		{"short", good[:len(good)-8], 0, 0, 0, "125 blocks"},
		{"empty", "", 1, 1, 0, "125 blocks"},
		{"zero processing", "     0" + good[6:], 1, 6, 1, "processing time of job 1 of instance 1"},
		{"negative weight", good[:13] + "    -1" + good[19:], 2, 5, 3, "weight of job 1"},
	}
	for _, c := range cases {
		_, err := ReadORLib(strings.NewReader(c.text), "bad.txt", 1, 1)
		var pe *instances.ParseError
		if !errors.As(err, &pe) || pe.File != "bad.txt" || !strings.Contains(pe.Error(), c.want) {
			t.Errorf("%s: want a parse error naming %q, got %v", c.name, c.want, err)
			continue
		}
		if c.line > 0 && (pe.Line != c.line || pe.Column != c.col || pe.Token != c.token) {
			t.Errorf("%s: at %d:%d token %d, want %d:%d token %d (%v)", c.name, pe.Line, pe.Column, pe.Token, c.line, c.col, c.token, err)
		}
	}
}

// FuzzReadORLib: any input gives an instance that validates or an error,
// never a panic; bad content is a parse error naming the file.
func FuzzReadORLib(f *testing.F) {
	f.Add([]byte(orlibText(1)), 1)
	f.Add([]byte(orlibText(2)), 125)
	f.Add([]byte("1 2 3\n"), 1)
	f.Add([]byte("  12\t-3\r\n99999999999999999999"), 2)
	f.Fuzz(func(t *testing.T, data []byte, index int) {
		in, err := ReadORLib(strings.NewReader(string(data)), "fuzz.txt", index, 1)
		if err != nil {
			var pe *instances.ParseError
			if errors.As(err, &pe) && pe.File != "fuzz.txt" {
				t.Fatalf("parse error names %q", pe.File)
			}
			return
		}
		if err := in.Validate(); err != nil {
			t.Fatalf("read an invalid instance: %v", err)
		}
	})
}
