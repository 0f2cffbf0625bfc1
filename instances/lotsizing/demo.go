package lotsizing

// Demo is a scenario of our own invention: the Larkspur Lane bakery-goods
// plant (fictional) runs one packing line, 80 hours a week minus
// maintenance, for a quarter of 13 weeks. Twelve products share the line;
// switching the line to a product takes cleaning time (hours) and costs
// cleaning crew and wasted dough (money); stock costs cold-store space per
// case and week. Capacity is in line hours, unit time in hours per case.
// Week 7 has a planned maintenance stop (half capacity), and overtime
// shifts cost 90 per line hour when the OvertimeCost option is used.
//
// In the plan's load table, a week's shadow price is what one more line
// hour in that week would save: high prices mark the weeks where the line
// is the bottleneck (typically the maintenance week and the weeks before a
// demand peak), zero means the line had spare hours.
func Demo() *Instance {
	names := []string{"rye loaf", "seeded loaf", "brioche", "oat bars", "ginger snaps", "shortbread",
		"fruit cake", "cinnamon rolls", "flatbread", "crackers", "pretzels", "muffins"}
	in := &Instance{Name: "larkspur-lane-quarter", Capacity: make([]float64, 13)}
	for t := range in.Capacity {
		in.Capacity[t] = 76
		if t == 6 {
			in.Capacity[t] = 38
		}
	}
	for i, nm := range names {
		in.Items = append(in.Items, Item{
			Name:         nm,
			UnitTime:     0.05 + 0.01*float64(i%4), // hours per case
			SetupTime:    1.5 + 0.5*float64(i%3),   // cleaning hours
			SetupCost:    120 + 30*float64(i%5),
			Holding:      0.4 + 0.1*float64(i%3),
			InitialStock: float64(20 * (i % 2)),
		})
		d := make([]float64, 13)
		for t := range d {
			// a steady base per product, a seasonal lift in weeks 9-12 and
			// a product-specific weekly ripple
			base := 60 + 10*float64(i%6)
			if t >= 8 && t <= 11 {
				base *= 1.3
			}
			d[t] = float64(int(base + float64((i*7+t*5)%23) - 11))
		}
		in.Demand = append(in.Demand, d)
	}
	return in
}
