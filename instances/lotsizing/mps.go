package lotsizing

import (
	"bufio"
	"fmt"
	"io"
	"math"
)

// WriteMPS writes the instance as a mixed-integer model in MPS: minimise
// Σ sc_i y_it + h_i s_it (+ overtime cost · o_t) subject to stock balance,
// x_it <= M_it y_it with the tightest valid M_it = min(remaining demand,
// (C_t − st_i)/b_i) (only remaining demand where overtime is allowed) and
// Σ_i (b_i x_it + st_i y_it) − o_t <= C_t, 0 <= o_t <= U_t. opt supplies the
// overtime cost as in NewProblem.
func WriteMPS(w io.Writer, in *Instance, opt Options) error {
	if err := in.Validate(); err != nil {
		return err
	}
	n, T := len(in.Items), in.Periods()
	oc := overtimeCosts(in, opt)
	bw := bufio.NewWriter(w)
	p := func(format string, a ...any) { fmt.Fprintf(bw, format, a...) }
	p("NAME lotsizing\nROWS\n N cost\n")
	for i := 0; i < n; i++ {
		for t := 0; t < T; t++ {
			p(" E b_%d_%d\n L m_%d_%d\n", i, t, i, t)
		}
	}
	for t := 0; t < T; t++ {
		p(" L c_%d\n", t)
	}
	bigM := func(i, t int) float64 {
		rem := 0.0
		for u := t; u < T; u++ {
			rem += in.Demand[i][u]
		}
		it := in.Items[i]
		if oc[t] < 0 && it.UnitTime > 0 {
			rem = math.Min(rem, (in.Capacity[t]-it.SetupTime)/it.UnitTime)
		}
		return math.Max(rem, 0)
	}
	p("COLUMNS\n    M1 'MARKER' 'INTORG'\n")
	for i, it := range in.Items {
		for t := 0; t < T; t++ {
			m := bigM(i, t)
			if m == 0 {
				m = 1 // y is fixed to 0 below; keep the column non-empty
			}
			p(" y_%d_%d cost %g m_%d_%d %g\n", i, t, it.SetupCost, i, t, -m)
			if it.SetupTime != 0 {
				p(" y_%d_%d c_%d %g\n", i, t, t, it.SetupTime)
			}
		}
	}
	p("    M2 'MARKER' 'INTEND'\n")
	for i, it := range in.Items {
		for t := 0; t < T; t++ {
			p(" x_%d_%d b_%d_%d 1 m_%d_%d 1\n", i, t, i, t, i, t)
			if it.UnitTime != 0 {
				p(" x_%d_%d c_%d %g\n", i, t, t, it.UnitTime)
			}
			p(" s_%d_%d cost %g b_%d_%d -1\n", i, t, it.Holding, i, t)
			if t+1 < T {
				p(" s_%d_%d b_%d_%d 1\n", i, t, i, t+1)
			}
		}
	}
	for t := 0; t < T; t++ {
		if oc[t] >= 0 {
			p(" o_%d cost %g c_%d -1\n", t, oc[t], t)
		}
	}
	p("RHS\n")
	for i, it := range in.Items {
		for t := 0; t < T; t++ {
			rhs := in.Demand[i][t]
			if t == 0 {
				rhs -= it.InitialStock
			}
			if rhs != 0 {
				p(" rhs b_%d_%d %g\n", i, t, rhs)
			}
		}
	}
	for t := 0; t < T; t++ {
		p(" rhs c_%d %g\n", t, in.Capacity[t])
	}
	p("BOUNDS\n")
	for i := 0; i < n; i++ {
		for t := 0; t < T; t++ {
			if bigM(i, t) == 0 {
				p(" FX bnd y_%d_%d 0\n", i, t)
			} else {
				p(" UP bnd y_%d_%d 1\n", i, t)
			}
		}
	}
	for t := 0; t < T; t++ {
		if oc[t] >= 0 {
			p(" UP bnd o_%d %g\n", t, overtimeLimit(in, t))
		}
	}
	p("ENDATA\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("lotsizing: writing MPS for %q: %w", in.Name, err)
	}
	return nil
}
