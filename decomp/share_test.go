package decomp_test

import (
	"context"
	"errors"
	"fmt"
	"sync/atomic"
	"testing"

	"pincer/decomp"
)

// sharedBlock checks that the request's shared data is the price sum that
// Share derived from these very prices, then answers like its inner block.
type sharedBlock struct {
	inner decomp.Block
	seen  *atomic.Int64
}

func (b sharedBlock) Solve(ctx context.Context, req *decomp.Request, ans *decomp.Answer) error {
	v, ok := req.Shared().(float64)
	if !ok {
		return fmt.Errorf("block %d: shared data %T, want float64", req.Block, req.Shared())
	}
	if v != priceSum(req.Prices) {
		return fmt.Errorf("block %d: shared data %v is stale: prices sum to %v", req.Block, v, priceSum(req.Prices))
	}
	b.seen.Add(1)
	return b.inner.Solve(ctx, req, ans)
}

func priceSum(p []float64) float64 {
	s := 0.0
	for _, x := range p {
		s += x
	}
	return s
}

// TestShareOncePerEvaluation: Share runs once per round, every block sees
// its result for the round's prices, and the run is the plain run.
func TestShareOncePerEvaluation(t *testing.T) {
	plain, err := decomp.Solve(context.Background(), manyBlocks(300, 12), decomp.Settings{Rounds: 25, Gap: -1})
	if err != nil {
		t.Fatal(err)
	}
	p := manyBlocks(300, 12)
	var calls, seen atomic.Int64
	for k, b := range p.Blocks {
		p.Blocks[k] = sharedBlock{inner: b, seen: &seen}
	}
	p.Share = func(req *decomp.Request) (any, error) {
		calls.Add(1)
		return priceSum(req.Prices), nil
	}
	res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 25, Gap: -1})
	if err != nil {
		t.Fatal(err)
	}
	if calls.Load() != int64(res.Rounds) {
		t.Fatalf("Share ran %d times in %d rounds", calls.Load(), res.Rounds)
	}
	if seen.Load() != int64(res.Rounds*len(p.Blocks)) {
		t.Fatalf("%d block solves saw shared data, want %d", seen.Load(), res.Rounds*len(p.Blocks))
	}
	if res.Bound != plain.Bound || res.Rounds != plain.Rounds {
		t.Fatalf("bound %v after %d rounds, plain run %v after %d", res.Bound, res.Rounds, plain.Bound, plain.Rounds)
	}

	p.Share = func(*decomp.Request) (any, error) { return nil, errors.New("out of slots") }
	if _, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 3}); err == nil {
		t.Fatal("a failing Share did not fail the run")
	}
}
