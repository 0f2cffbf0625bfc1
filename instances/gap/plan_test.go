package gap

import (
	"bytes"
	"errors"
	"io"
	"reflect"
	"strings"
	"testing"
)

func TestPlanCSVRoundTrip(t *testing.T) {
	in := handInstance()
	var buf bytes.Buffer
	if err := WritePlanCSV(&buf, in, []int{0, 0, 1}); err != nil {
		t.Fatal(err)
	}
	// Costs and uses from handInstance(): job 1 agent 1 (4, 5), job 2 agent 1
	// (7, 4), job 3 agent 2 (5, 2).
	const want = "job,agent,cost,use\n1,1,4,5\n2,1,7,4\n3,2,5,2\n"
	if buf.String() != want {
		t.Fatalf("got %q, want %q", buf.String(), want)
	}
	got, err := ReadPlanCSV(&buf, "plan.csv", in)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, []int{0, 0, 1}) {
		t.Errorf("got %v", got)
	}
	// Any row order, blanks around fields, empty cost and use.
	got, err = ReadPlanCSV(strings.NewReader("Job, Agent ,cost,use\n3 ,2,,\n1,1,4,\n2,2,2,8\n"), "p.csv", in)
	if err != nil || !reflect.DeepEqual(got, []int{0, 1, 1}) {
		t.Errorf("got %v, %v", got, err)
	}
	if err := WritePlanCSV(io.Discard, in, []int{0, 2, 1}); err == nil {
		t.Error("agent out of range written")
	}
	if err := WritePlanCSV(io.Discard, in, []int{0}); err == nil {
		t.Error("short plan written")
	}
}

func TestReadPlanCSVErrors(t *testing.T) {
	const head = "job,agent,cost,use\n"
	for _, tc := range []struct {
		name, text       string
		line, col, field int
		wantIn           string
	}{
		{"empty", "", 1, 1, 0, "expected header job,agent,cost,use: got end of input"},
		{"bad header", "job,agent,price,use\n", 1, 11, 3, `expected header field "cost": got "price"`},
		{"short header", "job,agent\n", 1, 1, 0, "2 fields"},
		{"field count", head + "1,1,4\n", 2, 1, 0, "expected 4 fields"},
		{"non-number", head + "1,one,4,5\n", 2, 3, 2, `expected agent number 1..2: got "one"`},
		{"job range", head + "4,1,,\n", 2, 1, 1, `expected job number 1..3: got "4"`},
		{"agent range", head + "1,0,,\n", 2, 3, 2, `expected agent number 1..2: got "0"`},
		{"duplicate", head + "1,1,,\n2,1,,\n1,2,,\n", 4, 1, 1, "job 1 already has a row on line 2"},
		// handInstance(): cost of agent 1 for job 2 is 7.
		{"wrong cost", head + "2,1,8,\n", 2, 5, 3, `expected cost 7 (the instance's cost of agent 1 for job 2) or an empty field: got "8"`},
		{"missing job", head + "1,1,,\n3,2,,\n", 3, 1, 0, "a row for job 2 (every job 1..3 once): got end of input"},
		{"bare quote", head + "1,\"1,,\n", 2, 0, 0, "well-formed CSV record"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadPlanCSV(strings.NewReader(tc.text), "plan.csv", handInstance())
			var pe *ParseError
			if !errors.As(err, &pe) {
				t.Fatalf("got %v (%T), want *ParseError", err, err)
			}
			if pe.File != "plan.csv" || pe.Line != tc.line || (tc.col > 0 && pe.Column != tc.col) || pe.Token != tc.field {
				t.Errorf("got %s:%d:%d field %d, want plan.csv:%d:%d field %d (%v)", pe.File, pe.Line, pe.Column, pe.Token, tc.line, tc.col, tc.field, err)
			}
			if !strings.Contains(err.Error(), tc.wantIn) || !strings.HasPrefix(err.Error(), "plan.csv:") {
				t.Errorf("message %q lacks %q", err, tc.wantIn)
			}
		})
	}
}

// TestNamedPlanReadsBack: the agent_name column is written when names are
// given and ignored on reading; the agent number decides.
func TestNamedPlanReadsBack(t *testing.T) {
	in := &Instance{Name: "two", Agents: 2, Jobs: 3,
		Cost: [][]int64{{1, 2, 3}, {4, 5, 6}}, Use: [][]int64{{1, 1, 1}, {1, 1, 1}}, Capacity: []int64{3, 3}}
	var b strings.Builder
	if err := WriteNamedPlanCSV(&b, in, []int{0, 1, 1}, []string{"Ashcombe", "Bellwater"}); err != nil {
		t.Fatal(err)
	}
	want := "job,agent,cost,use,agent_name\n1,1,1,1,Ashcombe\n2,2,5,1,Bellwater\n3,2,6,1,Bellwater\n"
	if b.String() != want {
		t.Fatalf("got\n%s\nwant\n%s", b.String(), want)
	}
	got, err := ReadPlanCSV(strings.NewReader(b.String()), "named.csv", in)
	if err != nil || len(got) != 3 || got[0] != 0 || got[1] != 1 || got[2] != 1 {
		t.Fatalf("read back %v %v", got, err)
	}
	if err := WriteNamedPlanCSV(&b, in, []int{0, 1, 1}, []string{"only one"}); err == nil {
		t.Error("short name list accepted")
	}
}
