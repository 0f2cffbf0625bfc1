package heuristics

// Searcher is the compiled form of an Assignment for repeated calls of
// Repair and Improve: it flattens the matrices once and keeps the working
// arrays of the searches, so that a call allocates little beyond its result.
// Its memory is about 28 bytes per pair (m*n) once Repair has been given
// priced costs, 20 before.
//
// A Searcher reads p once, in NewSearcher; later changes to p are not seen.
// It is not safe for concurrent use: one goroutine at a time, with one
// exception that lets a caller use two cores. Repair touches only its
// construction buffers, and AddItemPrices and Restrict only the pair bounds
// and the restriction, so Repair may run on one goroutine while the other
// runs AddItemPrices and then Restrict; no other method may run meanwhile.
// Either order gives the same state afterwards.
type Searcher struct {
	p      *Assignment
	base   *model
	sign   float64
	priced []float64 // buffer of the priced costs of Repair
	srch   *search
	rep    *repairer

	// reduced-cost fixing (reduced.go)
	bounds     *pairBounds
	active     *model    // restricted model of the searches, nil for none
	restricted []float64 // its cost buffer
	ropt       []int32   // its allowed lists
	rbits      []uint64  // and their bit sets
	ranked     []int32   // per item (CSR of active), allowed resources by bound

	// plan search (relink.go)
	elite []elitePlan
	tasks []*search // one per task of PlanSearch
	tmods []model   // the narrowed model of each task
}

// NewSearcher validates and compiles p.
func NewSearcher(p *Assignment) (*Searcher, error) {
	if err := p.Validate(); err != nil {
		return nil, err
	}
	md := compile(p)
	sign := 1.0
	if p.Maximise {
		sign = -1
	}
	return &Searcher{
		p:    p,
		base: md,
		sign: sign,
		srch: newSearch(md.m, md.n),
		rep:  newRepairer(md.m, md.n),
	}, nil
}

// Size returns the number of resources and items of the compiled
// assignment.
func (sr *Searcher) Size() (resources, items int) { return sr.base.m, sr.base.n }
