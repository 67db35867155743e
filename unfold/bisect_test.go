package unfold

import (
	"context"
	"math/bits"
	"math/rand/v2"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// holdsAllPaths reports whether seq holds every simple path of d as a
// subsequence, by walking all simple paths depth first while matching each
// greedily (leftmost) in seq: a path is a subsequence exactly when its
// greedy match succeeds. It gives up (ok false, done false) after budget
// path extensions.
func holdsAllPaths(d *digraph, seq []int32, budget int) (ok, done bool, missing []int32) {
	n := d.n
	next := nextTable(n, seq)
	on := make([]bool, n)
	var path []int32
	var walk func(v int32, at int32) bool
	walk = func(v int32, at int32) bool {
		if budget--; budget < 0 {
			return false
		}
		on[v] = true
		path = append(path, v)
		for _, w := range d.succ(v) {
			if on[w] {
				continue
			}
			p := next[int(at+1)*n+int(w)]
			if p == int32(len(seq)) {
				missing = append(slices.Clone(path), w)
				return false
			}
			if !walk(w, p) {
				return false
			}
		}
		on[v] = false
		path = path[:len(path)-1]
		return true
	}
	for v := int32(0); v < int32(n); v++ {
		p := next[int(v)]
		if p == int32(len(seq)) {
			return false, true, []int32{v}
		}
		if !walk(v, p) {
			return false, missing != nil, missing
		}
	}
	return true, true, nil
}

// nextTable returns, for a sequence over n vertices, the table whose entry
// i*n+v is the first position ≥ i holding v, len(seq) if none.
func nextTable(n int, seq []int32) []int32 {
	next := make([]int32, (len(seq)+1)*n)
	for v := 0; v < n; v++ {
		next[len(seq)*n+v] = int32(len(seq))
	}
	for i := len(seq) - 1; i >= 0; i-- {
		copy(next[i*n:(i+1)*n], next[(i+1)*n:(i+2)*n])
		next[i*n+int(seq[i])] = int32(i)
	}
	return next
}

// gridDigraph returns the digraph of the k×n grid with the arcs for which
// keep returns true (all arcs of the bidirectional grid when keep is nil);
// vertex r*n+c is at row r, column c.
func gridDigraph(k, n int, keep func(a, b int) bool) *digraph {
	var from, to []int32
	add := func(a, b int) {
		if keep == nil || keep(a, b) {
			from, to = append(from, int32(a)), append(to, int32(b))
		}
	}
	for r := 0; r < k; r++ {
		for c := 0; c < n; c++ {
			v := r*n + c
			if c+1 < n {
				add(v, v+1)
				add(v+1, v)
			}
			if r+1 < k {
				add(v, v+n)
				add(v+n, v)
			}
		}
	}
	return newDigraph(k*n, from, to)
}

// bisectVariants returns, for every thin layering of d that layerings
// finds, the bisection sequence with levels of two passes and, when rowsOf
// finds rows, the one with levels of one pass, and how many of the latter
// there are.
func bisectVariants(t testing.TB, d *digraph) (seqs [][]int32, rowed int) {
	u := d.undirected()
	s := newSearcher(context.Background(), Options{})
	for _, layers := range layerings(u) {
		if len(layers) < minBisectionLayers || !thin(u, layers) {
			continue
		}
		inner := make([][]int32, len(layers))
		for j, l := range layers {
			inner[j] = s.layerSeq(d, l, 0)
		}
		seqs = append(seqs, bisect(layers, inner, nil, 0))
		if row := rowsOf(u, layers); row != nil {
			if !rowsAgree(u, layers, row) {
				t.Fatalf("rowsOf(%v) = %v breaks the row conditions", layers, row)
			}
			for whole := 0; whole <= 2; whole++ {
				seqs = append(seqs, bisect(layers, inner, row, whole))
			}
			rowed++
		}
	}
	return seqs, rowed
}

// rowsAgree checks the conditions on rows from their definition (see
// rowsOf): rows 0 to 2, distinct inside a layer, edges between layers
// inside one row, edges inside a layer between rows 1 apart.
func rowsAgree(u *digraph, layers [][]int32, row []int8) bool {
	layer := make([]int, u.n)
	for j, l := range layers {
		seen := map[int8]bool{}
		for _, v := range l {
			if row[v] < 0 || row[v] > 2 || seen[row[v]] {
				return false
			}
			seen[row[v]] = true
			layer[v] = j
		}
	}
	for v := int32(0); v < int32(u.n); v++ {
		for _, w := range u.succ(v) {
			d := row[v] - row[w]
			if layer[v] == layer[w] && d != 1 && d != -1 || layer[v] != layer[w] && d != 0 {
				return false
			}
		}
	}
	return true
}

// TestBisectionGrids checks the bisection sequences of bidirectional k×n
// grids, both kinds on every thin layering found and the one the search
// picks, against every simple path, where enumerating them is cheap enough.
func TestBisectionGrids(t *testing.T) {
	cases := [][2]int{{1, 6}, {2, 4}, {2, 7}, {3, 4}, {3, 5}, {3, 6}}
	if !testing.Short() {
		cases = append(cases, [2]int{3, 7}, [2]int{3, 8})
	}
	for _, kn := range cases {
		k, n := kn[0], kn[1]
		d := gridDigraph(k, n, nil)
		s := newSearcher(context.Background(), Options{})
		seq := s.bisection(d, 0)
		if seq == nil {
			t.Fatalf("%d×%d grid: no thin layering found", k, n)
		}
		seqs, rowed := bisectVariants(t, d)
		if k == 3 && rowed == 0 {
			t.Fatalf("3×%d grid: no layering with rows found", n)
		}
		for _, seq := range append(seqs, seq) {
			ok, done, missing := holdsAllPaths(d, seq, 1<<28)
			if !done {
				t.Fatalf("%d×%d grid: check ran out of budget", k, n)
			}
			if !ok {
				t.Errorf("%d×%d grid: sequence misses the simple path %v", k, n, missing)
			}
		}
		t.Logf("%d×%d grid: largest copies %d, total %d; %d sequences checked", k, n, copies(d.n, seq), len(seq), len(seqs)+1)
	}
}

// TestBisectionRowsSubgrids checks the bisection with levels of one pass
// on the strongly connected components of random subgraphs of 3×n grids
// (vertices and arcs left out at random, arcs one way or both), layered by
// columns with every vertex in its grid row (so the row conditions hold
// whatever rowsOf finds), against every simple path, and F and F′ of both
// kinds against the paths they must hold by themselves.
func TestBisectionRowsSubgrids(t *testing.T) {
	checked := 0
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(2, 7).Draw(t, "n")
		r := rand.New(rand.NewPCG(rapid.Uint64().Draw(t, "seed"), 3))
		dropVertex := rapid.IntRange(0, 3).Draw(t, "dropVertex")
		dropArc := rapid.IntRange(0, 3).Draw(t, "dropArc")
		gone := make([]bool, 3*n)
		for v := range gone {
			gone[v] = r.IntN(10) < dropVertex
		}
		d := gridDigraph(3, n, func(a, b int) bool { return !gone[a] && !gone[b] && r.IntN(10) >= dropArc })
		comps, cyclic := d.sccs()
		for c, vs := range comps {
			if !cyclic[c] {
				continue
			}
			slices.Sort(vs)
			sub := d.induce(vs)
			u := sub.undirected()
			// Columns as layers, the grid rows as rows.
			lo, hi := n, -1
			for _, v := range vs {
				lo, hi = min(lo, int(v)%n), max(hi, int(v)%n)
			}
			layers := make([][]int32, hi-lo+1)
			row := make([]int8, len(vs))
			for i, v := range vs {
				layers[int(v)%n-lo] = append(layers[int(v)%n-lo], int32(i))
				row[i] = int8(int(v) / n)
			}
			if !rowsAgree(u, layers, row) {
				t.Fatalf("grid rows break the row conditions")
			}
			// The grid's rows agree, so rowsOf must find rows too.
			if found := rowsOf(u, layers); found == nil || !rowsAgree(u, layers, found) {
				t.Fatalf("rowsOf(%v) = %v, but the grid rows %v agree", layers, found, row)
			}
			s := newSearcher(context.Background(), Options{})
			inner := make([][]int32, len(layers))
			for j, l := range layers {
				inner[j] = s.layerSeq(sub, l, 0)
			}
			for _, seq := range [][]int32{bisect(layers, inner, row, 0), bisect(layers, inner, row, 1), bisect(layers, inner, row, 2), bisect(layers, inner, nil, 0)} {
				if ok, done, missing := holdsAllPaths(sub, seq, 1<<24); done && !ok {
					t.Fatalf("component %v: sequence misses the simple path %v", vs, missing)
				}
			}
			checkLevels(t, sub, layers, inner, row)
			checkLevels(t, sub, layers, inner, nil)
			checked++
		}
	})
	if checked == 0 {
		t.Fatal("no component checked")
	}
}

// eachSimplePath calls f with every simple path of d (the slice is reused)
// until f returns false or budget paths were listed; it reports whether it
// listed them all.
func eachSimplePath(d *digraph, budget int, f func(path []int32) bool) bool {
	on := make([]bool, d.n)
	var path []int32
	var walk func(v int32) bool
	walk = func(v int32) bool {
		if budget--; budget < 0 {
			return false
		}
		on[v] = true
		path = append(path, v)
		if !f(path) {
			return false
		}
		for _, w := range d.succ(v) {
			if !on[w] && !walk(w) {
				return false
			}
		}
		on[v] = false
		path = path[:len(path)-1]
		return true
	}
	for v := int32(0); v < int32(d.n); v++ {
		if !walk(v) {
			return false
		}
	}
	return true
}

// checkLevels checks the invariant the proof in bisect.go rests on: F
// (levels) holds every forward path of the layering (from layer a to
// layer b ≥ a, never leaving [a, b]) and F′ every path that is forward
// after reversing the layers, by listing all simple paths.
func checkLevels(t *rapid.T, d *digraph, layers, inner [][]int32, row []int8) {
	layer := make([]int, d.n)
	for j, l := range layers {
		for _, v := range l {
			layer[v] = j
		}
	}
	f, fm := levels(layers, inner, row, false), levels(layers, inner, row, true)
	eachSimplePath(d, 1<<20, func(path []int32) bool {
		a, b := layer[path[0]], layer[path[len(path)-1]]
		lo, hi := a, a
		for _, v := range path {
			lo, hi = min(lo, layer[v]), max(hi, layer[v])
		}
		if a <= b && lo == a && hi == b && !isSubsequence(path, f) {
			t.Fatalf("rows %v: F misses the forward path %v", row, path)
		}
		if a >= b && lo == b && hi == a && !isSubsequence(path, fm) {
			t.Fatalf("rows %v: F′ misses the path %v", row, path)
		}
		return true
	})
}

// randomThin draws a random digraph with a thin layering: layers of one to
// three vertices, random arcs inside layers, at most three random
// undirected edges between consecutive layers with random directions (one
// way or both), and all of them reachable from each other only where the
// draw says so (the test takes the strongly connected components).
func randomThin(t *rapid.T, minLayers, maxLayers int) (int, []int32, []int32) {
	m := rapid.IntRange(minLayers, maxLayers).Draw(t, "layers")
	var layers [][]int32
	n := 0
	for j := 0; j < m; j++ {
		size := rapid.IntRange(1, 3).Draw(t, "size")
		var l []int32
		for i := 0; i < size; i++ {
			l = append(l, int32(n))
			n++
		}
		layers = append(layers, l)
	}
	var from, to []int32
	arc := func(a, b int32) {
		switch rapid.IntRange(0, 3).Draw(t, "dir") {
		case 0:
			from, to = append(from, a), append(to, b)
		case 1:
			from, to = append(from, b), append(to, a)
		default:
			from, to = append(from, a, b), append(to, b, a)
		}
	}
	for j, l := range layers {
		for x := 0; x < len(l); x++ {
			for y := x + 1; y < len(l); y++ {
				if rapid.Bool().Draw(t, "inner") {
					arc(l[x], l[y])
				}
			}
		}
		if j+1 < len(layers) {
			next := layers[j+1]
			edges := rapid.IntRange(1, 3).Draw(t, "cut")
			used := map[[2]int32]bool{}
			for e := 0; e < edges; e++ {
				a := rapid.SampledFrom(l).Draw(t, "a")
				b := rapid.SampledFrom(next).Draw(t, "b")
				if !used[[2]int32{a, b}] {
					used[[2]int32{a, b}] = true
					arc(a, b)
				}
			}
		}
	}
	return n, from, to
}

// TestBisectionRandomThin checks bisection on the strongly connected
// components of random digraphs with thin layerings, against every simple
// path, whenever it finds a thin layering of the component (it must find
// one for components that are all of a drawn graph's layers in order, as
// breadth-first layers of a path-shaped graph are, but it may also miss
// some: then there is nothing to check).
func TestBisectionRandomThin(t *testing.T) {
	found := 0
	rapid.Check(t, func(t *rapid.T) {
		n, from, to := randomThin(t, 4, 7)
		d := newDigraph(n, from, to)
		comps, cyclic := d.sccs()
		for c, vs := range comps {
			if !cyclic[c] || len(vs) < minBisectionLayers {
				continue
			}
			sub := d.induce(vs)
			s := newSearcher(context.Background(), Options{})
			seq := s.bisection(sub, 0)
			if seq == nil {
				continue
			}
			found++
			ok, done, missing := holdsAllPaths(sub, seq, 1<<24)
			if done && !ok {
				t.Fatalf("component %v: bisection sequence %v misses the simple path %v", vs, seq, missing)
			}
		}
	})
	t.Logf("%d components checked", found)
	if found == 0 {
		t.Fatal("no component got a bisection sequence: the test checks nothing")
	}
}

// TestBisectionSubgrids checks bisection on random subgraphs of 3×n grids
// (each arc kept or not), against every simple path.
func TestBisectionSubgrids(t *testing.T) {
	checked := 0
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(3, 6).Draw(t, "n")
		drop := rapid.IntRange(0, 4).Draw(t, "drop")
		r := rand.New(rand.NewPCG(rapid.Uint64().Draw(t, "seed"), 7))
		d := gridDigraph(3, n, func(a, b int) bool { return r.IntN(10) >= drop })
		comps, cyclic := d.sccs()
		for c, vs := range comps {
			if !cyclic[c] || len(vs) < minBisectionLayers {
				continue
			}
			sub := d.induce(vs)
			seq := newSearcher(context.Background(), Options{}).bisection(sub, 0)
			if seq == nil {
				continue
			}
			checked++
			if ok, done, missing := holdsAllPaths(sub, seq, 1<<24); done && !ok {
				t.Fatalf("component %v: sequence misses the simple path %v", vs, missing)
			}
		}
	})
	if checked == 0 {
		t.Fatal("no component checked")
	}
}

// zigzagPath returns a random simple path of the bidirectional 3×n grid
// (vertex r*n+c) that runs from column 0 to column n−1 and, at random
// places, makes regions: along one outer row to a column y, back along the
// middle row, then along the other outer row past y. These are the paths
// that defeat a bounded number of sweeps.
func zigzagPath(r *rand.Rand, n int) []int32 {
	var path []int32
	at := func(row, col int) int32 { return int32(row*n + col) }
	row, col := 0, 0
	if r.IntN(2) == 1 {
		row = 2
	}
	path = append(path, at(row, col))
	for col < n-1 {
		if col+2 < n && r.IntN(3) > 0 {
			// A region from col to y: rise on row, fall on the middle
			// row, rise on the other outer row.
			y := col + 2 + r.IntN(min(n-col-2, 1+r.IntN(12)))
			for c := col + 1; c <= y; c++ {
				path = append(path, at(row, c))
			}
			for c := y; c >= col+1; c-- {
				path = append(path, at(1, c))
			}
			other := 2 - row
			for c := col + 1; c <= y; c++ {
				path = append(path, at(other, c))
			}
			row, col = other, y
			continue
		}
		col++
		path = append(path, at(row, col))
	}
	return path
}

// selfAvoidingWalk returns a random simple path of d from a random vertex,
// extended while it can be.
func selfAvoidingWalk(r *rand.Rand, d *digraph) []int32 {
	v := int32(r.IntN(d.n))
	on := map[int32]bool{v: true}
	path := []int32{v}
	for {
		var free []int32
		for _, w := range d.succ(v) {
			if !on[w] {
				free = append(free, w)
			}
		}
		if len(free) == 0 {
			return path
		}
		v = free[r.IntN(len(free))]
		on[v] = true
		path = append(path, v)
	}
}

func isSubsequence(path, seq []int32) bool {
	i := 0
	for _, x := range seq {
		if i < len(path) && x == path[i] {
			i++
		}
	}
	return i == len(path)
}

// TestGridSequencesSampled samples simple paths of long 3×n grids, where
// they cannot all be listed, and checks each against the sequence the
// search returns: random zigzag paths (also reversed) and random
// self-avoiding walks.
func TestGridSequencesSampled(t *testing.T) {
	for _, n := range []int{20, 100} {
		s := gridShape(3, n)
		g := s.graph()
		comp := g.Component(largestComponent(g))
		seq, how := Sequence(context.Background(), g, comp, Options{})
		d := gridDigraph(3, n, nil)
		r := rand.New(rand.NewPCG(uint64(n), 11))
		samples := 2000
		if testing.Short() {
			samples = 300
		}
		for i := 0; i < samples; i++ {
			var path []int32
			switch i % 3 {
			case 0:
				path = zigzagPath(r, n)
			case 1:
				path = zigzagPath(r, n)
				slices.Reverse(path)
			default:
				path = selfAvoidingWalk(r, d)
			}
			if !isSubsequence(path, seq) {
				t.Fatalf("3×%d (%s): sequence misses the simple path %v", n, how, path)
			}
		}
	}
}

// TestBisectionCopies checks the copies of the bisection construction on
// long 3×n grids against its bound: the four full passes and the bases of
// F and F′ give every atom at most 9 copies (a middle atom 7 and 1 and 1, an
// outer one 5 and at most 2 and 2), and each of F and F′ one per level of
// the ⌈log2 n⌉ levels (the grid's columns have three rows).
// The bound grows like log n; a 3×100 grid gets at least 5× fewer copies in
// total than the naive sequence.
func TestBisectionCopies(t *testing.T) {
	for _, n := range []int{5, 20, 100, 1000} {
		d := gridDigraph(3, n, nil)
		seq := newSearcher(context.Background(), Options{}).bisection(d, 0)
		levels := bits.Len(uint(n - 1))
		bound := 9 + 2*levels
		got := copies(d.n, seq)
		t.Logf("3×%d: bisection largest copies %d (bound %d), total %d, naive total %d", n, got, bound, len(seq), d.n*d.n)
		if got > bound {
			t.Errorf("3×%d: %d copies, bound %d", n, got, bound)
		}
		if n >= 100 && len(seq)*5 > d.n*d.n {
			t.Errorf("3×%d: %d copies in total, not 5× fewer than naive %d", n, len(seq), d.n*d.n)
		}
	}
}

// TestThin checks the thin-layering test on small cases.
func TestThin(t *testing.T) {
	path := newDigraph(4, []int32{0, 1, 1, 2, 2, 3}, []int32{1, 0, 2, 1, 3, 2}).undirected()
	for _, tc := range []struct {
		layers [][]int32
		want   bool
	}{
		{[][]int32{{0}, {1}, {2}, {3}}, true},
		{[][]int32{{0, 1}, {2, 3}}, true},
		{[][]int32{{0}, {2}, {1}, {3}}, false}, // edge 0–1 skips a layer
		{[][]int32{{0}, {1}, {2}}, false},      // vertex 3 in no layer
		{[][]int32{{0, 1, 2, 3}}, false},       // four vertices in a layer
	} {
		if got := thin(path, tc.layers); got != tc.want {
			t.Errorf("thin(%v) = %v, want %v", tc.layers, got, tc.want)
		}
	}
	// Four edges between two layers.
	k := newDigraph(4, []int32{0, 0, 1, 1}, []int32{2, 3, 2, 3}).undirected()
	if thin(k, [][]int32{{0, 1}, {2, 3}}) {
		t.Error("four edges between consecutive layers accepted")
	}
}

// TestHoldsAllPathsRejects checks that the greedy path walk used above
// can fail on a real sequence (TestValidAgreesOnRandomSequences compares it
// with the brute-force check on random sequences).
func TestHoldsAllPathsRejects(t *testing.T) {
	// The bisection sequence of a 3×6 grid holds some slack (single
	// deletions keep it valid), but not half of it.
	d := gridDigraph(3, 6, nil)
	seq := newSearcher(context.Background(), Options{}).bisection(d, 0)
	if ok, done, _ := holdsAllPaths(d, seq[:len(seq)/2], 1<<26); ok || !done {
		t.Fatal("half of the 3×6 bisection sequence accepted")
	}
}

// layeredPath returns a simple path of the bidirectional 3×n grid (vertex
// r*n+c) whose visits to the middle row's even columns 2, 4, …, 2k are, in
// order, the layered permutation given by its layers (intervals [a, b] of
// 1…k, increasing): a layer of one letter is crossed top to bottom (or
// bottom to top) through the middle row, a longer layer is a region: along
// the current outer row to column 2b, back along the middle row to 2a, on
// along the other outer row. It needs n ≥ 2k+2.
func layeredPath(n int, layers [][2]int) []int32 {
	at := func(row, col int) int32 { return int32(row*n + col) }
	row, col := 0, 0
	path := []int32{at(0, 0)}
	walk := func(to int) {
		for ; col < to; col++ {
			path = append(path, at(row, col+1))
		}
	}
	for _, l := range layers {
		a, b := 2*l[0], 2*l[1]
		other := 2 - row
		if a == b {
			walk(a)
			path = append(path, at(1, a), at(other, a))
			row = other
			continue
		}
		walk(b)
		for c := b; c >= a; c-- {
			path = append(path, at(1, c))
		}
		path = append(path, at(other, a))
		row, col = other, a
		walk(b)
	}
	walk(n - 1)
	return path
}

// binaryLayered lists the layered permutations of the letters lo…hi (a
// power of two of them) that are either one layer or such a permutation of
// the lower half followed by one of the upper half, as lists of layers.
func binaryLayered(lo, hi int) [][][2]int {
	out := [][][2]int{{{lo, hi}}}
	if lo == hi {
		return out
	}
	mid := (lo + hi) / 2
	for _, left := range binaryLayered(lo, mid) {
		for _, right := range binaryLayered(mid+1, hi) {
			out = append(out, append(slices.Clone(left), right...))
		}
	}
	return out
}

// TestGridLowerBound checks the two steps of the argument that no sequence
// keeps the copies of bidirectional 3×n grids bounded (DEVELOPERS.md):
// every layered permutation of the middle row's even columns is what some
// simple path of the grid visits there, and a word that holds all the
// permutations of binaryLayered on 2^r letters has a letter r+1 times (the
// induction is proved in DEVELOPERS.md; here exhaustively for r = 2: no
// word with each of 4 letters at most twice holds all five).
func TestGridLowerBound(t *testing.T) {
	const k, n = 8, 18
	d := gridDigraph(3, n, nil)
	perms := binaryLayered(1, k)
	if len(perms) != 26 { // 1 + 5·5 for 8 letters, 1 + 2·2 for 4
		t.Fatalf("%d permutations of 8 letters, want 26", len(perms))
	}
	for _, layers := range perms {
		path := layeredPath(n, layers)
		seen := map[int32]bool{}
		for i, v := range path {
			if seen[v] {
				t.Fatalf("%v: path %v visits %d twice", layers, path, v)
			}
			seen[v] = true
			if i > 0 && !slices.Contains(d.succ(path[i-1]), v) {
				t.Fatalf("%v: path %v steps %d → %d off the grid", layers, path, path[i-1], v)
			}
		}
		var middle, want []int
		for _, v := range path {
			if r, c := int(v)/n, int(v)%n; r == 1 && c%2 == 0 && c >= 2 && c <= 2*k {
				middle = append(middle, c/2)
			}
		}
		for _, l := range layers {
			for x := l[1]; x >= l[0]; x-- {
				want = append(want, x)
			}
		}
		if !slices.Equal(middle, want) {
			t.Fatalf("%v: middle row visited %v, want %v", layers, middle, want)
		}
	}
	// r = 2: every arrangement of 1 1 2 2 3 3 4 4 misses one of the five,
	// and some arrangement with each letter three times holds them all.
	var words [][]int32
	for _, layers := range binaryLayered(1, 4) {
		var w []int32
		for _, l := range layers {
			for x := l[1]; x >= l[0]; x-- {
				w = append(w, int32(x))
			}
		}
		words = append(words, w)
	}
	count := [5]int{}
	word := make([]int32, 0, 12)
	holding, most := 0, 2
	var place func()
	place = func() {
		if len(word) == 4*most {
			all := true
			for _, w := range words {
				all = all && isSubsequence(w, word)
			}
			if all {
				holding++
			}
			return
		}
		for x := int32(1); x <= 4; x++ {
			if count[x] < most {
				count[x]++
				word = append(word, x)
				place()
				word = word[:len(word)-1]
				count[x]--
			}
		}
	}
	place()
	if holding != 0 {
		t.Fatalf("%d words with each letter twice hold all of %v", holding, words)
	}
	most = 3
	place()
	if holding == 0 {
		t.Fatalf("no word with each letter three times holds all of %v", words)
	}
}
