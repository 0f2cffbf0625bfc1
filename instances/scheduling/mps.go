package scheduling

import (
	"bufio"
	"fmt"
	"io"
	"strconv"
	"strings"
)

// Size limits of the MPS export. The time-indexed model has one column per
// job, class and start and one matrix entry per slot the start covers, so
// its size grows with the horizon times the processing times (a 100-job
// instance of the published kind on one machine has about 0.54 million
// columns and 30 million entries, some 600 MB; on two machines half of
// that). Past 2 million columns or 50 million matrix entries the file
// passes about a gigabyte and a
// general-purpose solver would spend far longer on its linear relaxation
// alone than the decomposition needs for a plan and a bound; such
// instances are what the decomposition is for.
const (
	MPSMaxColumns = 2_000_000
	MPSMaxEntries = 50_000_000
)

// MPSSize returns the number of columns (x variables) of the time-indexed
// model WriteMPS writes and an upper bound on its matrix entries (objective
// row included; zero costs are not written).
func MPSSize(in *Instance) (columns, entries int64) {
	hs := in.Horizons()
	for j, jb := range in.Jobs {
		for k, h := range hs {
			if !in.EligibleOn(j, k) {
				continue
			}
			if c := int64(h - jb.Processing - jb.Release + 1); c > 0 {
				columns += c
				entries += c * int64(jb.Processing+2)
			}
		}
	}
	return columns, entries
}

// WriteMPS writes the time-indexed model of in as a 0-1 program in free
// MPS: a binary column x_j_k_s per job j, eligible class k and start s
// (release r_j <= s <= H_k − p_j, with H_k from Instance.Horizons; all
// numbers 1-based for j and k, s the start time itself) whose objective
// coefficient is the job's cost when it completes at s + p_j
// (Instance.Cost); an assignment row job_j ("E", right-hand side 1) per job;
// and a capacity row cap_k_t ("L", right-hand side m_k) per class and slot
// t = 0..H_k−1, holding x_j_k_s for every start s with s <= t < s + p_j.
// The capacity rows are the slot rows of the relaxation (SlotRows), in
// the same order.
//
// The objective row obj is minimised. Columns are marked integer
// (MARKER INTORG … INTEND) and declared binary (BV). It refuses instances
// whose model has more than MPSMaxColumns columns or MPSMaxEntries matrix
// entries, with the sizes in the message.
func WriteMPS(w io.Writer, in *Instance) error {
	return writeMPS(w, in, true)
}

// WriteLPRelaxationMPS writes the linear relaxation of the model WriteMPS
// writes: the same rows and columns, without integer markers, each column
// bounded by 0 <= x <= 1. Its optimum is the time-indexed LP bound, which
// no valid bound of the decomposition may pass.
func WriteLPRelaxationMPS(w io.Writer, in *Instance) error {
	return writeMPS(w, in, false)
}

func writeMPS(w io.Writer, in *Instance, integer bool) error {
	if err := in.Validate(); err != nil {
		return err
	}
	cols, entries := MPSSize(in)
	if cols > MPSMaxColumns || entries > MPSMaxEntries {
		return fmt.Errorf("scheduling: the time-indexed model of %q has %d columns and %d matrix entries; the MPS export stops at %d columns and %d entries (the file would pass about a gigabyte): use a shorter horizon or fewer jobs",
			in.Name, cols, entries, MPSMaxColumns, MPSMaxEntries)
	}
	hs := in.Horizons()
	bw := bufio.NewWriter(w)
	name := strings.Map(func(r rune) rune {
		if r <= ' ' || r > '~' {
			return '_'
		}
		return r
	}, in.Name)
	if name == "" {
		name = "scheduling"
	}
	kind := "0-1 program"
	if !integer {
		kind = "linear relaxation"
	}
	fmt.Fprintf(bw, "* time-indexed scheduling model (%s): %d jobs, %d machine classes, %s\n", kind, len(in.Jobs), len(in.Classes), in.Objective)
	fmt.Fprintf(bw, "* x_j_k_s = 1 when job j (1-based) starts on class k (1-based) at time s\n")
	fmt.Fprintf(bw, "* horizons per class: %s\n", mpsJoinInts(hs))
	fmt.Fprintf(bw, "NAME %s\nROWS\n N obj\n", name)
	for j := range in.Jobs {
		fmt.Fprintf(bw, " E job_%d\n", j+1)
	}
	for k, h := range hs {
		for t := 0; t < h; t++ {
			fmt.Fprintf(bw, " L cap_%d_%d\n", k+1, t)
		}
	}
	bw.WriteString("COLUMNS\n")
	if integer {
		bw.WriteString("    M1 'MARKER' 'INTORG'\n")
	}
	buf := make([]byte, 0, 256)
	mpsColumns(in, hs, func(j, k, s int) {
		jb := in.Jobs[j]
		col := mpsColumn(j, k, s)
		// Two (row, value) pairs per line, as MPS allows, to keep the
		// file short.
		pairs := 0
		entry := func(row string, v int64) {
			if pairs%2 == 0 {
				buf = append(buf[:0], "    "...)
				buf = append(buf, col...)
			}
			buf = append(buf, ' ')
			buf = append(buf, row...)
			buf = append(buf, ' ')
			buf = strconv.AppendInt(buf, v, 10)
			if pairs++; pairs%2 == 0 {
				buf = append(buf, '\n')
				bw.Write(buf)
			}
		}
		if c := in.Cost(j, s+jb.Processing); c != 0 {
			entry("obj", c)
		}
		entry("job_"+strconv.Itoa(j+1), 1)
		for t := s; t < s+jb.Processing; t++ {
			entry("cap_"+strconv.Itoa(k+1)+"_"+strconv.Itoa(t), 1)
		}
		if pairs%2 == 1 {
			buf = append(buf, '\n')
			bw.Write(buf)
		}
	})
	if integer {
		bw.WriteString("    M2 'MARKER' 'INTEND'\n")
	}
	bw.WriteString("RHS\n")
	for j := range in.Jobs {
		fmt.Fprintf(bw, "    rhs job_%d 1\n", j+1)
	}
	for k, h := range hs {
		for t := 0; t < h; t++ {
			fmt.Fprintf(bw, "    rhs cap_%d_%d %d\n", k+1, t, in.Classes[k].Machines)
		}
	}
	bw.WriteString("BOUNDS\n")
	mpsColumns(in, hs, func(j, k, s int) {
		if integer {
			bw.WriteString(" BV bnd " + mpsColumn(j, k, s) + "\n")
		} else {
			bw.WriteString(" UP bnd " + mpsColumn(j, k, s) + " 1\n")
		}
	})
	bw.WriteString("ENDATA\n")
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("scheduling: writing MPS for %q: %w", in.Name, err)
	}
	return nil
}

// mpsColumns calls f for every column of the model, job by job, class by
// class, start by start.
func mpsColumns(in *Instance, hs []int, f func(j, k, s int)) {
	for j, jb := range in.Jobs {
		for k, h := range hs {
			if !in.EligibleOn(j, k) {
				continue
			}
			for s := jb.Release; s+jb.Processing <= h; s++ {
				f(j, k, s)
			}
		}
	}
}

// mpsColumn is the name of column x_j_k_s (j and k 1-based).
func mpsColumn(j, k, s int) string {
	return "x_" + strconv.Itoa(j+1) + "_" + strconv.Itoa(k+1) + "_" + strconv.Itoa(s)
}

func mpsJoinInts(v []int) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.Itoa(x)
	}
	return strings.Join(s, " ")
}
