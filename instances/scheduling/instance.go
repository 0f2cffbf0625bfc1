// Package scheduling is the shared-machine scheduling family: jobs with
// integer processing times, weights, due dates and optional release dates
// compete for machine classes of identical machines, without preemption.
package scheduling

import (
	"errors"
	"fmt"
	"sort"
)

// Objective is what a schedule minimises.
type Objective int8

// Objectives.
const (
	// WeightedTardiness is Σ_j w_j max(0, C_j − d_j).
	WeightedTardiness Objective = iota
	// WeightedCompletion is Σ_j w_j C_j.
	WeightedCompletion
)

// String returns "weighted-tardiness" or "weighted-completion".
func (o Objective) String() string {
	if o == WeightedCompletion {
		return "weighted-completion"
	}
	return "weighted-tardiness"
}

// Class is a machine class: Machines identical machines.
type Class struct {
	ID       string
	Name     string // for people; may be empty
	Machines int
}

// Job is one job. Times are integer slots; a job started at s occupies
// slots s..s+Processing−1 of one machine and completes at s+Processing.
type Job struct {
	ID         string
	Name       string // for people; may be empty
	Processing int
	Weight     int
	Due        int
	Release    int
	// Eligible lists the indices (into Instance.Classes) of the classes
	// that may process the job, in increasing order; nil means every class.
	Eligible []int
}

// Instance is a scheduling problem.
type Instance struct {
	Name      string
	Objective Objective
	Classes   []Class
	Jobs      []Job
}

// Schedule places every job: Class[j] (index into Instance.Classes),
// Machine[j] (0..Machines−1 within that class) and Start[j].
type Schedule struct {
	Class   []int
	Machine []int
	Start   []int
}

// Validate checks the instance's shape and numbers.
func (in *Instance) Validate() error {
	if in == nil {
		return errors.New("scheduling: nil instance")
	}
	if len(in.Classes) == 0 {
		return fmt.Errorf("scheduling: instance %q has no machine class", in.Name)
	}
	if len(in.Jobs) == 0 {
		return fmt.Errorf("scheduling: instance %q has no job", in.Name)
	}
	if in.Objective != WeightedTardiness && in.Objective != WeightedCompletion {
		return fmt.Errorf("scheduling: instance %q: unknown objective %d", in.Name, in.Objective)
	}
	for k, c := range in.Classes {
		if c.Machines < 1 {
			return fmt.Errorf("scheduling: class %d (%s): %d machines, want at least 1", k, c.ID, c.Machines)
		}
	}
	for j, jb := range in.Jobs {
		switch {
		case jb.Processing < 1:
			return fmt.Errorf("scheduling: job %d (%s): processing time %d, want at least 1", j, jb.ID, jb.Processing)
		case jb.Weight < 0:
			return fmt.Errorf("scheduling: job %d (%s): weight %d, want at least 0", j, jb.ID, jb.Weight)
		case jb.Due < 0:
			return fmt.Errorf("scheduling: job %d (%s): due date %d, want at least 0", j, jb.ID, jb.Due)
		case jb.Release < 0:
			return fmt.Errorf("scheduling: job %d (%s): release date %d, want at least 0", j, jb.ID, jb.Release)
		}
		if jb.Eligible != nil && len(jb.Eligible) == 0 {
			return fmt.Errorf("scheduling: job %d (%s): no eligible class", j, jb.ID)
		}
		for e, k := range jb.Eligible {
			if k < 0 || k >= len(in.Classes) {
				return fmt.Errorf("scheduling: job %d (%s): eligible class %d out of range 0..%d", j, jb.ID, k, len(in.Classes)-1)
			}
			if e > 0 && k <= jb.Eligible[e-1] {
				return fmt.Errorf("scheduling: job %d (%s): eligible classes not strictly increasing", j, jb.ID)
			}
		}
	}
	return nil
}

// EligibleOn reports whether job j may run on class k.
func (in *Instance) EligibleOn(j, k int) bool {
	el := in.Jobs[j].Eligible
	if el == nil {
		return k >= 0 && k < len(in.Classes)
	}
	for _, e := range el {
		if e == k {
			return true
		}
	}
	return false
}

// Cost is job j's objective term when it completes at time c.
func (in *Instance) Cost(j, c int) int64 {
	jb := in.Jobs[j]
	if in.Objective == WeightedCompletion {
		return int64(jb.Weight) * int64(c)
	}
	if c <= jb.Due {
		return 0
	}
	return int64(jb.Weight) * int64(c-jb.Due)
}

// Evaluate checks that s is a feasible schedule of in (every job on an
// eligible class and an existing machine, not before its release, no two
// jobs overlapping on one machine) and returns its objective value.
func (in *Instance) Evaluate(s *Schedule) (int64, error) {
	n := len(in.Jobs)
	if s == nil || len(s.Class) != n || len(s.Machine) != n || len(s.Start) != n {
		return 0, fmt.Errorf("scheduling: schedule does not place all %d jobs", n)
	}
	type slot struct{ start, end, job int }
	onMachine := make(map[[2]int][]slot)
	var total int64
	for j, jb := range in.Jobs {
		k, m, st := s.Class[j], s.Machine[j], s.Start[j]
		if !in.EligibleOn(j, k) {
			return 0, fmt.Errorf("scheduling: job %s on class %d, which is not eligible", jb.ID, k)
		}
		if m < 0 || m >= in.Classes[k].Machines {
			return 0, fmt.Errorf("scheduling: job %s on machine %d of class %s, which has %d", jb.ID, m, in.Classes[k].ID, in.Classes[k].Machines)
		}
		if st < jb.Release {
			return 0, fmt.Errorf("scheduling: job %s starts at %d, before its release %d", jb.ID, st, jb.Release)
		}
		key := [2]int{k, m}
		onMachine[key] = append(onMachine[key], slot{st, st + jb.Processing, j})
		total += in.Cost(j, st+jb.Processing)
	}
	for key, sl := range onMachine {
		sort.Slice(sl, func(a, b int) bool { return sl[a].start < sl[b].start })
		for a := 1; a < len(sl); a++ {
			if sl[a].start < sl[a-1].end {
				return 0, fmt.Errorf("scheduling: jobs %s and %s overlap on machine %d of class %s", in.Jobs[sl[a-1].job].ID, in.Jobs[sl[a].job].ID, key[1], in.Classes[key[0]].ID)
			}
		}
	}
	return total, nil
}
