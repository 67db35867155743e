package unfold

import (
	"context"
	"math/bits"
	"slices"
	"testing"

	"pgregory.net/rapid"

	"trellis/ground"
	"trellis/internal/brute"
)

// bitGraph is a graph of at most 64 vertices as neighbour bit sets.
type bitGraph []uint64

func toBits(adj [][]int32) bitGraph {
	g := make(bitGraph, len(adj))
	for v, nb := range adj {
		for _, w := range nb {
			if int(w) != v {
				g[v] |= 1 << w
				g[w] |= 1 << v
			}
		}
	}
	return g
}

// gameWidth plays the elimination game on g in the given order, from its
// definition: the neighbours of each eliminated vertex are joined, and the
// width is the largest number of neighbours a vertex has when eliminated.
func gameWidth(g bitGraph, order []int32) int {
	g = slices.Clone(g)
	gone := uint64(0)
	width := 0
	for _, v := range order {
		nb := g[v] &^ gone
		width = max(width, bits.OnesCount64(nb))
		for rest := nb; rest != 0; rest &= rest - 1 {
			u := bits.TrailingZeros64(rest)
			g[u] |= nb &^ (1 << u)
		}
		gone |= 1 << v
	}
	return width
}

// permutationTreewidth is the treewidth by its elimination-order
// characterisation, taken literally: the least width of the elimination
// game over every order of the vertices (textbook; e.g. Bodlaender and
// Koster 2010, Treewidth computations I, from memory). Small graphs only.
func permutationTreewidth(g bitGraph) int {
	n := len(g)
	best := n
	order := make([]int32, 0, n)
	used := make([]bool, n)
	var walk func()
	walk = func() {
		if len(order) == n {
			best = min(best, gameWidth(g, order))
			return
		}
		for v := 0; v < n; v++ {
			if !used[v] {
				used[v] = true
				order = append(order, int32(v))
				walk()
				order = order[:len(order)-1]
				used[v] = false
			}
		}
	}
	walk()
	if n == 0 {
		return 0
	}
	return best
}

// exactTreewidth computes the same minimum over elimination orders by
// dynamic programming over the set S of vertices eliminated first
// (Bodlaender, Fomin, Koster, Kratsch and Thilikos 2012, On exact
// algorithms for treewidth, from memory): TW(S) = min over v in S of
// max(TW(S−v), |Q(S−v, v)|), where Q(S, v) are the vertices outside S∪{v}
// that v reaches through S, which are v's neighbours when eliminated after
// S in any order.
func exactTreewidth(g bitGraph) int {
	n := len(g)
	if n == 0 {
		return 0
	}
	full := uint64(1)<<n - 1
	tw := make([]int8, 1<<n)
	for s := uint64(1); s <= full; s++ {
		best := int8(n)
		for rest := s; rest != 0; rest &= rest - 1 {
			v := bits.TrailingZeros64(rest)
			prev := s &^ (1 << v)
			// Vertices reached from v through prev.
			seen := uint64(1) << v
			frontier := seen
			for frontier != 0 {
				next := uint64(0)
				for f := frontier; f != 0; f &= f - 1 {
					next |= g[bits.TrailingZeros64(f)]
				}
				next &^= seen
				seen |= next
				frontier = next & prev
			}
			q := int8(bits.OnesCount64(seen &^ prev &^ (1 << v)))
			best = min(best, max(tw[prev], q))
		}
		tw[s] = best
	}
	return int(tw[full])
}

// randomGraph draws a graph of 1 to most vertices as sorted neighbour lists.
func randomGraph(t *rapid.T, most int) [][]int32 {
	n := rapid.IntRange(1, most).Draw(t, "vertices")
	density := rapid.IntRange(1, 9).Draw(t, "density")
	adj := make([][]int32, n)
	for v := 0; v < n; v++ {
		for w := v + 1; w < n; w++ {
			if rapid.IntRange(0, 9).Draw(t, "edge") < density {
				adj[v] = append(adj[v], int32(w))
				adj[w] = append(adj[w], int32(v))
			}
		}
	}
	for v := range adj {
		slices.Sort(adj[v])
	}
	return adj
}

func cloneGraph(adj [][]int32) [][]int32 {
	c := make([][]int32, len(adj))
	for v := range adj {
		c[v] = slices.Clone(adj[v])
	}
	return c
}

// TestExactTreewidthKnown checks the exact treewidth of the tests against
// known values: a path 1, a cycle 2, the complete graph on k vertices k−1
// (textbook), a k×n grid min(k, n) (folklore of the graph minors papers of
// Robertson and Seymour, from memory), and Width's estimate against it.
func TestExactTreewidthKnown(t *testing.T) {
	for _, tc := range []struct {
		s    *shape
		want int
	}{
		{biPathShape(6), 1}, {cycleShape(7), 2}, {ringShape(9), 2},
		{completeShape(5), 4}, {completeShape(7), 6},
		{gridShape(2, 6), 2}, {gridShape(3, 3), 3}, {gridShape(3, 4), 3}, {gridShape(4, 4), 4},
	} {
		if tc.s.n > 12 && testing.Short() {
			continue
		}
		adj, _ := primal(tc.s.program(), nil)
		g := toBits(adj)
		if got := exactTreewidth(g); got != tc.want {
			t.Errorf("%s: exact treewidth %d, want %d", tc.s.name, got, tc.want)
		}
		if tc.s.n <= 7 {
			if got := permutationTreewidth(g); got != tc.want {
				t.Errorf("%s: treewidth over all orders %d, want %d", tc.s.name, got, tc.want)
			}
		}
		if got, method := Width(tc.s.program(), nil, defaultWidthLimit); got < tc.want {
			t.Errorf("%s: %s width %d below the treewidth %d", tc.s.name, method, got, tc.want)
		}
	}
}

// TestExactTreewidthAgrees checks the subset recursion against the literal
// minimum over all elimination orders on random small graphs.
func TestExactTreewidthAgrees(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		g := toBits(randomGraph(t, 7))
		if a, b := exactTreewidth(g), permutationTreewidth(g); a != b {
			t.Fatalf("subset recursion %d, all orders %d", a, b)
		}
	})
}

// TestOrderedWidth checks orderedWidth against the elimination game played
// from its definition on random orders, eliminateOrder's order against its
// width, both against the exact treewidth, and the grouped bound against
// the lifted order's width.
func TestOrderedWidth(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		adj := randomGraph(t, 12)
		n := len(adj)
		g := toBits(adj)
		order := rapid.Permutation(identity(n)).Draw(t, "order")
		w, done := orderedWidth(adj, order)
		if !done {
			t.Fatal("cut short on a small graph")
		}
		if want := gameWidth(g, order); w != want {
			t.Fatalf("ordered width %d, elimination game %d, order %v", w, want, order)
		}
		exact := exactTreewidth(g)
		if w < exact {
			t.Fatalf("ordered width %d below the treewidth %d", w, exact)
		}
		for _, fill := range []bool{true, false} {
			gw, greedy, done := eliminateOrder(cloneGraph(adj), fill)
			if !done {
				t.Fatal("greedy cut short on a small graph")
			}
			if !slices.Equal(slices.Sorted(slices.Values(greedy)), identity(n)) {
				t.Fatalf("greedy order %v is not a permutation", greedy)
			}
			if rw := gameWidth(g, greedy); rw != gw {
				t.Fatalf("greedy (fill %v) reports %d, its order %v replays to %d", fill, gw, greedy, rw)
			}
			if gw < exact {
				t.Fatalf("greedy width %d below the treewidth %d", gw, exact)
			}
		}
		// Groups of consecutive vertices of the order: the grouped bound
		// holds the order's width, and singleton groups give it exactly.
		gs := &grouping{start: []int32{0}, of: make([]int32, n)}
		for i, v := range order {
			if i > 0 && rapid.Bool().Draw(t, "new group") {
				gs.start = append(gs.start, int32(i))
			}
			gs.list = append(gs.list, v)
			gs.of[v] = int32(len(gs.start) - 1)
		}
		gs.start = append(gs.start, int32(n))
		quotient, weight := gs.quotient(adj)
		gorder := identity(len(weight))
		if !slices.Equal(gs.lift(gorder), order) {
			t.Fatalf("lifted %v, want %v", gs.lift(gorder), order)
		}
		if gw, _ := weightedWidth(quotient, gorder, weight); gw < w {
			t.Fatalf("grouped bound %d below the width %d of the order", gw, w)
		}
		singles := &grouping{start: identity(n + 1), list: order, of: make([]int32, n)}
		for i, v := range order {
			singles.start[i] = int32(i)
			singles.of[v] = int32(i)
		}
		quotient, weight = singles.quotient(adj)
		if sw, _ := weightedWidth(quotient, identity(n), weight); sw != w {
			t.Fatalf("singleton groups give %d, the order %d", sw, w)
		}
	})
}

// TestWeightedWidth checks weighted elimination against the graph with
// every vertex blown up into a clique of its weight, joined to the cliques
// of its neighbours: weightedWidth of an order is the elimination game's
// width on the blown-up graph along the order lifted.
func TestWeightedWidth(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		adj := randomGraph(t, 7)
		n := len(adj)
		weight := make([]int32, n)
		gs := &grouping{start: []int32{0}}
		for v := range weight {
			weight[v] = int32(rapid.IntRange(1, 3).Draw(t, "weight"))
			for range weight[v] {
				gs.of = append(gs.of, int32(v))
				gs.list = append(gs.list, int32(len(gs.list)))
			}
			gs.start = append(gs.start, int32(len(gs.list)))
		}
		blown := make(bitGraph, len(gs.list))
		for x := range blown {
			for y := range blown {
				g, h := gs.of[x], gs.of[y]
				if x != y && (g == h || slices.Contains(adj[g], h)) {
					blown[x] |= 1 << y
				}
			}
		}
		order := rapid.Permutation(identity(n)).Draw(t, "order")
		w, _ := weightedWidth(adj, order, weight)
		if want := gameWidth(blown, gs.lift(order)); w != want {
			t.Fatalf("weighted width %d, elimination game on the blown-up graph %d", w, want)
		}
	})
}

func identity(n int) []int32 {
	id := make([]int32, n)
	for i := range id {
		id[i] = int32(i)
	}
	return id
}

// liftedBound is the bound the lifted order guarantees (see liftOrder):
// every atom of a bag of the input's decomposition is replaced by itself
// and at most m copies.
func liftedBound(m, w int) int { return (m+1)*(w+1) - 1 }

// TestLiftedWidthShapes checks the widths after unfolding known shapes
// against the lifted bound (m+1)·(w+1) − 1 (see liftOrder), program-wide
// and per component, and against the tighter m·(w+1) − 1 that counts only
// the copies. The tighter one is no theorem: an atom stays next to its
// copies (through `a if last copy` and negative literals, which keep the
// original), and it fails for a self-loop `a if a` (one copy, width 0
// before, 1 after) and for some small random programs, where exact
// treewidth confirms it (a 3-atom component of width 1 with 2 copies has
// treewidth 4 after). It holds on these shapes, whose rules have no
// negation, with room to spare except on the 3×100 grid; a failure there
// means the estimate after got worse.
func TestLiftedWidthShapes(t *testing.T) {
	for _, s := range []*shape{
		cycleShape(5), cycleShape(100), biPathShape(10), biPathShape(100),
		gridShape(2, 5), gridShape(2, 20), gridShape(2, 100),
		gridShape(3, 5), gridShape(3, 20), gridShape(3, 100),
		completeShape(4), completeShape(6), ringShape(12),
	} {
		_, rep, err := Unfold(context.Background(), s.program(), Options{})
		if err != nil {
			t.Fatal(err)
		}
		m, w, after := rep.MaxCopies, rep.WidthBefore, rep.WidthAfter
		t.Logf("%s: copies %d, width %d before, %d after (%s); bounds %d lifted, %d copies only",
			s.name, m, w, after, rep.WidthMethod, liftedBound(m, w), m*(w+1)-1)
		if after > liftedBound(m, w) {
			t.Errorf("%s: width after %d above the lifted bound %d", s.name, after, liftedBound(m, w))
		}
		if after > m*(w+1)-1 {
			t.Errorf("%s: width after %d above copies × (width before + 1) − 1 = %d", s.name, after, m*(w+1)-1)
		}
		for _, c := range rep.Components {
			if c.WidthAfter > liftedBound(c.MaxCopies, c.WidthBefore) {
				t.Errorf("%s: component %d width after %d above the lifted bound %d",
					s.name, c.Index, c.WidthAfter, liftedBound(c.MaxCopies, c.WidthBefore))
			}
			if c.WidthAfter > c.MaxCopies*(c.WidthBefore+1)-1 {
				t.Errorf("%s: component %d width after %d above copies × (width before + 1) − 1 = %d",
					s.name, c.Index, c.WidthAfter, c.MaxCopies*(c.WidthBefore+1)-1)
			}
		}
	}
}

// checkLiftedWidths unfolds p with widths and checks them: the lifted
// bound per component (whose atoms have no added atoms next to them), one
// more program-wide (an added guess or bound atom may see a whole lifted
// bag, see liftOrder), and on small programs the exact treewidth below
// every estimate.
//
// A component no derivation can enter gets no copies, but an element of a
// choice on it still gets its guess atom next to it (rewriteChoices), so the
// bounds count at least one copy.
func checkLiftedWidths(t *rapid.T, p *ground.Program) {
	q, rep, err := Unfold(context.Background(), p, Options{})
	if err != nil {
		t.Fatalf("Unfold: %v", err)
	}
	if m := max(rep.MaxCopies, 1); rep.WidthAfter > liftedBound(m, rep.WidthBefore)+1 {
		t.Fatalf("width after %d above the lifted bound %d + 1 (copies %d, width before %d, %s)",
			rep.WidthAfter, liftedBound(m, rep.WidthBefore), rep.MaxCopies, rep.WidthBefore, rep.WidthMethod)
	}
	for _, c := range rep.Components {
		if m := max(c.MaxCopies, 1); c.WidthAfter > liftedBound(m, c.WidthBefore) {
			t.Fatalf("component %d: width after %d above the lifted bound %d", c.Index, c.WidthAfter, liftedBound(m, c.WidthBefore))
		}
	}
	for _, tc := range []struct {
		prog  *ground.Program
		width int
	}{{p, rep.WidthBefore}, {q, rep.WidthAfter}} {
		adj, _ := primal(tc.prog, nil)
		if len(adj) > 14 {
			continue
		}
		if exact := exactTreewidth(toBits(adj)); tc.width < exact {
			t.Fatalf("estimate %d below the treewidth %d", tc.width, exact)
		}
	}
}

func TestLiftedWidthRandom(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		checkLiftedWidths(t, cyclicProgram().Draw(t, "program"))
	})
	rapid.Check(t, func(t *rapid.T) {
		checkLiftedWidths(t, brute.Program(brute.Options{Negation: true, Choices: true, Aggregates: true, Constraints: true}).Draw(t, "program"))
	})
}

// BenchmarkLiftedWidth reports, in one run, the width after unfolding
// known shapes estimated by the heuristic alone (heuristic-after), by the
// lifted orders (lifted-after, see liftedWidth) and the best of these and
// the windowed order (best-after, see windowedWidth), the width before, the
// largest copies, and the ratio heuristic-after / lifted-after. The time
// measured is the lifted estimate.
func BenchmarkLiftedWidth(b *testing.B) {
	for _, s := range []*shape{
		cycleShape(100), biPathShape(100), completeShape(6),
		gridShape(2, 20), gridShape(2, 100), gridShape(3, 20), gridShape(3, 100),
		randomSparseShape(100, 1), randomSparseShape(1000, 2),
	} {
		p := s.program()
		b.Run(s.name, func(b *testing.B) {
			q, rep, err := Unfold(context.Background(), p, Options{NoWidth: true})
			if err != nil {
				b.Fatal(err)
			}
			before, nb := primal(p, nil)
			after, na := primal(q, nil)
			wb, order, _ := eliminateOrder(slices.Clone(before), nb <= defaultWidthLimit)
			heuristic, _ := eliminate(slices.Clone(after), na <= defaultWidthLimit)
			start, copies, extra := copyLists(len(p.Atoms), q)
			var lifted int
			var method string
			for b.Loop() {
				gs, gorder := liftOrder(order, start, copies, extra)
				lifted, method = liftedWidth(after, gs, gorder)
			}
			b.Logf("%s: %s", s.name, method)
			gs, gorder := liftOrder(order, start, copies, extra)
			windowed, _ := windowedWidth(after, gs, gorder, wb, min(heuristic, lifted))
			b.ReportMetric(float64(rep.MaxCopies), "copies-max")
			b.ReportMetric(float64(wb), "width-before")
			b.ReportMetric(float64(heuristic), "heuristic-after")
			b.ReportMetric(float64(lifted), "lifted-after")
			b.ReportMetric(float64(windowed), "best-after")
			b.ReportMetric(float64(heuristic)/float64(max(lifted, 1)), "ratio")
		})
	}
}
