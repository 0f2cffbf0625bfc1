package scheduling

import (
	"errors"
	"fmt"
	"io"
	"sort"

	"pincer/instances"
)

// PlanFile is a schedule.csv as read: the schedule and, per job, what the
// file states beside it (−1 where a column is absent), with the line of
// each job's row (0 for a job the file leaves out).
type PlanFile struct {
	Schedule  *Schedule
	End       []int
	Tardiness []int
	Line      []int
}

// ReadPlanCSV reads a schedule.csv (see WriteScheduleCSV) for in. Columns
// are found by name in any order; job, class, machine and start are
// required, name, end and tardiness optional. Jobs and classes are named by
// their ids; machines are numbered from 1 within the class.
//
// Syntax faults are *instances.ParseError with file, line, column and
// field: malformed CSV, unknown job or class ids, a job listed twice, and
// numbers that are not integers (machine at least 1, start at least 0).
// Everything that is well formed but wrong for the instance (a job left
// out, a machine the class does not have, an ineligible class, overlaps,
// starts before release, stated end or tardiness that disagree) is left to
// VerifyPlan, which reports it.
func ReadPlanCSV(r io.Reader, name string, in *Instance) (*PlanFile, error) {
	n := len(in.Jobs)
	pf := &PlanFile{Schedule: &Schedule{Class: make([]int, n), Machine: make([]int, n), Start: make([]int, n)},
		End: make([]int, n), Tardiness: make([]int, n), Line: make([]int, n)}
	for j := range n {
		pf.Schedule.Class[j], pf.End[j], pf.Tardiness[j] = -1, -1, -1
	}
	jobIndex := make(map[string]int, n)
	for j, jb := range in.Jobs {
		jobIndex[jb.ID] = j
	}
	classIndex := make(map[string]int, len(in.Classes))
	for k, c := range in.Classes {
		classIndex[c.ID] = k
	}
	err := instances.ReadCSVTable(r, name, []string{"job", "class", "machine", "start"}, func(row *instances.CSVRow) error {
		id := row.Text("job")
		j, ok := jobIndex[id]
		if !ok {
			return row.Errorf("job", "a job id of instance "+in.Name, "got %q", id)
		}
		if pf.Line[j] != 0 {
			return row.Errorf("job", "each job once", "job %q is already on line %d", id, pf.Line[j])
		}
		pf.Line[j] = row.Line
		cid := row.Text("class")
		k, ok := classIndex[cid]
		if !ok {
			return row.Errorf("class", "a class id of instance "+in.Name, "got %q", cid)
		}
		m, err := csvInteger(row, "machine", "machine number of job "+id, 1, false)
		if err != nil {
			return err
		}
		st, err := csvInteger(row, "start", "start of job "+id, 0, false)
		if err != nil {
			return err
		}
		s := pf.Schedule
		s.Class[j], s.Machine[j], s.Start[j] = k, m-1, st
		for _, c := range []struct {
			col string
			to  *int
		}{{"end", &pf.End[j]}, {"tardiness", &pf.Tardiness[j]}} {
			if !row.Has(c.col) {
				continue
			}
			v, err := csvInteger(row, c.col, c.col+" of job "+id, 0, false)
			if err != nil {
				return err
			}
			*c.to = v
		}
		return nil
	})
	if err != nil {
		return nil, err
	}
	return pf, nil
}

// ReadScheduleCSV reads a schedule.csv (see ReadPlanCSV) and returns its
// schedule; a job the file leaves out has class −1. The stated end and
// tardiness columns are dropped; use ReadPlanCSV and VerifyPlan to check
// them.
func ReadScheduleCSV(r io.Reader, name string, in *Instance) (*Schedule, error) {
	pf, err := ReadPlanCSV(r, name, in)
	if err != nil {
		return nil, err
	}
	return pf.Schedule, nil
}

// Report is the outcome of checking a schedule.
type Report struct {
	// Value is the objective of the schedule as placed (its weighted
	// tardiness or weighted completion time), counted over the jobs that
	// are placed on an existing class; it is the plan's value when
	// Feasible.
	Value    int64
	Feasible bool
	// Problems lists what is wrong, at most reportMaxProblems entries
	// followed by a line counting the rest.
	Problems []string
	Tardy    int // jobs that end after their due date
	Makespan int // latest end
}

const reportMaxProblems = 20

// Verify checks s against in on its own, without the engine: every job
// placed once on an existing machine of an eligible class, not before its
// release, no two jobs overlapping on a machine; it computes the objective
// and, for a schedule that passes, confirms it with Instance.Evaluate.
func Verify(in *Instance, s *Schedule) Report {
	return verifyWith(in, s, nil)
}

// VerifyPlan is Verify for a schedule read with ReadPlanCSV; it also
// checks the stated end (start + processing time) and tardiness (max(0,
// end − due)) columns, naming the line of each disagreement.
func VerifyPlan(in *Instance, pf *PlanFile) Report {
	return verifyWith(in, pf.Schedule, pf)
}

func verifyWith(in *Instance, s *Schedule, pf *PlanFile) Report {
	var rep Report
	more := 0
	problem := func(format string, a ...any) {
		if len(rep.Problems) < reportMaxProblems {
			rep.Problems = append(rep.Problems, fmt.Sprintf(format, a...))
		} else {
			more++
		}
	}
	n := len(in.Jobs)
	if s == nil || len(s.Class) != n || len(s.Machine) != n || len(s.Start) != n {
		problem("the schedule does not have one entry for each of the %d jobs", n)
		return rep
	}
	at := func(j int) string {
		if pf != nil && pf.Line[j] > 0 {
			return fmt.Sprintf(" (line %d)", pf.Line[j])
		}
		return ""
	}
	type placed struct{ start, end, job int }
	lanes := map[[2]int][]placed{}
	for j, jb := range in.Jobs {
		k, m, st := s.Class[j], s.Machine[j], s.Start[j]
		if k < 0 || k >= len(in.Classes) {
			problem("job %s is not placed on any class", jb.ID)
			continue
		}
		end := st + jb.Processing
		rep.Value += in.Cost(j, end)
		rep.Makespan = max(rep.Makespan, end)
		if end > jb.Due {
			rep.Tardy++
		}
		c := in.Classes[k]
		if !in.EligibleOn(j, k) {
			problem("job %s%s runs on class %s, which may not process it", jb.ID, at(j), c.ID)
		}
		if m < 0 || m >= c.Machines {
			problem("job %s%s runs on machine %d of class %s, which has %d", jb.ID, at(j), m+1, c.ID, c.Machines)
		} else {
			lanes[[2]int{k, m}] = append(lanes[[2]int{k, m}], placed{st, end, j})
		}
		if st < jb.Release {
			problem("job %s%s starts at %d, before its release at %d", jb.ID, at(j), st, jb.Release)
		}
		if st < 0 {
			problem("job %s%s starts at %d, before time 0", jb.ID, at(j), st)
		}
		if pf != nil {
			if pf.End[j] >= 0 && pf.End[j] != end {
				problem("job %s%s: end says %d, but start %d + processing time %d = %d", jb.ID, at(j), pf.End[j], st, jb.Processing, end)
			}
			if tard := max(0, end-jb.Due); pf.Tardiness[j] >= 0 && pf.Tardiness[j] != tard {
				problem("job %s%s: tardiness says %d, but end %d against due %d gives %d", jb.ID, at(j), pf.Tardiness[j], end, jb.Due, tard)
			}
		}
	}
	keys := make([][2]int, 0, len(lanes))
	for key := range lanes {
		keys = append(keys, key)
	}
	sort.Slice(keys, func(a, b int) bool {
		return keys[a][0] < keys[b][0] || (keys[a][0] == keys[b][0] && keys[a][1] < keys[b][1])
	})
	for _, key := range keys {
		lane := lanes[key]
		sort.SliceStable(lane, func(a, b int) bool { return lane[a].start < lane[b].start })
		// Compare each job with the latest-ending job before it, so that
		// a long job overlapping several short ones is reported for each.
		last := 0
		for a := 1; a < len(lane); a++ {
			if lane[a].start < lane[last].end {
				p, q := lane[last].job, lane[a].job
				problem("jobs %s%s and %s%s overlap on machine %d of class %s during %d..%d", in.Jobs[p].ID, at(p),
					in.Jobs[q].ID, at(q), key[1]+1, in.Classes[key[0]].ID, lane[a].start, min(lane[a].end, lane[last].end))
			}
			if lane[a].end > lane[last].end {
				last = a
			}
		}
	}
	if more > 0 {
		rep.Problems = append(rep.Problems, fmt.Sprintf("… and %d more problems", more))
	}
	rep.Feasible = len(rep.Problems) == 0
	if rep.Feasible {
		// A second, separately written check of the same rules.
		v, err := in.Evaluate(s)
		switch {
		case err != nil:
			rep.Feasible = false
			rep.Problems = append(rep.Problems, "the instance's own evaluation rejects the schedule: "+err.Error())
		case v != rep.Value:
			rep.Feasible = false
			rep.Problems = append(rep.Problems, fmt.Sprintf("the instance's own evaluation gives %d, this check %d", v, rep.Value))
		}
	}
	return rep
}

// VerifyFile reads a schedule.csv with ReadPlanCSV and checks it with
// VerifyPlan, as the command line's verify does: a syntax fault is an
// error (an *instances.ParseError), anything else goes into the verdict.
func VerifyFile(in *Instance, r io.Reader, file string) (instances.Verdict, error) {
	pf, err := ReadPlanCSV(r, file, in)
	if err != nil {
		var pe *instances.ParseError
		if errors.As(err, &pe) {
			return instances.Verdict{}, err
		}
		return instances.Verdict{}, fmt.Errorf("scheduling: reading plan %s: %w", file, err)
	}
	rep := VerifyPlan(in, pf)
	return instances.Verdict{Value: float64(rep.Value), Feasible: rep.Feasible, Problems: rep.Problems}, nil
}
