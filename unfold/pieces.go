package unfold

import (
	"context"
	"math/rand/v2"
	"slices"
)

// The feedback-set construction with pieces left in place.
//
// feedbackTrees needs the components of d − X to be single atoms or trees
// of two-way edges, whose sequences have every atom at most twice. A
// component with a feedback atom v (one on every cycle of the component,
// so that removing it leaves the component acyclic) has such a sequence
// too: t·v·t, with t a topological order of the component without v. A
// simple path inside it either avoids v, and then follows t, or runs to v
// in the first t and on from v in the second. Allowing these pieces as
// well as trees lets X shrink (on the random 100-atom digraph of
// BenchmarkUnfold, from 15 atoms to 14), which saves a round of T and two
// copies of the most copied atoms.

// pieceSetSize is the largest digraph on which the construction looks for
// a set leaving pieces; pieceWork bounds the vertices and edges one search
// visits, and pieceTotalWork those of all the searches of one unfolding
// (common practice, no source: the search recomputes the components of
// what is left after every change, so it is kept to small components;
// pieceWork is about a quarter of a second).
const (
	pieceSetSize   = 150
	pieceWork      = 15000000
	pieceTotalWork = 100000000
)

// feedbackAtom returns an atom of the strongly connected component c of d
// minus the removed vertices that lies on every cycle of c, or −1 when
// there is none. Candidates are the atoms of one cycle, found by walking
// from c[0] along first successors inside c until an atom repeats; each is
// tried by topological sorting c without it. Self-loops do not count. It
// also returns the number of vertices and edges it visited.
func (d *digraph) feedbackAtom(c []int32, removed []bool) (atom int32, steps int) {
	// pos[v] is 1 + v's position in c, 0 outside c.
	pos := make([]int32, d.n)
	for i, v := range c {
		if !removed[v] {
			pos[v] = int32(i) + 1
		}
	}
	// The walk: at[i] is the step at which it reached c[i], −1 before.
	at := make([]int32, len(c))
	for i := range at {
		at[i] = -1
	}
	var walk []int32
	v := c[0]
	for at[pos[v]-1] < 0 {
		at[pos[v]-1] = int32(len(walk))
		walk = append(walk, v)
		next := int32(-1)
		for _, w := range d.succ(v) {
			if w != v && pos[w] > 0 {
				next = w
				break
			}
		}
		steps++
		if next < 0 {
			return -1, steps
		}
		v = next
	}
	cycle := walk[at[pos[v]-1]:]
	indeg := make([]int32, len(c))
	queue := make([]int32, 0, len(c))
	for _, cand := range cycle {
		clear(indeg)
		for _, u := range c {
			if u == cand {
				continue
			}
			steps += len(d.succ(u))
			for _, w := range d.succ(u) {
				if w != cand && w != u && pos[w] > 0 {
					indeg[pos[w]-1]++
				}
			}
		}
		queue = queue[:0]
		for i, u := range c {
			if u != cand && indeg[i] == 0 {
				queue = append(queue, u)
			}
		}
		for i := 0; i < len(queue); i++ {
			for _, w := range d.succ(queue[i]) {
				if w != cand && w != queue[i] && pos[w] > 0 {
					if indeg[pos[w]-1]--; indeg[pos[w]-1] == 0 {
						queue = append(queue, w)
					}
				}
			}
		}
		steps += len(c)
		if len(queue) == len(c)-1 {
			return cand, steps
		}
	}
	return -1, steps
}

// pieceRounds returns the sequences of the component c with feedback atom
// v for the first, the middle and the last rounds of feedbackTrees, with
// reach as reachX gives it. The first round is t·v·t in full. After the
// first round a path comes into c from outside at an atom marked entered,
// so the first t needs only the atoms reached from those (in c − v);
// before the last round it leaves c towards a member, from an atom marked
// leavesToX, so the first t needs only atoms that reach one of those or v,
// and the second t only atoms that reach one of those. A component that
// no member reaches is met only by paths that never meet a member, all of
// whose stretch in c the first round holds; one that reaches no member is
// left out of the middle rounds.
func (d *digraph) pieceRounds(c []int32, v int32, reach []uint8) (first, middle, last []int32) {
	t := d.pieceOrder(c, v)
	first = slices.Concat(t, []int32{v}, t)
	if reach[v]&fromX == 0 {
		return first, nil, nil
	}
	in := make(map[int32]bool, len(c))
	for _, u := range c {
		in[u] = u != v
	}
	// from marks the atoms of c − v reached from the seeds (forward) or
	// reaching them (backward), in c − v: t in order reaches successors
	// after their predecessors, t in reverse the other way round.
	from := func(seed func(int32) bool, forward bool) map[int32]bool {
		got := map[int32]bool{}
		if forward {
			for _, u := range t {
				if got[u] = got[u] || seed(u); got[u] {
					for _, w := range d.succ(u) {
						if in[w] {
							got[w] = true
						}
					}
				}
			}
			return got
		}
		for i := len(t) - 1; i >= 0; i-- {
			u := t[i]
			got[u] = seed(u)
			for _, w := range d.succ(u) {
				got[u] = got[u] || in[w] && got[w]
			}
		}
		return got
	}
	fromEntry := from(func(u int32) bool { return reach[u]&entered != 0 }, true)
	fromV := from(func(u int32) bool { return slices.Contains(d.succ(v), u) }, true)
	keep := func(set ...map[int32]bool) []int32 {
		var out []int32
		for _, u := range t {
			all := true
			for _, s := range set {
				all = all && s[u]
			}
			if all {
				out = append(out, u)
			}
		}
		return out
	}
	last = slices.Concat(keep(fromEntry), []int32{v}, t)
	if reach[v]&toX == 0 {
		return first, nil, last
	}
	toExit := from(func(u int32) bool { return reach[u]&leavesToX != 0 }, false)
	toExitOrV := from(func(u int32) bool {
		return reach[u]&leavesToX != 0 || slices.Contains(d.succ(u), v)
	}, false)
	middle = slices.Concat(keep(fromEntry, toExitOrV), []int32{v}, keep(fromV, toExit))
	return first, middle, last
}

// pieceOrder returns a topological order of the component c without its
// feedback atom v.
func (d *digraph) pieceOrder(c []int32, v int32) []int32 {
	indeg := make(map[int32]int, len(c))
	in := make(map[int32]bool, len(c))
	for _, u := range c {
		in[u] = u != v
	}
	for _, u := range c {
		if u == v {
			continue
		}
		for _, w := range d.succ(u) {
			if in[w] && w != u {
				indeg[w]++
			}
		}
	}
	var order []int32
	for _, u := range c {
		if in[u] && indeg[u] == 0 {
			order = append(order, u)
		}
	}
	for i := 0; i < len(order); i++ {
		for _, w := range d.succ(order[i]) {
			if in[w] && w != order[i] {
				if indeg[w]--; indeg[w] == 0 {
					order = append(order, w)
				}
			}
		}
	}
	return order
}

// pieces reports whether every strongly connected component of d minus
// the removed vertices is a single atom, a tree of two-way edges or has a
// feedback atom, and how many vertices and edges it visited.
func (d *digraph) pieces(removed []bool) (bool, int) {
	steps := d.n + d.edges()
	comps, bad := d.treeComponents(removed)
	if bad == nil {
		return true, steps
	}
	for _, c := range comps {
		if len(c) > 1 && offending(d, c, removed) {
			v, k := d.feedbackAtom(c, removed)
			if steps += k; v < 0 {
				return false, steps
			}
		}
	}
	return true, steps
}

// pieceSet improves the set x (whose removal must leave pieces) by
// iterated local search, keeping the set with the cheapest construction
// (treeRoundSeqs.cost): put a random member a back; while what is left is
// not all pieces, take a random neighbour of a into the set, giving up
// after three; then put back every member that can go back. A move is
// undone when it gave up or the set grew; moves that keep the size are
// kept even when the construction is no cheaper, so the search can move
// on. It stops after perMember·(|x|+5) moves without a better set, or when
// its work, taken from *shared, runs out. The random generator has a fixed
// seed, so the result is deterministic. It returns nil when no set found
// beats x's construction.
func pieceSet(ctx context.Context, d *digraph, x []int32, perMember int, shared *int) []int32 {
	r := rand.New(rand.NewPCG(0x7069656365, 5))
	removed := make([]bool, d.n)
	for _, v := range x {
		removed[v] = true
	}
	pred := d.preds()
	members := func() []int32 {
		var m []int32
		for v := int32(0); v < int32(d.n); v++ {
			if removed[v] {
				m = append(m, v)
			}
		}
		return m
	}
	rounds := d.rounds(x)
	if rounds == nil {
		return nil
	}
	best, bestCost := []int32(nil), rounds.cost(d.n)
	work := min(pieceWork, *shared)
	defer func(before int) { *shared -= before - work }(work)
	pass := d.n + d.edges()
	saved := make([]bool, d.n)
	reachBoth := &sccSearch{mark: make([]uint8, d.n)}
	allowance := perMember * (len(x) + 5)
	for tries := allowance; tries > 0 && work > 0 && ctx.Err() == nil; tries-- {
		m := members()
		if len(m) == 0 {
			break
		}
		copy(saved, removed)
		a := m[r.IntN(len(m))]
		removed[a] = false
		ok, steps := d.pieces(removed)
		work -= steps
		for picks := 0; !ok && picks < 3; picks++ {
			var near []int32
			for _, w := range slices.Concat(d.succ(a), pred[a]) {
				if w != a && !removed[w] {
					near = append(near, w)
				}
			}
			if len(near) == 0 {
				break
			}
			removed[near[r.IntN(len(near))]] = true
			ok, steps = d.pieces(removed)
			work -= steps
		}
		if !ok {
			copy(removed, saved)
			continue
		}
		for _, v := range members() {
			removed[v] = false
			scc := reachBoth.scc(d, pred, removed, v)
			work -= pass
			if len(scc) > 1 && offending(d, scc, removed) {
				atom, steps := d.feedbackAtom(scc, removed)
				if work -= steps; atom < 0 {
					removed[v] = true
				}
			}
		}
		now := members()
		if len(now) > len(m) {
			copy(removed, saved)
			continue
		}
		work -= 4 * pass
		if c := d.rounds(now).cost(d.n); !c.worse(bestCost) && c != bestCost {
			best, bestCost = now, c
			tries = allowance
		}
	}
	return best
}

// pieceConstruction returns feedbackTrees around a set that leaves
// pieces, when it has fewer largest copies than most (those of the tree
// construction on the set tree); otherwise nil. A short search from tree
// tells whether pieces lower the largest copies at all; only then does a
// longer one run from greedy (the greedy tree-leaving set, from which the
// search usually goes further), and the better set is kept.
func (s *searcher) pieceConstruction(d *digraph, greedy, tree []int32, most int) []int32 {
	if d.n > pieceSetSize || len(tree) == 0 || s.pieceLeft <= 0 {
		return nil
	}
	quick := pieceSet(s.ctx, d, tree, quickPieceTries, &s.pieceLeft)
	if quick == nil {
		return nil
	}
	best := d.rounds(quick).cost(d.n)
	if best.most >= most {
		return nil
	}
	if y := pieceSet(s.ctx, d, greedy, pieceTries, &s.pieceLeft); y != nil {
		if c := d.rounds(y).cost(d.n); !c.worse(best) && c != best {
			quick = y
		}
	}
	return s.feedbackTrees(d, quick)
}

// quickPieceTries and pieceTries are the moves pieceSet makes per member
// of the set (and five more) without finding a better set before it stops
// (common practice, no source: on random digraphs of about 100 atoms, 20
// found the best set of 30 tries on seven of eight, 10 on six).
const (
	quickPieceTries = 2
	pieceTries      = 20
)

// sccSearch holds the scratch space of scc.
type sccSearch struct {
	mark                  []uint8 // 1: reached forward, 2: backward
	queue, found, touched []int32
}

// scc returns the strongly connected component of v in d minus the
// removed vertices: the vertices v reaches that also reach v, in the
// order of a breadth-first search backward from v. The slice is reused by
// the next call.
func (s *sccSearch) scc(d *digraph, pred [][]int32, removed []bool, v int32) []int32 {
	s.found, s.touched = s.found[:0], s.touched[:0]
	for bit, next := range [2]func(int32) []int32{d.succ, func(u int32) []int32 { return pred[u] }} {
		b := uint8(1) << bit
		s.queue = append(s.queue[:0], v)
		s.mark[v] |= b
		for i := 0; i < len(s.queue); i++ {
			for _, w := range next(s.queue[i]) {
				if !removed[w] && s.mark[w]&b == 0 {
					s.mark[w] |= b
					s.queue = append(s.queue, w)
				}
			}
		}
		s.touched = append(s.touched, s.queue...)
	}
	// The backward search comes last: the vertices it reached that the
	// forward one reached too.
	for _, u := range s.queue {
		if s.mark[u] == 3 {
			s.found = append(s.found, u)
		}
	}
	for _, u := range s.touched {
		s.mark[u] = 0
	}
	return s.found
}
