package unfold

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
)

// The directed feedback vertex set heuristic of the feedback-set
// construction: the graph is first shrunk by the reduction rules of Levy
// and Low (1988) — a vertex with no in-edge or no out-edge lies on no cycle
// and is dropped, a vertex with a self-loop must be taken, and a vertex
// with one in-neighbour u (or one out-neighbour w) is bypassed by joining u
// to its out-neighbours (its in-neighbours to w), since every cycle through
// it also passes u (w) — and the rest, the kernel, is searched by simulated
// annealing over topological orderings of the kept vertices, as in
// Galinier, Lemamou and Bouzidi (2013), "Applying local search to the
// feedback vertex set problem", J. Heuristics: the kept vertices form a
// sequence in which every edge between them goes forward; a move inserts a
// removed vertex v either just after its last in-neighbour or just before
// its first out-neighbour in the sequence and removes the neighbours that
// would then make an edge go backward (out-neighbours before v, or
// in-neighbours after v). The move changes the number of kept vertices by
// 1 − conflicts and is accepted by the Metropolis rule.

// The annealing schedule. The starting temperature, cooling factor, moves
// per temperature (per kernel vertex) and temperatures without improvement
// before stopping are those reported by Galinier, Lemamou and Bouzidi
// (2013), quoted from memory.
const (
	annealStartTemp   = 0.6
	annealCooling     = 0.99
	annealLevelMoves  = 5
	annealMaxFailures = 50
)

// Work budgets of the heuristic, in edge visits, so that large components
// stay within seconds: annealWorkPerEdge per edge and vertex of the kernel
// and at most annealMaxWork in all for the annealing, reduceWorkPerEdge for
// the reductions and minimalWorkPerEdge for the final minimality pass
// (common practice, no source; set by measuring BenchmarkFVS, where the
// annealing takes about 200 ns per move and a dense 10,000-vertex graph
// reaches annealMaxWork in about two seconds).
const (
	annealWorkPerEdge  = 2000
	annealMaxWork      = 200000000
	reduceWorkPerEdge  = 64
	minimalWorkPerEdge = 400
)

// annealSeed seeds the annealing's random numbers, so that the same graph
// always gives the same set.
const annealSeed = 0x7e11150fb5

// annealFVS returns a feedback vertex set of d found by the reductions and
// the annealing, sorted, never larger than greedyFVS's. The set is minimal
// (no member can be dropped) unless a work budget ran out (greedyFVS's
// included, where its set is returned) or ctx was cancelled; it is always a
// feedback vertex set.
func annealFVS(ctx context.Context, d *digraph) []int32 {
	greedy := greedyFVS(d)
	if len(greedy) <= 1 || ctx.Err() != nil {
		return greedy
	}
	k, orig, taken := reduce(d, reduceWorkPerEdge*(d.edges()+d.n))
	x := taken
	if k.n > 0 {
		// The annealing starts from the empty ordering, as in the
		// paper; starting from the greedy set at the starting
		// temperature first spoils it and stops before it recovers.
		start := make([]int32, k.n)
		for v := range start {
			start[v] = int32(v)
		}
		keep := anneal(ctx, k, start)
		minimalize(ctx, k, keep, minimalWorkPerEdge*(k.edges()+k.n))
		for v, in := range keep {
			if !in {
				x = append(x, orig[v])
			}
		}
	}
	slices.Sort(x)
	if len(x) >= len(greedy) {
		return greedy
	}
	removed := make([]bool, d.n)
	for _, v := range x {
		removed[v] = true
	}
	if !d.acyclicWithout(removed) {
		return greedy
	}
	return x
}

// reduce applies the reduction rules of Levy and Low to d until none
// applies or the work budget runs out. It returns the reduced graph (the
// kernel), the vertex of d each kernel vertex stands for, and the vertices
// taken for self-loops; the kernel has no self-loop. A set made of the
// taken vertices and a feedback vertex set of the kernel is one of d; if
// the kernel's is minimal, so is the union, and if it is a smallest one and
// the budget did not run out, so is the union (the rules keep the
// optimum).
func reduce(d *digraph, budget int) (kernel *digraph, orig, taken []int32) {
	n := d.n
	succ := make([][]int32, n)
	pred := make([][]int32, n)
	for v := 0; v < n; v++ {
		for _, w := range d.succ(int32(v)) {
			succ[v] = append(succ[v], w)
			pred[w] = append(pred[w], int32(v))
		}
	}
	gone := make([]bool, n)
	queued := make([]bool, n)
	queue := make([]int32, 0, n)
	push := func(v int32) {
		if !gone[v] && !queued[v] {
			queued[v] = true
			queue = append(queue, v)
		}
	}
	for v := n - 1; v >= 0; v-- {
		push(int32(v))
	}
	// drop removes v from the lists of its neighbours and queues them.
	drop := func(v int32) {
		gone[v] = true
		for _, w := range succ[v] {
			if w != v {
				pred[w] = without(pred[w], v)
				budget -= len(pred[w])
				push(w)
			}
		}
		for _, u := range pred[v] {
			if u != v {
				succ[u] = without(succ[u], v)
				budget -= len(succ[u])
				push(u)
			}
		}
		succ[v], pred[v] = nil, nil
	}
	mark := make([]int32, n) // mark[w] == stamp: w already in the list
	stamp := int32(0)
	// join adds to out[u] the vertices of ws it lacks and u to their in
	// lists: with (out, in) = (succ, pred) the edges u → w, with (pred,
	// succ) the edges w → u, keeping the lists free of duplicates.
	join := func(u int32, ws []int32, out, in [][]int32) {
		stamp++
		for _, w := range out[u] {
			mark[w] = stamp
		}
		budget -= len(out[u]) + len(ws)
		for _, w := range ws {
			if mark[w] != stamp {
				mark[w] = stamp
				out[u] = append(out[u], w)
				in[w] = append(in[w], u)
			}
		}
	}
	for len(queue) > 0 && budget > 0 {
		v := queue[len(queue)-1]
		queue = queue[:len(queue)-1]
		queued[v] = false
		if gone[v] {
			continue
		}
		switch {
		case slices.Contains(succ[v], v):
			taken = append(taken, v)
			drop(v)
		case len(succ[v]) == 0 || len(pred[v]) == 0:
			drop(v)
		case len(pred[v]) == 1:
			u, ws := pred[v][0], slices.Clone(succ[v])
			drop(v)
			join(u, ws, succ, pred)
			push(u)
		case len(succ[v]) == 1:
			w, us := succ[v][0], slices.Clone(pred[v])
			drop(v)
			join(w, us, pred, succ)
			push(w)
		}
	}
	// When the budget ran out, vertices with a self-loop may be left.
	for v := int32(0); v < int32(n); v++ {
		if !gone[v] && slices.Contains(succ[v], v) {
			taken = append(taken, v)
			drop(v)
		}
	}
	local := make([]int32, n)
	for v := 0; v < n; v++ {
		if !gone[v] {
			local[v] = int32(len(orig))
			orig = append(orig, int32(v))
		}
	}
	var from, to []int32
	for _, v := range orig {
		for _, w := range succ[v] {
			from = append(from, local[v])
			to = append(to, local[w])
		}
	}
	return newDigraph(len(orig), from, to), orig, taken
}

// without removes the first v from list, in place, not keeping the order.
func without(list []int32, v int32) []int32 {
	if i := slices.Index(list, v); i >= 0 {
		list[i] = list[len(list)-1]
		return list[:len(list)-1]
	}
	return list
}

// ordering is a sequence of the kept vertices of a digraph in which every
// edge between kept vertices goes forward, as a doubly linked list with
// order labels: label[u] < label[v] when u comes before v. Vertices n and
// n+1 are the head and tail sentinels.
type ordering struct {
	n          int
	label      []int64
	prev, next []int32
	kept       []bool
	count      int
}

func newOrdering(n int) *ordering {
	o := &ordering{n: n, label: make([]int64, n+2), prev: make([]int32, n+2), next: make([]int32, n+2), kept: make([]bool, n)}
	head, tail := int32(n), int32(n+1)
	o.next[head], o.prev[tail] = tail, head
	o.prev[head], o.next[tail] = -1, -1
	o.label[head], o.label[tail] = 0, math.MaxInt64
	return o
}

func (o *ordering) head() int32 { return int32(o.n) }
func (o *ordering) tail() int32 { return int32(o.n + 1) }

// insertAfter puts v right after u and returns the number of vertices it
// had to relabel to make room.
func (o *ordering) insertAfter(v, u int32) int {
	w := o.next[u]
	work := 0
	if o.label[w]-o.label[u] < 2 {
		o.relabel()
		work = o.count
	}
	o.label[v] = o.label[u] + (o.label[w]-o.label[u])/2
	o.prev[v], o.next[v] = u, w
	o.next[u], o.prev[w] = v, v
	o.kept[v] = true
	o.count++
	return work
}

// remove takes v out of the sequence.
func (o *ordering) remove(v int32) {
	p, w := o.prev[v], o.next[v]
	o.next[p], o.prev[w] = w, p
	o.kept[v] = false
	o.count--
}

// relabel spreads the labels evenly over the label range.
func (o *ordering) relabel() {
	gap := int64(math.MaxInt64/2) / int64(o.count+2)
	l := int64(0)
	for v := o.next[o.head()]; v != o.tail(); v = o.next[v] {
		l += gap
		o.label[v] = l
	}
}

// anneal returns the kept vertices of the best ordering of k found by the
// annealing, starting from the complement of the feedback vertex set start.
func anneal(ctx context.Context, k *digraph, start []int32) []bool {
	n := k.n
	pstart, pred := reverse(k)
	o := newOrdering(n)
	inStart := make([]bool, n)
	for _, v := range start {
		inStart[v] = true
	}
	for _, v := range k.topoWithout(inStart) {
		o.insertAfter(v, o.prev[o.tail()])
	}
	// out lists the removed vertices; at[v] is v's index there.
	out := slices.Clone(start)
	at := make([]int32, n)
	for i, v := range out {
		at[v] = int32(i)
	}
	best := slices.Clone(o.kept)
	bestCount := o.count
	if len(out) == 0 {
		return best
	}
	r := rand.New(rand.NewPCG(annealSeed, uint64(n)))
	levelMoves := annealLevelMoves * n
	work := min(annealWorkPerEdge*(n+k.edges()), annealMaxWork)
	var conflicts []int32
	temp := annealStartTemp
	failures := 0
	for work > 0 && failures < annealMaxFailures && len(out) > 0 {
		improved := false
		for j := 0; j < levelMoves && work > 0 && len(out) > 0; j++ {
			if j&1023 == 0 && ctx.Err() != nil {
				work = 0
				break
			}
			v := out[r.IntN(len(out))]
			ins, outs := pred[pstart[v]:pstart[v+1]], k.succ(v)
			work -= 1 + len(ins) + len(outs)
			conflicts = conflicts[:0]
			var anchor int32
			if r.IntN(2) == 0 {
				// Just after the last kept in-neighbour: kept
				// out-neighbours up to there conflict.
				anchor = o.head()
				for _, u := range ins {
					if o.kept[u] && o.label[u] > o.label[anchor] {
						anchor = u
					}
				}
				for _, w := range outs {
					if o.kept[w] && o.label[w] <= o.label[anchor] {
						conflicts = append(conflicts, w)
					}
				}
			} else {
				// Just before the first kept out-neighbour: kept
				// in-neighbours from there on conflict.
				first := o.tail()
				for _, w := range outs {
					if o.kept[w] && o.label[w] < o.label[first] {
						first = w
					}
				}
				for _, u := range ins {
					if o.kept[u] && o.label[u] >= o.label[first] {
						conflicts = append(conflicts, u)
					}
				}
				anchor = o.prev[first]
			}
			delta := len(conflicts) - 1
			if delta > 0 && r.Float64() >= math.Exp(-float64(delta)/temp) {
				continue
			}
			work -= o.insertAfter(v, anchor)
			last := out[len(out)-1]
			out[at[v]], at[last] = last, at[v]
			out = out[:len(out)-1]
			for _, w := range conflicts {
				o.remove(w)
				at[w] = int32(len(out))
				out = append(out, w)
			}
			if o.count > bestCount {
				bestCount = o.count
				copy(best, o.kept)
				improved = true
			}
		}
		if improved {
			failures = 0
		} else {
			failures++
		}
		temp *= annealCooling
	}
	return best
}

// reverse returns the predecessor lists of d in compressed sparse rows.
func reverse(d *digraph) (start, pred []int32) {
	from := make([]int32, 0, d.edges())
	to := make([]int32, 0, d.edges())
	for v := 0; v < d.n; v++ {
		for _, w := range d.succ(int32(v)) {
			from = append(from, w)
			to = append(to, int32(v))
		}
	}
	return csr(d.n, from, to)
}

// minimalize adds to keep, one at a time in order, each vertex of d whose
// addition leaves the kept subgraph acyclic, until the work budget (edge
// visits) runs out or ctx is cancelled; keep must mark an acyclic
// subgraph. It reports whether it went through all vertices, in which case
// the vertices not kept form a minimal feedback vertex set.
func minimalize(ctx context.Context, d *digraph, keep []bool, budget int) bool {
	n := d.n
	pstart, pred := reverse(d)
	removed := make([]bool, n)
	for v := range keep {
		removed[v] = !keep[v]
	}
	pos := make([]int32, n) // position in a topological order of the kept part
	order := func() {
		for i, v := range d.topoWithout(removed) {
			pos[v] = int32(i)
		}
		budget -= n + d.edges()
	}
	order()
	seen := make([]int32, n)
	isIn := make([]int32, n)
	stamp := int32(0)
	var stack []int32
	for v := int32(0); v < int32(n); v++ {
		if keep[v] {
			continue
		}
		if budget <= 0 || v&63 == 0 && ctx.Err() != nil {
			return false
		}
		// v can be kept unless a kept out-neighbour reaches a kept
		// in-neighbour; such a path only visits positions up to the
		// last kept in-neighbour.
		stamp++
		limit := int32(-1)
		for _, u := range pred[pstart[v]:pstart[v+1]] {
			if u == v {
				isIn[u] = stamp
			} else if keep[u] {
				isIn[u] = stamp
				limit = max(limit, pos[u])
			}
		}
		stack = stack[:0]
		for _, w := range d.succ(v) {
			if (keep[w] || w == v) && seen[w] != stamp {
				seen[w] = stamp
				stack = append(stack, w)
			}
		}
		cycle := false
		for len(stack) > 0 && !cycle {
			u := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			if isIn[u] == stamp {
				cycle = true
				break
			}
			if u == v || pos[u] > limit {
				continue
			}
			succ := d.succ(u)
			budget -= len(succ)
			for _, w := range succ {
				if keep[w] && seen[w] != stamp {
					seen[w] = stamp
					stack = append(stack, w)
				}
			}
		}
		if !cycle {
			keep[v], removed[v] = true, false
			order()
		}
	}
	return true
}
