package unfold

import (
	"slices"
	"strconv"
	"strings"
)

// digraph is a small directed graph over vertices 0..n-1 in compressed
// sparse rows, used for the sequence search on one component at a time.
type digraph struct {
	n     int
	start []int32
	adj   []int32
	pred  [][]int32 // predecessor lists, made by preds on first use
}

// newDigraph builds a digraph from parallel edge lists.
func newDigraph(n int, from, to []int32) *digraph {
	start, adj := csr(n, from, to)
	return &digraph{n: n, start: start, adj: adj}
}

func (d *digraph) succ(v int32) []int32 { return d.adj[d.start[v]:d.start[v+1]] }

func (d *digraph) edges() int { return len(d.adj) }

// preds returns the predecessors of every vertex (self-loops included),
// made on the first call and shared by the later ones.
func (d *digraph) preds() [][]int32 {
	if d.pred == nil {
		d.pred = make([][]int32, d.n)
		for v := int32(0); v < int32(d.n); v++ {
			for _, w := range d.succ(v) {
				d.pred[w] = append(d.pred[w], v)
			}
		}
	}
	return d.pred
}

// local returns the subgraph of g induced by the sorted vertex list vs, with
// vertex i of the result standing for vs[i].
func (g *Graph) local(vs []int32) *digraph {
	var from, to []int32
	for i, v := range vs {
		for _, w := range g.Succ(v) {
			if j, ok := slices.BinarySearch(vs, w); ok {
				from = append(from, int32(i))
				to = append(to, int32(j))
			}
		}
	}
	return newDigraph(len(vs), from, to)
}

// induce returns the subgraph of d induced by the vertex list vs (in any
// order), with vertex i of the result standing for vs[i].
func (d *digraph) induce(vs []int32) *digraph {
	pos := make(map[int32]int32, len(vs))
	for i, v := range vs {
		pos[v] = int32(i)
	}
	var from, to []int32
	for i, v := range vs {
		for _, w := range d.succ(v) {
			if j, ok := pos[w]; ok {
				from = append(from, int32(i))
				to = append(to, j)
			}
		}
	}
	return newDigraph(len(vs), from, to)
}

// sccs returns the strongly connected components of d in topological order
// (edges go from earlier to later components), members sorted, and whether
// each is cyclic.
func (d *digraph) sccs() (comps [][]int32, cyclic []bool) {
	comp, count := tarjan(d.n, d.start, d.adj)
	comps = make([][]int32, count)
	for v := 0; v < d.n; v++ {
		c := count - 1 - int(comp[v])
		comps[c] = append(comps[c], int32(v))
	}
	cyclic = make([]bool, count)
	for c, vs := range comps {
		if len(vs) > 1 {
			cyclic[c] = true
			continue
		}
		_, cyclic[c] = slices.BinarySearch(d.succ(vs[0]), vs[0])
	}
	return comps, cyclic
}

// acyclicWithout reports whether d minus the vertices marked in removed has
// no cycle (self-loops included): whether every vertex left gets a place in
// a topological order.
func (d *digraph) acyclicWithout(removed []bool) bool {
	left := 0
	for _, r := range removed[:d.n] {
		if !r {
			left++
		}
	}
	return len(d.topoWithout(removed)) == left
}

// topoWithout returns the vertices of d not marked removed in a topological
// order, by Kahn's algorithm; where d minus the removed vertices has cycles
// (self-loops included), the vertices on or after them are left out.
func (d *digraph) topoWithout(removed []bool) []int32 {
	indeg := make([]int32, d.n)
	for v := 0; v < d.n; v++ {
		if removed[v] {
			continue
		}
		for _, w := range d.succ(int32(v)) {
			if !removed[w] {
				indeg[w]++
			}
		}
	}
	// The queue, never popped, is the order.
	var queue []int32
	for v := 0; v < d.n; v++ {
		if !removed[v] && indeg[v] == 0 {
			queue = append(queue, int32(v))
		}
	}
	for i := 0; i < len(queue); i++ {
		v := queue[i]
		for _, w := range d.succ(v) {
			if removed[w] {
				continue
			}
			indeg[w]--
			if indeg[w] == 0 {
				queue = append(queue, w)
			}
		}
	}
	return queue
}

// undirected returns the symmetric closure of d without self-loops.
func (d *digraph) undirected() *digraph {
	var from, to []int32
	for v := 0; v < d.n; v++ {
		for _, w := range d.succ(int32(v)) {
			if w != int32(v) {
				from = append(from, int32(v), w)
				to = append(to, w, int32(v))
			}
		}
	}
	return newDigraph(d.n, from, to)
}

// copies returns the largest number of occurrences of one vertex in seq.
func copies(n int, seq []int32) int {
	count := make([]int32, n)
	most := int32(0)
	for _, v := range seq {
		count[v]++
		most = max(most, count[v])
	}
	return int(most)
}

// key returns a string that identifies d: equal keys, equal graphs.
func (d *digraph) key() string {
	var b strings.Builder
	b.WriteString(strconv.Itoa(d.n))
	for v := 0; v < d.n; v++ {
		b.WriteByte(';')
		for i, w := range d.succ(int32(v)) {
			if i > 0 {
				b.WriteByte(',')
			}
			b.WriteString(strconv.Itoa(int(w)))
		}
	}
	return b.String()
}
