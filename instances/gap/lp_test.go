package gap

import (
	"context"
	"fmt"
	"math"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"

	"pincer/decomp"
)

// lpRelaxation returns the optimum of the LP relaxation of in, solved with
// gonum's lp.Simplex (an outside solver, used here only as an oracle).
//
// Model, in the standard form lp.Simplex takes (min cᵀx, Ax = b, x >= 0):
// one column x_ij per agent i and job j with a_ij <= b_i, one slack column
// s_i per agent, a capacity row Σ_j a_ij x_ij + s_i = b_i per agent and an
// assignment row Σ_i x_ij = 1 per job. x_ij <= 1 follows from the
// assignment rows. Pairs with a_ij > b_i are left out: no feasible plan
// uses them, and both relaxations of NewProblem leave them out as well (the
// choice blocks drop the option, a knapsack never packs an item heavier
// than its capacity), so their bounds are compared with this LP. When
// maximising, the costs are negated and the sign of the optimum restored.
func lpRelaxation(t testing.TB, in *Instance, maximise bool) float64 {
	t.Helper()
	type pair struct{ i, j int }
	var cols []pair
	for i := 0; i < in.Agents; i++ {
		for j := 0; j < in.Jobs; j++ {
			if in.Use[i][j] <= in.Capacity[i] {
				cols = append(cols, pair{i, j})
			}
		}
	}
	nx := len(cols)
	rows, ncols := in.Agents+in.Jobs, nx+in.Agents
	a := mat.NewDense(rows, ncols, nil)
	c := make([]float64, ncols)
	b := make([]float64, rows)
	sign := 1.0
	if maximise {
		sign = -1
	}
	for k, p := range cols {
		c[k] = sign * float64(in.Cost[p.i][p.j])
		a.Set(p.i, k, float64(in.Use[p.i][p.j]))
		a.Set(in.Agents+p.j, k, 1)
	}
	for i := 0; i < in.Agents; i++ {
		a.Set(i, nx+i, 1)
		b[i] = float64(in.Capacity[i])
	}
	for j := 0; j < in.Jobs; j++ {
		b[in.Agents+j] = 1
	}
	opt, _, err := lp.Simplex(c, a, b, 1e-10, nil)
	if err != nil {
		t.Fatalf("%s: lp.Simplex: %v", in.Name, err)
	}
	return sign * opt
}

// lpCase is one instance of the LP duality checks.
type lpCase struct {
	name string
	load func(t testing.TB) *Instance
}

func lpCases() []lpCase {
	var cases []lpCase
	// OR-Library instances (small sets of Cattrysse et al. / Osman).
	for _, f := range []struct {
		file  string
		index []int
	}{
		{"gap1.txt", []int{1, 2}}, {"gap2.txt", []int{1, 2}}, {"gap3.txt", []int{1, 2}},
		{"gap4.txt", []int{1, 2}}, {"gap5.txt", []int{1}},
	} {
		for _, k := range f.index {
			cases = append(cases, lpCase{
				name: fmt.Sprintf("%s#%d", f.file, k),
				load: func(t testing.TB) *Instance {
					path := filepath.Join(gapBenchDir(t), "orlib", f.file)
					in, err := ReadFile(path, k)
					if err != nil {
						t.Fatal(err)
					}
					return in
				},
			})
		}
	}
	// Generated instances of the tight types.
	for _, g := range []struct {
		kind byte
		m, n int
		seed uint64
	}{
		{'c', 5, 20, 1}, {'c', 8, 40, 2}, {'d', 5, 30, 3}, {'d', 10, 50, 4},
	} {
		cases = append(cases, lpCase{
			name: fmt.Sprintf("gen-%c-%dx%d-s%d", g.kind, g.m, g.n, g.seed),
			load: func(t testing.TB) *Instance {
				in, err := Generate(g.kind, g.m, g.n, g.seed)
				if err != nil {
					t.Fatal(err)
				}
				return in
			},
		})
	}
	return cases
}

// lpSettings are the engine settings of the LP duality checks: no gap stop,
// a fixed round budget (deterministic), and a stall limit long enough not
// to fire before the bound has converged.
func lpSettings() decomp.Settings {
	return decomp.Settings{Gap: -1, Rounds: 400, StallRounds: 400, RepairEvery: 50, Seed: 1}
}

// TestChoiceBoundConvergesToLP checks the choice relaxation against the LP
// relaxation solved by lp.Simplex. Expected relation: Geoffrion (1974),
// "Lagrangean relaxation for integer programming" — the choose-one blocks
// have the integrality property, so the Lagrangian dual of the capacity
// rows equals the LP optimum. Hence every round's L lies on the bound side
// of the LP value (weak LP duality, tolerance 1e-6 relative) and the best
// L must come within 0.5 % of it.
func TestChoiceBoundConvergesToLP(t *testing.T) {
	for _, tc := range lpCases() {
		for _, maximise := range []bool{false, true} {
			t.Run(tc.name+"/"+sense(maximise), func(t *testing.T) {
				in := tc.load(t)
				want := lpRelaxation(t, in, maximise)
				p, err := NewProblem(in, Options{Maximise: maximise, Relaxation: ChoiceRelaxation})
				if err != nil {
					t.Fatal(err)
				}
				res, err := decomp.Solve(context.Background(), p, lpSettings())
				if err != nil {
					t.Fatal(err)
				}
				tol := 1e-6 * math.Max(1, math.Abs(want))
				for _, h := range res.History {
					if (!maximise && h.Value > want+tol) || (maximise && h.Value < want-tol) {
						t.Fatalf("round %d: L = %.6f passes the LP value %.6f (%s)", h.Round, h.Value, want, sense(maximise))
					}
				}
				rel := math.Abs(want-res.Bound) / math.Max(1, math.Abs(want))
				reached := 0
				for _, h := range res.History {
					if math.Abs(want-h.Bound) <= 0.005*math.Max(1, math.Abs(want)) {
						reached = h.Round
						break
					}
				}
				t.Logf("LP %.4f  choice bound %.4f  rel. gap %.4f %%  within 0.5 %% at round %d  rounds %d  status %s",
					want, res.Bound, 100*rel, reached, res.Rounds, res.Status)
				if rel > 0.005 {
					t.Errorf("choice bound %.6f is %.3f %% from the LP value %.6f after %d rounds (%s); want <= 0.5 %%",
						res.Bound, 100*rel, want, res.Rounds, res.Status)
				}
			})
		}
	}
}

// TestKnapsackBoundAtLeastLP checks that the knapsack relaxation's best bound
// is never weaker than the LP relaxation (lp.Simplex). Expected relation:
// Geoffrion (1974) — relaxing the assignment rows leaves knapsack blocks,
// which lack the integrality property, so the Lagrangian dual is at least
// as strong as the LP (Fisher 1981 discusses the same comparison for this
// problem). Tolerance 1e-6 relative.
func TestKnapsackBoundAtLeastLP(t *testing.T) {
	for _, tc := range lpCases() {
		for _, maximise := range []bool{false, true} {
			t.Run(tc.name+"/"+sense(maximise), func(t *testing.T) {
				in := tc.load(t)
				want := lpRelaxation(t, in, maximise)
				p, err := NewProblem(in, Options{Maximise: maximise, Relaxation: KnapsackRelaxation})
				if err != nil {
					t.Fatal(err)
				}
				res, err := decomp.Solve(context.Background(), p, lpSettings())
				if err != nil {
					t.Fatal(err)
				}
				tol := 1e-6 * math.Max(1, math.Abs(want))
				t.Logf("LP %.4f  knapsack bound %.4f  rounds %d  status %s", want, res.Bound, res.Rounds, res.Status)
				if (!maximise && res.Bound < want-tol) || (maximise && res.Bound > want+tol) {
					t.Errorf("knapsack bound %.6f is weaker than the LP value %.6f after %d rounds (%s, %s)",
						res.Bound, want, res.Rounds, res.Status, sense(maximise))
				}
			})
		}
	}
}
