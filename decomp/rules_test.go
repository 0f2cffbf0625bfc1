package decomp_test

import (
	"context"
	"math"
	"reflect"
	"testing"

	"pgregory.net/rapid"

	"pincer/decomp"
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
