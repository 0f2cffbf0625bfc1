package gap

import (
	"encoding/csv"
	"os"
	"path/filepath"
	"pincer/internal/benchdata"
	"strconv"
	"testing"
)

// gapBenchDir returns the shared GAP benchmark folder, or skips the test.
func gapBenchDir(t testing.TB) string { return benchdata.Dir(t, "gap") }

// gapRefRow is one row of the shared reference.csv.
type gapRefRow struct {
	file, name, sense, status string
	index, agents, jobs       int
	value                     int64
}

func readGapReference(t testing.TB, dir string) []gapRefRow {
	t.Helper()
	f, err := os.Open(filepath.Join(dir, "reference.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	var rows []gapRefRow
	for _, r := range recs[1:] {
		atoi := func(s string) int {
			v, err := strconv.Atoi(s)
			if err != nil {
				t.Fatalf("reference.csv: %v", err)
			}
			return v
		}
		rows = append(rows, gapRefRow{file: r[0], index: atoi(r[1]), name: r[2], sense: r[3],
			agents: atoi(r[4]), jobs: atoi(r[5]), value: int64(atoi(r[6])), status: r[7]})
	}
	return rows
}

// enumerateOptimum enumerates all m^n assignments and returns the best feasible
// value (ok false when none is feasible). Independent of every other code
// path in the package.
func enumerateOptimum(in *Instance, maximise bool) (best int64, ok bool) {
	load := make([]int64, in.Agents)
	var rec func(j int, val int64)
	rec = func(j int, val int64) {
		if j == in.Jobs {
			if !ok || (maximise && val > best) || (!maximise && val < best) {
				best, ok = val, true
			}
			return
		}
		for i := 0; i < in.Agents; i++ {
			if load[i]+in.Use[i][j] <= in.Capacity[i] {
				load[i] += in.Use[i][j]
				rec(j+1, val+in.Cost[i][j])
				load[i] -= in.Use[i][j]
			}
		}
	}
	rec(0, 0)
	return best, ok
}
