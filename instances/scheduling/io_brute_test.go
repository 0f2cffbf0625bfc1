package scheduling

import (
	"math"
	"sort"
	"testing"
)

// ioBruteForce returns an optimal schedule of a tiny instance by exhaustive
// search: every assignment of the jobs to eligible machines and, on each
// machine, every order of its jobs, each job started as early as its
// release and the machine allow (for a fixed order this is optimal, since
// both objectives are regular). Orders are enumerated once per job subset.
func ioBruteForce(t *testing.T, in *Instance) (int64, *Schedule) {
	t.Helper()
	n := len(in.Jobs)
	if n > 10 {
		t.Fatalf("brute force wants at most 10 jobs, got %d", n)
	}
	type lane struct{ k, m int }
	var lanes []lane
	for k, c := range in.Classes {
		for m := 0; m < c.Machines; m++ {
			lanes = append(lanes, lane{k, m})
		}
	}
	// best[S]: least cost of the jobs of subset S on one machine, and the
	// order achieving it. Processing times do not depend on the class.
	best := make([]int64, 1<<n)
	order := make([][]int, 1<<n)
	perm := make([]int, 0, n)
	var rec func(S, rest int, time int, cost int64)
	rec = func(S, rest int, time int, cost int64) {
		if cost >= best[S] {
			return
		}
		if rest == 0 {
			best[S] = cost
			order[S] = append([]int(nil), perm...)
			return
		}
		for j := 0; j < n; j++ {
			if rest&(1<<j) == 0 {
				continue
			}
			st := max(time, in.Jobs[j].Release)
			c := st + in.Jobs[j].Processing
			perm = append(perm, j)
			rec(S, rest&^(1<<j), c, cost+in.Cost(j, c))
			perm = perm[:len(perm)-1]
		}
	}
	for S := range best {
		best[S] = math.MaxInt64
		rec(S, S, 0, 0)
	}
	// Enumerate assignments job -> lane.
	assign := make([]int, n)
	bestTotal := int64(math.MaxInt64)
	var bestAssign []int
	var walk func(j int)
	walk = func(j int) {
		if j == n {
			subsets := make([]int, len(lanes))
			for i, l := range assign {
				subsets[l] |= 1 << i
			}
			var total int64
			for _, S := range subsets {
				total += best[S]
			}
			if total < bestTotal {
				bestTotal, bestAssign = total, append([]int(nil), assign...)
			}
			return
		}
		for l, ln := range lanes {
			if in.EligibleOn(j, ln.k) {
				assign[j] = l
				walk(j + 1)
			}
		}
	}
	walk(0)
	s := &Schedule{Class: make([]int, n), Machine: make([]int, n), Start: make([]int, n)}
	subsets := make([]int, len(lanes))
	for i, l := range bestAssign {
		subsets[l] |= 1 << i
	}
	for l, S := range subsets {
		time := 0
		for _, j := range order[S] {
			st := max(time, in.Jobs[j].Release)
			s.Class[j], s.Machine[j], s.Start[j] = lanes[l].k, lanes[l].m, st
			time = st + in.Jobs[j].Processing
		}
	}
	return bestTotal, s
}

// The brute force itself, against a hand-worked case: two jobs on one
// machine, p = (2, 3), w = (1, 4), due (2, 3). Order 1,2 ends at 2 and 5:
// cost 0 + 4·2 = 8; order 2,1 ends at 3 and 5: cost 0 + 1·3 = 3.
func TestIOBruteForceHandCase(t *testing.T) {
	in := &Instance{Name: "hand", Classes: []Class{{ID: "M", Machines: 1}},
		Jobs: []Job{{ID: "a", Processing: 2, Weight: 1, Due: 2}, {ID: "b", Processing: 3, Weight: 4, Due: 3}}}
	v, s := ioBruteForce(t, in)
	if v != 3 || s.Start[1] != 0 || s.Start[0] != 3 {
		t.Fatalf("got %d with %+v, want 3 with b first", v, s)
	}
}

// ioListSchedule is a plain feasible schedule for tests of the output:
// jobs by release then due date, each on the eligible machine where it can
// start first.
func ioListSchedule(in *Instance) *Schedule {
	n := len(in.Jobs)
	s := &Schedule{Class: make([]int, n), Machine: make([]int, n), Start: make([]int, n)}
	order := make([]int, n)
	for j := range order {
		order[j] = j
	}
	sort.SliceStable(order, func(a, b int) bool {
		ja, jb := in.Jobs[order[a]], in.Jobs[order[b]]
		if ja.Release != jb.Release {
			return ja.Release < jb.Release
		}
		return ja.Due < jb.Due
	})
	free := make([][]int, len(in.Classes))
	for k, c := range in.Classes {
		free[k] = make([]int, c.Machines)
	}
	for _, j := range order {
		bk, bm, bs := -1, -1, 0
		for k := range in.Classes {
			if !in.EligibleOn(j, k) {
				continue
			}
			for m, f := range free[k] {
				if st := max(f, in.Jobs[j].Release); bk < 0 || st < bs {
					bk, bm, bs = k, m, st
				}
			}
		}
		s.Class[j], s.Machine[j], s.Start[j] = bk, bm, bs
		free[bk][bm] = bs + in.Jobs[j].Processing
	}
	return s
}
