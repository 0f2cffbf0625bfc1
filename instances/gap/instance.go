package gap

import (
	"errors"
	"fmt"
)

// Limits on what an Instance may hold. They keep every sum of values over
// all cells inside int64 and stop a hostile file from asking for gigabytes.
const (
	// maxCells bounds Agents*Jobs.
	maxCells = 50_000_000
	// maxValue bounds the magnitude of every cost, use and capacity.
	maxValue = 1_000_000_000
)

// Instance is one GAP instance.
//
// Cost and Use are agent-major: Cost[i][j] is the value of giving job j to
// agent i (a cost when minimising, a profit when maximising) and Use[i][j] is
// the part of agent i's capacity that job j takes. Capacity[i] is agent i's
// capacity. Indices are 0-based.
type Instance struct {
	Name     string
	Agents   int
	Jobs     int
	Cost     [][]int64 // [agent][job]
	Use      [][]int64 // [agent][job]
	Capacity []int64   // [agent]
}

// Validate reports the first structural fault of in: non-positive sizes,
// more than 5e7 agent-job pairs, matrices or capacity vector of the wrong
// shape, a negative use or capacity, or any number whose magnitude exceeds
// 1e9. Costs may be negative.
func (in *Instance) Validate() error {
	if in == nil {
		return errors.New("gap: nil instance")
	}
	if in.Agents <= 0 || in.Jobs <= 0 {
		return fmt.Errorf("gap: instance %q: need at least one agent and one job, have %d agents and %d jobs", in.Name, in.Agents, in.Jobs)
	}
	if in.Agents > maxCells/in.Jobs {
		return fmt.Errorf("gap: instance %q: %d agents x %d jobs exceeds the limit of %d pairs", in.Name, in.Agents, in.Jobs, maxCells)
	}
	check := func(what string, mat [][]int64, nonNeg bool) error {
		if len(mat) != in.Agents {
			return fmt.Errorf("gap: instance %q: %s has %d rows, want %d (one per agent)", in.Name, what, len(mat), in.Agents)
		}
		for i, row := range mat {
			if len(row) != in.Jobs {
				return fmt.Errorf("gap: instance %q: %s row of agent %d has %d entries, want %d (one per job)", in.Name, what, i+1, len(row), in.Jobs)
			}
			for j, v := range row {
				if nonNeg && v < 0 {
					return fmt.Errorf("gap: instance %q: %s of agent %d for job %d is negative (%d)", in.Name, what, i+1, j+1, v)
				}
				if v > maxValue || v < -maxValue {
					return fmt.Errorf("gap: instance %q: %s of agent %d for job %d is %d, beyond the limit of %d in magnitude", in.Name, what, i+1, j+1, v, maxValue)
				}
			}
		}
		return nil
	}
	if err := check("cost", in.Cost, false); err != nil {
		return err
	}
	if err := check("use", in.Use, true); err != nil {
		return err
	}
	if len(in.Capacity) != in.Agents {
		return fmt.Errorf("gap: instance %q: %d capacities, want %d (one per agent)", in.Name, len(in.Capacity), in.Agents)
	}
	for i, b := range in.Capacity {
		if b < 0 || b > maxValue {
			return fmt.Errorf("gap: instance %q: capacity of agent %d is %d, want 0..%d", in.Name, i+1, b, maxValue)
		}
	}
	return nil
}
