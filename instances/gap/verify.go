package gap

import "fmt"

// Verification is the outcome of checking a plan against an instance.
type Verification struct {
	// Value is the sum of c_ij over the jobs the plan assigns to an
	// existing agent: the objective in either sense.
	Value int64
	// Maximise records the sense the plan was checked for.
	Maximise bool
	// Feasible is true when Problems is empty.
	Feasible bool
	// Problems lists every fault found, jobs first, then agents.
	Problems []string
	// Load[i] is the capacity agent i uses under the plan.
	Load []int64
}

// Verify checks plan assign (assign[j] = 0-based agent of job j, -1 for
// none) against in: every job must go to exactly one existing agent and no
// agent may use more than its capacity. It shares no code with any solver
// and accepts any input, reporting faults instead of failing.
func Verify(in *Instance, assign []int, maximise bool) Verification {
	v := Verification{Maximise: maximise}
	if err := in.Validate(); err != nil {
		v.Problems = append(v.Problems, "instance invalid: "+err.Error())
		return v
	}
	v.Load = make([]int64, in.Agents)
	if len(assign) != in.Jobs {
		v.Problems = append(v.Problems, fmt.Sprintf("plan has %d entries for %d jobs", len(assign), in.Jobs))
	}
	for j := 0; j < in.Jobs; j++ {
		if j >= len(assign) || assign[j] == -1 {
			v.Problems = append(v.Problems, fmt.Sprintf("job %d not assigned", j+1))
			continue
		}
		i := assign[j]
		if i < 0 || i >= in.Agents {
			v.Problems = append(v.Problems, fmt.Sprintf("job %d assigned to agent %d, which does not exist (agents 1..%d)", j+1, i+1, in.Agents))
			continue
		}
		v.Value += in.Cost[i][j]
		v.Load[i] += in.Use[i][j]
	}
	for i, load := range v.Load {
		if b := in.Capacity[i]; load > b {
			v.Problems = append(v.Problems, fmt.Sprintf("agent %d over capacity by %d (load %d, capacity %d)", i+1, load-b, load, b))
		}
	}
	v.Feasible = len(v.Problems) == 0
	return v
}
