package lotsizing

import (
	"os"
	"path/filepath"
	"testing"

	"pincer/internal/benchdata"
)

// BenchmarkPatternSolve prices the zero-inventory setup pattern of a
// shared benchmark file (one evaluation of the repair's pattern search).
func BenchmarkPatternSolve(b *testing.B) {
	dir := benchdata.Dir(b, "lotsizing")
	for _, name := range []string{"f1.dat", "g69.dat", "g72.dat"} {
		b.Run(name, func(b *testing.B) {
			fh, err := os.Open(filepath.Join(dir, "ttm", name))
			if err != nil {
				b.Fatal(err)
			}
			in, err := ReadTTM(fh, name)
			fh.Close()
			if err != nil {
				b.Fatal(err)
			}
			pen, overtime := make([]float64, in.Periods()), make([]float64, in.Periods())
			for t := range pen {
				pen[t], overtime[t] = 1e6, -1
			}
			p := newPattern(in, pen, overtime)
			s := newPatternSearch(p, 1)
			for i := range s.y {
				for t := range s.y[i] {
					s.y[i][t] = t%2 == 0
				}
			}
			b.ResetTimer()
			for k := 0; k < b.N; k++ {
				p.solve(s.y, s.x)
			}
		})
	}
}
