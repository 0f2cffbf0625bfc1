package decomp

import (
	"context"
	"fmt"
	"runtime"

	"golang.org/x/sync/errgroup"
)

// Evaluator solves every block at the requested prices, writing block k's
// answer into answers[k]. It is the single seam through which blocks are
// evaluated: the local pool below runs goroutines on this machine; an
// evaluator that ships requests to remote workers can take its place
// without any change to the engine.
//
// An evaluator must leave answers exactly as the blocks wrote them, in
// block order, whatever its scheduling, so that the engine's reduction is
// deterministic.
type Evaluator interface {
	Evaluate(ctx context.Context, blocks []Block, req *Request, answers []Answer) error
}

// Pool evaluates blocks on a bounded number of local goroutines. Blocks are
// handed out in contiguous chunks so that a hundred thousand tiny blocks
// do not cost a goroutine each. The zero value uses GOMAXPROCS workers.
type Pool struct {
	// Workers bounds the goroutines working at once; <= 0 means GOMAXPROCS.
	Workers int
	// Chunk is the number of blocks per task; <= 0 chooses about eight
	// tasks per worker.
	Chunk int
}

// Evaluate implements Evaluator.
func (p Pool) Evaluate(ctx context.Context, blocks []Block, req *Request, answers []Answer) error {
	workers := p.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	n := len(blocks)
	if workers == 1 || n <= 1 {
		own := *req
		own.Workers = max(1, workers/max(1, n))
		for k := range blocks {
			if err := solveOne(ctx, blocks, k, &own, answers); err != nil {
				return err
			}
		}
		return nil
	}
	var chunks [][2]int
	if p.Chunk > 0 {
		for lo := 0; lo < n; lo += p.Chunk {
			chunks = append(chunks, [2]int{lo, min(lo+p.Chunk, n)})
		}
	} else {
		chunks = Chunks(n, workers)
	}
	g, gctx := errgroup.WithContext(ctx)
	g.SetLimit(workers)
	for _, c := range chunks {
		lo, hi := c[0], c[1]
		g.Go(func() error {
			own := *req
			own.Workers = max(1, workers/n)
			for k := lo; k < hi; k++ {
				if err := solveOne(gctx, blocks, k, &own, answers); err != nil {
					return err
				}
			}
			return nil
		})
	}
	return g.Wait()
}

func solveOne(ctx context.Context, blocks []Block, k int, req *Request, answers []Answer) error {
	if err := ctx.Err(); err != nil {
		return err
	}
	req.Block = k
	if err := blocks[k].Solve(ctx, req, &answers[k]); err != nil {
		return fmt.Errorf("block %d: %w", k, err)
	}
	return nil
}

// Chunks splits n items into contiguous half-open ranges [lo, hi), about
// eight per worker (so that uneven items still balance), in order. It is
// the one chunking rule for every parallel loop over blocks or items.
func Chunks(n, workers int) [][2]int {
	if n <= 0 {
		return nil
	}
	workers = max(1, workers)
	chunk := max(1, (n+8*workers-1)/(8*workers))
	out := make([][2]int, 0, (n+chunk-1)/chunk)
	for lo := 0; lo < n; lo += chunk {
		out = append(out, [2]int{lo, min(lo+chunk, n)})
	}
	return out
}
