package unfold

import (
	"container/heap"
	"slices"

	"trellis/ground"
)

// defaultWidthLimit is the number of atoms above which Width switches from
// min-fill to min-degree elimination.
const defaultWidthLimit = 20000

// fillDegreeCap is the degree above which the min-fill score of a vertex is
// not computed pair by pair but bounded by the number of pairs.
const fillDegreeCap = 48

// eliminationBudget bounds the work of one elimination (neighbour list
// entries merged and fill pairs looked at). When it runs out, the remaining
// r vertices are counted as one bag: width max(found, r−1), still an upper
// bound on the treewidth.
const eliminationBudget = 20000000

// Width returns an upper bound on the treewidth of the primal graph of p
// (atoms sharing a rule, a bounded choice or an aggregate are adjacent; the
// elements of a choice without a binding bound share only its body), restricted
// to the atoms for which keep returns true (all atoms when keep is nil), and
// the elimination heuristic used: "min-fill" up to limit atoms, else
// "min-degree". The bound is the largest neighbourhood met while
// eliminating vertices one by one in the heuristic's order; a graph without
// edges has width 0.
func Width(p *ground.Program, keep func(ground.Atom) bool, limit int) (int, string) {
	u, n := primal(p, keep)
	method := "min-fill"
	if n > limit {
		method = "min-degree"
	}
	w, done := eliminate(u, n <= limit)
	if !done {
		method += " (cut short)"
	}
	return w, method
}

// primal returns the primal graph of p restricted to the kept atoms, as
// sorted adjacency lists, and the number of kept atoms.
func primal(p *ground.Program, keep func(ground.Atom) bool) ([][]int32, int) {
	n := len(p.Atoms)
	var from, to []int32
	var group []int32
	clique := func() {
		for i, a := range group {
			for _, b := range group[i+1:] {
				if a != b {
					from = append(from, a, b)
					to = append(to, b, a)
				}
			}
		}
		group = group[:0]
	}
	add := func(a ground.Atom) {
		if a != ground.NoAtom && (keep == nil || keep(a)) {
			group = append(group, int32(a))
		}
	}
	for _, r := range p.Rules {
		add(r.Head)
		for _, a := range r.Pos {
			add(a)
		}
		for _, a := range r.Neg {
			add(a)
		}
		clique()
	}
	for _, c := range p.Choices {
		body := func() {
			for _, a := range c.Pos {
				add(a)
			}
			for _, a := range c.Neg {
				add(a)
			}
		}
		if c.Lower <= 0 && c.Upper >= int64(len(c.Elements)) {
			// Without a bound that can bite, the elements do not constrain
			// one another: each one shares only the body.
			for _, a := range c.Elements {
				add(a)
				body()
				clique()
			}
			continue
		}
		for _, a := range c.Elements {
			add(a)
		}
		body()
		clique()
	}
	for _, g := range p.Aggregates {
		add(g.Atom)
		for _, e := range g.Elements {
			add(e.Atom)
		}
		clique()
	}
	start, adj := csr(n, from, to)
	lists := make([][]int32, n)
	kept := 0
	for v := 0; v < n; v++ {
		lists[v] = adj[start[v]:start[v+1]:start[v+1]]
		if keep == nil || keep(ground.Atom(v)) {
			kept++
		}
	}
	return lists, kept
}

// eliminate runs greedy vertex elimination on the graph adj (sorted
// neighbour lists, modified) and returns the largest neighbourhood of an
// eliminated vertex, and false when it ran out of budget. See
// eliminateOrder.
func eliminate(adj [][]int32, fill bool) (int, bool) {
	w, _, done := eliminateOrder(adj, fill)
	return w, done
}

// eliminateOrder runs greedy vertex elimination on the graph adj (sorted
// neighbour lists, modified) and returns the largest neighbourhood of an
// eliminated vertex and the elimination order used, every vertex once.
// With fill, the vertex adding the fewest fill edges goes next, else the
// one of least degree; stale heap entries are refreshed when they come up.
// Vertices never eliminated (those without neighbours, and all the rest
// when the budget runs out) end the order in increasing index. It reports
// false when it ran out of budget; the width returned then counts the
// remaining vertices as one bag, which eliminating them in the order given
// stays within.
func eliminateOrder(adj [][]int32, fill bool) (int, []int32, bool) {
	return greedyOrder(adj, fill, nil, 0)
}

// orderedWidth eliminates the vertices of the graph adj (neighbour lists,
// not modified) in the given order, a permutation of its vertices, and
// returns the largest neighbourhood met, as eliminating them one by one and
// joining the neighbours of each (the fill) would; a graph without edges
// has width 0. It reports false when it ran out of budget; the width
// returned then counts the remaining vertices as one bag, as eliminate
// does.
func orderedWidth(adj [][]int32, order []int32) (int, bool) {
	return weightedWidth(adj, order, nil)
}

// weightedWidth is orderedWidth for a graph whose vertex v stands for a
// clique of weight[v] vertices joined to all the vertices its neighbours
// stand for (all weights 1 when weight is nil): eliminating those in the
// order given, each vertex's clique consecutively, meets neighbourhoods of
// at most weight[v] − 1 plus the weights of v's later neighbours in the
// filled graph, and it returns the largest of these.
//
// It does not update neighbour lists vertex by vertex as eliminate does,
// but computes, in elimination order, each vertex's later neighbours in the
// filled graph: its later neighbours in adj, together with the later
// neighbours of the vertices whose first later neighbour it is (its
// children in the elimination tree), other than itself. This is symbolic
// factorisation (George and Liu 1981, Computer Solution of Large Sparse
// Positive Definite Systems, from memory); its work, counted against the
// same budget as eliminate's, is the size of the filled graph rather than
// the sum of the squared neighbourhoods.
func weightedWidth(adj [][]int32, order []int32, weight []int32) (int, bool) {
	n := len(adj)
	wt := func(v int32) int {
		if weight == nil {
			return 1
		}
		return int(weight[v])
	}
	pos := make([]int32, n)
	for i, v := range order {
		pos[v] = int32(i)
	}
	// later[v] holds v's later neighbours in the filled graph once v is
	// eliminated, until its parent in the elimination tree is; children[u]
	// lists the vertices whose parent u is.
	later := make([][]int32, n)
	children := make([][]int32, n)
	mark := make([]int32, n) // mark[x] == i+1: x is in the set of order[i]
	// left is the weight of the vertices not yet eliminated that have
	// neighbours or stand for more than one vertex.
	left := 0
	for v := range adj {
		if len(adj[v]) > 0 || wt(int32(v)) > 1 {
			left += wt(int32(v))
		}
	}
	budget := eliminationBudget
	width := 0
	var set []int32
	for i, v := range order {
		if budget < 0 {
			return max(width, left-1), false
		}
		stamp := int32(i + 1)
		mark[v] = stamp
		set = set[:0]
		size := wt(v) - 1
		add := func(xs []int32) {
			for _, x := range xs {
				if pos[x] > int32(i) && mark[x] != stamp {
					mark[x] = stamp
					set = append(set, x)
					size += wt(x)
				}
			}
			budget -= len(xs)
		}
		add(adj[v])
		for _, c := range children[v] {
			add(later[c])
			later[c] = nil
		}
		children[v] = nil
		if len(adj[v]) > 0 || wt(v) > 1 {
			left -= wt(v)
		}
		width = max(width, size)
		if len(set) == 0 {
			continue
		}
		parent := set[0]
		for _, x := range set[1:] {
			if pos[x] < pos[parent] {
				parent = x
			}
		}
		later[v] = slices.Clone(set)
		children[parent] = append(children[parent], v)
	}
	return width, true
}

// grouping partitions the vertices of a graph into groups: the members of
// group g, in the order they are to be eliminated in, are
// list[start[g]:start[g+1]], and of[x] is the group of vertex x.
type grouping struct {
	start, list, of []int32
}

// lift returns the order of the vertices that eliminates the groups in the
// given order, each group's members consecutively.
func (gs *grouping) lift(order []int32) []int32 {
	up := make([]int32, 0, len(gs.list))
	for _, g := range order {
		up = append(up, gs.list[gs.start[g]:gs.start[g+1]]...)
	}
	return up
}

// quotient returns the quotient of the graph adj by the groups (one vertex
// per group, adjacent when some of their members are), as sorted neighbour
// lists, and the size of every group.
func (gs *grouping) quotient(adj [][]int32) ([][]int32, []int32) {
	groups := len(gs.start) - 1
	weight := make([]int32, groups)
	for g := range weight {
		weight[g] = gs.start[g+1] - gs.start[g]
	}
	var from, to []int32
	for x, nb := range adj {
		for _, y := range nb {
			if g, h := gs.of[x], gs.of[y]; g != h {
				from = append(from, g)
				to = append(to, h)
			}
		}
	}
	start, list := csr(groups, from, to)
	quotient := make([][]int32, groups)
	for g := range quotient {
		quotient[g] = list[start[g]:start[g+1]:start[g+1]]
	}
	return quotient, weight
}

// liftedWidth bounds the treewidth of the graph adj, whose vertices fall
// into the groups gs, by eliminating them group by group in the order of
// the groups given, and names how: "lifted" for orderedWidth along that
// order; when that runs out of budget, the quotient graph eliminated in the
// same order with every group weighing its size (weightedWidth), if
// smaller: "lifted, grouped". adj is a subgraph of the quotient with every
// group blown up into a clique, and the order lifted is a perfect
// elimination order of that graph's filled graph, so the grouped bound
// holds the order's width on adj. Either way the result is an upper bound
// on the treewidth; a bound cut short is marked so.
//
// Two other orders were tried on the shapes of BenchmarkLiftedWidth and
// left out: the groups ordered by greedy elimination on the weighted
// quotient (never better than the input's order, except on the random
// 1000-atom digraph, by under 1%, at three times the cost), and the
// heuristic on the output finishing along the lifted order when cut short
// (better than the heuristic cut short, never better than this).
func liftedWidth(adj [][]int32, gs *grouping, order []int32) (int, string) {
	w, done := orderedWidth(adj, gs.lift(order))
	if done {
		return w, "lifted"
	}
	quotient, weight := gs.quotient(adj)
	gw, gdone := weightedWidth(quotient, order, weight)
	switch {
	case gw >= w:
		return w, "lifted (cut short)"
	case !gdone:
		return gw, "lifted, grouped (cut short)"
	}
	return gw, "lifted, grouped"
}

// greedyOrder is eliminateOrder with the vertices in ranked groups: rank[v]
// is the position of v's group (nil: all in one), ties between equal scores
// go to the lower rank, then the lower vertex, and with window > 0 only
// vertices of the window lowest-ranked groups that still have vertices to
// eliminate are candidates.
func greedyOrder(adj [][]int32, fill bool, rank []int32, window int) (int, []int32, bool) {
	return greedyOrderWithin(adj, fill, rank, window, eliminationBudget)
}

// greedyOrderWithin is greedyOrder with the given work budget in place of
// eliminationBudget.
func greedyOrderWithin(adj [][]int32, fill bool, rank []int32, window, budget int) (int, []int32, bool) {
	n := len(adj)
	gone := make([]bool, n)
	score := func(v int32) int64 {
		nb := adj[v]
		if !fill {
			return int64(len(nb))
		}
		if len(nb) > fillDegreeCap {
			return int64(len(nb)) * int64(len(nb)-1) / 2
		}
		missing := int64(0)
		budget -= len(nb) * len(nb) / 2
		for i, a := range nb {
			for _, b := range nb[i+1:] {
				if _, ok := slices.BinarySearch(adj[a], b); !ok {
					missing++
				}
			}
		}
		return missing
	}
	rankOf := func(v int32) int32 {
		if rank == nil {
			return 0
		}
		return rank[v]
	}
	groups := int32(1)
	for v := 0; v < n; v++ {
		groups = max(groups, rankOf(int32(v))+1)
	}
	// members[start[g]:start[g+1]] are the vertices with neighbours of
	// rank g; remaining[g] counts those not yet eliminated.
	start := make([]int32, groups+1)
	for v := 0; v < n; v++ {
		if len(adj[v]) > 0 {
			start[rankOf(int32(v))+1]++
		}
	}
	for g := int32(0); g < groups; g++ {
		start[g+1] += start[g]
	}
	members := make([]int32, start[groups])
	next := slices.Clone(start[:groups])
	for v := 0; v < n; v++ {
		if len(adj[v]) > 0 {
			g := rankOf(int32(v))
			members[next[g]] = int32(v)
			next[g]++
		}
	}
	remaining := make([]int32, groups)
	for g := range remaining {
		remaining[g] = start[g+1] - start[g]
	}
	h := &rankHeap{}
	low, open := int32(0), int32(0) // groups [low, open) are candidates
	openUpTo := func() {
		for low < groups && remaining[low] == 0 {
			low++
		}
		limit := groups
		if window > 0 {
			limit = min(groups, low+int32(window))
		}
		for ; open < limit; open++ {
			for _, v := range members[start[open]:start[open+1]] {
				heap.Push(h, rankItem{v, score(v), open})
			}
		}
	}
	openUpTo()
	width := 0
	left := int(start[groups])
	order := make([]int32, 0, n)
	rest := func() []int32 {
		for v := 0; v < n; v++ {
			if !gone[v] {
				order = append(order, int32(v))
			}
		}
		return order
	}
	var merged []int32
	for h.Len() > 0 {
		if budget < 0 {
			return max(width, left-1), rest(), false
		}
		it := heap.Pop(h).(rankItem)
		v := it.v
		if gone[v] {
			continue
		}
		if s := score(v); s != it.score {
			heap.Push(h, rankItem{v, s, it.rank})
			continue
		}
		gone[v] = true
		order = append(order, v)
		left--
		remaining[it.rank]--
		nb := adj[v]
		width = max(width, len(nb))
		budget -= len(nb) * (len(nb) + 1)
		merged = eliminateVertex(adj, v, merged)
		for _, a := range nb {
			if r := rankOf(a); r < open {
				heap.Push(h, rankItem{a, score(a), r})
			}
		}
		budget -= len(nb) * 20
		openUpTo()
	}
	return width, rest(), true
}

type rankItem struct {
	v     int32
	score int64
	rank  int32
}

// rankHeap is a min-heap of vertices by score, then rank, then vertex.
type rankHeap []rankItem

func (h rankHeap) Len() int { return len(h) }
func (h rankHeap) Less(i, j int) bool {
	a, b := h[i], h[j]
	if a.score != b.score {
		return a.score < b.score
	}
	if a.rank != b.rank {
		return a.rank < b.rank
	}
	return a.v < b.v
}
func (h rankHeap) Swap(i, j int) { h[i], h[j] = h[j], h[i] }
func (h *rankHeap) Push(x any)   { *h = append(*h, x.(rankItem)) }
func (h *rankHeap) Pop() any {
	old := *h
	it := old[len(old)-1]
	*h = old[:len(old)-1]
	return it
}

// eliminateVertex makes the neighbourhood of v in the graph adj (sorted
// neighbour lists) a clique and removes v. merged is scratch space, returned
// for reuse.
func eliminateVertex(adj [][]int32, v int32, merged []int32) []int32 {
	nb := adj[v]
	for _, a := range nb {
		merged = merged[:0]
		i, j := 0, 0
		old := adj[a]
		for i < len(old) || j < len(nb) {
			var x int32
			switch {
			case j == len(nb) || (i < len(old) && old[i] < nb[j]):
				x = old[i]
				i++
			case i == len(old) || nb[j] < old[i]:
				x = nb[j]
				j++
			default:
				x = old[i]
				i++
				j++
			}
			if x != a && x != v {
				merged = append(merged, x)
			}
		}
		adj[a] = append(adj[a][:0:0], merged...)
	}
	adj[v] = nil
	return merged
}
