package unfold

import (
	"container/heap"
	"slices"
)

// exactFVSLimit is the largest graph whose feedback vertex set is found by
// exhaustive search.
const exactFVSLimit = 12

// minimalizeLimit is the largest graph whose greedy feedback vertex set is
// made minimal by trying to drop each member, and minimalizeWork bounds the
// vertices and edges visited doing so (common practice, no source).
const (
	minimalizeLimit = 3000
	minimalizeWork  = 100000000
)

// feedbackSet returns the feedback-set construction for the strongly
// connected digraph d: with X a feedback vertex set of d and T a sequence holding
// every simple path of d − X (its topological order, since d − X is
// acyclic), the sequence T·π·T·π·…·π·T with |X| copies of π (X in any order)
// and |X|+1 copies of T. It is valid: a simple path meets X at most |X| times
// and, between two meetings, runs inside d − X, where T holds it.
func (s *searcher) feedbackSet(d *digraph, x []int32) []int32 {
	removed := make([]bool, d.n)
	for _, v := range x {
		removed[v] = true
	}
	t := d.topoWithout(removed)
	if !s.fits((len(x)+1)*len(t) + len(x)*len(x)) {
		return nil
	}
	seq := make([]int32, 0, (len(x)+1)*len(t)+len(x)*len(x))
	seq = append(seq, t...)
	for range x {
		seq = append(seq, x...)
		seq = append(seq, t...)
	}
	return seq
}

// fvs returns a feedback vertex set of d: a smallest one for small graphs,
// otherwise one found by reductions and simulated annealing (annealFVS).
func (s *searcher) fvs(d *digraph) []int32 {
	if d.n <= exactFVSLimit {
		if x := exactFVS(d); x != nil {
			return x
		}
	}
	return annealFVS(s.ctx, d)
}

// exactFVS returns a smallest feedback vertex set of d by trying subsets in
// order of size.
func exactFVS(d *digraph) []int32 {
	removed := make([]bool, d.n)
	var try func(from, left int) bool
	try = func(from, left int) bool {
		if left == 0 {
			return d.acyclicWithout(removed)
		}
		for v := from; v <= d.n-left; v++ {
			removed[v] = true
			if try(v+1, left-1) {
				return true
			}
			removed[v] = false
		}
		return false
	}
	for k := 0; k <= d.n; k++ {
		if try(0, k) {
			var x []int32
			for v, r := range removed {
				if r {
					x = append(x, int32(v))
				}
			}
			return x
		}
	}
	return nil
}

// greedyFVS returns a feedback vertex set of d found greedily: vertices
// that cannot lie on a cycle (no in-edge or no out-edge left) are dropped,
// self-loops are taken, and otherwise the vertex with the largest product of
// in- and out-degree is taken; on graphs of moderate size members are then
// dropped while the rest remains a feedback vertex set, as long as the work
// budget lasts.
func greedyFVS(d *digraph) []int32 {
	n := d.n
	// Predecessor lists.
	var from, to []int32
	for v := 0; v < n; v++ {
		for _, w := range d.succ(int32(v)) {
			from = append(from, w)
			to = append(to, int32(v))
		}
	}
	pstart, pred := csr(n, from, to)
	indeg := make([]int32, n)
	outdeg := make([]int32, n)
	gone := make([]bool, n)
	for v := 0; v < n; v++ {
		outdeg[v] = int32(len(d.succ(int32(v))))
		indeg[v] = pstart[v+1] - pstart[v]
	}
	var x []int32
	var queue []int32 // vertices to drop: no in-edge or no out-edge
	remove := func(v int32) {
		gone[v] = true
		for _, w := range d.succ(v) {
			if !gone[w] {
				indeg[w]--
				if indeg[w] == 0 {
					queue = append(queue, w)
				}
			}
		}
		for _, u := range pred[pstart[v]:pstart[v+1]] {
			if !gone[u] {
				outdeg[u]--
				if outdeg[u] == 0 {
					queue = append(queue, u)
				}
			}
		}
	}
	h := &degreeHeap{}
	for v := 0; v < n; v++ {
		if _, loop := slices.BinarySearch(d.succ(int32(v)), int32(v)); loop {
			x = append(x, int32(v))
			remove(int32(v))
		}
	}
	for v := 0; v < n; v++ {
		if !gone[v] && (indeg[v] == 0 || outdeg[v] == 0) {
			queue = append(queue, int32(v))
		}
	}
	drain := func() {
		for len(queue) > 0 {
			v := queue[len(queue)-1]
			queue = queue[:len(queue)-1]
			if !gone[v] {
				remove(v)
			}
		}
	}
	drain()
	for v := 0; v < n; v++ {
		if !gone[v] {
			heap.Push(h, degreeItem{int32(v), int64(indeg[v]) * int64(outdeg[v])})
		}
	}
	for h.Len() > 0 {
		it := heap.Pop(h).(degreeItem)
		v := it.v
		if gone[v] {
			continue
		}
		if key := int64(indeg[v]) * int64(outdeg[v]); key != it.key {
			heap.Push(h, degreeItem{v, key}) // stale entry
			continue
		}
		x = append(x, v)
		remove(v)
		drain()
	}
	slices.Sort(x)
	if n <= minimalizeLimit {
		removed := make([]bool, n)
		for _, v := range x {
			removed[v] = true
		}
		kept := x[:0]
		work := minimalizeWork
		for _, v := range x {
			if work -= n + d.edges(); work < 0 {
				kept = append(kept, v)
				continue
			}
			removed[v] = false
			if !d.acyclicWithout(removed) {
				removed[v] = true
				kept = append(kept, v)
			}
		}
		x = kept
	}
	return x
}

type degreeItem struct {
	v   int32
	key int64
}

// degreeHeap is a max-heap of vertices by key, ties broken by the smaller
// vertex.
type degreeHeap []degreeItem

func (h degreeHeap) Len() int { return len(h) }
func (h degreeHeap) Less(i, j int) bool {
	if h[i].key != h[j].key {
		return h[i].key > h[j].key
	}
	return h[i].v < h[j].v
}
func (h degreeHeap) Swap(i, j int) { h[i], h[j] = h[j], h[i] }
func (h *degreeHeap) Push(x any)   { *h = append(*h, x.(degreeItem)) }
func (h *degreeHeap) Pop() any {
	old := *h
	it := old[len(old)-1]
	*h = old[:len(old)-1]
	return it
}

// repetition returns the best plain repetition of an order of d. For an
// order, a simple path needs one round plus one per edge it takes against
// the order (a back edge); the back edges of a simple path have distinct
// tails and distinct heads, so they form a matching between tails and heads
// of back edges, and 1 + the size of a maximum matching rounds suffice.
// Orders tried: feedback vertex set first and last, the rest topologically
// sorted. On small graphs fewer rounds are tried with the validity checker.
func (s *searcher) repetition(d *digraph, x []int32) []int32 {
	removed := make([]bool, d.n)
	for _, v := range x {
		removed[v] = true
	}
	t := d.topoWithout(removed)
	orders := [][]int32{append(slices.Clone(x), t...), append(slices.Clone(t), x...)}
	// Every vertex occurs once a round, so fewer rounds is better; the
	// sequence is built for the best order only.
	var best []int32
	bestRounds := 0
	for _, order := range orders {
		rounds := min(1+backMatching(d, order), d.n)
		if d.n <= s.opts.checkLimit() {
			for r := 1; r < rounds; r++ {
				if s.check(d, repeat(order, r)) {
					rounds = r
					break
				}
			}
		}
		if s.fits(rounds*d.n) && (best == nil || rounds < bestRounds) {
			best, bestRounds = order, rounds
		}
	}
	if best == nil {
		return nil
	}
	return repeat(best, bestRounds)
}

func repeat(order []int32, rounds int) []int32 {
	seq := make([]int32, 0, rounds*len(order))
	for r := 0; r < rounds; r++ {
		seq = append(seq, order...)
	}
	return seq
}

// backMatching returns the size of a maximum matching between tails and
// heads of the edges of d that go against order (self-loops excluded), by
// augmenting paths (Kuhn's method) after a greedy start.
func backMatching(d *digraph, order []int32) int {
	pos := make([]int32, d.n)
	for i, v := range order {
		pos[v] = int32(i)
	}
	var from, to []int32
	for v := 0; v < d.n; v++ {
		for _, w := range d.succ(int32(v)) {
			if pos[w] < pos[int32(v)] {
				from = append(from, int32(v))
				to = append(to, w)
			}
		}
	}
	start, adj := csr(d.n, from, to)
	mateL := make([]int32, d.n) // tail → head
	mateR := make([]int32, d.n) // head → tail
	for i := range mateL {
		mateL[i], mateR[i] = -1, -1
	}
	size := 0
	for u := 0; u < d.n; u++ {
		for _, w := range adj[start[u]:start[u+1]] {
			if mateR[w] < 0 {
				mateL[u], mateR[w] = w, int32(u)
				size++
				break
			}
		}
	}
	stamp := make([]int32, d.n)
	round := int32(0)
	// augment searches an augmenting path from tail u with an explicit
	// stack.
	type frame struct{ u, e int32 }
	augment := func(root int32) bool {
		round++
		stack := []frame{{root, start[root]}}
		var path []int32 // heads taken along the stack
		for len(stack) > 0 {
			f := &stack[len(stack)-1]
			if f.e == start[f.u+1] {
				stack = stack[:len(stack)-1]
				if len(path) > 0 {
					path = path[:len(path)-1]
				}
				continue
			}
			w := adj[f.e]
			f.e++
			if stamp[w] == round {
				continue
			}
			stamp[w] = round
			if mateR[w] < 0 {
				// Flip the path.
				path = append(path, w)
				for i := range stack {
					u, h := stack[i].u, path[i]
					mateL[u], mateR[h] = h, u
				}
				return true
			}
			path = append(path, w)
			stack = append(stack, frame{mateR[w], start[mateR[w]]})
		}
		return false
	}
	for u := 0; u < d.n; u++ {
		if mateL[u] < 0 && start[u] < start[u+1] && augment(int32(u)) {
			size++
		}
	}
	return size
}
