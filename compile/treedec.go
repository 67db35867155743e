package compile

import (
	"container/heap"
	"context"
	"slices"
)

// dcLargeClause is the clause length above which the primal graph links a
// clause's variables in a path instead of a clique, to keep the graph small.
// The graph only guides decisions, so this changes speed, never answers
// (common practice, no source).
const dcLargeClause = 64

// dcWorkBudget bounds the adjacency and scoring work of one elimination;
// past it the remaining variables are eliminated by degree (see dcChainMax)
// (common practice, no source).
const dcWorkBudget = 50_000_000

// dcChainMax is the largest number of variables left at the work budget
// that are eliminated in one pass in order of their degree at that point;
// when more are left they are eliminated by least current degree, which
// keeps the width far lower (a random sparse network of 128 rooms: 209
// instead of 2759) (common practice, no source).
const dcChainMax = 256

// dcExactFill is the largest degree for which the fill of a variable is
// counted; above it the fill is taken to be as large as it can be, which
// puts variables of many neighbours late in the order (common practice, no
// source).
const dcExactFill = 40

// dcPrimal returns the sorted adjacency lists of the primal graph of f: two
// variables are adjacent when they share a clause.
func dcPrimal(f *CNF) [][]int32 {
	adj := make([][]int32, f.NumVars+1)
	var vs []int32
	for i := 0; i < f.NumClauses(); i++ {
		vs = vs[:0]
		for _, l := range f.Clause(i) {
			vs = append(vs, int32(l.Var()))
		}
		slices.Sort(vs)
		vs = slices.Compact(vs)
		if len(vs) > dcLargeClause {
			for k := 1; k < len(vs); k++ {
				adj[vs[k-1]] = append(adj[vs[k-1]], vs[k])
				adj[vs[k]] = append(adj[vs[k]], vs[k-1])
			}
			continue
		}
		for a := range vs {
			for b := range vs {
				if a != b {
					adj[vs[a]] = append(adj[vs[a]], vs[b])
				}
			}
		}
	}
	for v := range adj {
		slices.Sort(adj[v])
		adj[v] = slices.Clip(slices.Compact(adj[v]))
	}
	return adj
}

// dcHeapItem is an entry of the elimination queue; entries whose version is
// stale are skipped.
type dcHeapItem struct {
	score, deg int64
	v, ver     int32
}

type dcHeap []dcHeapItem

func (h dcHeap) Len() int { return len(h) }
func (h dcHeap) Less(i, j int) bool {
	a, b := h[i], h[j]
	if a.score != b.score {
		return a.score < b.score
	}
	if a.deg != b.deg {
		return a.deg < b.deg
	}
	return a.v < b.v
}
func (h dcHeap) Swap(i, j int) { h[i], h[j] = h[j], h[i] }
func (h *dcHeap) Push(x any)   { *h = append(*h, x.(dcHeapItem)) }
func (h *dcHeap) Pop() any {
	old := *h
	x := old[len(old)-1]
	*h = old[:len(old)-1]
	return x
}

// dcElim is the state of one elimination of the primal graph.
type dcElim struct {
	adj   [][]int32
	mark  []uint32 // per variable: stamp of the neighbourhood being scored
	stamp uint32
	work  int
}

// fill returns the number of missing edges among the neighbours of v,
// counting the edges by marking the neighbours, or the largest possible
// number when v has more than dcExactFill neighbours.
func (e *dcElim) fill(v int32) int64 {
	ns := e.adj[v]
	d := int64(len(ns))
	if d < 2 {
		return 0
	}
	if d > dcExactFill {
		return d * (d - 1) / 2
	}
	e.stamp++
	st := e.stamp
	for _, a := range ns {
		e.mark[a] = st
	}
	var have int64
	for _, a := range ns {
		for _, b := range e.adj[a] {
			if e.mark[b] == st {
				have++
			}
		}
	}
	return d*(d-1)/2 - have/2
}

// dcOrder eliminates the variables of the graph adj (not modified) by the
// min-fill heuristic: the variable with the fewest missing edges among its
// neighbours first, then the one of least degree, then the lowest. Fill
// scores are updated for the neighbours of each eliminated variable only
// (common practice, no source). Once the work passes budget the remaining
// variables are eliminated by degree (dcChainMax). It returns the order and
// its width (the largest number of later neighbours of a variable when it
// is eliminated).
func dcOrder(ctx context.Context, adj [][]int32, budget int) (order []int32, width int, err error) {
	n := len(adj) - 1
	e := &dcElim{adj: make([][]int32, n+1), mark: make([]uint32, n+1)}
	for v := range adj {
		e.adj[v] = slices.Clone(adj[v])
	}
	cheap := false // past the work budget: score by degree only
	score := func(v int32) int64 {
		if cheap {
			return int64(len(e.adj[v]))
		}
		return e.fill(v)
	}
	ver := make([]int32, n+1)
	alive := make([]bool, n+1)
	h := make(dcHeap, 0, n)
	for v := int32(1); v <= int32(n); v++ {
		alive[v] = true
		h = append(h, dcHeapItem{score(v), int64(len(e.adj[v])), v, 0})
	}
	heap.Init(&h)
	order = make([]int32, 0, n)
	var buf []int32
	var chain []int32 // past the budget: the rest, in the order to eliminate them
	for h.Len() > 0 || len(chain) > 0 {
		if !cheap && e.work > budget {
			cheap = true
			if rest := n - len(order); rest <= dcChainMax {
				// Few are left: eliminate them in order of degree.
				for v := int32(1); v <= int32(n); v++ {
					if alive[v] {
						chain = append(chain, v)
					}
				}
				slices.SortStableFunc(chain, func(a, b int32) int { return len(e.adj[a]) - len(e.adj[b]) })
				h = h[:0]
			} else {
				// Go on by least degree: rescore what is left.
				h = h[:0]
				for v := int32(1); v <= int32(n); v++ {
					if alive[v] {
						ver[v]++
						h = append(h, dcHeapItem{score(v), int64(len(e.adj[v])), v, ver[v]})
					}
				}
				heap.Init(&h)
			}
		}
		var v int32
		if len(chain) > 0 {
			v, chain = chain[0], chain[1:]
		} else {
			it := heap.Pop(&h).(dcHeapItem)
			v = it.v
			if !alive[v] || it.ver != ver[v] {
				continue
			}
		}
		if len(order)&255 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, 0, err
			}
		}
		alive[v] = false
		order = append(order, v)
		ns := e.adj[v]
		width = max(width, len(ns))
		for _, u := range ns {
			// adj[u] ∪ ns minus {u, v}
			buf = buf[:0]
			a, b := e.adj[u], ns
			for len(a) > 0 || len(b) > 0 {
				var x int32
				switch {
				case len(b) == 0 || len(a) > 0 && a[0] < b[0]:
					x, a = a[0], a[1:]
				case len(a) == 0 || b[0] < a[0]:
					x, b = b[0], b[1:]
				default:
					x, a, b = a[0], a[1:], b[1:]
				}
				if x != u && x != v {
					buf = append(buf, x)
				}
			}
			e.work += len(buf)
			e.adj[u] = append(e.adj[u][:0], buf...)
		}
		e.adj[v] = nil
		for _, u := range ns {
			if chain != nil {
				break
			}
			ver[u]++
			if !cheap {
				e.work += len(e.adj[u]) * len(e.adj[u])
			}
			heap.Push(&h, dcHeapItem{score(u), int64(len(e.adj[u])), u, ver[u]})
		}
	}
	return order, width, nil
}

// dcTree returns the parent of every variable in the elimination tree of
// order on the graph adj (-1 for roots): the parent of v is the first
// variable eliminated after v among those v is adjacent to once the
// variables before it are eliminated (Liu 1986, with path compression).
func dcTree(adj [][]int32, order []int32) []int32 {
	n := len(adj) - 1
	pos := make([]int32, n+1)
	for i, v := range order {
		pos[v] = int32(i)
	}
	parent := make([]int32, n+1)
	anc := make([]int32, n+1)
	for v := range parent {
		parent[v] = -1
		anc[v] = -1
	}
	for _, v := range order {
		for _, u := range adj[v] {
			if pos[u] >= pos[v] {
				continue
			}
			r := u
			for anc[r] != -1 && anc[r] != v {
				next := anc[r]
				anc[r] = v
				r = next
			}
			if anc[r] == -1 {
				anc[r] = v
				parent[r] = v
			}
		}
	}
	return parent
}

// dcDepths returns the depth of every variable in the elimination tree of
// order with the given parents (0 for roots) and the height of the tree.
func dcDepths(order, parent []int32) (depth []int32, height int) {
	depth = make([]int32, len(parent))
	for i := len(order) - 1; i >= 0; i-- {
		v := order[i]
		if p := parent[v]; p >= 0 {
			depth[v] = depth[p] + 1
		}
		height = max(height, int(depth[v])+1)
	}
	return depth, height
}

// dcDecompose computes an elimination order of the primal graph of f by the
// min-fill heuristic (dcOrder), and returns for every variable its depth in the
// elimination tree (0 for roots) and the width of the order (the largest
// number of later neighbours a variable has when it is eliminated).
func dcDecompose(ctx context.Context, f *CNF) (depth []int32, width int, err error) {
	adj := dcPrimal(f)
	order, width, err := dcOrder(ctx, adj, dcWorkBudget)
	if err != nil {
		return nil, 0, err
	}
	depth, _ = dcDepths(order, dcTree(adj, order))
	return depth, width, nil
}
