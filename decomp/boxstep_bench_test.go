package decomp_test

import (
	"context"
	"fmt"
	"testing"

	"pincer/decomp"
)

// BenchmarkBoxstepRound measures whole runs of 60 rounds with the boxstep
// rule against the subgradient rule, by coupling-row count, on choice
// blocks (4000 blocks, so block evaluation is a realistic share of a
// round). The row count where boxstep's master LP costs more than the
// rounds it saves sets BoxstepMaxRows.
func BenchmarkBoxstepRound(b *testing.B) {
	for _, rows := range []int{10, 20, 40, 80} {
		for _, rule := range []string{"subgradient", "boxstep"} {
			b.Run(fmt.Sprintf("rows=%d/%s", rows, rule), func(b *testing.B) {
				for i := 0; i < b.N; i++ {
					m, _ := decomp.NewMethod(rule)
					p := manyBlocks(4000, rows)
					for r := range p.Rows {
						p.Rows[r].RHS = 1.1 * 4000 / float64(rows) // feasible, with a little slack
					}
					res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 60, Gap: -1, Method: m, Workers: 1})
					if err != nil && rows <= decomp.BoxstepMaxRows {
						b.Fatal(err)
					}
					if res != nil {
						b.ReportMetric(res.Bound, "bound")
					}
				}
			})
		}
	}
}
