package gap

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// WriteMPS writes in as a 0-1 integer program in free MPS format: one
// binary column x_i_j per agent i and job j (1-based), a capacity row cap_i
// ("L", right-hand side b_i) per agent, an assignment row job_j ("E",
// right-hand side 1) per job, and the objective row obj holding c_ij.
//
// The columns are marked integer (MARKER INTORG ... INTEND) and declared
// binary in the BOUNDS section ("BV"). The objective row is always
// minimised: when maximise is true the costs are written negated, so the
// optimum a solver reports is minus the maximum, and a comment line in the
// file says so. (An OBJSENSE section is not written because not every
// reader honours it; some reject it, others ignore it and minimise.)
func WriteMPS(w io.Writer, in *Instance, maximise bool) error {
	if err := in.Validate(); err != nil {
		return err
	}
	bw := bufio.NewWriter(w)
	sign := int64(1)
	if maximise {
		sign = -1
	}
	name := strings.Map(func(r rune) rune {
		if r <= ' ' || r > '~' {
			return '_'
		}
		return r
	}, in.Name)
	if name == "" {
		name = "gap"
	}
	fmt.Fprintf(bw, "* generalized assignment: %d agents, %d jobs\n", in.Agents, in.Jobs)
	fmt.Fprintf(bw, "* x_i_j = 1 when job j goes to agent i (1-based)\n")
	if maximise {
		fmt.Fprintf(bw, "* maximisation written as minimisation: objective coefficients are the negated profits,\n")
		fmt.Fprintf(bw, "* so the maximum profit is minus the optimal objective value\n")
	} else {
		fmt.Fprintf(bw, "* minimisation of total cost\n")
	}
	fmt.Fprintf(bw, "NAME %s\n", name)
	bw.WriteString("ROWS\n N obj\n")
	for i := 1; i <= in.Agents; i++ {
		fmt.Fprintf(bw, " L cap_%d\n", i)
	}
	for j := 1; j <= in.Jobs; j++ {
		fmt.Fprintf(bw, " E job_%d\n", j)
	}
	bw.WriteString("COLUMNS\n    M1 'MARKER' 'INTORG'\n")
	buf := make([]byte, 0, 96)
	for i := 0; i < in.Agents; i++ {
		for j := 0; j < in.Jobs; j++ {
			col := "x_" + strconv.Itoa(i+1) + "_" + strconv.Itoa(j+1)
			buf = append(buf[:0], "    "...)
			buf = append(buf, col...)
			buf = append(buf, " obj "...)
			buf = strconv.AppendInt(buf, sign*in.Cost[i][j], 10)
			buf = append(buf, " cap_"...)
			buf = strconv.AppendInt(buf, int64(i+1), 10)
			buf = append(buf, ' ')
			buf = strconv.AppendInt(buf, in.Use[i][j], 10)
			buf = append(buf, "\n    "...)
			buf = append(buf, col...)
			buf = append(buf, " job_"...)
			buf = strconv.AppendInt(buf, int64(j+1), 10)
			buf = append(buf, " 1\n"...)
			bw.Write(buf)
		}
	}
	bw.WriteString("    M2 'MARKER' 'INTEND'\nRHS\n")
	for i, b := range in.Capacity {
		fmt.Fprintf(bw, "    rhs cap_%d %d\n", i+1, b)
	}
	for j := 1; j <= in.Jobs; j++ {
		fmt.Fprintf(bw, "    rhs job_%d 1\n", j)
	}
	bw.WriteString("BOUNDS\n")
	for i := 1; i <= in.Agents; i++ {
		for j := 1; j <= in.Jobs; j++ {
			fmt.Fprintf(bw, " BV bnd x_%d_%d\n", i, j)
		}
	}
	bw.WriteString("ENDATA\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("gap: writing MPS for %q: %w", in.Name, err)
	}
	return nil
}
