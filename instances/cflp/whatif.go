package cflp

import (
	"fmt"

	"pincer/instances"
)

// siteIndex finds a site by its id, its name, or the "name (id)" the
// summary shows.
func (m *Model) siteIndex(part string) (int, error) {
	for i, s := range m.In.Sites {
		if part == s.ID || (s.Name != "" && (part == s.Name || part == s.Name+" ("+s.ID+")")) {
			return i, nil
		}
	}
	return 0, fmt.Errorf("cflp: instance %s has no site %q (give a site's id or name)", m.In.Name, part)
}

// clone copies the model with its own site list.
func (m *Model) clone() *Model {
	in := *m.In
	in.Sites = append([]Site(nil), m.In.Sites...)
	c := *m
	c.In = &in
	return &c
}

// Capacity implements instances.Adjuster: the site's capacity, in demand
// units.
func (m *Model) Capacity(resource string) (float64, error) {
	i, err := m.siteIndex(resource)
	if err != nil {
		return 0, err
	}
	return m.In.Sites[i].Capacity, nil
}

// WithCapacity implements instances.Adjuster.
func (m *Model) WithCapacity(resource string, capacity float64) (instances.Model, error) {
	i, err := m.siteIndex(resource)
	if err != nil {
		return nil, err
	}
	c := m.clone()
	c.In.Sites[i].Capacity = capacity
	if err := c.In.Validate(); err != nil {
		return nil, err
	}
	return c, nil
}

// WithSwitch implements instances.Switcher: the site forced open (its
// fixed cost always paid) or closed (serving nobody).
func (m *Model) WithSwitch(part string, open bool) (instances.Model, error) {
	i, err := m.siteIndex(part)
	if err != nil {
		return nil, err
	}
	c := m.clone()
	c.In.Sites[i].Status = ForcedClosed
	if open {
		c.In.Sites[i].Status = ForcedOpen
	}
	if err := c.In.Validate(); err != nil {
		return nil, err
	}
	return c, nil
}
