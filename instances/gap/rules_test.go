package gap

import (
	"context"
	"math"
	"testing"

	"pincer/decomp"
)

// TestRulesReachLP runs every price rule on the choice relaxation and
// checks the bound against the LP relaxation solved by lp.Simplex (an
// outside oracle): never past it (weak LP duality; Geoffrion 1974 gives
// equality of the Lagrangian dual and the LP for choose-one blocks), and
// within 0.1 % of it after the round budget.
func TestRulesReachLP(t *testing.T) {
	if testing.Short() {
		t.Skip("-short: the rule comparison runs 700 rounds per case")
	}
	for _, name := range decomp.Rules() {
		for _, tc := range lpCases() {
			for _, maximise := range []bool{false, true} {
				t.Run(name+"/"+tc.name+"/"+sense(maximise), func(t *testing.T) {
					in := tc.load(t)
					want := lpRelaxation(t, in, maximise)
					p, err := NewProblem(in, Options{Maximise: maximise, Relaxation: ChoiceRelaxation})
					if err != nil {
						t.Fatal(err)
					}
					m, err := decomp.NewMethod(name)
					if err != nil {
						t.Fatal(err)
					}
					res, err := decomp.Solve(context.Background(), p, decomp.Settings{Gap: -1, Rounds: 700, StallRounds: 700, RepairEvery: 100, Seed: 1, Method: m})
					if err != nil {
						t.Fatal(err)
					}
					tol := 1e-6 * math.Max(1, math.Abs(want))
					if (!maximise && res.Bound > want+tol) || (maximise && res.Bound < want-tol) {
						t.Fatalf("%s: bound %.6f passes the LP value %.6f", name, res.Bound, want)
					}
					rel := math.Abs(want-res.Bound) / math.Max(1, math.Abs(want))
					reached := 0
					for _, h := range res.History {
						if math.Abs(want-h.Bound) <= 0.001*math.Max(1, math.Abs(want)) {
							reached = h.Round
							break
						}
					}
					t.Logf("%s: LP %.4f bound %.4f gap %.4f %% within 0.1 %% at round %d", name, want, res.Bound, 100*rel, reached)
					if rel > 0.001 {
						t.Errorf("%s: bound %.6f is %.3f %% from the LP value %.6f after %d rounds; want <= 0.1 %%", name, res.Bound, 100*rel, want, res.Rounds)
					}
				})
			}
		}
	}
}
