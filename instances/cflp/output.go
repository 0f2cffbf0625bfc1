package cflp

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"

	"pincer/instances"
)

// outNumber writes a value computed from the data.
func outNumber(v float64) string { return instances.FormatNumber(v) }

// WritePlanCSV writes a plan as CSV with the header
// site,customer,quantity,cost: one row for every lane with a positive
// quantity, where flow[i][j] is the quantity shipped from site i to customer
// j in demand units and cost = Cost[i][j] · quantity / demand. Sites and
// customers are written by id; when the instance names any site or
// customer, the columns site_name and customer_name follow. quantity and cost are written without binary
// noise (see [instances.FormatNumber]).
func WritePlanCSV(w io.Writer, in *Instance, flow [][]float64) error {
	if err := checkShape(in, flow); err != nil {
		return fmt.Errorf("cflp: writing plan: %w", err)
	}
	named := false
	for _, s := range in.Sites {
		named = named || s.Name != ""
	}
	for _, c := range in.Customers {
		named = named || c.Name != ""
	}
	header := []string{"site", "customer", "quantity", "cost"}
	if named {
		header = append(header, "site_name", "customer_name")
	}
	cw := csv.NewWriter(w)
	if err := cw.Write(header); err != nil {
		return fmt.Errorf("cflp: writing plan: %w", err)
	}
	for i, s := range in.Sites {
		for j, c := range in.Customers {
			q := flow[i][j]
			if q == 0 {
				continue
			}
			if !(q > 0) || math.IsInf(q, 1) {
				return fmt.Errorf("cflp: writing plan: quantity %v from site %q to customer %q", q, s.ID, c.ID)
			}
			if !in.Allowed(i, j) {
				return fmt.Errorf("cflp: writing plan: site %q may not serve customer %q", s.ID, c.ID)
			}
			cost := in.Cost[i][j] * q / c.Demand
			rec := []string{s.ID, c.ID, outNumber(q), outNumber(cost)}
			if named {
				rec = append(rec, s.Name, c.Name)
			}
			if err := cw.Write(rec); err != nil {
				return fmt.Errorf("cflp: writing plan: %w", err)
			}
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("cflp: writing plan: %w", err)
	}
	return nil
}

// WriteSitesCSV writes one row per site with the header
// id,name,open,capacity,load,utilisation,fixed_cost,capacity_price.
// open is "yes" or "no"; load is the quantity the site serves and
// utilisation is load / capacity (empty for a site without capacity).
// capacity_price is what one more unit of capacity at an open site would
// save in serving cost, per unit of demand, with the same sites open (the
// shadow price of its capacity among the open sites); it is left empty for
// closed sites, and for all sites when capacityPrice is nil. Computed values
// (load, utilisation, capacity_price) are written without binary noise.
func WriteSitesCSV(w io.Writer, in *Instance, open []bool, load []float64, capacityPrice []float64) error {
	m := len(in.Sites)
	if len(open) != m || len(load) != m || (capacityPrice != nil && len(capacityPrice) != m) {
		return fmt.Errorf("cflp: writing sites: %d sites but %d open flags, %d loads and %d capacity prices",
			m, len(open), len(load), len(capacityPrice))
	}
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"id", "name", "open", "capacity", "load", "utilisation", "fixed_cost", "capacity_price"}); err != nil {
		return fmt.Errorf("cflp: writing sites: %w", err)
	}
	for i, s := range in.Sites {
		o := "no"
		if open[i] {
			o = "yes"
		}
		util := ""
		if s.Capacity > 0 {
			util = outNumber(load[i] / s.Capacity)
		}
		price := ""
		if capacityPrice != nil && open[i] {
			price = outNumber(capacityPrice[i])
		}
		rec := []string{s.ID, s.Name, o, formatNumber(s.Capacity), outNumber(load[i]), util, formatNumber(s.FixedCost), price}
		if err := cw.Write(rec); err != nil {
			return fmt.Errorf("cflp: writing sites: %w", err)
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("cflp: writing sites: %w", err)
	}
	return nil
}

// ReadPlanCSV reads a plan written by WritePlanCSV (or by hand): a header
// with the columns site, customer and quantity (others, such as cost, are
// ignored), then one row per lane. It returns the quantities as
// flow[site][customer]. Unknown ids, repeated lanes and missing or negative
// quantities are reported as *ParseError; whether the plan is feasible is
// left to Verify.
func ReadPlanCSV(r io.Reader, file string, in *Instance) (flow [][]float64, err error) {
	siteIndex := make(map[string]int, len(in.Sites))
	for i, s := range in.Sites {
		siteIndex[s.ID] = i
	}
	custIndex := make(map[string]int, len(in.Customers))
	for j, c := range in.Customers {
		custIndex[c.ID] = j
	}
	flow = make([][]float64, len(in.Sites))
	for i := range flow {
		flow[i] = make([]float64, len(in.Customers))
	}
	seen := map[[2]int]int{}
	err = instances.ReadCSVTable(r, file, []string{"site", "customer", "quantity"}, func(row *instances.CSVRow) error {
		sid, cid := row.Text("site"), row.Text("customer")
		i, ok := siteIndex[sid]
		if !ok {
			return row.Errorf("site", "a site id of instance "+in.Name, "got %q", sid)
		}
		j, ok := custIndex[cid]
		if !ok {
			return row.Errorf("customer", "a customer id of instance "+in.Name, "got %q", cid)
		}
		if l, dup := seen[[2]int{i, j}]; dup {
			return row.Errorf("site", "one row per lane", "lane %s → %s already given on line %d", sid, cid, l)
		}
		seen[[2]int{i, j}] = row.Line
		q, err := csvNumber(row, "quantity", "quantity shipped on lane "+sid+" → "+cid, false)
		if err != nil {
			return err
		}
		flow[i][j] = q
		return nil
	})
	if err != nil {
		return nil, err
	}
	return flow, nil
}

// checkShape reports whether flow is an m × n matrix for the instance.
func checkShape(in *Instance, flow [][]float64) error {
	if len(flow) != len(in.Sites) {
		return fmt.Errorf("flow has %d rows for %d sites", len(flow), len(in.Sites))
	}
	for i, row := range flow {
		if len(row) != len(in.Customers) {
			return fmt.Errorf("flow row %d has %d entries for %d customers", i+1, len(row), len(in.Customers))
		}
	}
	return nil
}
