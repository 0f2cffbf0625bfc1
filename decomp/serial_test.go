package decomp_test

import (
	"bytes"
	"context"
	"encoding/gob"
	"reflect"
	"testing"

	"pincer/decomp"
)

// wireEvaluator ships every Request and Answer through gob, as a remote
// worker would see them, and evaluates in between on a local Pool.
type wireEvaluator struct{ pool decomp.Pool }

func (w wireEvaluator) Evaluate(ctx context.Context, blocks []decomp.Block, req *decomp.Request, answers []decomp.Answer) error {
	var b bytes.Buffer
	if err := gob.NewEncoder(&b).Encode(req); err != nil {
		return err
	}
	var got decomp.Request
	if err := gob.NewDecoder(&b).Decode(&got); err != nil {
		return err
	}
	remote := make([]decomp.Answer, len(answers))
	if err := w.pool.Evaluate(ctx, blocks, &got, remote); err != nil {
		return err
	}
	b.Reset()
	if err := gob.NewEncoder(&b).Encode(remote); err != nil {
		return err
	}
	var back []decomp.Answer
	if err := gob.NewDecoder(&b).Decode(&back); err != nil {
		return err
	}
	copy(answers, back)
	return nil
}

// TestSerialisingEvaluator: the reference is the same run on Pool; the
// run over the wire must be bit-identical.
func TestSerialisingEvaluator(t *testing.T) {
	run := func(ev decomp.Evaluator) *decomp.Result {
		p := smallRun(t)
		res, err := decomp.Solve(context.Background(), p, decomp.Settings{Rounds: 80, Seed: 2, Gap: -1, Evaluator: ev})
		if err != nil {
			t.Fatal(err)
		}
		clean(res)
		return res
	}
	ref := run(decomp.Pool{Workers: 2})
	got := run(wireEvaluator{decomp.Pool{Workers: 2}})
	if ref.Bound != got.Bound || ref.Rounds != got.Rounds || !reflect.DeepEqual(ref.Prices, got.Prices) || !reflect.DeepEqual(ref.History, got.History) {
		t.Fatalf("over the wire: bound %v rounds %d; on the pool: bound %v rounds %d", got.Bound, got.Rounds, ref.Bound, ref.Rounds)
	}
}
