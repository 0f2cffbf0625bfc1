package lotsizing

import (
	"encoding/csv"
	"fmt"
	"io"
	"strconv"
)

func num(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }

// WriteScheduleCSV writes schedule.csv: item, period, setup, quantity,
// inventory (periods 1-based, items by name).
func WriteScheduleCSV(w io.Writer, in *Instance, s *Schedule) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"item", "period", "setup", "quantity", "inventory"})
	for i, it := range in.Items {
		for t := 0; t < in.Periods(); t++ {
			setup := "0"
			if s.Setup[i][t] {
				setup = "1"
			}
			cw.Write([]string{it.Name, strconv.Itoa(t + 1), setup, num(s.Production[i][t]), num(s.Inventory[i][t])})
		}
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("lotsizing: writing schedule: %w", err)
	}
	return nil
}

// PeriodLoad is one line of the per-period load table.
type PeriodLoad struct {
	Period   int     `json:"period"`
	Load     float64 `json:"load"`
	Capacity float64 `json:"capacity"`
	Slack    float64 `json:"slack"`
	Overtime float64 `json:"overtime"`
	// ShadowPrice is the capacity row's multiplier at the best bound: what
	// one more unit of capacity in this period is worth to the bound.
	ShadowPrice float64 `json:"shadow_price"`
}

// Loads builds the per-period load table of a schedule; prices are the
// multipliers at the best bound (decomp.Result.Prices; nil gives zeros).
func Loads(in *Instance, s *Schedule, prices []float64) []PeriodLoad {
	out := make([]PeriodLoad, in.Periods())
	for t := range out {
		out[t] = PeriodLoad{Period: t + 1, Load: s.Load[t], Capacity: in.Capacity[t], Slack: max(0, in.Capacity[t]-s.Load[t]), Overtime: s.Overtime[t]}
		if t < len(prices) {
			out[t].ShadowPrice = prices[t]
		}
	}
	return out
}

// WriteLoadCSV writes the load table: period, load, capacity, slack,
// overtime, shadow_price.
func WriteLoadCSV(w io.Writer, loads []PeriodLoad) error {
	cw := csv.NewWriter(w)
	cw.Write([]string{"period", "load", "capacity", "slack", "overtime", "shadow_price"})
	for _, l := range loads {
		cw.Write([]string{strconv.Itoa(l.Period), num(l.Load), num(l.Capacity), num(l.Slack), num(l.Overtime), num(l.ShadowPrice)})
	}
	cw.Flush()
	if err := cw.Error(); err != nil {
		return fmt.Errorf("lotsizing: writing load table: %w", err)
	}
	return nil
}

// PlanReport is a JSON-able plan: cost, schedule and load table.
type PlanReport struct {
	Cost     float64      `json:"cost"`
	Bound    float64      `json:"bound"`
	Schedule *Schedule    `json:"schedule"`
	Periods  []PeriodLoad `json:"periods"`
}
