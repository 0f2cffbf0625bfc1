package decomp

import (
	"container/heap"
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"
	"sync"
	"time"
)

// Penalty is a lower estimate of what forcing one binary variable of a
// block costs: with Var forced to Value the block's optimum at the same
// prices is worse by at least Delta (higher when minimising, lower when
// maximising). Delta is +Inf when the block has no point with that
// forcing.
type Penalty struct {
	Var   int
	Value float64
	Delta float64
}

// Penalizer is a block that can price the forcing of its free binary
// variables, the ground of reduced-cost fixing and of child bounds in
// [Search].
//
// Penalties appends to dst, for variables of the block that req's
// fixings leave free, the penalty of forcing each to the value opposite to
// its value in ans (the block's exact optimum at req, as Solve returned
// it). Any under-estimate of the true change keeps the search sound (0 is
// always valid); a variable may be left out. It is called from one
// goroutine at a time, never concurrently with Solve.
type Penalizer interface {
	Penalties(ctx context.Context, req *Request, ans *Answer, dst []Penalty) ([]Penalty, error)
}

// BranchInput is what a Brancher sees at a node: the block answers at the
// prices of the node's bound.
type BranchInput struct {
	Sense   Sense
	Bound   float64   // the node's bound
	Prices  []float64 // prices of the bound
	Answers []Answer  // block answers at Prices, in block order
	// Fixings are the node's fixings (the problem's own, the branching
	// decisions and the reduced-cost fixings), sorted by SortFixings.
	Fixings []Fixing
	// Penalties, per block, price the forcing of free variables (nil for
	// blocks that are not Penalizers, or with fixing switched off).
	Penalties [][]Penalty
	// Primal is the price rule's averaged primal solution, when the node
	// rule is a PrimalAverager; nil otherwise.
	Primal [][]Entry
}

// Branching is a Brancher's answer.
type Branching struct {
	// Children each add fixings to the node. Together they must cover
	// every plan of the node (a partition is best); the first child is
	// the one a dive follows. No children declares the node solved: it
	// holds no feasible plan better than Plan (none at all when Plan is
	// nil), for example because its answers form a feasible plan whose
	// value equals the node's bound.
	Children [][]Fixing
	// Plan, when not nil, is a plan feasible for the problem found at the
	// node; it is offered as an incumbent.
	Plan *Plan
}

// Brancher chooses how to split a search node; a family implements it
// for its own variables. It is called from one goroutine at a time.
type Brancher interface {
	Branch(in *BranchInput) (*Branching, error)
}

// SearchSettings are the limits and choices of a Search. The zero value
// is valid.
type SearchSettings struct {
	Time  time.Duration // wall-clock limit; 0 means none
	Nodes int           // limit on nodes evaluated; 0 means none
	// Rounds bounds the dual ascent rounds summed over all nodes (each
	// node counts at least one); 0 means none. Unlike Time it is a
	// budget of work, so a search cut by it is reproducible: a repairer
	// that searches inside a run uses it. A node's ascent is capped by
	// what is left when its batch starts, so a batch may end up to
	// Batch·NodeRounds past the budget at most.
	Rounds int
	// MaxOpen bounds the node store's count and MaxBytes its estimated
	// memory (see NodeBytes); 0 means 200000 nodes and 512 MiB. When a
	// new child finds the store full on either, the store keeps the
	// best-bound half (of the count, or of the bytes) and drops the rest;
	// the best bound of the dropped nodes stays in the global bound
	// (which then cannot close), so the bound remains valid.
	MaxOpen  int
	MaxBytes int64
	// Workers evaluate the nodes of a batch in parallel, each on its own
	// copy of the problem; 0 means GOMAXPROCS.
	Workers int
	// Batch is the number of nodes evaluated together; 0 means 8. The
	// search depends on Batch, never on Workers: its result is the same
	// for any worker count.
	Batch int
	Seed  uint64 // passed (mixed with the node number) to the repairer
	// Prices start the root node (nil: the problem's own), typically the
	// best prices of a plain run.
	Prices []float64
	// Incumbent, when not nil, is a known plan (e.g. a plain run's).
	Incumbent *Plan
	// RootRounds and NodeRounds bound the dual ascent at the root and at
	// other nodes; 0 means 300 and 40.
	RootRounds, NodeRounds int
	// NewMethod makes a fresh price rule for a node; nil means a
	// subgradient rule that stops once its steps are too short (see
	// NodeMethod for the rules by name).
	NewMethod func() Method
	// NoFixing switches reduced-cost fixing (and penalty child bounds)
	// off.
	NoFixing bool
	// RepairEvery runs the repair at every this many evaluated nodes (the
	// root always); 0 means 1.
	RepairEvery int
	// Progress, when set, is called after every batch.
	Progress func(*SearchProgress)
}

// SearchProgress is a search's state after a batch.
type SearchProgress struct {
	Nodes        int
	Open         int
	Bound        float64 // the global bound
	Incumbent    float64 // NaN without a plan
	HasIncumbent bool
	Elapsed      time.Duration
}

// SearchStatus says why a search stopped.
type SearchStatus int8

// Search outcomes.
const (
	// SearchProved: the tree is exhausted; the plan is optimal (within
	// Result.Gap) or, without a plan, none exists.
	SearchProved SearchStatus = iota
	SearchTimeLimit
	SearchNodeLimit
	SearchInterrupted
	// SearchStoreFull: the tree is exhausted but nodes were dropped from
	// the full store, so the global bound may stay below the plan.
	SearchStoreFull
	// SearchWorkLimit: SearchSettings.Rounds ran out.
	SearchWorkLimit
)

// String names the status as reports use it.
func (s SearchStatus) String() string {
	switch s {
	case SearchProved:
		return "search-closed"
	case SearchTimeLimit:
		return "time-limit"
	case SearchNodeLimit:
		return "node-limit"
	case SearchInterrupted:
		return "interrupted"
	case SearchStoreFull:
		return "store-full"
	case SearchWorkLimit:
		return "work-limit"
	}
	return fmt.Sprintf("search-status(%d)", int(s))
}

// SearchResult is the outcome of a Search.
type SearchResult struct {
	Status SearchStatus
	Plan   *Plan // best plan found (the incumbent), nil when none
	// Bound is the global bound: no plan is better. With an integral
	// objective it is rounded. It is the best of the open nodes' bounds,
	// the closed leaves' values, the dropped nodes' bounds and the plan.
	Bound float64
	// Proved: the tree is exhausted and nothing was dropped. With a plan
	// its value then meets Bound exactly for an integral objective, and
	// within Gap (at most about 1e-9 relative) otherwise; without a plan
	// the problem is proved infeasible.
	Proved bool
	// Gap is |plan − bound| / max(1, |plan|); +Inf without a plan.
	Gap float64
	// RootBound is the root node's bound (unrounded) and RootPrices its
	// prices.
	RootBound  float64
	RootPrices []float64
	Elapsed    time.Duration
	Tree       TreeSummary
}

// TreeSummary counts what the search did.
type TreeSummary struct {
	Nodes      int // nodes evaluated
	Open       int // nodes left in the store
	Depth      int // deepest node evaluated (the root is depth 0)
	CutOff     int // nodes whose bound could not beat the plan
	Infeasible int // nodes with no point under their fixings
	Solved     int // nodes the brancher declared solved
	Branched   int // nodes split into children
	Pruned     int // children discarded on their penalty bound before evaluation
	Dropped    int // nodes dropped from the full store
	// Fixed counts variables fixed by reduced costs over the whole
	// search, RootFixed those fixed at the root (valid for every node).
	Fixed, RootFixed int
	Plans            int // times the incumbent improved during the search
	Rounds           int // dual ascent rounds over all nodes (at least one a node)
	// OpenBytes is the store's estimated memory at the stop and PeakBytes
	// its largest value (see NodeBytes).
	OpenBytes, PeakBytes int64
}

// DefaultMaxBytes is the node store's memory bound when
// SearchSettings.MaxBytes is 0.
const DefaultMaxBytes = 512 << 20

// NodeBytes estimates the memory an open node holds: its record, its
// branching fixings, the reduced-cost fixings its parent passes on (nfix
// fixings in all) and its warm prices (nprices). Siblings share their
// parent's prices and fixings; each is counted with every sibling, so the
// estimate errs high.
func NodeBytes(nfix, nprices int) int64 {
	const record = 136 // the node, its heap slot and its share of a chain link
	return record + int64(nfix)*24 + int64(nprices)*8
}

// searchNode is an open node. Its fixings are its own plus its parent's
// (a chain shared with siblings), gathered when it is evaluated.
type searchNode struct {
	id     int
	depth  int
	parent *fixChain
	fix    []Fixing  // this node's own branching fixings
	prices []float64 // warm start (the parent's best prices)
	key    float64   // valid bound, in minimising terms
	bytes  int64     // NodeBytes estimate, counted while stored
}

type fixChain struct {
	up  *fixChain
	fix []Fixing
}

func (c *fixChain) collect(dst []Fixing) []Fixing {
	for ; c != nil; c = c.up {
		dst = append(dst, c.fix...)
	}
	return dst
}

// nodeStore is the bounded store of open nodes: a heap best bound first,
// with the estimated bytes it holds.
type nodeStore struct {
	h           nodeHeap
	bytes, peak int64
	maxN        int
	maxBytes    int64
}

func (st *nodeStore) Len() int { return st.h.Len() }

func (st *nodeStore) push(nd *searchNode) {
	if nd.bytes == 0 {
		n := len(nd.fix)
		if nd.parent != nil {
			n += len(nd.parent.fix)
		}
		nd.bytes = NodeBytes(n, len(nd.prices))
	}
	heap.Push(&st.h, nd)
	st.bytes += nd.bytes
	st.peak = max(st.peak, st.bytes)
}

func (st *nodeStore) pop() *searchNode {
	nd := heap.Pop(&st.h).(*searchNode)
	st.bytes -= nd.bytes
	return nd
}

func (st *nodeStore) full() bool { return st.h.Len() > st.maxN || st.bytes > st.maxBytes }

// nodeHeap orders open nodes best bound first, ties by id.
type nodeHeap []*searchNode

func (h nodeHeap) Len() int { return len(h) }
func (h nodeHeap) Less(a, b int) bool {
	if h[a].key != h[b].key {
		return h[a].key < h[b].key
	}
	return h[a].id < h[b].id
}
func (h nodeHeap) Swap(a, b int) { h[a], h[b] = h[b], h[a] }
func (h *nodeHeap) Push(x any)   { *h = append(*h, x.(*searchNode)) }
func (h *nodeHeap) Pop() any {
	old := *h
	n := old[len(old)-1]
	*h = old[:len(old)-1]
	return n
}

// evalOut is what a worker learns about a node.
type evalOut struct {
	res       *NodeResult
	fixings   []Fixing // all the node's fixings, with the reduced-cost ones
	penalties [][]Penalty
	primal    [][]Entry
	err       error
	stopped   bool // interrupted: the node goes back to the store
}

// Search runs a Lagrangian branch and bound to proof or a limit. build
// makes a fresh copy of the problem; it is called once for the search
// (whose repairer runs at nodes) and once per worker (whose blocks bound
// the nodes), so that no block is solved from two goroutines at once.
// Every copy must describe the same problem.
//
// Nodes are the problem with more fixings, bounded by SolveNode warm
// started from the parent's prices, with the incumbent as cutoff (minus
// one, for an integral objective, beyond a tolerance). At each node the
// problem's repairer turns the answers into plans (any plan feasible for
// the problem is an incumbent); blocks that are Penalizers fix variables
// by reduced costs (a variable whose forcing would lift the node's bound
// past the cutoff is fixed to its other value) and give each child a
// bound before it is evaluated; the brancher splits the node.
//
// Order: nodes are evaluated in batches of Batch; a batch takes first
// the dive children (the brancher's first child of each node expanded in
// the previous batch: all of the batch until a plan is known, a quarter
// of it afterwards), then the open nodes of best bound. Repairs,
// incumbent updates and branching happen in node order after the batch,
// so the search is deterministic for a given seed and batch, whatever
// the worker count.
func Search(ctx context.Context, build func() (*Problem, error), br Brancher, s SearchSettings) (*SearchResult, error) {
	start := time.Now()
	if s.Time > 0 {
		var cancel context.CancelFunc
		ctx, cancel = context.WithDeadline(ctx, start.Add(s.Time))
		defer cancel()
	}
	main, err := build()
	if err != nil {
		return nil, err
	}
	if err := main.Validate(); err != nil {
		return nil, err
	}
	if br == nil {
		return nil, errors.New("decomp: search needs a brancher")
	}
	batch := s.Batch
	if batch <= 0 {
		batch = 8
	}
	workers := s.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, batch)
	maxOpen := s.MaxOpen
	if maxOpen <= 0 {
		maxOpen = 200000
	}
	maxBytes := s.MaxBytes
	if maxBytes <= 0 {
		maxBytes = DefaultMaxBytes
	}
	repairEvery := max(1, s.RepairEvery)
	probs := make([]*Problem, workers)
	for w := range probs {
		if probs[w], err = build(); err != nil {
			return nil, err
		}
		if len(probs[w].Blocks) != len(main.Blocks) || len(probs[w].Rows) != len(main.Rows) {
			return nil, errors.New("decomp: search: the problem copies differ in shape")
		}
	}
	sg := 1.0 // minimising terms: v' = sg·v
	if main.Sense == Maximise {
		sg = -1
	}
	se := &search{main: main, sg: sg, s: s, inc: s.Incumbent}
	rootPrices := s.Prices
	if rootPrices == nil {
		rootPrices = main.Prices
	}
	if rootPrices != nil {
		if len(rootPrices) != len(main.Rows) {
			return nil, fmt.Errorf("decomp: search: %d starting prices for %d rows", len(rootPrices), len(main.Rows))
		}
		rootPrices = slices.Clone(rootPrices)
		Project(main.Sense, main.Rows, rootPrices)
	}
	root := &searchNode{id: 0, prices: rootPrices, key: math.Inf(-1)}
	open := &nodeStore{maxN: maxOpen, maxBytes: maxBytes}
	var dives []*searchNode
	dives = append(dives, root)
	nextID := 1
	res := &SearchResult{RootBound: math.NaN()}
	tree := &res.Tree
	se.closedBest, se.droppedBest = math.Inf(1), math.Inf(1)
	var rootFix *fixChain // reduced-cost fixings of the root, valid everywhere
	status := SearchProved
	progress := func() {
		if s.Progress == nil {
			return
		}
		sp := &SearchProgress{Nodes: tree.Nodes, Open: open.Len() + len(dives), Bound: sg * se.globalBound(open, dives), Elapsed: time.Since(start), Incumbent: math.NaN()}
		if se.inc != nil {
			sp.Incumbent, sp.HasIncumbent = se.inc.Value, true
		}
		s.Progress(sp)
	}
	for open.Len()+len(dives) > 0 {
		if ctx.Err() != nil {
			status = se.ctxStatus(ctx)
			break
		}
		if s.Nodes > 0 && tree.Nodes >= s.Nodes {
			status = SearchNodeLimit
			break
		}
		if s.Rounds > 0 && tree.Rounds >= s.Rounds {
			status = SearchWorkLimit
			break
		}
		// The batch: dive children first, then best bound.
		size := batch
		if s.Nodes > 0 {
			size = min(size, s.Nodes-tree.Nodes)
		}
		diveSlots := size
		if se.inc != nil {
			diveSlots = max(1, size/4)
		}
		var nodes []*searchNode
		for _, d := range dives {
			if len(nodes) < diveSlots {
				nodes = append(nodes, d)
			} else {
				open.push(d)
			}
		}
		dives = dives[:0]
		for len(nodes) < size && open.Len() > 0 {
			nodes = append(nodes, open.pop())
		}
		// Nodes whose bound can no longer beat the incumbent close now.
		kept := nodes[:0]
		for _, nd := range nodes {
			if se.inc != nil && se.prunes(nd.key) {
				se.closeLeaf(nd.key)
				tree.CutOff++
				continue
			}
			kept = append(kept, nd)
		}
		nodes = kept
		if len(nodes) == 0 {
			continue
		}
		cutoff, hasCutoff := se.cutoff()
		roundsLeft := 0 // no cap
		if s.Rounds > 0 {
			roundsLeft = s.Rounds - tree.Rounds
		}
		outs := make([]evalOut, len(nodes))
		var wg sync.WaitGroup
		next := make(chan int)
		for w := 0; w < workers && w < len(nodes); w++ {
			wg.Add(1)
			go func(p *Problem) {
				defer wg.Done()
				for k := range next {
					outs[k] = se.evaluate(ctx, p, nodes[k], rootFix, cutoff, hasCutoff, roundsLeft)
				}
			}(probs[w])
		}
		for k := range nodes {
			next <- k
		}
		close(next)
		wg.Wait()
		// Merge in node order.
		for k, nd := range nodes {
			o := &outs[k]
			if o.err != nil {
				return nil, o.err
			}
			if o.stopped {
				open.push(nd)
				continue
			}
			tree.Nodes++
			tree.Depth = max(tree.Depth, nd.depth)
			r := o.res
			tree.Rounds += max(1, r.Rounds)
			if nd.id == 0 && r.HasBound {
				res.RootBound, res.RootPrices = r.Bound, slices.Clone(r.Prices)
			}
			if r.Infeasible {
				tree.Infeasible++
				continue
			}
			bound := math.Max(nd.key, sg*r.Bound)
			if !r.HasBound {
				open.push(nd)
				continue
			}
			if r.CutOff {
				se.closeLeaf(bound)
				tree.CutOff++
				continue
			}
			if main.Repair != nil && (nd.id == 0 || tree.Nodes%repairEvery == 0) {
				in := &RepairInput{Round: nd.id, Sense: main.Sense, Prices: r.Prices, Answers: r.BestAnswers,
					Bound: r.Bound, BoundPrices: r.Prices, Best: se.inc, Seed: mixSeed(s.Seed, uint64(nd.id)), Primal: o.primal,
					Fixings: o.fixings}
				plan, err := main.Repair.Repair(ctx, in)
				if err != nil {
					if ctx.Err() == nil {
						return nil, fmt.Errorf("decomp: search: repair at node %d: %w", nd.id, err)
					}
				} else {
					se.offer(plan, tree)
				}
			}
			if se.inc != nil && se.prunes(bound) {
				se.closeLeaf(bound)
				tree.CutOff++
				continue
			}
			// Reduced-cost fixing at the cutoff after this node's repair.
			fixings, nfixed, err := se.fixByCost(o)
			if err != nil {
				return nil, fmt.Errorf("decomp: search: node %d: %w", nd.id, err)
			}
			tree.Fixed += nfixed
			own := fixChain{fix: nil}
			if nd.id == 0 {
				tree.RootFixed = nfixed
				rootFix = &fixChain{fix: slices.Clone(fixings)}
			} else {
				// The node's reduced-cost fixings are passed on to its
				// children with its branching fixings.
				own = fixChain{up: nd.parent, fix: rcOnly(fixings, nd, rootFix)}
			}
			b, err := br.Branch(&BranchInput{Sense: main.Sense, Bound: sg * bound, Prices: r.Prices, Answers: r.BestAnswers,
				Fixings: fixings, Penalties: o.penalties, Primal: o.primal})
			if err != nil {
				return nil, fmt.Errorf("decomp: search: branching at node %d: %w", nd.id, err)
			}
			if b.Plan != nil {
				se.offer(b.Plan, tree)
			}
			if len(b.Children) == 0 {
				tree.Solved++
				if b.Plan != nil {
					se.closeLeaf(sg * b.Plan.Value)
				}
				continue
			}
			tree.Branched++
			var chain *fixChain
			if nd.id == 0 {
				chain = nil // root fixings travel in rootFix
			} else {
				c := own
				chain = &c
			}
			pen := penaltyIndex(o.penalties)
			for ci, cf := range b.Children {
				if !addsFixing(cf, fixings) {
					return nil, fmt.Errorf("decomp: search: the brancher's child %d of node %d fixes nothing new (the tree would not end)", ci, nd.id)
				}
				child := &searchNode{id: nextID, depth: nd.depth + 1, parent: chain, fix: cf, prices: r.Prices, key: bound}
				nextID++
				if !s.NoFixing {
					child.key = math.Max(child.key, sg*r.Bound+pen.lift(cf, fixings))
				}
				if se.inc != nil && se.prunes(child.key) {
					se.closeLeaf(child.key)
					tree.Pruned++
					continue
				}
				if ci == 0 {
					dives = append(dives, child)
					continue
				}
				open.push(child)
				if open.full() {
					se.shrink(open, tree)
				}
			}
		}
		progress()
	}
	if status == SearchProved && se.droppedBest < math.Inf(1) {
		status = SearchStoreFull
	}
	res.Status = status
	res.Plan = se.inc
	res.Bound = sg * se.globalBound(open, dives)
	tree.Open = open.Len() + len(dives)
	tree.OpenBytes, tree.PeakBytes = open.bytes, open.peak
	res.Proved = status == SearchProved
	res.Gap = math.Inf(1)
	if se.inc != nil {
		res.Gap = math.Abs(se.inc.Value-res.Bound) / math.Max(1, math.Abs(se.inc.Value))
	}
	res.Elapsed = time.Since(start)
	progress()
	return res, nil
}

func nodeSubgradient() Method { return &Subgradient{Theta: 1, Patience: 5, StopTheta: 1e-4} }

// NodeMethod returns a maker of fresh price rules for the short ascents of
// search nodes, by the names of Rules, each set for a few dozen rounds
// from warm prices: "subgradient" (the search's default: θ from 1, halved
// after 5 rounds without a better bound, stopping once it falls below
// 1e-4), "deflected" (θ from 1, halved after 5), "volume" (its step
// factor shrunk after 5 red rounds; its averaged primal reaches the
// nodes' repair and brancher) and "boxstep" (as in a plain run; for
// problems of at most BoxstepMaxRows rows, which the caller checks: on
// more, the first node's ascent fails). Every rule keeps node bounds
// valid; they differ in how fast a node's bound tightens.
func NodeMethod(name string) (func() Method, error) {
	switch name {
	case "subgradient", "":
		return nodeSubgradient, nil
	case "deflected":
		return func() Method { return &Deflected{Theta: 1, Patience: 5} }, nil
	case "volume":
		return func() Method { return &Volume{Patience: 5} }, nil
	case "boxstep":
		return func() Method { return &Boxstep{} }, nil
	}
	return nil, fmt.Errorf("decomp: unknown price rule %q (want one of %v)", name, Rules())
}

// search holds the shared state of a Search, in minimising terms.
type search struct {
	main        *Problem
	sg          float64
	s           SearchSettings
	inc         *Plan
	closedBest  float64 // best value of a closed leaf
	droppedBest float64 // best bound of a dropped node
}

// eps is the search's tolerance on bounds.
func (se *search) eps() float64 {
	scale := 1.0
	if se.inc != nil {
		scale = math.Max(scale, math.Abs(se.inc.Value))
	}
	return 1e-9 * scale
}

// cutoff is the value (in the problem's sense) a node's bound must pass
// for the node to hold no plan worth finding.
func (se *search) cutoff() (float64, bool) {
	if se.inc == nil {
		return 0, false
	}
	v := se.sg * se.inc.Value
	if se.main.IntegralObjective {
		v = v - 1 + se.eps()
	} else {
		v -= se.eps()
	}
	return se.sg * v, true
}

// prunes reports whether a node of bound key (minimising terms) can hold
// no plan better than the incumbent. Without an integral objective a
// bound that meets the cutoff exactly prunes too (a step of the ascent
// aimed at the cutoff lands on it where the bound is linear): the cutoff
// is the incumbent less the tolerance, so the node holds no plan better
// beyond the tolerance, and its bound joins the global bound within the
// tolerance of the plan. With an integral objective the test stays
// strict, so that the closed node's rounded bound reaches the plan.
func (se *search) prunes(key float64) bool {
	c, ok := se.cutoff()
	if !ok {
		return false
	}
	if se.main.IntegralObjective {
		return key > se.sg*c
	}
	return key >= se.sg*c
}

// leafValue is a closed node's contribution to the global bound.
func (se *search) closeLeaf(key float64) {
	if se.main.IntegralObjective && !math.IsInf(key, 0) {
		key = math.Ceil(key - se.eps())
	}
	se.closedBest = math.Min(se.closedBest, key)
}

func (se *search) offer(p *Plan, tree *TreeSummary) {
	if p == nil || math.IsNaN(p.Value) {
		return
	}
	// A plan better only within the tolerance is a tie: keeping the
	// incumbent keeps the cutoff, and so the node ascents, unchanged.
	if se.inc == nil || se.sg*p.Value < se.sg*se.inc.Value-se.eps() {
		se.inc = p
		tree.Plans++
	}
}

// globalBound is the best bound over everything not yet excluded.
func (se *search) globalBound(open *nodeStore, dives []*searchNode) float64 {
	b := math.Min(se.closedBest, se.droppedBest)
	if se.inc != nil {
		b = math.Min(b, se.sg*se.inc.Value)
	}
	if open.Len() > 0 {
		b = math.Min(b, open.h[0].key)
	}
	for _, d := range dives {
		b = math.Min(b, d.key)
	}
	if se.main.IntegralObjective && !math.IsInf(b, 0) {
		b = math.Ceil(b - se.eps())
	}
	return b
}

func (se *search) ctxStatus(ctx context.Context) SearchStatus {
	if errors.Is(ctx.Err(), context.DeadlineExceeded) {
		return SearchTimeLimit
	}
	return SearchInterrupted
}

// shrink keeps the best-bound nodes of the full store: at most half its
// count limit and half its byte limit.
func (se *search) shrink(open *nodeStore, tree *TreeSummary) {
	all := open.h
	sort.Slice(all, func(a, b int) bool { return all.Less(a, b) })
	keep, bytes := 0, int64(0)
	for keep < len(all) && keep < max(1, open.maxN/2) && bytes+all[keep].bytes <= open.maxBytes/2 {
		bytes += all[keep].bytes
		keep++
	}
	for _, nd := range all[keep:] {
		se.droppedBest = math.Min(se.droppedBest, nd.key)
		tree.Dropped++
	}
	clear(all[keep:])
	open.h = all[:keep]
	open.bytes = bytes
	heap.Init(&open.h)
}

// evaluate bounds one node on a worker's problem copy.
func (se *search) evaluate(ctx context.Context, p *Problem, nd *searchNode, rootFix *fixChain, cutoff float64, hasCutoff bool, roundsLeft int) evalOut {
	// The cutoff bounds the ascent; reduced-cost fixing happens at the merge.
	fix := rootFix.collect(nil)
	fix = nd.parentFixings(fix)
	fix = append(fix, nd.fix...)
	fix = append(fix, p.Fixings...)
	if err := SortFixings(fix); err != nil {
		// Contradicting fixings: the node holds no point.
		return evalOut{res: &NodeResult{Infeasible: true}}
	}
	fix = slices.CompactFunc(fix, func(a, b Fixing) bool { return a.Block == b.Block && a.Var == b.Var })
	rounds := se.s.NodeRounds
	if rounds <= 0 {
		rounds = 40
	}
	if nd.id == 0 {
		rounds = se.s.RootRounds
		if rounds <= 0 {
			rounds = 300
		}
	}
	if roundsLeft > 0 {
		rounds = min(rounds, roundsLeft)
	}
	var method Method
	if se.s.NewMethod != nil {
		method = se.s.NewMethod()
	} else {
		method = nodeSubgradient()
	}
	q := *p
	q.Fixings = nil
	res, err := SolveNode(ctx, &q, NodeSettings{Prices: nd.prices, Fixings: fix, Cutoff: cutoff, HasCutoff: hasCutoff,
		Rounds: rounds, Evaluator: Pool{Workers: 1}, Method: method, KeepBest: true})
	if err != nil {
		if ctx.Err() != nil {
			return evalOut{stopped: true}
		}
		return evalOut{err: fmt.Errorf("decomp: search: node %d: %w", nd.id, err)}
	}
	if ctx.Err() != nil && !res.Infeasible && !res.CutOff {
		return evalOut{stopped: true}
	}
	out := evalOut{res: res, fixings: fix}
	if pa, ok := method.(PrimalAverager); ok {
		out.primal = pa.AveragePrimal()
	}
	if res.Infeasible || res.CutOff || !res.HasBound || se.s.NoFixing {
		return out
	}
	q.Fixings = fix
	pen, err := penalties(ctx, &q, res.Prices, res.BestAnswers)
	if err != nil {
		return evalOut{err: fmt.Errorf("decomp: search: node %d: %w", nd.id, err)}
	}
	out.penalties = pen
	return out
}

// fixByCost adds the reduced-cost fixings of a node at the current cutoff
// to its fixings (sorted); it returns them and how many were added.
func (se *search) fixByCost(o *evalOut) ([]Fixing, int, error) {
	c, ok := se.cutoff()
	if !ok || o.penalties == nil {
		return o.fixings, 0, nil
	}
	add, lift := fixingsFrom(o.penalties, se.main.Sense, o.res.Bound, c)
	if len(add) == 0 {
		return o.fixings, 0, nil
	}
	// The plans the fixings exclude are bounded by the smallest lifted
	// bound: it joins the global bound like a closed leaf.
	se.closeLeaf(lift)
	fix := append(slices.Clone(o.fixings), add...)
	if err := SortFixings(fix); err != nil {
		return nil, 0, fmt.Errorf("reduced-cost fixing contradicts a fixing: %w", err)
	}
	return fix, len(add), nil
}

func (nd *searchNode) parentFixings(dst []Fixing) []Fixing { return nd.parent.collect(dst) }

// rcOnly returns the fixings of fixings that are neither inherited nor the
// node's own branching ones (the node's reduced-cost fixings), so that the
// chain holds each fixing once.
func rcOnly(fixings []Fixing, nd *searchNode, rootFix *fixChain) []Fixing {
	have := rootFix.collect(nil)
	have = nd.parentFixings(have)
	have = append(have, nd.fix...)
	_ = SortFixings(have)
	var out []Fixing
	for _, f := range fixings {
		i := sort.Search(len(have), func(i int) bool {
			return have[i].Block > f.Block || (have[i].Block == f.Block && have[i].Var >= f.Var)
		})
		if i < len(have) && have[i].Block == f.Block && have[i].Var == f.Var {
			continue
		}
		out = append(out, f)
	}
	// The node's own branching fixings travel with the chain too.
	return append(out, nd.fix...)
}

// penalties asks every Penalizer block for its penalties at prices, with
// answers the blocks' optima there under p.Fixings.
func penalties(ctx context.Context, p *Problem, prices []float64, answers []Answer) ([][]Penalty, error) {
	fix := slices.Clone(p.Fixings)
	if err := SortFixings(fix); err != nil {
		return nil, err
	}
	req := &Request{Sense: p.Sense, Prices: prices, Fixings: fix, Workers: 1}
	if err := p.Prepare(req); err != nil {
		return nil, err
	}
	out := make([][]Penalty, len(p.Blocks))
	some := false
	for k, b := range p.Blocks {
		pz, ok := b.(Penalizer)
		if !ok {
			continue
		}
		some = true
		req.Block = k
		v, err := pz.Penalties(ctx, req, &answers[k], nil)
		if err != nil {
			return nil, fmt.Errorf("block %d penalties: %w", k, err)
		}
		slices.SortFunc(v, func(a, b Penalty) int { return a.Var - b.Var })
		out[k] = v
	}
	if !some {
		return nil, nil
	}
	return out, nil
}

// fixingsFrom returns the reduced-cost fixings: a variable whose forcing
// would lift bound past threshold (in the problem's sense) is fixed to its
// other value. Penalties are of binary variables.
//
// The test is strict beyond a tolerance of 1e-9 relative, so that rounding
// in the bound never fixes a variable whose forcing only ties the
// threshold. It also returns the smallest lifted bound of the fixed
// variables (minimising terms; +Inf when none is fixed).
func fixingsFrom(pen [][]Penalty, sense Sense, bound, threshold float64) ([]Fixing, float64) {
	sg := 1.0
	if sense == Maximise {
		sg = -1
	}
	limit := sg*threshold + 1e-9*math.Max(1, math.Abs(threshold))
	lift := math.Inf(1)
	var out []Fixing
	for k, ps := range pen {
		for _, q := range ps {
			if l := sg*bound + q.Delta; q.Delta > 0 && l > limit {
				out = append(out, Fixing{Block: k, Var: q.Var, Value: 1 - q.Value})
				lift = math.Min(lift, l)
			}
		}
	}
	return out, lift
}

// ReducedCostFixings returns the variables that reduced costs fix: with
// answers the blocks' optima at prices under p.Fixings and bound their
// Lagrangian value, every variable of a Penalizer block whose forcing to
// a value would lift the bound strictly past threshold is fixed to its
// other value. Every plan strictly better than threshold honours the
// returned fixings; with threshold the optimum itself, so does every
// optimal plan.
func ReducedCostFixings(ctx context.Context, p *Problem, prices []float64, answers []Answer, bound, threshold float64) ([]Fixing, error) {
	pen, err := penalties(ctx, p, prices, answers)
	if err != nil {
		return nil, err
	}
	fix, _ := fixingsFrom(pen, p.Sense, bound, threshold)
	return fix, nil
}

// penIndex finds a node's penalties by block and variable.
type penIndex [][]Penalty

func penaltyIndex(p [][]Penalty) penIndex { return penIndex(p) }

// lift is a valid lower estimate of how much a child's fixings raise the
// node's Lagrangian value (minimising terms) at the node's prices: per
// block the largest penalty among its newly forced variables (forcing
// more variables of a block costs at least as much as forcing any one),
// summed over blocks. +Inf means the child has no point.
func (pi penIndex) lift(child, have []Fixing) float64 {
	if len(pi) == 0 {
		return 0
	}
	// Per block in order of appearance, summed in block order below so
	// that the sum is reproducible.
	var perBlock []Penalty // Var holds the block here
	for _, f := range child {
		if f.Block < 0 || f.Block >= len(pi) {
			continue
		}
		if g := FixingsOf(have, f.Block); len(g) > 0 {
			i := sort.Search(len(g), func(i int) bool { return g[i].Var >= f.Var })
			if i < len(g) && g[i].Var == f.Var {
				if g[i].Value != f.Value {
					return math.Inf(1) // contradicts a fixing of the node
				}
				continue
			}
		}
		ps := pi[f.Block]
		i := sort.Search(len(ps), func(i int) bool { return ps[i].Var >= f.Var })
		if i < len(ps) && ps[i].Var == f.Var && ps[i].Value == f.Value {
			j := slices.IndexFunc(perBlock, func(q Penalty) bool { return q.Var == f.Block })
			if j < 0 {
				perBlock = append(perBlock, Penalty{Var: f.Block, Delta: ps[i].Delta})
			} else {
				perBlock[j].Delta = math.Max(perBlock[j].Delta, ps[i].Delta)
			}
		}
	}
	slices.SortFunc(perBlock, func(a, b Penalty) int { return a.Var - b.Var })
	sum := 0.0
	for _, q := range perBlock {
		sum += q.Delta
	}
	return sum
}

// addsFixing reports whether child fixes a variable that the sorted
// fixings have leaves free (or fixes to another value).
func addsFixing(child, have []Fixing) bool {
	for _, f := range child {
		g := FixingsOf(have, f.Block)
		i := sort.Search(len(g), func(i int) bool { return g[i].Var >= f.Var })
		if i == len(g) || g[i].Var != f.Var || g[i].Value != f.Value {
			return true
		}
	}
	return false
}
