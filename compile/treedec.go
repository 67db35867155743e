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

// dcWorkBudget bounds the adjacency work of the elimination; past it the
// remaining variables are eliminated together (common practice, no source).
const dcWorkBudget = 50_000_000

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
	fill, deg int64
	v, ver    int32
}

type dcHeap []dcHeapItem

func (h dcHeap) Len() int { return len(h) }
func (h dcHeap) Less(i, j int) bool {
	a, b := h[i], h[j]
	if a.fill != b.fill {
		return a.fill < b.fill
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

// dcFill returns the number of missing edges among the neighbours of v, or
// an upper bound when v has many neighbours.
func dcFill(adj [][]int32, v int32) int64 {
	ns := adj[v]
	d := int64(len(ns))
	if d > 40 {
		return d * (d - 1) / 2
	}
	var fill int64
	for i, a := range ns {
		for _, b := range ns[i+1:] {
			if _, ok := slices.BinarySearch(adj[a], b); !ok {
				fill++
			}
		}
	}
	return fill
}

// dcDecompose computes an elimination order of the primal graph of f by the
// min-fill heuristic (fill scores are updated for the neighbours of each
// eliminated variable only), and returns for every variable its depth in the
// elimination tree (0 for roots) and the width of the order (the largest
// number of later neighbours a variable has when it is eliminated).
func dcDecompose(ctx context.Context, f *CNF) (depth []int32, width int, err error) {
	n := f.NumVars
	orig := dcPrimal(f)
	adj := make([][]int32, n+1)
	for v := range adj {
		adj[v] = slices.Clone(orig[v])
	}
	ver := make([]int32, n+1)
	alive := make([]bool, n+1)
	h := make(dcHeap, 0, n)
	for v := int32(1); v <= int32(n); v++ {
		alive[v] = true
		h = append(h, dcHeapItem{dcFill(adj, v), int64(len(adj[v])), v, 0})
	}
	heap.Init(&h)
	order := make([]int32, 0, n)
	var buf []int32
	work := 0
	for h.Len() > 0 {
		if work > dcWorkBudget {
			// Eliminate the rest in order of degree; their bags hold at
			// most all of them.
			var rest []int32
			for v := int32(1); v <= int32(n); v++ {
				if alive[v] {
					rest = append(rest, v)
				}
			}
			slices.SortStableFunc(rest, func(a, b int32) int { return len(adj[a]) - len(adj[b]) })
			order = append(order, rest...)
			width = max(width, len(rest)-1)
			break
		}
		it := heap.Pop(&h).(dcHeapItem)
		v := it.v
		if !alive[v] || it.ver != ver[v] {
			continue
		}
		if len(order)&255 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, 0, err
			}
		}
		alive[v] = false
		order = append(order, v)
		ns := adj[v]
		width = max(width, len(ns))
		for _, u := range ns {
			// adj[u] ∪ ns minus {u, v}
			buf = buf[:0]
			a, b := adj[u], ns
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
			work += len(buf)
			adj[u] = append(adj[u][:0], buf...)
		}
		adj[v] = nil
		for _, u := range ns {
			ver[u]++
			fill := dcFill(adj, u)
			work += len(adj[u]) * len(adj[u])
			heap.Push(&h, dcHeapItem{fill, int64(len(adj[u])), u, ver[u]})
		}
	}
	// Elimination tree (Liu 1986 style, with path compression): the parent
	// of v is the first variable eliminated after v among those v is
	// adjacent to once the variables before it are eliminated.
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
		for _, u := range orig[v] {
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
	depth = make([]int32, n+1)
	for i := len(order) - 1; i >= 0; i-- {
		v := order[i]
		if p := parent[v]; p >= 0 {
			depth[v] = depth[p] + 1
		}
	}
	return depth, width, nil
}
