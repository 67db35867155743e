package unfold

import (
	"cmp"
	"context"
	"math/rand/v2"
	"slices"
)

// The feedback-set construction with two-way edges left in place.
//
// Components with many pairs of atoms that depend on each other both ways
// (two-way edges, each a cycle of two atoms) need large feedback vertex
// sets: every two-way edge needs one of its ends in the set. Two-way edges
// are cheap otherwise: a tree of two-way edges holds every simple path in a
// sequence with each atom at most twice. So the construction takes a set X
// whose removal leaves only components that are single atoms or trees of
// two-way edges (no cycle of three atoms or more), and a sequence T of d − X
// holding each of those components' simple paths, components in
// topological order; then T·π·T·…·π·T as in the feedback-set construction.
// X is usually about half a feedback vertex set, at the price of two copies
// instead of one for the atoms of trees in every round of T.

// treeSetWork bounds the vertices and edges visited while finding and
// shrinking the set X (common practice, no source).
const treeSetWork = 200000000

// feedbackTrees returns the construction T·π·T·…·π·T for the set x, whose
// removal must leave only single atoms and trees of two-way edges, or nil
// when it does not or the sequence is over the copy limit. A tree's
// sequence lists its atoms children before parents and then parents before
// children, sharing the root: a simple path in a tree rises to its highest
// atom and falls from there, so it is held. Every simple path of d − x runs
// through its components in topological order, a simple path inside each,
// so T holds it; and a simple path of d meets x at most |x| times, running
// inside d − x in between. Rounds of T after the first and before the last
// leave out what no path needs there (treeRounds).
func (s *searcher) feedbackTrees(d *digraph, x []int32) []int32 {
	r := d.rounds(x)
	if r == nil {
		return nil
	}
	if !s.fits(r.length()) {
		return nil
	}
	seq := make([]int32, 0, r.length())
	if len(x) == 0 {
		return append(seq, r.full...)
	}
	seq = append(seq, r.first...)
	for i := range x {
		seq = append(seq, x...)
		if i == len(x)-1 {
			seq = append(seq, r.last...)
		} else {
			seq = append(seq, r.middle...)
		}
	}
	return seq
}

// treeRoundSeqs are the rounds of T in feedbackTrees for a set x.
type treeRoundSeqs struct {
	x                   []int32
	first, middle, last []int32
	full                []int32 // T itself, when x is empty
}

// length returns the length of feedbackTrees.
func (r *treeRoundSeqs) length() int {
	if len(r.x) == 0 {
		return len(r.full)
	}
	return len(r.first) + len(r.last) + (len(r.x)-1)*len(r.middle) + len(r.x)*len(r.x)
}

// rounds returns the rounds of T for the set x, or nil when the removal
// of x leaves a component that is neither a single atom nor a tree of
// two-way edges. Round by round: the first holds every rise, the last
// every fall, the others only the rises from atoms entered from outside
// their tree and the falls to atoms left towards outside (see treeRounds).
func (d *digraph) rounds(x []int32) *treeRoundSeqs {
	removed := make([]bool, d.n)
	for _, v := range x {
		removed[v] = true
	}
	comps, bad := d.treeComponents(removed)
	// Components that are not trees must have a feedback atom
	// (pieces.go).
	var cut []int32
	if bad != nil {
		cut = make([]int32, len(comps))
		for i, c := range comps {
			cut[i] = -1
			if len(c) > 1 && offending(d, c, removed) {
				if cut[i], _ = d.feedbackAtom(c, removed); cut[i] < 0 {
					return nil
				}
			}
		}
	}
	r := &treeRoundSeqs{x: x}
	if len(x) == 0 {
		for i, c := range comps {
			if cut != nil && cut[i] >= 0 {
				t := d.pieceOrder(c, cut[i])
				r.full = append(append(append(r.full, t...), cut[i]), t...)
			} else {
				r.full = append(r.full, d.treeSequence(c, removed)...)
			}
		}
		return r
	}
	of := make([]int32, d.n)
	for i := range of {
		of[i] = -1
	}
	for i, c := range comps {
		for _, v := range c {
			of[v] = int32(i)
		}
	}
	reach := d.reachX(x, of)
	local := make([]int32, d.n)
	for i, c := range comps {
		var f, m, l []int32
		if cut != nil && cut[i] >= 0 {
			f, m, l = d.pieceRounds(c, cut[i], reach)
		} else {
			f, m, l = d.treeRounds(c, of, reach, local)
		}
		r.first, r.middle, r.last = append(r.first, f...), append(r.middle, m...), append(r.last, l...)
	}
	return r
}

// cost returns the largest copies and the length of feedbackTrees on a
// digraph of n vertices.
func (r *treeRoundSeqs) cost(n int) cost {
	count := make([]int, n)
	add := func(seq []int32, times int) {
		for _, v := range seq {
			count[v] += times
		}
	}
	if len(r.x) == 0 {
		add(r.full, 1)
	} else {
		add(r.first, 1)
		add(r.middle, len(r.x)-1)
		add(r.last, 1)
		add(r.x, len(r.x))
	}
	return cost{slices.Max(append(count, 0)), r.length()}
}

// treeRounds returns the sequences of the tree (or single atom) c for the
// first, the middle and the last rounds of T; of gives each atom's
// component (−1 for members of the set).
//
// The tree's sequence is a rise (children before parents) and a fall
// (parents before children) sharing the root. Inside one round a path
// meets the tree in one stretch, the tree path from the atom where it
// comes in to the atom where it goes out or ends: a rise to their highest
// atom, then a fall. After the first round, the path comes in from outside
// the tree (from the set or an earlier component), so the rise needs only
// the atoms with such an atom below them (or themselves). Before the last
// round, where the path goes on, the fall needs only the atoms with an atom
// below them (or themselves) that has an edge out of the tree; where the
// path ends in the tree, the atoms the fall leaves out are all below the
// last one it keeps, and the last round's full fall holds them in order
// after everything the path met before.
func (d *digraph) treeRounds(c []int32, of []int32, reach []uint8, local []int32) (first, middle, last []int32) {
	if len(c) == 1 {
		first = c
		if reach[c[0]]&fromX != 0 {
			last = c
			if reach[c[0]]&toX != 0 {
				middle = c
			}
		}
		return first, middle, last
	}
	for i, v := range c {
		local[v] = int32(i)
	}
	// Every atom of a small tree is tried as the root, the shortest middle
	// round kept (then the shortest first and last).
	t := &treeRooting{order: make([]int32, 0, len(c)), parent: make([]int32, len(c)), flags: make([]uint8, len(c))}
	best := c[0]
	if len(c) <= maxRootTries {
		bm, bfl := -1, 0
		for _, r := range c {
			t.root(d, c, of, reach, local, r)
			f, m, l := t.lengths(reach)
			if bm < 0 || m < bm || m == bm && f+l < bfl {
				best, bm, bfl = r, m, f+l
			}
		}
	}
	t.root(d, c, of, reach, local, best)
	return t.rounds(reach)
}

// maxRootTries is the largest tree whose every atom treeRounds tries as
// the root (common practice, no source).
const maxRootTries = 64

// treeRooting is a tree of treeRounds rooted at one of its atoms.
type treeRooting struct {
	order  []int32 // breadth-first from the root
	parent []int32 // by position in the tree's atom list, −1 for the root
	// flags, by position in the tree's atom list: the bits entered,
	// leaves and leavesToX of reachX of the atom or any atom below it.
	flags []uint8
	local []int32
}

// root roots the tree c at r; local gives every atom's position in c.
func (t *treeRooting) root(d *digraph, c []int32, of []int32, reach []uint8, local []int32, r int32) {
	me := of[r]
	t.local = local
	for i := range t.parent {
		t.parent[i] = -2
	}
	t.order = append(t.order[:0], r)
	t.parent[local[r]] = -1
	for i := 0; i < len(t.order); i++ {
		for _, w := range d.succ(t.order[i]) {
			if of[w] == me && t.parent[local[w]] == -2 {
				t.parent[local[w]] = t.order[i]
				t.order = append(t.order, w)
			}
		}
	}
	for _, v := range c {
		t.flags[local[v]] = reach[v] & (entered | leaves | leavesToX)
	}
	for i := len(t.order) - 1; i > 0; i-- {
		v := t.order[i]
		t.flags[local[t.parent[local[v]]]] |= t.flags[local[v]]
	}
}

// has reports whether v (or an atom below it) has the flag f; f = 0 means
// every atom.
func (t *treeRooting) has(v int32, f uint8) bool {
	return f == 0 || t.flags[t.local[v]]&f != 0
}

// rise lists the atoms with the flag f children before parents, and the
// root; fall lists them parents before children, without the root.
func (t *treeRooting) rise(f uint8) []int32 {
	var r []int32
	for i := len(t.order) - 1; i > 0; i-- {
		if t.has(t.order[i], f) {
			r = append(r, t.order[i])
		}
	}
	return append(r, t.order[0])
}

func (t *treeRooting) fall(f uint8) []int32 {
	var r []int32
	for _, v := range t.order[1:] {
		if t.has(v, f) {
			r = append(r, v)
		}
	}
	return r
}

// count returns the number of non-root atoms with the flag f.
func (t *treeRooting) count(f uint8) int {
	k := 0
	for _, v := range t.order[1:] {
		if t.has(v, f) {
			k++
		}
	}
	return k
}

// lengths returns the lengths of the rounds rounds would return.
func (t *treeRooting) lengths(reach []uint8) (first, middle, last int) {
	root, n, in := t.order[0], len(t.order)-1, t.count(entered)
	first = n + 1 + t.count(leaves)
	switch {
	case reach[root]&fromX == 0:
		return first, 0, n
	case reach[root]&toX == 0:
		return first, 0, in + 1 + n
	}
	return first, in + 1 + t.count(leavesToX), in + 1 + n
}

// rounds returns the first, the middle and the last rounds of the tree.
func (t *treeRooting) rounds(reach []uint8) (first, middle, last []int32) {
	root := t.order[0]
	first = append(t.rise(0), t.fall(leaves)...)
	if reach[root]&fromX == 0 {
		// No member reaches the tree: only paths that never meet a
		// member come here, and they end in the last round's fall.
		return first, nil, t.fall(0)
	}
	if reach[root]&toX != 0 {
		middle = append(t.rise(entered), t.fall(leavesToX)...)
	}
	last = append(t.rise(entered), t.fall(0)...)
	return first, middle, last
}

// Bits of reachX.
const (
	fromX     uint8 = 1 << iota // reached from a member of the set
	toX                         // reaches a member of the set
	entered                     // has an edge in from a member or from another fromX tree
	leaves                      // has an edge to another tree
	leavesToX                   // has an edge to a member or to another toX tree
)

// reachX marks every atom outside the set x (of[v] ≥ 0, the tree it is
// in) with fromX when some member reaches it and with toX when it reaches
// some member, in both cases through atoms outside the set only; and with
// the bits entered, leaves and leavesToX of the edges between trees and
// members.
func (d *digraph) reachX(x []int32, of []int32) []uint8 {
	reach := make([]uint8, d.n)
	pred := d.preds()
	for _, dir := range []struct {
		bit  uint8
		next func(int32) []int32
	}{{fromX, d.succ}, {toX, func(v int32) []int32 { return pred[v] }}} {
		var queue []int32
		for _, v := range x {
			for _, w := range dir.next(v) {
				if of[w] >= 0 && reach[w]&dir.bit == 0 {
					reach[w] |= dir.bit
					queue = append(queue, w)
				}
			}
		}
		for i := 0; i < len(queue); i++ {
			for _, w := range dir.next(queue[i]) {
				if of[w] >= 0 && reach[w]&dir.bit == 0 {
					reach[w] |= dir.bit
					queue = append(queue, w)
				}
			}
		}
	}
	for u := int32(0); u < int32(d.n); u++ {
		for _, w := range d.succ(u) {
			if of[w] < 0 || of[w] == of[u] {
				continue
			}
			if of[u] < 0 || reach[u]&fromX != 0 {
				reach[w] |= entered
			}
			if of[u] >= 0 {
				reach[u] |= leaves
				if reach[w]&toX != 0 {
					reach[u] |= leavesToX
				}
			}
		}
		if of[u] < 0 {
			for _, v := range pred[u] {
				if of[v] >= 0 {
					reach[v] |= leaves | leavesToX
				}
			}
		}
	}
	return reach
}

// treeSequence returns a sequence holding every simple path of the tree of
// two-way edges on the vertices c (all not removed): breadth-first from
// c[0], the order reversed (children before parents) followed by the order
// itself without the root, which the two halves share.
func (d *digraph) treeSequence(c []int32, removed []bool) []int32 {
	if len(c) == 1 {
		return c
	}
	in := make(map[int32]bool, len(c))
	for _, v := range c {
		in[v] = true
	}
	order := []int32{c[0]}
	seen := map[int32]bool{c[0]: true}
	for i := 0; i < len(order); i++ {
		for _, w := range d.succ(order[i]) {
			if in[w] && !seen[w] {
				seen[w] = true
				order = append(order, w)
			}
		}
	}
	seq := make([]int32, 0, 2*len(order)-1)
	for i := len(order) - 1; i >= 0; i-- {
		seq = append(seq, order[i])
	}
	return append(seq, order[1:]...)
}

// treeComponents returns the strongly connected components of d minus the
// removed vertices, in topological order, and the largest one that is
// neither a single vertex nor a tree of two-way edges (nil when there is
// none). Self-loops do not count: simple paths never use them.
func (d *digraph) treeComponents(removed []bool) (comps [][]int32, bad []int32) {
	var from, to []int32
	for v := int32(0); v < int32(d.n); v++ {
		if removed[v] {
			continue
		}
		for _, w := range d.succ(v) {
			if !removed[w] && w != v {
				from, to = append(from, v), append(to, w)
			}
		}
	}
	start, adj := csr(d.n, from, to)
	comp, count := tarjan(d.n, start, adj)
	all := make([][]int32, count)
	for v := 0; v < d.n; v++ {
		c := count - 1 - int(comp[v])
		all[c] = append(all[c], int32(v))
	}
	for c, vs := range all {
		if removed[vs[0]] {
			continue
		}
		comps = append(comps, vs)
		if len(vs) == 1 || len(vs) <= len(bad) {
			continue
		}
		arcs, tree := 0, true
		for _, v := range vs {
			for _, w := range adj[start[v]:start[v+1]] {
				if count-1-int(comp[w]) != c {
					continue
				}
				arcs++
				if _, back := slices.BinarySearch(adj[start[w]:start[w+1]], v); !back {
					tree = false
				}
			}
		}
		if !tree || arcs != 2*(len(vs)-1) {
			bad = vs
		}
	}
	return comps, bad
}

// treeSet returns a minimal set X of vertices of d whose removal leaves
// only single vertices and trees of two-way edges: greedily, the vertices of
// largest in-degree × out-degree from each offending component, then each
// member dropped again where the rest still does, then improveTreeSet, all
// within work budgets. It returns nil when cancelled or out of budget
// before a set is found.
func treeSet(ctx context.Context, d *digraph) []int32 {
	shared := improveWork
	return treeSetShared(ctx, d, &shared)
}

// treeSetShared is treeSet with the work of its local search taken from
// *shared, a budget shared by all the searches of one unfolding; with
// shared nil, the greedy set alone.
func treeSetShared(ctx context.Context, d *digraph, shared *int) []int32 {
	t := greedyTreeSet(ctx, d)
	if t == nil {
		return nil
	}
	if shared != nil {
		t.improve(ctx, shared)
	}
	return t.set()
}

// treeState is a set of vertices of d (the removed ones) that leaves only
// single vertices and trees of two-way edges, with what the searches for
// it share.
type treeState struct {
	d       *digraph
	pred    [][]int32
	removed []bool
	work    int // left of treeSetWork
	check   *cycleCheck
}

// score is the product of v's in- and out-degree among the vertices not
// removed (self-loops left out).
func (t *treeState) score(v int32) int {
	in, out := 0, 0
	for _, w := range t.d.succ(v) {
		if !t.removed[w] && w != v {
			out++
		}
	}
	for _, w := range t.pred[v] {
		if !t.removed[w] {
			in++
		}
	}
	return in * out
}

// greedyTreeSet returns the greedy set of treeSet, made minimal, or nil
// when cancelled or out of budget before a set is found.
func greedyTreeSet(ctx context.Context, d *digraph) *treeState {
	t := &treeState{d: d, removed: make([]bool, d.n), pred: make([][]int32, d.n), work: treeSetWork, check: newCycleCheck(d.n)}
	removed, pred := t.removed, t.pred
	for v := int32(0); v < int32(d.n); v++ {
		for _, w := range d.succ(v) {
			if w != v {
				pred[w] = append(pred[w], v)
			}
		}
	}
	pass := d.n + d.edges()
	var x []int32
	for {
		if ctx.Err() != nil || t.work < 0 {
			return nil
		}
		t.work -= pass
		comps, bad := d.treeComponents(removed)
		if bad == nil {
			break
		}
		// Take a few vertices from every offending component at once
		// (one in fifty), the best scores first.
		for _, c := range comps {
			if len(c) < 2 || !offending(d, c, removed) {
				continue
			}
			ranked := slices.Clone(c)
			slices.SortStableFunc(ranked, func(a, b int32) int { return cmp.Compare(t.score(b), t.score(a)) })
			for _, v := range ranked[:max(1, len(c)/50)] {
				removed[v] = true
				x = append(x, v)
			}
		}
	}
	// Drop members that are not needed, the cheapest to keep out first.
	slices.SortStableFunc(x, func(a, b int32) int { return cmp.Compare(t.score(a), t.score(b)) })
	for _, v := range x {
		if ctx.Err() != nil || t.work < 0 {
			break
		}
		long, visited := t.check.closesLong(d, pred, removed, v)
		t.work -= visited
		if !long {
			removed[v] = false
		}
	}
	return t
}

// improve runs improveTreeSet on the set, its work taken from *shared,
// and then makes the set minimal again.
func (t *treeState) improve(ctx context.Context, shared *int) {
	if t.work <= 0 || *shared <= 0 {
		return
	}
	before := *shared
	improveTreeSet(ctx, t.d, t.pred, t.removed, t.score, shared)
	t.work -= before - *shared
	// The search puts back the members near each change; one more pass
	// makes the whole set minimal.
	for v := int32(0); v < int32(t.d.n) && ctx.Err() == nil; v++ {
		if t.removed[v] {
			if long, _ := t.check.closesLong(t.d, t.pred, t.removed, v); !long {
				t.removed[v] = false
			}
		}
	}
}

// set returns the members, sorted.
func (t *treeState) set() []int32 {
	var x []int32
	for v := int32(0); v < int32(t.d.n); v++ {
		if t.removed[v] {
			x = append(x, v)
		}
	}
	return x
}

// cost returns treeCost of the set: every two-way edge between vertices
// not removed is an edge of one of the trees left.
func (t *treeState) cost() cost {
	size, forest := 0, 0
	for v := int32(0); v < int32(t.d.n); v++ {
		if t.removed[v] {
			size++
			continue
		}
		for _, w := range t.d.succ(v) {
			if w != v && !t.removed[w] {
				if _, back := slices.BinarySearch(t.d.succ(w), v); back {
					forest++
				}
			}
		}
	}
	return treeCost(t.d.n, size, forest/2)
}

// treeConstruction returns feedbackTrees for d around a set that leaves
// trees of two-way edges, or nil when the greedy set is not smaller than a
// feedback vertex set of fvs vertices (the plain construction is then as
// good or better) or the sequence is over the copy limit. The local search
// runs, on the searcher's shared budget, only when the construction on the
// greedy set of two or more members, with 15% fewer copies (about what the
// search gains on random digraphs), would beat most, the best largest
// copies so far. The sequence is built once, for the set chosen. It also
// returns the greedy set, before the local search, and the set chosen (nil
// with no sequence).
func (s *searcher) treeConstruction(d *digraph, fvs, most int) (seq, greedy, set []int32) {
	t := greedyTreeSet(s.ctx, d)
	if t == nil {
		return nil, nil, nil
	}
	c, size := t.cost(), len(t.set())
	if size >= fvs {
		return nil, nil, nil
	}
	greedy = t.set()
	if size >= 2 && c.most*17/20 < most && s.fits(c.total) {
		t.improve(s.ctx, &s.treeLeft)
	}
	set = t.set()
	if seq = s.feedbackTrees(d, set); seq == nil {
		return nil, nil, nil
	}
	return seq, greedy, set
}

// improveWork and improvePerEdge bound the vertices and edges visited by
// improveTreeSet: improvePerEdge per vertex and edge of the graph, at most
// improveWork (common practice, no source; set by measuring BenchmarkUnfold,
// where improveWork takes about a second on the random 10,000-atom digraph
// and twice as much work gained only 1.5% fewer copies).
const (
	improveWork    = 80000000
	improvePerEdge = 20000
)

// maxRepair is the most vertices a move of improveTreeSet takes into the
// set to repair it; a move that needs more is undone (common practice, no
// source: on random sparse digraphs of 1,000 and 10,000 vertices 4 did
// best among 1 to 10, by 1% or less over 2 to 5; from 6 on, fewer but
// more thorough moves lost).
const maxRepair = 4

// improveTreeSet improves the set (the removed vertices, which leave only
// single vertices and trees of two-way edges) by iterated local search: put
// a random member a back; while a lies on a cycle of three vertices or
// more, take the best-scoring vertex of one such cycle (a short one, found
// by longCycle) into the set, giving up after maxRepair; then put back
// every member near the change that can go back. A move is undone when it
// gave up or the set grew; the best set seen (treeCost: largest copies,
// then length) is the result. The random generator has a fixed seed, so
// the result is deterministic. It stops when the work budget *work (shared
// with other searches) or its own runs out, or ctx is cancelled.
func improveTreeSet(ctx context.Context, d *digraph, pred [][]int32, removed []bool, score func(int32) int, work *int) {
	r := rand.New(rand.NewPCG(0x7472656c6c6973, 3))
	c := newCycleCheck(d.n)
	mark := make([]int32, d.n) // stamps for the searches below
	stamp := int32(0)
	budget := min(improveWork, improvePerEdge*(d.n+d.edges()))
	var members, changed, near []int32
	two := newTwoWay(d)
	size, forest := 0, 0
	for v := range removed {
		if removed[v] {
			size++
		} else {
			forest += two.kept(int32(v), removed)
		}
	}
	forest /= 2
	// members lists the set, at[v] is the index of v there.
	at := make([]int32, d.n)
	for v := range removed {
		if removed[v] {
			at[v] = int32(len(members))
			members = append(members, int32(v))
		}
	}
	// flip moves v into or out of the set, keeping forest and members up
	// to date.
	flip := func(v int32) {
		if removed[v] {
			removed[v] = false
			forest += two.kept(v, removed)
			last := members[len(members)-1]
			members[at[v]], at[last] = last, at[v]
			members = members[:len(members)-1]
		} else {
			forest -= two.kept(v, removed)
			removed[v] = true
			at[v] = int32(len(members))
			members = append(members, v)
		}
	}
	// The best set seen so far: moves that keep the size but lengthen
	// the construction are taken too, so the search can move on.
	best := slices.Clone(removed)
	bestCost := treeCost(d.n, size, forest)
	defer copy(removed, best)
	// Fifty tries per member, plus a hundred, counted again from each
	// better set found.
	allowance := 50*size + 100
	for tries := allowance; tries > 0 && budget > 0 && *work > 0 && ctx.Err() == nil && size > 0; tries-- {
		start := budget
		a := members[r.IntN(len(members))]
		changed = append(changed[:0], a)
		sizeBefore := size
		flip(a)
		size--
		failed := false
		for picks := 0; ; picks++ {
			long, cycle, visited := c.longCycle(d, pred, removed, a)
			budget -= visited
			if !long {
				break
			}
			if picks == maxRepair {
				failed = true
				break
			}
			pick, best := int32(-1), -1
			for _, v := range cycle {
				if sc := 4*score(v) + r.IntN(4); sc > best {
					pick, best = v, sc
				}
			}
			flip(pick)
			changed = append(changed, pick)
			size++
		}
		// Members near the change (at most two edges away, either way)
		// that can go back.
		near = near[:0]
		stamp++
		addNear := func(z int32) {
			if removed[z] && mark[z] != stamp {
				mark[z] = stamp
				near = append(near, z)
			}
		}
		for _, y := range changed {
			if failed {
				break
			}
			for _, list := range [2][]int32{d.succ(y), pred[y]} {
				for _, w := range list {
					addNear(w)
					for _, z := range d.succ(w) {
						addNear(z)
					}
					for _, z := range pred[w] {
						addNear(z)
					}
				}
			}
		}
		for _, v := range near {
			long, visited := c.closesLong(d, pred, removed, v)
			budget -= visited
			if !long {
				flip(v)
				changed = append(changed, v)
				size--
			}
		}
		if failed || size > sizeBefore {
			// Undo: the changed vertices flip back, in reverse.
			for i := len(changed) - 1; i >= 0; i-- {
				flip(changed[i])
			}
			size = sizeBefore
		} else if c := treeCost(d.n, size, forest); !c.worse(bestCost) && c != bestCost {
			bestCost = c
			copy(best, removed)
			budget -= d.n
			tries = allowance
		}
		*work -= start - budget
	}
}

// cost is the largest copies and the length of a sequence.
type cost struct{ most, total int }

// worse reports whether c is worse than b: more largest copies, then
// longer (the order of better).
func (c cost) worse(b cost) bool {
	if c.most != b.most {
		return c.most > b.most
	}
	return c.total > b.total
}

// treeCost returns a bound on the cost of feedbackTrees on a digraph of n
// vertices for a set of size vertices that leaves trees with forest two-way
// edges in all: its cost when every round of T is full. A tree of m
// vertices has m−1 edges and a sequence of 2m−1 elements, a single vertex a
// sequence of one, so T has n − size + forest elements; with size+1 rounds
// of T and size of π, a tree's non-root vertices occur twice a round,
// single vertices and roots once, members size times. The rounds
// feedbackTrees leaves short (treeRounds) only lower the cost.
func treeCost(n, size, forest int) cost {
	most := size + 1
	if forest > 0 {
		most = 2 * (size + 1)
	}
	return cost{most, (size+1)*(n-size+forest) + size*size}
}

// twoWay lists the two-way neighbours of every vertex (w ≠ v with edges
// v → w and w → v) in compressed sparse rows.
type twoWay struct {
	start, adj []int32
}

func newTwoWay(d *digraph) *twoWay {
	var from, to []int32
	for v := int32(0); v < int32(d.n); v++ {
		for _, w := range d.succ(v) {
			if w == v {
				continue
			}
			if _, back := slices.BinarySearch(d.succ(w), v); back {
				from, to = append(from, v), append(to, w)
			}
		}
	}
	start, adj := csr(d.n, from, to)
	return &twoWay{start, adj}
}

// kept returns the number of two-way neighbours of v not removed.
func (t *twoWay) kept(v int32, removed []bool) int {
	k := 0
	for _, w := range t.adj[t.start[v]:t.start[v+1]] {
		if !removed[w] {
			k++
		}
	}
	return k
}

// cycleCheck holds the scratch space of closesLong: per side (0 the
// search forward from the successors of v, 1 the search backward from its
// predecessors) up to two labels per vertex, −1 for none, and the vertices
// touched and queued.
type cycleCheck struct {
	from    [2][2][]int32
	parent  [2][2][]int32 // the vertex each label came from
	touched [2][]int32
	queue   [2][]int32
	// meet, when not −1, is a vertex with a forward label meetF and a
	// backward label meetB ≠ meetF.
	meet, meetF, meetB int32
	path               []int32
}

func newCycleCheck(n int) *cycleCheck {
	c := &cycleCheck{meet: -1}
	for s := range c.from {
		for k := range c.from[s] {
			c.parent[s][k] = make([]int32, n)
			c.from[s][k] = make([]int32, n)
			for i := range c.from[s][k] {
				c.from[s][k][i] = -1
			}
		}
	}
	return c
}

// closesLong reports whether the removed vertex v, put back into d minus
// the removed vertices (which has no cycle of three vertices or more), would
// lie on such a cycle, and how many vertices and edges it visited. That is
// so exactly when some successor w of v reaches a predecessor u ≠ w of v
// without passing v: the cycle v → w ⇝ u → v then has three vertices or
// more, while cycles v → w → v are allowed. Two searches run in turns, the
// one with less to do first: forward from all successors at once, keeping
// per vertex up to two distinct successors it is reached from, and backward
// from all predecessors, keeping up to two distinct predecessors it
// reaches (two labels are enough to tell whether one differs from a given
// vertex). A vertex with a forward label w and a backward label u ≠ w
// proves such a cycle. When one search has nothing left to do it has
// reached everything it can with all its labels: a successor w is a
// backward seed and a predecessor u a forward seed, each labelled with
// itself, so the cycle, if any, has already been met.
func (c *cycleCheck) closesLong(d *digraph, pred [][]int32, removed []bool, v int32) (bool, int) {
	long, _, visited := c.search(d, pred, removed, v, false)
	return long, visited
}

// longCycle is closesLong that also returns, when v would lie on a cycle of
// three vertices or more, the vertices other than v of one such cycle,
// w ⇝ u in the notation of closesLong: found by the two searches, so one of
// the shortest when they run in step.
func (c *cycleCheck) longCycle(d *digraph, pred [][]int32, removed []bool, v int32) (long bool, cycle []int32, visited int) {
	return c.search(d, pred, removed, v, true)
}

// search is closesLong, with the cycle found when want is set.
func (c *cycleCheck) search(d *digraph, pred [][]int32, removed []bool, v int32, want bool) (long bool, cycle []int32, visited int) {
	// add gives x the label src, coming from vertex p, on side s and
	// checks it against the labels of the other side.
	add := func(s int, x, src, p int32) {
		f := &c.from[s]
		k := 0
		switch {
		case f[0][x] == src || f[1][x] == src:
			return
		case f[0][x] < 0:
			c.touched[s] = append(c.touched[s], x)
		case f[1][x] < 0:
			k = 1
		default:
			return
		}
		f[k][x], c.parent[s][k][x] = src, p
		c.queue[s] = append(c.queue[s], x)
		o := &c.from[1-s]
		for _, l := range [2]int32{o[0][x], o[1][x]} {
			if l >= 0 && l != src && !long {
				long = true
				c.meet, c.meetF, c.meetB = x, src, l
				if s == 1 {
					c.meetF, c.meetB = l, src
				}
			}
		}
	}
	for _, w := range d.succ(v) {
		if w != v && !removed[w] {
			add(0, w, w, -1)
		}
	}
	for _, u := range pred[v] {
		if u != v && !removed[u] {
			add(1, u, u, -1)
		}
	}
	var next [2]int
	for !long {
		left0, left1 := len(c.queue[0])-next[0], len(c.queue[1])-next[1]
		if left0 == 0 || left1 == 0 {
			break
		}
		s := 0
		if left1 < left0 {
			s = 1
		}
		x := c.queue[s][next[s]]
		next[s]++
		visited++
		ys := d.succ(x)
		if s == 1 {
			ys = pred[x]
		}
		l0, l1 := c.from[s][0][x], c.from[s][1][x]
		for _, y := range ys {
			visited++
			if y == v || removed[y] {
				continue
			}
			add(s, y, l0, x)
			if l1 >= 0 {
				add(s, y, l1, x)
			}
		}
	}
	if long && want {
		cycle = c.cycle()
	}
	for s := range c.touched {
		for _, x := range c.touched[s] {
			c.from[s][0][x], c.from[s][1][x] = -1, -1
		}
		c.touched[s], c.queue[s] = c.touched[s][:0], c.queue[s][:0]
	}
	c.meet = -1
	return long, cycle, visited
}

// cycle returns the path from meetF to meetB through meet that the labels
// record, made simple: the forward part runs from meetF to meet, the
// backward part from meet to meetB, and where they share a vertex the
// walk is cut short there.
func (c *cycleCheck) cycle() []int32 {
	// trace follows the parents of x on side s back to the seed lab.
	trace := func(s int, x, lab int32, out []int32) []int32 {
		for {
			out = append(out, x)
			if x == lab {
				return out
			}
			k := 0
			if c.from[s][0][x] != lab {
				k = 1
			}
			x = c.parent[s][k][x]
		}
	}
	fwd := trace(0, c.meet, c.meetF, c.path[:0]) // meet … meetF
	slices.Reverse(fwd)                          // meetF … meet
	n := len(fwd)
	bwd := trace(1, c.meet, c.meetB, fwd) // meet … meetB after fwd
	c.path = bwd
	fwd, bwd = bwd[:n], bwd[n:]
	// The last vertex of the backward part that is also on the forward
	// part (meet at least) joins them.
	for j := len(bwd) - 1; j >= 0; j-- {
		if i := slices.Index(fwd, bwd[j]); i >= 0 {
			return slices.Concat(fwd[:i], bwd[j:])
		}
	}
	return nil
}

// offending reports whether the strongly connected component c of d minus
// the removed vertices is neither a single vertex nor a tree of two-way
// edges.
func offending(d *digraph, c []int32, removed []bool) bool {
	in := make(map[int32]bool, len(c))
	for _, v := range c {
		in[v] = true
	}
	arcs := 0
	for _, v := range c {
		for _, w := range d.succ(v) {
			if w == v || !in[w] {
				continue
			}
			arcs++
			if _, back := slices.BinarySearch(d.succ(w), v); !back {
				return true
			}
		}
	}
	return arcs != 2*(len(c)-1)
}
