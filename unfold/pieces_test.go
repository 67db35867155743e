package unfold

import (
	"context"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// bruteFeedbackAtoms returns, by brute force, every atom of the set c
// (a strongly connected component of d minus the removed vertices) whose
// removal leaves c without a cycle of two vertices or more.
func bruteFeedbackAtoms(d *digraph, c []int32, removed []bool) []int32 {
	var atoms []int32
	for _, v := range c {
		out := pieceMask(d, c)
		out[v] = true
		if !cycleOfAtLeast(d, out, 2) {
			atoms = append(atoms, v)
		}
	}
	return atoms
}

// drawSet draws a random set of vertices of d.
func drawSet(t *rapid.T, d *digraph) []int32 {
	var x []int32
	for v := int32(0); v < int32(d.n); v++ {
		if rapid.IntRange(0, 3).Draw(t, "member") == 0 {
			x = append(x, v)
		}
	}
	return x
}

// TestFeedbackAtom checks feedbackAtom against brute force on the
// components left by random sets: it finds an atom exactly when one
// exists, and the atom it finds is one.
func TestFeedbackAtom(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		g := drawTreeTestGraph(t)
		d := whole(g)
		removed := setMask(d.n, drawSet(t, d))
		comps, _ := d.treeComponents(removed)
		for _, c := range comps {
			if len(c) < 2 {
				continue
			}
			got, _ := d.feedbackAtom(c, removed)
			want := bruteFeedbackAtoms(d, c, removed)
			if got < 0 && len(want) > 0 || got >= 0 && !slices.Contains(want, got) {
				t.Fatalf("component %v minus %v: feedbackAtom %d, atoms that work %v", c, removed, got, want)
			}
		}
	})
}

// TestPieceRounds checks that the construction holds every simple path
// (brute force) for every random set whose removal leaves pieces, and that
// rounds refuses exactly the sets that leave something else.
func TestPieceRounds(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		for _, part := range cyclicParts(drawTreeTestGraph(t)) {
			d := part.d
			x := drawSet(t, d)
			removed := setMask(d.n, x)
			comps, _ := d.treeComponents(removed)
			pieces := true
			for _, c := range comps {
				if len(c) > 1 && longCycle(d, pieceMask(d, c)) && len(bruteFeedbackAtoms(d, c, removed)) == 0 {
					pieces = false
				}
			}
			r := d.rounds(x)
			if (r != nil) != pieces {
				t.Fatalf("set %v of %d vertices: rounds %v, leaves pieces %v", x, d.n, r != nil, pieces)
			}
			if ok, _ := d.pieces(removed); ok != pieces {
				t.Fatalf("set %v: pieces says %v, brute force %v", x, !pieces, pieces)
			}
			if r == nil {
				continue
			}
			seq := newSearcher(context.Background(), Options{}).feedbackTrees(d, x)
			if c := r.cost(d.n); c.total != len(seq) || c.most != copies(d.n, seq) {
				t.Fatalf("cost %v, sequence has %d copies at most and %d in all", c, copies(d.n, seq), len(seq))
			}
			if ok, done, missing := holdsAllPaths(d, seq, 1<<22); done && !ok {
				t.Fatalf("set %v: sequence %v misses the path %v", x, seq, missing)
			}
		}
	})
}

// setMask marks the vertices of set among n.
func setMask(n int, set []int32) []bool {
	mask := make([]bool, n)
	for _, v := range set {
		mask[v] = true
	}
	return mask
}

// pieceMask marks every vertex outside c as removed.
func pieceMask(d *digraph, c []int32) []bool {
	mask := make([]bool, d.n)
	for v := range mask {
		mask[v] = !slices.Contains(c, int32(v))
	}
	return mask
}

// TestPieceSet checks the local search: the set it returns leaves pieces,
// is no larger than the set it started from, and its construction is
// cheaper and holds every simple path.
func TestPieceSet(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		for _, part := range cyclicParts(drawTreeTestGraph(t)) {
			d := part.d
			x := treeSet(context.Background(), d)
			work := pieceTotalWork
			y := pieceSet(context.Background(), d, x, pieceTries, &work)
			if y == nil {
				continue
			}
			removed := setMask(d.n, y)
			if ok, _ := d.pieces(removed); !ok || len(y) > len(x) {
				t.Fatalf("set %v (from %v) does not leave pieces or grew", y, x)
			}
			if before, after := d.rounds(x).cost(d.n), d.rounds(y).cost(d.n); after.worse(before) || after == before {
				t.Fatalf("set %v costs %v, no better than %v for %v", y, after, before, x)
			}
			seq := newSearcher(context.Background(), Options{}).feedbackTrees(d, y)
			if ok, done, missing := holdsAllPaths(d, seq, 1<<22); done && !ok {
				t.Fatalf("set %v: sequence %v misses the path %v", y, seq, missing)
			}
		}
	})
}

// TestSCCSearch checks scc against Tarjan's components of what is left.
func TestSCCSearch(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		g := randomShape(t, 1, 10).graph()
		d := whole(g)
		removed := setMask(d.n, drawSet(t, d))
		pred := d.preds()
		s := &sccSearch{mark: make([]uint8, d.n)}
		comps, _ := d.treeComponents(removed)
		for _, c := range comps {
			want := slices.Sorted(slices.Values(c))
			for _, v := range c {
				if got := slices.Sorted(slices.Values(s.scc(d, pred, removed, v))); !slices.Equal(got, want) {
					t.Fatalf("scc of %d: %v, want %v", v, got, want)
				}
			}
		}
	})
}

// TestSequenceWithPieces checks sequences of components of 8 to 11 atoms
// found without the exhaustive search, so that the tree and piece
// constructions compete, against every simple path (the exhaustive path
// walk of the bisection tests).
func TestSequenceWithPieces(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		var g *Graph
		if rapid.Bool().Draw(t, "two-way") {
			g = twoWayShape(t, 8, 11).graph()
		} else {
			g = randomShape(t, 8, 11).graph()
		}
		for c := 0; c < g.NumComponents(); c++ {
			if !g.Cyclic(c) {
				continue
			}
			comp := slices.Sorted(slices.Values(g.Component(c)))
			seq, how := Sequence(context.Background(), g, comp, Options{ExactLimit: 2, CheckLimit: 2})
			local := make([]int32, len(seq))
			for i, v := range seq {
				local[i] = int32(slices.Index(comp, v))
			}
			if ok, done, missing := holdsAllPaths(g.local(comp), local, 1<<24); !done || !ok {
				t.Fatalf("%s sequence %v misses the path %v of component %v (checked: %v)", how, seq, missing, comp, done)
			}
		}
	})
}
