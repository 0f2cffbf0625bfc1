package lotsizing

import (
	"bufio"
	"fmt"
	"io"

	"pincer/instances"
)

// WriteTTM writes in in the layout ReadTTM reads: "n T", the line "1",
// the capacity, one line "b h st sc" per item, the demands period by
// period in blocks of at most 15 item columns, and the trailer naming the
// item columns. The layout has one capacity for all periods and no initial
// stock or overtime; an instance with any of these is refused.
func WriteTTM(w io.Writer, in *Instance) error {
	if err := in.Validate(); err != nil {
		return err
	}
	for t, c := range in.Capacity {
		if c != in.Capacity[0] {
			return fmt.Errorf("lotsizing: the TTM layout has one capacity, period %d has %v and period 1 %v", t+1, c, in.Capacity[0])
		}
	}
	for i, it := range in.Items {
		if it.InitialStock != 0 {
			return fmt.Errorf("lotsizing: the TTM layout has no initial stock (item %d has %v)", i+1, it.InitialStock)
		}
	}
	for _, c := range in.OvertimeCost {
		if c >= 0 {
			return fmt.Errorf("lotsizing: the TTM layout has no overtime")
		}
	}
	num := instances.FormatNumber
	bw := bufio.NewWriter(w)
	n, T := len(in.Items), in.Periods()
	fmt.Fprintf(bw, "%d %d\n1\n%s\n", n, T, num(in.Capacity[0]))
	for _, it := range in.Items {
		fmt.Fprintf(bw, "%s %s %s %s\n", num(it.UnitTime), num(it.Holding), num(it.SetupTime), num(it.SetupCost))
	}
	for lo := 0; lo < n; lo += 15 {
		hi := min(lo+15, n)
		for t := 0; t < T; t++ {
			for i := lo; i < hi; i++ {
				if i > lo {
					bw.WriteByte(' ')
				}
				bw.WriteString(num(in.Demand[i][t]))
			}
			bw.WriteByte('\n')
		}
	}
	bw.WriteString("Bi hi su su\ntime cost\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("lotsizing: writing TTM file: %w", err)
	}
	return nil
}
