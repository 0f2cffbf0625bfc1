package decomp_test

import (
	"context"
	"math"
	"reflect"
	"testing"

	"pgregory.net/rapid"

	"pincer/decomp"
	"pincer/subproblem"
)

// TestRulesKeepBoundsValid runs every price rule on random tiny problems
// (both senses, every row sense, random fixings through drawToy) and
// checks, against the brute-force optimum, that no round's value passes
// it and that every price the observer sees has its valid sign.
func TestRulesKeepBoundsValid(t *testing.T) {
	for _, name := range decomp.Rules() {
		t.Run(name, func(t *testing.T) {
			rapid.Check(t, func(t *rapid.T) {
				tb := drawToy(t)
				m, err := decomp.NewMethod(name)
				if err != nil {
					t.Fatal(err)
				}
				var bad []string
				obs := decomp.ObserverFunc(func(p *decomp.Progress) {
					if !tb.boundValid(p.Record.Value) || !tb.boundValid(p.Record.Bound) {
						bad = append(bad, "bound")
					}
					for r, v := range p.Prices {
						if s := decomp.PriceSign(tb.p.Sense, tb.p.Rows[r].Sense); float64(s)*v < 0 || math.IsNaN(v) {
							bad = append(bad, "price sign")
						}
					}
				})
				res, err := decomp.Solve(context.Background(), tb.p, decomp.Settings{Rounds: 60, Observer: obs, RepairEvery: 1, Method: m})
				if err != nil {
					t.Fatal(err)
				}
				if len(bad) > 0 {
					t.Fatalf("%s: %s check failed (optimum %v)", name, bad[0], tb.opt)
				}
				if res.Plan != nil && tb.p.Sense.Better(res.Plan.Value, tb.opt) {
					t.Fatalf("plan value %v better than optimum %v", res.Plan.Value, tb.opt)
				}
			})
		})
	}
}

// TestRulesResumeExactly: a run checkpointed midway and resumed with a
// fresh rule of the same kind ends exactly like the uninterrupted run, so
// every rule's state is captured.
func TestRulesResumeExactly(t *testing.T) {
	for _, name := range decomp.Rules() {
		t.Run(name, func(t *testing.T) {
			newRule := func() decomp.Method {
				m, err := decomp.NewMethod(name)
				if err != nil {
					t.Fatal(err)
				}
				return m
			}
			full, err := decomp.Solve(context.Background(), manyBlocks(400, 15), decomp.Settings{Rounds: 40, Gap: -1, Method: newRule()})
			if err != nil {
				t.Fatal(err)
			}
			var saved *decomp.State
			cs := decomp.Settings{Rounds: 40, Gap: -1, Method: newRule(), CheckpointEvery: 17}
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			cs.Checkpoint = func(st *decomp.State) error {
				if st.Round == 17 {
					data, err := decomp.EncodeCheckpoint(&decomp.Checkpoint{State: st}, nil)
					if err != nil {
						return err
					}
					c, err := decomp.DecodeCheckpoint(data, nil)
					if err != nil {
						return err
					}
					saved = c.State
					cancel()
				}
				return nil
			}
			if _, err := decomp.Solve(ctx, manyBlocks(400, 15), cs); err != nil {
				t.Fatal(err)
			}
			if saved == nil {
				t.Fatal("no checkpoint at round 17")
			}
			rest, err := decomp.Resume(context.Background(), manyBlocks(400, 15), decomp.Settings{Rounds: 40, Gap: -1, Method: newRule()}, saved)
			if err != nil {
				t.Fatal(err)
			}
			if rest.Bound != full.Bound || rest.Rounds != full.Rounds || !reflect.DeepEqual(rest.Prices, full.Prices) {
				t.Fatalf("resumed: bound %v after %d rounds; uninterrupted: %v after %d", rest.Bound, rest.Rounds, full.Bound, full.Rounds)
			}
		})
	}
}

func TestNewMethodRefusesUnknown(t *testing.T) {
	if _, err := decomp.NewMethod("bisection"); err == nil {
		t.Fatal("an unknown rule name was accepted")
	}
}

// primalSpy records the primal average each repair gets.
type primalSpy struct{ got [][][]decomp.Entry }

func (s *primalSpy) Repair(_ context.Context, in *decomp.RepairInput) (*decomp.Plan, error) {
	s.got = append(s.got, in.Primal)
	return nil, nil
}

// TestVolumePrimalAverage: the volume rule's averaged block answers,
// handed to the repairs, are convex combinations of block answers (each
// choice block's values sum to 1), and the row use they imply is the
// rule's own averaged use ū (both are averaged with the same weights).
func TestVolumePrimalAverage(t *testing.T) {
	p := manyBlocks(300, 12)
	spy := &primalSpy{}
	p.Repair = spy
	v := &decomp.Volume{}
	if _, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 40, Gap: -1, Method: v, RepairEvery: 5, Workers: 1}); err != nil {
		t.Fatal(err)
	}
	if len(spy.got) == 0 || spy.got[len(spy.got)-1] == nil {
		t.Fatal("repairs got no primal average")
	}
	last := v.AveragePrimal()
	use := make([]float64, len(p.Rows))
	for k, entries := range last {
		sum := 0.0
		c := p.Blocks[k].(*subproblem.Choice)
		for _, e := range entries {
			sum += e.Value
			for _, u := range c.Options[e.Index].Use {
				use[u.Index] += e.Value * u.Value
			}
		}
		if math.Abs(sum-1) > 1e-4 {
			t.Fatalf("block %d: averaged choice weights sum to %v", k, sum)
		}
	}
	viol := v.AverageViolation()
	for r := range use {
		if d := use[r] - p.Rows[r].RHS - viol[r]; math.Abs(d) > 1e-3 {
			t.Fatalf("row %d: use of x̄ minus rhs %v, rule's average %v", r, use[r]-p.Rows[r].RHS, viol[r])
		}
	}
}
