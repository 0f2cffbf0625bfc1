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

// Horizons returns, per class k, a horizon H_k such that some optimal
// schedule completes every job on class k by H_k, so that the slots
// 0..H_k−1 of the time-indexed model exclude no optimal schedule.
//
// With r the latest release date, L_k the summed processing time of the
// jobs eligible on k and p_k the longest of them: H_k = r + L_k when
// m_k = 1, else H_k = r + ⌈L_k/m_k⌉ + p_k.
//
// Why (both objectives are regular: no cost falls when a completion time
// grows): take an optimal schedule with the least Σ_j C_j, and with every
// job started as early as its release and its machine's previous job allow
// (shifting left never raises a completion time). Then a machine idles only
// before some release, so a machine with load ℓ finishes by r + ℓ. A job j
// on machine a of class k with m_k = 1 completes by r + L_k. With m_k ≥ 2,
// let b be the least loaded other machine of class k: ℓ_b ≤ (L_k − ℓ_a)/
// (m_k − 1). Moving j to the end of b would complete it by r + ℓ_b + p_j
// and delay no other job, so minimality of Σ C_j gives C_j ≤ r + ℓ_b + p_j.
// If ℓ_a ≥ L_k/m_k then ℓ_b ≤ L_k/m_k; otherwise C_j ≤ r + ℓ_a < r + L_k/m_k.
// Either way C_j ≤ r + ⌈L_k/m_k⌉ + p_k.
func (in *Instance) Horizons() []int {
	r := 0
	for _, jb := range in.Jobs {
		r = max(r, jb.Release)
	}
	h := make([]int, len(in.Classes))
	for k, c := range in.Classes {
		load, longest := 0, 0
		for j, jb := range in.Jobs {
			if in.EligibleOn(j, k) {
				load += jb.Processing
				longest = max(longest, jb.Processing)
			}
		}
		if c.Machines == 1 {
			h[k] = r + load
		} else {
			h[k] = r + (load+c.Machines-1)/c.Machines + longest
		}
	}
	return h
}

// SlotRows lays out the time-indexed capacity rows class by class: the
// row of class k and slot t (0 <= t < horizons[k]) is offsets[k] + t, and
// total is the number of rows.
func SlotRows(horizons []int) (offsets []int, total int) {
	offsets = make([]int, len(horizons))
	for k, h := range horizons {
		offsets[k] = total
		total += h
	}
	return offsets, total
}
