package lotsizing

import (
	"fmt"
	"strconv"
	"strings"

	"pincer/instances"
)

// periodIndex finds a period by the name Resources gives it ("period N")
// or by its 1-based number.
func (m *Model) periodIndex(resource string) (int, error) {
	n, err := strconv.Atoi(strings.TrimPrefix(resource, "period "))
	if err != nil || n < 1 || n > m.In.Periods() {
		return 0, fmt.Errorf("lotsizing: instance %s has no period %q (periods are \"period 1\" to \"period %d\")", m.In.Name, resource, m.In.Periods())
	}
	return n - 1, nil
}

// Capacity implements instances.Adjuster: the period's capacity.
func (m *Model) Capacity(resource string) (float64, error) {
	t, err := m.periodIndex(resource)
	if err != nil {
		return 0, err
	}
	return m.In.Capacity[t], nil
}

// WithCapacity implements instances.Adjuster.
func (m *Model) WithCapacity(resource string, capacity float64) (instances.Model, error) {
	t, err := m.periodIndex(resource)
	if err != nil {
		return nil, err
	}
	in := *m.In
	in.Capacity = append([]float64(nil), m.In.Capacity...)
	in.Capacity[t] = capacity
	if err := in.Validate(); err != nil {
		return nil, err
	}
	c := *m
	c.In = &in
	return &c, nil
}
