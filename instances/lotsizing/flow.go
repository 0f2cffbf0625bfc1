package lotsizing

import "math"

// netflow is a minimum-cost flow on a small directed graph, solved by the
// primal-dual method: Dijkstra's algorithm on reduced costs gives node
// potentials, then blocking flows (levels and current arcs, as in Dinic's
// maximum flow) saturate the arcs of zero reduced cost before the next
// Dijkstra. Costs must be non-negative. The graph is rebuilt for every
// solve; its slices are reused.
type netflow struct {
	head       []int32
	next, to   []int32
	capa, cost []float64 // residual capacity and cost of every arc; arc e^1 is the reverse of e
	pot, dist  []float64
	level      []int32
	iter       []int32
	queue      []int32
	pq         distHeap
	capEps     float64
	// work counts the arcs scanned, a measure of effort that does not
	// depend on the clock.
	work int
}

func (g *netflow) reset(nodes int) {
	g.head = g.head[:0]
	for range nodes {
		g.head = append(g.head, -1)
	}
	g.next, g.to, g.capa, g.cost = g.next[:0], g.to[:0], g.capa[:0], g.cost[:0]
}

// arc adds u→v with capacity c and unit cost w and returns its number; the
// flow on it is later capa[e^1].
func (g *netflow) arc(u, v int, c, w float64) int {
	e := len(g.to)
	g.to = append(g.to, int32(v), int32(u))
	g.capa = append(g.capa, c, 0)
	g.cost = append(g.cost, w, -w)
	g.next = append(g.next, g.head[u], g.head[v])
	g.head[u], g.head[v] = int32(e), int32(e+1)
	return e
}

func (g *netflow) flowOn(e int) float64 { return g.capa[e^1] }

type distItem struct {
	d float64
	v int32
}

// distHeap is a binary min-heap by distance (written out: the interface
// of container/heap would allocate on every push).
type distHeap []distItem

func (h *distHeap) push(x distItem) {
	q := append(*h, x)
	for k := len(q) - 1; k > 0; {
		p := (k - 1) / 2
		if q[p].d <= q[k].d {
			break
		}
		q[p], q[k] = q[k], q[p]
		k = p
	}
	*h = q
}

func (h *distHeap) pop() distItem {
	q := *h
	top := q[0]
	last := len(q) - 1
	q[0] = q[last]
	q = q[:last]
	for k := 0; ; {
		c := 2*k + 1
		if c >= len(q) {
			break
		}
		if c+1 < len(q) && q[c+1].d < q[c].d {
			c++
		}
		if q[k].d <= q[c].d {
			break
		}
		q[k], q[c] = q[c], q[k]
		k = c
	}
	*h = q
	return top
}

// run sends up to need units from s to t at least cost and returns the
// amount sent and its cost.
func (g *netflow) run(s, t int, need float64) (sent, total float64) {
	n := len(g.head)
	g.pot = growF(g.pot, n)
	g.dist = growF(g.dist, n)
	for v := range g.pot {
		g.pot[v] = 0
	}
	if cap(g.level) < n {
		g.level, g.iter = make([]int32, n), make([]int32, n)
	}
	g.level, g.iter = g.level[:n], g.iter[:n]
	g.capEps = 1e-9 * math.Max(1, need)
	inf := math.Inf(1)
	for need-sent > g.capEps {
		// Dijkstra on reduced costs.
		for v := range g.dist {
			g.dist[v] = inf
		}
		g.dist[s] = 0
		g.pq = append(g.pq[:0], distItem{0, int32(s)})
		for len(g.pq) > 0 {
			it := g.pq.pop()
			u := int(it.v)
			if it.d > g.dist[u] {
				continue
			}
			for e := g.head[u]; e >= 0; e = g.next[e] {
				g.work++
				if g.capa[e] <= g.capEps {
					continue
				}
				v := int(g.to[e])
				rc := g.cost[e] + g.pot[u] - g.pot[v]
				if rc < 0 {
					rc = 0
				}
				if d := it.d + rc; d < g.dist[v] {
					g.dist[v] = d
					g.pq.push(distItem{d, int32(v)})
				}
			}
		}
		dt := g.dist[t]
		if dt == inf {
			break
		}
		for v := range g.pot {
			g.pot[v] += math.Min(g.dist[v], dt)
		}
		// Blocking flows on the admissible arcs (zero reduced cost).
		for need-sent > g.capEps && g.levels(s, t) {
			for v := range g.iter {
				g.iter[v] = g.head[v]
			}
			for need-sent > g.capEps {
				f := g.push(s, t, need-sent)
				if f <= g.capEps {
					break
				}
				sent += f
			}
		}
	}
	for e := 0; e < len(g.to); e += 2 {
		total += g.cost[e] * g.capa[e+1]
	}
	return sent, total
}

func (g *netflow) admissible(e int32, u int) bool {
	if g.capa[e] <= g.capEps {
		return false
	}
	v := g.to[e]
	rc := g.cost[e] + g.pot[u] - g.pot[v]
	return rc <= 1e-9*(1+math.Abs(g.pot[u])+math.Abs(g.cost[e]))
}

// levels numbers the nodes by breadth-first distance from s over
// admissible arcs and reports whether t is reached.
func (g *netflow) levels(s, t int) bool {
	for v := range g.level {
		g.level[v] = -1
	}
	g.level[s] = 0
	g.queue = append(g.queue[:0], int32(s))
	for k := 0; k < len(g.queue); k++ {
		u := int(g.queue[k])
		for e := g.head[u]; e >= 0; e = g.next[e] {
			g.work++
			v := g.to[e]
			if g.level[v] < 0 && g.admissible(e, u) {
				g.level[v] = g.level[u] + 1
				g.queue = append(g.queue, v)
			}
		}
	}
	return g.level[t] >= 0
}

// push sends one augmenting path's flow (at most f) from u to t along
// level-increasing admissible arcs.
func (g *netflow) push(u, t int, f float64) float64 {
	if u == t {
		return f
	}
	for ; g.iter[u] >= 0; g.iter[u] = g.next[g.iter[u]] {
		e := g.iter[u]
		g.work++
		v := int(g.to[e])
		if g.level[v] != g.level[u]+1 || !g.admissible(e, u) {
			continue
		}
		if d := g.push(v, t, math.Min(f, g.capa[e])); d > g.capEps {
			g.capa[e] -= d
			g.capa[e^1] += d
			return d
		}
	}
	return 0
}

func growF(s []float64, n int) []float64 {
	if cap(s) < n {
		return make([]float64, n)
	}
	return s[:n]
}
