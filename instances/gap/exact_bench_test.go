package gap

import (
	"context"
	"path/filepath"
	"testing"

	"pincer/decomp"
)

// BenchmarkExact times the exact search to proof (one worker) on
// OR-Library instances: the ten 10 x 60 instances of gap12 and gap11 in
// both senses per iteration (go test -bench Exact -run ^$).
func BenchmarkExact(b *testing.B) {
	dir := gapBenchDir(b)
	var ins []*Instance
	for _, f := range []string{"gap11.txt", "gap12.txt"} {
		for k := 1; k <= 5; k++ {
			in, err := ReadFile(filepath.Join(dir, "orlib", f), k)
			if err != nil {
				b.Fatal(err)
			}
			ins = append(ins, in)
		}
	}
	b.ResetTimer()
	for range b.N {
		for _, in := range ins {
			for _, maximise := range []bool{false, true} {
				opt := Options{Maximise: maximise}
				res, err := decomp.Search(context.Background(), func() (*decomp.Problem, error) { return NewExactProblem(in, opt) },
					NewBrancher(in, opt, JobRule), decomp.SearchSettings{Workers: 1, Seed: 1})
				if err != nil {
					b.Fatal(err)
				}
				if !res.Proved {
					b.Fatalf("%s: not proved", in.Name)
				}
			}
		}
	}
}
