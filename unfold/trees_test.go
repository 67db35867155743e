package unfold

import (
	"context"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// longCycle reports, by brute force, whether the digraph d minus the
// removed vertices has a simple directed cycle of three vertices or more.
func longCycle(d *digraph, removed []bool) bool {
	return cycleOfAtLeast(d, removed, 3)
}

// cycleOfAtLeast reports, by brute force, whether the digraph d minus the
// removed vertices has a simple directed cycle of at least k vertices.
func cycleOfAtLeast(d *digraph, removed []bool, k int) bool {
	on := make([]bool, d.n)
	var from func(start, v int32, length int) bool
	from = func(start, v int32, length int) bool {
		for _, w := range d.succ(v) {
			if removed[w] {
				continue
			}
			if w == start && length >= k {
				return true
			}
			// Cycles are found from their smallest vertex.
			if w > start && !on[w] {
				on[w] = true
				found := from(start, w, length+1)
				on[w] = false
				if found {
					return true
				}
			}
		}
		return false
	}
	for v := int32(0); v < int32(d.n); v++ {
		if !removed[v] {
			on[v] = true
			found := from(v, v, 1)
			on[v] = false
			if found {
				return true
			}
		}
	}
	return false
}

// cyclicPart is a cyclic component of a Graph: its atoms and its digraph,
// vertex i standing for comp[i].
type cyclicPart struct {
	comp []int32
	d    *digraph
}

// cyclicParts returns the cyclic components of g.
func cyclicParts(g *Graph) []cyclicPart {
	var parts []cyclicPart
	for c := 0; c < g.NumComponents(); c++ {
		if g.Cyclic(c) {
			comp := slices.Clone(g.Component(c))
			parts = append(parts, cyclicPart{comp, g.local(comp)})
		}
	}
	return parts
}

// whole returns the digraph of all of g's atoms.
func whole(g *Graph) *digraph {
	vs := make([]int32, g.Len())
	for v := range vs {
		vs[v] = int32(v)
	}
	return g.local(vs)
}

// twoWayShape is a random digraph where most pairs that are joined are
// joined both ways (invented test data).
func twoWayShape(t *rapid.T, lo, hi int) *shape {
	n := rapid.IntRange(lo, hi).Draw(t, "n")
	s := &shape{name: "two-way", n: n}
	for i := 0; i < n; i++ {
		for j := i + 1; j < n; j++ {
			switch rapid.IntRange(0, 7).Draw(t, "pair") {
			case 1, 2, 3:
				s.both(i, j)
			case 4:
				s.edge(i, j)
			case 5:
				s.edge(j, i)
			}
		}
	}
	return s
}

// drawTreeTestGraph draws a random graph of 2 to 9 vertices for the tests
// of the tree-leaving set, half of the time with two-way edges only.
func drawTreeTestGraph(t *rapid.T) *Graph {
	if rapid.Bool().Draw(t, "two-way") {
		return twoWayShape(t, 2, 9).graph()
	}
	return randomShape(t, 2, 9).graph()
}

// TestTreeSet checks that removing the set leaves no cycle of three
// vertices or more (brute force), that the set is minimal (no member can
// go back), and that the construction built on it holds every simple path.
func TestTreeSet(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		g := drawTreeTestGraph(t)
		for _, part := range cyclicParts(g) {
			comp, d := part.comp, part.d
			x := treeSet(context.Background(), d)
			removed := make([]bool, d.n)
			for _, v := range x {
				removed[v] = true
			}
			if longCycle(d, removed) {
				t.Fatalf("%v minus %v still has a cycle of three or more", comp, x)
			}
			if _, bad := d.treeComponents(removed); bad != nil {
				t.Fatalf("treeComponents finds %v bad after %v", bad, x)
			}
			for _, v := range x {
				removed[v] = false
				if !longCycle(d, removed) {
					t.Fatalf("set %v is not minimal: %d can go back", x, v)
				}
				removed[v] = true
			}
			seq := newSearcher(context.Background(), Options{}).feedbackTrees(d, x)
			global := make([]int32, len(seq))
			for i, v := range seq {
				global[i] = comp[v]
			}
			if !bruteValid(g, comp, global) {
				t.Fatalf("sequence %v for the set %v misses a simple path of %v", seq, x, comp)
			}
		}
	})
}

// TestTreeComponents checks the test for trees of two-way edges against
// the brute-force cycle search: a digraph without removed vertices passes
// exactly when it has no cycle of three vertices or more.
func TestTreeComponents(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		s := twoWayShape(t, 1, 8)
		d := whole(s.graph())
		removed := make([]bool, d.n)
		_, bad := d.treeComponents(removed)
		if got, want := bad == nil, !longCycle(d, removed); got != want {
			t.Fatalf("treeComponents says tree-like %v, brute force %v", got, want)
		}
	})
}

// TestTreeSequence checks the sequence of random trees of two-way edges:
// it holds every simple path (brute force), with each atom at most twice
// and 2n−1 elements.
func TestTreeSequence(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 12).Draw(t, "n")
		s := &shape{name: "tree", n: n}
		for v := 1; v < n; v++ {
			s.both(rapid.IntRange(0, v-1).Draw(t, "parent"), v)
		}
		g := s.graph()
		all := make([]int32, n)
		for i := range all {
			all[i] = int32(i)
		}
		d := g.local(all)
		seq := d.treeSequence(all, make([]bool, n))
		if n > 1 && (len(seq) != 2*n-1 || copies(n, seq) != 2) {
			t.Fatalf("tree sequence %v: %d elements, %d copies", seq, len(seq), copies(n, seq))
		}
		if n > 1 && !bruteValid(g, all, seq) {
			t.Fatalf("tree sequence %v misses a simple path", seq)
		}
	})
}

// TestClosesLong compares the search of closesLong with the brute-force
// cycle search on random digraphs minus a random set that leaves no cycle
// of three vertices or more.
func TestClosesLong(t *testing.T) {
	outcomes := map[bool]int{}
	rapid.Check(t, func(t *rapid.T) {
		s := twoWayShape(t, 2, 9)
		all := make([]int32, s.n)
		for i := range all {
			all[i] = int32(i)
		}
		d := s.graph().local(all)
		x := treeSet(context.Background(), d)
		removed := make([]bool, d.n)
		for _, v := range x {
			removed[v] = true
		}
		// Some more vertices out, which can go back safely.
		for v := 0; v < d.n; v++ {
			if rapid.IntRange(0, 3).Draw(t, "extra") == 0 && !removed[v] {
				removed[v] = true
				x = append(x, int32(v))
			}
		}
		pred := d.preds()
		c := newCycleCheck(d.n)
		for _, v := range x {
			got, _ := c.closesLong(d, pred, removed, v)
			removed[v] = false
			want := longCycle(d, removed)
			removed[v] = true
			if got != want {
				t.Fatalf("putting %d back: closesLong %v, brute force %v", v, got, want)
			}
			outcomes[got]++
			_, cycle, _ := c.longCycle(d, pred, removed, v)
			if (cycle != nil) != got {
				t.Fatalf("putting %d back: longCycle gives %v, closesLong %v", v, cycle, got)
			}
			if cycle != nil {
				checkCycle(t, d, removed, v, cycle)
			}
		}
	})
	if outcomes[false] == 0 || outcomes[true] == 0 {
		t.Fatalf("outcomes %v: one answer never came up", outcomes)
	}
}

// checkCycle checks that v followed by path is a simple cycle of three
// vertices or more of d through vertices not removed (other than v).
func checkCycle(t *rapid.T, d *digraph, removed []bool, v int32, path []int32) {
	walk := append([]int32{v}, path...)
	seen := map[int32]bool{}
	for i, x := range walk {
		if seen[x] || (x != v && removed[x]) {
			t.Fatalf("cycle %v through %d repeats or uses a removed vertex", path, v)
		}
		seen[x] = true
		y := walk[(i+1)%len(walk)]
		if _, ok := slices.BinarySearch(d.succ(x), y); !ok {
			t.Fatalf("cycle %v through %d: no edge %d → %d", path, v, x, y)
		}
	}
	if len(walk) < 3 {
		t.Fatalf("cycle %v through %d has fewer than three vertices", path, v)
	}
}

// TestTreeCost checks treeCost, which the local search uses in place of
// the sequence, against the construction itself: it bounds the largest
// copies and the length of feedbackTrees on the greedy set and on the
// improved one, and equals the length with every round of T full.
// It also checks that treeConstruction's sequence holds every simple path
// (brute force).
func TestTreeCost(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		g := drawTreeTestGraph(t)
		for _, part := range cyclicParts(g) {
			comp, d := part.comp, part.d
			search := newSearcher(context.Background(), Options{})
			ts := greedyTreeSet(context.Background(), d)
			for round := 0; round < 2; round++ {
				seq := search.feedbackTrees(d, ts.set())
				bound, got := ts.cost(), cost{copies(d.n, seq), len(seq)}
				if got.most > bound.most || got.total > bound.total {
					t.Fatalf("set %v of %v: treeCost %v below the construction's %v", ts.set(), comp, bound, got)
				}
				x := ts.set()
				comps, _ := d.treeComponents(ts.removed)
				full := len(d.fullTrees(comps, ts.removed))
				if want := (len(x)+1)*full + len(x)*len(x); bound.total != want {
					t.Fatalf("set %v of %v: treeCost %v, %d with every round full", x, comp, bound, want)
				}
				work := improveWork
				ts.improve(context.Background(), &work)
			}
			seq, _, _ := search.treeConstruction(d, d.n, d.n)
			if seq == nil {
				continue
			}
			global := make([]int32, len(seq))
			for i, v := range seq {
				global[i] = comp[v]
			}
			if !bruteValid(g, comp, global) {
				t.Fatalf("treeConstruction %v misses a simple path of %v", seq, comp)
			}
		}
	})
}

// countdown is a context that reports cancellation from its n-th call of
// Err on, to stop a search at a chosen point.
type countdown struct {
	context.Context
	n int
}

func (c *countdown) Err() error {
	if c.n--; c.n < 0 {
		return context.Canceled
	}
	return nil
}

// TestTreeSetCancelled checks that a search for a tree-leaving set stopped
// at any point returns nil or a set that leaves only single vertices and
// trees of two-way edges, and that cancelled at the start it returns nil.
func TestTreeSetCancelled(t *testing.T) {
	d := newDigraphOf(randomSparseShape(300, 4))
	for _, n := range []int{0, 1, 2, 5, 20, 100, 1000, 10000} {
		x := treeSet(&countdown{context.Background(), n}, d)
		t.Logf("stopped after %d checks: %d members", n, len(x))
		if n == 0 && x != nil {
			t.Errorf("cancelled at the start: %d members, want nil", len(x))
		}
		if x == nil {
			continue
		}
		removed := make([]bool, d.n)
		for _, v := range x {
			removed[v] = true
		}
		if _, bad := d.treeComponents(removed); bad != nil {
			t.Errorf("stopped after %d checks: %v is left, not a tree", n, bad)
		}
	}
}

// fullTrees returns the tree sequences of comps, in order.
func (d *digraph) fullTrees(comps [][]int32, removed []bool) []int32 {
	var t []int32
	for _, c := range comps {
		t = append(t, d.treeSequence(c, removed)...)
	}
	return t
}
