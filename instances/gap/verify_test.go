package gap

import (
	"reflect"
	"testing"
)

// handInstance is a 2-agent, 3-job instance whose plan values are worked out by
// hand in the tests below.
func handInstance() *Instance {
	return &Instance{Name: "tiny", Agents: 2, Jobs: 3,
		Cost:     [][]int64{{4, 7, 3}, {6, 2, 5}},
		Use:      [][]int64{{5, 4, 6}, {3, 8, 2}},
		Capacity: []int64{10, 9}}
}

func TestVerifyByHand(t *testing.T) {
	in := handInstance()
	for _, tc := range []struct {
		name     string
		assign   []int
		value    int64
		load     []int64
		problems []string
	}{
		// jobs 1,2 -> agent 1 (use 5+4=9 <= 10), job 3 -> agent 2 (use 2 <= 9):
		// value 4+7+5 = 16.
		{"feasible", []int{0, 0, 1}, 16, []int64{9, 2}, nil},
		// all on agent 1: use 5+4+6 = 15 > 10 by 5; value 4+7+3 = 14.
		{"over", []int{0, 0, 0}, 14, []int64{15, 0}, []string{"agent 1 over capacity by 5 (load 15, capacity 10)"}},
		// job 2 missing, job 3 on a non-existent agent: value 6 only.
		{"holes", []int{1, -1, 2}, 6, []int64{0, 3}, []string{"job 2 not assigned", "job 3 assigned to agent 3, which does not exist (agents 1..2)"}},
		{"short", []int{1, 1}, 8, []int64{0, 11}, []string{"plan has 2 entries for 3 jobs", "job 3 not assigned", "agent 2 over capacity by 2 (load 11, capacity 9)"}},
	} {
		v := Verify(in, tc.assign, false)
		if v.Value != tc.value || !reflect.DeepEqual(v.Load, tc.load) || !reflect.DeepEqual(v.Problems, tc.problems) || v.Feasible != (tc.problems == nil) {
			t.Errorf("%s: got %+v, want value %d load %v problems %q", tc.name, v, tc.value, tc.load, tc.problems)
		}
	}
	if v := Verify(&Instance{}, nil, true); v.Feasible || len(v.Problems) != 1 || !v.Maximise {
		t.Errorf("invalid instance: %+v", v)
	}
}

// Over every plan of small generated instances, Verify's feasibility and
// value agree with a direct recount, and the best feasible value it sees
// equals the enumeration optimum.
func TestVerifyAgreesWithEnumeration(t *testing.T) {
	for k, kind := range []byte("abcde") {
		in, err := Generate(kind, 3, 6, uint64(40+k))
		if err != nil {
			t.Fatal(err)
		}
		want, ok := enumerateOptimum(in, false)
		var best int64
		found := false
		assign := make([]int, in.Jobs)
		var walk func(j int)
		walk = func(j int) {
			if j == in.Jobs {
				v := Verify(in, assign, false)
				if v.Feasible && (!found || v.Value < best) {
					best, found = v.Value, true
				}
				return
			}
			for i := 0; i < in.Agents; i++ {
				assign[j] = i
				walk(j + 1)
			}
		}
		walk(0)
		if found != ok || best != want {
			t.Errorf("type %c: Verify-based minimum %d (found %v), enumeration %d (found %v)", kind, best, found, want, ok)
		}
	}
}
