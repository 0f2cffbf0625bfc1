package transport

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
	"gonum.org/v1/gonum/optimize/convex/lp"
)

// lpOptimum solves p with gonum's lp.Simplex, an outside oracle. The
// standard form has one column per allowed lane plus one slack column per
// site, one equality row per customer that has a lane and one per site.
// It returns feasible=false when lp.Simplex reports lp.ErrInfeasible or a
// customer with positive demand has no lane at all.
func lpOptimum(p *Problem) (opt float64, feasible bool, err error) {
	return lpSolve(p, false)
}

// lpMaxShipped returns, from lp.Simplex, the largest total amount that can
// be shipped without exceeding any demand or supply: the same rows with an
// unmet-demand column per customer, minimising -Σ q.
func lpMaxShipped(p *Problem) (float64, error) {
	v, _, err := lpSolve(p, true)
	return -v, err
}

func lpSolve(p *Problem, maxFlow bool) (float64, bool, error) {
	m, n := len(p.Supply), len(p.Demand)
	type lane struct{ i, j int }
	var lanes []lane
	for i := range m {
		for j := range n {
			if !math.IsInf(p.Cost[i][j], 1) {
				lanes = append(lanes, lane{i, j})
			}
		}
	}
	var custRow []int // customer -> row, -1 if dropped
	rows := 0
	for j := range n {
		has := false
		for _, l := range lanes {
			if l.j == j {
				has = true
				break
			}
		}
		switch {
		case has || maxFlow:
			custRow = append(custRow, rows)
			rows++
		case p.Demand[j] > 0:
			return 0, false, nil // positive demand, no lane
		default:
			custRow = append(custRow, -1)
		}
	}
	siteRow0 := rows
	rows += m
	cols := len(lanes) + m
	if maxFlow {
		cols += n
	}
	A := mat.NewDense(rows, cols, nil)
	c := make([]float64, cols)
	b := make([]float64, rows)
	for k, l := range lanes {
		if r := custRow[l.j]; r >= 0 {
			A.Set(r, k, 1)
		}
		A.Set(siteRow0+l.i, k, 1)
		if maxFlow {
			c[k] = -1
		} else {
			c[k] = p.Cost[l.i][l.j]
		}
	}
	for i := range m {
		A.Set(siteRow0+i, len(lanes)+i, 1)
		b[siteRow0+i] = p.Supply[i]
	}
	for j := range n {
		if r := custRow[j]; r >= 0 {
			b[r] = p.Demand[j]
			if maxFlow {
				A.Set(r, len(lanes)+m+j, 1)
			}
		}
	}
	if rows == 0 {
		return 0, true, nil
	}
	opt, _, err := lp.Simplex(c, A, b, 1e-10, nil)
	if errors.Is(err, lp.ErrInfeasible) {
		return 0, false, nil
	}
	if err != nil {
		return 0, false, fmt.Errorf("oracle: %w", err)
	}
	return opt, true, nil
}

// checkSolution checks a solution against the problem itself: shipments on
// allowed lanes, every demand met, no supply exceeded, the cost equal to
// the sum over shipments, dual feasibility, complementary slackness and
// equal primal and dual objectives.
func checkSolution(t tester, p *Problem, sol *Solution) {
	t.Helper()
	m, n := len(p.Supply), len(p.Demand)
	scaleQ := 1.0
	for _, v := range p.Supply {
		scaleQ = max(scaleQ, v)
	}
	for _, v := range p.Demand {
		scaleQ = max(scaleQ, v)
	}
	tolQ := 1e-9 * scaleQ * float64(m+n)
	maxC := 1.0
	for _, row := range p.Cost {
		for _, c := range row {
			if !math.IsInf(c, 1) {
				maxC = max(maxC, math.Abs(c))
			}
		}
	}
	tolC := 1e-8 * maxC
	out := make([]float64, m)
	in := make([]float64, n)
	cost := 0.0
	used := make(map[[2]int]bool)
	for _, s := range sol.Shipments {
		if s.Site < 0 || s.Site >= m || s.Customer < 0 || s.Customer >= n {
			t.Fatalf("shipment %+v out of range", s)
		}
		if !(s.Qty > 0) {
			t.Fatalf("shipment %+v has non-positive quantity", s)
		}
		u := p.Cost[s.Site][s.Customer]
		if math.IsInf(u, 1) {
			t.Fatalf("shipment %+v on a forbidden lane", s)
		}
		if used[[2]int{s.Site, s.Customer}] {
			t.Fatalf("lane %d->%d listed twice", s.Site, s.Customer)
		}
		used[[2]int{s.Site, s.Customer}] = true
		out[s.Site] += s.Qty
		in[s.Customer] += s.Qty
		cost += s.Qty * u
	}
	if len(sol.Shipments) > m+n {
		t.Errorf("%d shipments, a basic solution has at most %d", len(sol.Shipments), m+n-1)
	}
	for i := range m {
		if out[i] > p.Supply[i]+tolQ {
			t.Errorf("site %d ships %g > supply %g", i, out[i], p.Supply[i])
		}
	}
	for j := range n {
		if math.Abs(in[j]-p.Demand[j]) > tolQ {
			t.Errorf("customer %d receives %g, demand %g", j, in[j], p.Demand[j])
		}
	}
	tolObj := 1e-9*max(1, math.Abs(cost)) + tolQ*maxC
	if math.Abs(cost-sol.Cost) > tolObj {
		t.Errorf("reported cost %g, shipments cost %g", sol.Cost, cost)
	}
	if len(sol.SiteDual) != m || len(sol.CustomerDual) != n {
		t.Fatalf("dual lengths %d, %d; want %d, %d", len(sol.SiteDual), len(sol.CustomerDual), m, n)
	}
	dualObj := 0.0
	for i := range m {
		a := sol.SiteDual[i]
		if a > 0 {
			t.Errorf("site dual %d = %g > 0", i, a)
		}
		if a < -tolC && out[i] < p.Supply[i]-tolQ {
			t.Errorf("site %d has spare capacity %g but dual %g", i, p.Supply[i]-out[i], a)
		}
		dualObj += a * p.Supply[i]
		for j := range n {
			u := p.Cost[i][j]
			if math.IsInf(u, 1) {
				continue
			}
			rc := u - a - sol.CustomerDual[j]
			if rc < -tolC*max(1, math.Abs(a), math.Abs(sol.CustomerDual[j])/maxC) {
				t.Errorf("lane %d->%d: reduced cost %g < 0", i, j, rc)
			}
			if used[[2]int{i, j}] && math.Abs(rc) > tolC*max(1, math.Abs(a)/maxC) {
				t.Errorf("lane %d->%d carries flow but reduced cost %g != 0", i, j, rc)
			}
		}
	}
	for j := range n {
		dualObj += sol.CustomerDual[j] * p.Demand[j]
	}
	if math.Abs(dualObj-cost) > tolObj {
		t.Errorf("dual objective %g != primal %g", dualObj, cost)
	}
}

// tester is the part of testing.TB that *rapid.T also has.
type tester interface {
	Helper()
	Errorf(format string, args ...any)
	Fatalf(format string, args ...any)
	Logf(format string, args ...any)
}
