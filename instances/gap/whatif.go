package gap

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"pincer/instances"
)

// agentIndex finds an agent by the name Resources gives it ("agent N" or
// its name from the input) or by its 1-based number.
func (m *Model) agentIndex(resource string) (int, error) {
	for i := 0; i < m.In.Agents; i++ {
		if resource == m.AgentName(i) {
			return i, nil
		}
	}
	if n, err := strconv.Atoi(strings.TrimPrefix(resource, "agent ")); err == nil && n >= 1 && n <= m.In.Agents {
		return n - 1, nil
	}
	return 0, fmt.Errorf("gap: instance %s has no agent %q (agents are named \"agent 1\" to \"agent %d\" or by the input's names)", m.In.Name, resource, m.In.Agents)
}

// Capacity implements instances.Adjuster: the agent's capacity.
func (m *Model) Capacity(resource string) (float64, error) {
	i, err := m.agentIndex(resource)
	if err != nil {
		return 0, err
	}
	return float64(m.In.Capacity[i]), nil
}

// WithCapacity implements instances.Adjuster. Capacities are whole
// numbers, like the data.
func (m *Model) WithCapacity(resource string, capacity float64) (instances.Model, error) {
	i, err := m.agentIndex(resource)
	if err != nil {
		return nil, err
	}
	if capacity < 0 || capacity != math.Trunc(capacity) || capacity > math.MaxInt32 {
		return nil, fmt.Errorf("gap: capacity %v of %s: want a whole number at least 0", capacity, m.AgentName(i))
	}
	in := *m.In
	in.Capacity = append([]int64(nil), m.In.Capacity...)
	in.Capacity[i] = int64(capacity)
	if err := in.Validate(); err != nil {
		return nil, err
	}
	c := *m
	c.In = &in
	return &c, nil
}
