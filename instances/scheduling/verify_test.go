package scheduling

import (
	"bytes"
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"pincer/instances"
)

func ioSmallInstance(t *testing.T) *Instance {
	t.Helper()
	in, err := ReadCSVFolder(filepath.Join("testdata", "small"))
	if err != nil {
		t.Fatal(err)
	}
	return in
}

// Source of the expected value: exhaustive search (ioBruteForce); the
// written schedule must read back and verify to the same value.
func TestScheduleCSVRoundTripVerifies(t *testing.T) {
	in := ioSmallInstance(t)
	want, s := ioBruteForce(t, in)
	var buf bytes.Buffer
	if err := WriteScheduleCSV(&buf, in, s); err != nil {
		t.Fatal(err)
	}
	if !strings.HasPrefix(buf.String(), "job,name,class,machine,start,end,tardiness\n") {
		t.Fatalf("header: %q", buf.String())
	}
	pf, err := ReadPlanCSV(strings.NewReader(buf.String()), "schedule.csv", in)
	if err != nil {
		t.Fatal(err)
	}
	rep := VerifyPlan(in, pf)
	if !rep.Feasible || rep.Value != want {
		t.Fatalf("verify: %+v, want feasible with value %d\n%s", rep, want, buf.String())
	}
	v, err := VerifyFile(in, strings.NewReader(buf.String()), "schedule.csv")
	if err != nil || !v.Feasible || v.Value != float64(want) {
		t.Fatalf("VerifyFile: %+v %v", v, err)
	}
}

// Each broken plan is built by hand on testdata/small (lathe: 2 machines,
// mill: 1; J1 lathe only, J3 mill only, J2 released at 1, J4 at 2).
func TestVerifyFindsViolations(t *testing.T) {
	in := ioSmallInstance(t)
	head := "job,name,class,machine,start,end,tardiness\n"
	ok := "J1,,lathe,1,0,4,0\nJ2,,lathe,2,1,4,0\nJ3,,mill,1,0,5,0\nJ4,,lathe,2,4,6,2\nJ5,,mill,1,5,8,5\n"
	for _, c := range []struct {
		name, plan string
		want       []string
	}{
		{"feasible", ok, nil},
		{"overlap", strings.Replace(ok, "J4,,lathe,2,4,6,2", "J4,,lathe,2,3,5,1", 1), []string{"J2 (line 3) and J4 (line 5) overlap on machine 2 of class lathe during 3..4"}},
		{"release", strings.Replace(ok, "J2,,lathe,2,1,4,0", "J2,,lathe,2,0,3,0", 1), []string{"J2 (line 3) starts at 0, before its release at 1"}},
		{"eligibility", strings.Replace(ok, "J1,,lathe,1,0,4,0", "J1,,mill,1,10,14,8", 1), []string{"J1 (line 2) runs on class mill, which may not process it"}},
		{"machine", strings.Replace(ok, "J3,,mill,1,0,5,0", "J3,,mill,2,0,5,0", 1), []string{"machine 2 of class mill, which has 1"}},
		{"end column", strings.Replace(ok, "J1,,lathe,1,0,4,0", "J1,,lathe,1,0,5,0", 1), []string{"J1 (line 2): end says 5, but start 0 + processing time 4 = 4"}},
		{"tardiness column", strings.Replace(ok, "J5,,mill,1,5,8,5", "J5,,mill,1,5,8,0", 1), []string{"J5 (line 6): tardiness says 0, but end 8 against due 3 gives 5"}},
		{"missing job", strings.Replace(ok, "J5,,mill,1,5,8,5\n", "", 1), []string{"job J5 is not placed"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			pf, err := ReadPlanCSV(strings.NewReader(head+c.plan), "schedule.csv", in)
			if err != nil {
				t.Fatal(err)
			}
			rep := VerifyPlan(in, pf)
			if rep.Feasible != (len(c.want) == 0) || len(rep.Problems) != len(c.want) {
				t.Fatalf("got %+v, want problems %q", rep, c.want)
			}
			for i, w := range c.want {
				if !strings.Contains(rep.Problems[i], w) {
					t.Errorf("problem %q does not say %q", rep.Problems[i], w)
				}
			}
			// Objective by hand for the feasible plan: J4 2 late × 1 + J5 5 late × 5 = 27.
			if c.name == "feasible" && rep.Value != 27 {
				t.Errorf("value %d, want 27", rep.Value)
			}
		})
	}
}

func TestReadPlanCSVErrors(t *testing.T) {
	in := ioSmallInstance(t)
	for _, c := range []struct {
		name, plan     string
		line, col, tok int
		expect         string
	}{
		{"unknown job", "job,class,machine,start\nJ9,lathe,1,0\n", 2, 1, 1, "\"J9\""},
		{"twice", "job,class,machine,start\nJ1,lathe,1,0\nJ1,lathe,1,4\n", 3, 1, 1, "already on line 2"},
		{"unknown class", "start,machine,class,job\n0,1,saw,J1\n", 2, 5, 3, "\"saw\""},
		{"machine 0", "job,class,machine,start\nJ1,lathe,0,0\n", 2, 10, 3, "\"0\""},
		{"bad start", "job,class,machine,start\nJ1,lathe,1,x\n", 2, 12, 4, "\"x\""},
		{"bad end", "job,class,machine,start,end\nJ1,lathe,1,0,-4\n", 2, 14, 5, "\"-4\""},
		{"missing column", "job,class,start\nJ1,lathe,0\n", 1, 1, 0, "machine"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadPlanCSV(strings.NewReader(c.plan), "plan.csv", in)
			var pe *instances.ParseError
			if !errors.As(err, &pe) || pe.File != "plan.csv" || pe.Line != c.line || pe.Column != c.col || pe.Token != c.tok || !strings.Contains(pe.Error(), c.expect) {
				t.Fatalf("got %v, want plan.csv:%d:%d token %d mentioning %q", err, c.line, c.col, c.tok, c.expect)
			}
		})
	}
}

func FuzzReadPlanCSV(f *testing.F) {
	f.Add([]byte("job,name,class,machine,start,end,tardiness\nJ1,,lathe,1,0,4,0\nJ3,,mill,1,0,5,0\n"))
	f.Add([]byte("job,class,machine,start\nJ1,mill,3,7\nJ2,\"lathe"))
	f.Fuzz(func(t *testing.T, data []byte) {
		in := &Instance{Name: "small", Classes: []Class{{ID: "lathe", Machines: 2}, {ID: "mill", Machines: 1}},
			Jobs: []Job{{ID: "J1", Processing: 4, Weight: 3, Due: 6, Eligible: []int{0}}, {ID: "J2", Processing: 3, Weight: 2, Due: 5, Release: 1},
				{ID: "J3", Processing: 5, Weight: 4, Due: 9, Eligible: []int{1}}}}
		pf, err := ReadPlanCSV(bytes.NewReader(data), "plan.csv", in)
		if err != nil {
			var pe *instances.ParseError
			if !errors.As(err, &pe) || pe.Line < 1 || pe.File != "plan.csv" {
				t.Fatalf("error %v (%T) is not a positioned *instances.ParseError", err, err)
			}
			return
		}
		rep := VerifyPlan(in, pf)
		if rep.Feasible {
			if v, err := in.Evaluate(pf.Schedule); err != nil || v != rep.Value {
				t.Fatalf("verify accepts what Evaluate gives as %d, %v", v, err)
			}
		}
	})
}
