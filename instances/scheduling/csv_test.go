package scheduling

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"pincer/instances"
)

// The expected values are read off testdata/small by hand.
func TestReadCSVFolderSmall(t *testing.T) {
	in, err := ReadCSVFolder(filepath.Join("testdata", "small"))
	if err != nil {
		t.Fatal(err)
	}
	want := &Instance{
		Name:      "small",
		Objective: WeightedTardiness,
		Classes:   []Class{{ID: "lathe", Name: "CNC lathes", Machines: 2}, {ID: "mill", Name: "Five-axis mill", Machines: 1}},
		Jobs: []Job{
			{ID: "J1", Name: "Pump shaft", Processing: 4, Weight: 3, Due: 6, Eligible: []int{0}},
			{ID: "J2", Name: "Gear blank", Processing: 3, Weight: 2, Due: 5, Release: 1},
			{ID: "J3", Name: "Valve body", Processing: 5, Weight: 4, Due: 9, Eligible: []int{1}},
			{ID: "J4", Name: "Bracket", Processing: 2, Weight: 1, Due: 4, Release: 2, Eligible: []int{0, 1}},
			{ID: "J5", Name: "Flange", Processing: 3, Weight: 5, Due: 3, Eligible: []int{0, 1}},
		},
	}
	if !reflect.DeepEqual(in, want) {
		t.Fatalf("read\n%+v\nwant\n%+v", in, want)
	}
}

func TestCSVFolderRoundTrip(t *testing.T) {
	in := Generate(GenerateConfig{Jobs: 40, Machines: 5, Classes: 3, TF: 0.6, RDD: 0.4, ReleaseFactor: 0.5, EligibleShare: 0.4, Seed: 7})
	dir := filepath.Join(t.TempDir(), "gen")
	if err := WriteCSVFolder(dir, in); err != nil {
		t.Fatal(err)
	}
	back, err := ReadCSVFolder(dir)
	if err != nil {
		t.Fatal(err)
	}
	in.Name = "gen"
	if !reflect.DeepEqual(in, back) {
		t.Fatalf("round trip changed the instance:\n%+v\n%+v", in, back)
	}
}

const goodMachines = "class,count,name\nA,2,press\nB,1,\n"
const goodJobs = "id,name,processing_time,weight,due,release,eligible_classes\nj1,first,3,2,5,0,A\nj2,,2,1,1,1,A;B\n"

// Positions and messages follow the ParseError contract: file, 1-based
// line, byte column and field number.
func TestReadCSVErrors(t *testing.T) {
	for _, c := range []struct {
		name, jobs, machines string
		file                 string
		line, col, tok       int
		expect               string
	}{
		{"unknown class", "id,name,processing_time,weight,due,eligible_classes\nj1,x,3,1,2,C\n", goodMachines, "jobs.csv", 2, 12, 6, "unknown class \"C\""},
		{"repeated class in list", "id,name,processing_time,weight,due,eligible_classes\nj1,x,3,1,2,A;A\n", goodMachines, "jobs.csv", 2, 12, 6, "repeated"},
		{"duplicate job", "id,name,processing_time,weight,due\nj1,x,3,1,2\nj1,y,3,1,2\n", goodMachines, "jobs.csv", 3, 1, 1, "already used on line 2"},
		{"not an integer", "id,name,processing_time,weight,due\nj1,x,3.5,1,2\n", goodMachines, "jobs.csv", 2, 6, 3, "\"3.5\""},
		{"negative weight", "weight,id,name,processing_time,due\n-1,j1,x,3,2\n", goodMachines, "jobs.csv", 2, 1, 1, "\"-1\""},
		{"zero processing", "id,name,processing_time,weight,due\nj1,x,0,1,2\n", goodMachines, "jobs.csv", 2, 6, 3, "\"0\""},
		{"negative release", "id,name,processing_time,weight,due,release\nj1,x,1,1,2,-3\n", goodMachines, "jobs.csv", 2, 12, 6, "\"-3\""},
		{"missing column", "id,name,weight,due\nj1,x,1,2\n", goodMachines, "jobs.csv", 1, 1, 0, "processing_time"},
		{"short record", "id,name,processing_time,weight,due\nj1,x,1\n", goodMachines, "jobs.csv", 2, 6, 4, "only 3 fields"},
		{"empty id", "id,name,processing_time,weight,due\n ,x,1,1,1\n", goodMachines, "jobs.csv", 2, 1, 1, "empty"},
		{"no jobs", "id,name,processing_time,weight,due\n", goodMachines, "jobs.csv", 1, 0, 0, "no rows"},
		{"bad quote", "id,name,processing_time,weight,due\nj1,\"x,1,1,1\n", goodMachines, "jobs.csv", 2, 0, 0, "extraneous or missing"},
		{"zero machines", goodJobs, "class,count\nA,0\n", "machines.csv", 2, 3, 2, "\"0\""},
		{"duplicate class", goodJobs, "class,count\nA,1\nA,2\n", "machines.csv", 3, 1, 1, "already used"},
		{"separator in class", goodJobs, "class,count\nA;B,1\n", "machines.csv", 2, 1, 1, "A;B"},
		{"duplicate column", goodJobs, "class,count,Count\nA,1,1\n", "machines.csv", 1, 13, 3, "also column 2"},
		{"empty machines", goodJobs, "", "machines.csv", 1, 0, 0, "empty"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := readCSVTables(strings.NewReader(c.jobs), strings.NewReader(c.machines), "jobs.csv", "machines.csv")
			var pe *instances.ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("got %v (%T), want a *instances.ParseError", err, err)
			}
			if pe.File != c.file || pe.Line != c.line || (c.col > 0 && pe.Column != c.col) || pe.Token != c.tok || !strings.Contains(pe.Error(), c.expect) {
				t.Fatalf("got %q (file %s line %d col %d token %d), want %s:%d col %d token %d mentioning %q",
					pe.Error(), pe.File, pe.Line, pe.Column, pe.Token, c.file, c.line, c.col, c.tok, c.expect)
			}
		})
	}
}

func TestReadCSVFolderNamesPath(t *testing.T) {
	dir := t.TempDir()
	os.WriteFile(filepath.Join(dir, MachinesFile), []byte(goodMachines), 0o644)
	os.WriteFile(filepath.Join(dir, JobsFile), []byte("id,name,processing_time,weight,due\nj1,x,1,one,1\n"), 0o644)
	_, err := ReadCSVFolder(dir)
	var pe *instances.ParseError
	if !errors.As(err, &pe) || pe.File != filepath.Join(dir, JobsFile) || pe.Line != 2 || pe.Column != 8 {
		t.Fatalf("got %v, want an error at %s:2:8", err, filepath.Join(dir, JobsFile))
	}
	if _, err := ReadCSVFolder(filepath.Join(dir, "absent")); err == nil {
		t.Fatal("a missing folder read without error")
	}
}

func FuzzReadCSVTables(f *testing.F) {
	f.Add([]byte(goodJobs), []byte(goodMachines))
	f.Add([]byte("id,name,processing_time,weight,due,eligible_classes\nj1,,1,1,1,;\n"), []byte("class,count\nA,1\n"))
	f.Add([]byte("id,name,processing_time,weight,due\n\"j1"), []byte("class,count\n,1\n"))
	f.Fuzz(func(t *testing.T, jobs, machines []byte) {
		in, err := readCSVTables(strings.NewReader(string(jobs)), strings.NewReader(string(machines)), "jobs.csv", "machines.csv")
		if err != nil {
			var pe *instances.ParseError
			if !errors.As(err, &pe) || pe.Line < 1 || (pe.File != "jobs.csv" && pe.File != "machines.csv") {
				t.Fatalf("error %v (%T) is not a positioned *instances.ParseError", err, err)
			}
			return
		}
		if err := in.Validate(); err != nil {
			t.Fatalf("accepted an invalid instance: %v", err)
		}
		// What was read writes back and reads again to the same instance.
		files := map[string]*strings.Builder{}
		err = WriteCSVTo(func(name string) (io.WriteCloser, error) {
			files[name] = &strings.Builder{}
			return ioCloser{files[name]}, nil
		}, in)
		if err != nil {
			t.Fatalf("write back: %v", err)
		}
		back, err := readCSVTables(strings.NewReader(files[JobsFile].String()), strings.NewReader(files[MachinesFile].String()), "jobs.csv", "machines.csv")
		if err != nil {
			t.Fatalf("read back: %v", err)
		}
		if !reflect.DeepEqual(in, back) {
			t.Fatalf("round trip changed\n%+v\ninto\n%+v", in, back)
		}
	})
}

// ioCloser lets a strings.Builder stand for a file.
type ioCloser struct{ io.Writer }

func (ioCloser) Close() error { return nil }

// testdata/bad-eligible names a class "saw" that machines.csv lacks, on
// line 3, field 7 (byte column 23), for command-line tests of exit code 2.
func TestReadCSVFolderBadEligible(t *testing.T) {
	dir := filepath.Join("testdata", "bad-eligible")
	_, err := ReadCSVFolder(dir)
	var pe *instances.ParseError
	if !errors.As(err, &pe) || pe.File != filepath.Join(dir, JobsFile) || pe.Line != 3 || pe.Token != 7 || pe.Column != 23 || !strings.Contains(err.Error(), `unknown class "saw"`) {
		t.Fatalf("got %v", err)
	}
	t.Log(err)
}
