package unfold

import (
	"slices"
)

// Bisection: a construction for components that are long and thin, such as
// bidirectional grids of three rows, whose copies grow with the logarithm of
// the length instead of linearly as with sweeps.
//
// It needs a thin layering of the component's undirected graph: layers
// L0, …, Lm with at most three vertices each, every edge inside a layer or
// between consecutive layers, and at most three edges between any two
// consecutive layers (the cut after layer j). A simple path uses an edge at
// most once, so it crosses every cut at most three times.
//
// Let a path start in layer a and end in layer b ≥ a. It crosses the cuts
// between a and b an odd number of times, 1 or 3, and the others an even
// number, 0 or 2. Call it forward if it crosses no cut outside [a, b].
//
// Regions. Take a cut c crossed three times by a forward path: right at t1,
// left at t2, right at t3. Between t1 and t2 the path is on the right of c,
// between t2 and t3 on the left. The part [t1, t2] crosses every cut it
// reaches on the right an even number of times, and the part after t3
// crosses the cuts between c and b an odd number of times, so [t1, t2]
// crosses each of them exactly twice: it rises to a top layer y and comes
// straight back (a second rise would cross some cut four times). Likewise
// [t2, t3] falls to a bottom layer x and comes straight back, and the part
// before t1 crosses each cut between x and c once. Every layer strictly
// between x and y is then entered and left three times, so the path has three
// stretches in it, each of at least one vertex: with at most three vertices
// per layer, each stretch is a single vertex. At the top layer y the turn is
// one stretch; the part after t3 also enters layer y, so the turn has at
// most two vertices, and likewise at x.
//
// F(I), for an interval I of layers, holds every forward path that stays in
// I. For one layer, F is a sequence holding every simple path of the layer.
// For more, with I split into a left half A and a right half B at c:
//
//	F(I) = F(A) · up(B) · down(B) · down(A) · up(A) · F(B)
//
// where up(B) lists the layers of B in increasing order, each layer's
// vertices once, and down the same in decreasing order. A forward path that
// never crosses c lies in A or in B; one that crosses it once has its part in
// A (a forward path of A) before its part in B (one of B); one that crosses
// it three times is, by the above, its part before t1 (in F(A)), the rise and
// fall [t1, t2] (single vertices in up(B) and down(B); the turn at y, at
// most two vertices v w, takes v from up(B) and w from down(B)), the fall and
// rise [t2, t3] (down(A), up(A), turning the same way), and the part after
// t3, a forward path of B (in F(B)). Each level of halving adds one up and one
// down pass, so an atom occurs 2·⌈log2(m+1)⌉ times in F plus its copies in
// its layer's sequence. F′ is the mirror image (layers reversed, up and down
// exchanged) and holds every path that is forward after reversing the
// layers.
//
// Any path. Let a ≤ b (the mirror case is symmetric). Outside [a, b] the
// path crosses the cuts twice or not at all, so it makes at most one
// excursion below a and one above b, each straight out and back. Before the
// excursion below a it may rise from a and come straight back (crossing those
// cuts twice, which leaves the later part one crossing), and after the
// excursion above b it may fall below b and rise straight back to b. So the
// path is: a rise from a, a fall to the bottom x, a forward path from x up to
// the top z, a fall from z, and a rise to b, any of them possibly empty. Two
// consecutive parts meet in one layer, where the path has one stretch (a
// simple path of the layer); give it to the part that is a pass below or, in
// F and F′, to either. With UP and DOWN the passes that use each layer's
// full sequence (every simple path of the layer),
//
//	UP · DOWN · F · F′ · UP · DOWN
//
// holds every simple path. With a ≤ b: the rise from a in UP, the fall to x
// in DOWN, the forward path in F, the fall from z in F′ (it crosses every cut
// at most once, leftwards, so it is forward after reversing the layers), the
// rise to b in UP. With a > b, the mirror image: the fall from a in DOWN,
// the rise to the top in F (a rise is a forward path), the path from there
// down to the bottom in F′, the rise from the bottom in UP, the fall to b in
// DOWN.
//
// Three rows. When every vertex can be given a row 0, 1 or 2, distinct
// inside each layer, so that every edge between consecutive layers joins two
// vertices of one row and every edge inside a layer joins rows 1 apart (as
// in subgraphs of 3×n grids, layers being columns), a level of F needs one
// pass per vertex instead of two:
//
//	F(I) = F(A) · upOuter(B) · downMiddle(I) · upOuter(A) · F(B)
//
// where upOuter lists the vertices of rows 0 and 2 of each layer, layers in
// increasing order, and downMiddle the vertices of row 1, layers in
// decreasing order. Take a forward path crossing c three times, with x, y, t1,
// t2 and t3 as above. Each vertex has at most one neighbour in each next
// layer (the one of its row). The turn at y has two vertices: with one, the
// path would leave it the way it came. So does the turn at x. A stretch of
// one vertex strictly between x and y enters and leaves its layer in one row,
// so the rise [t1, t2] runs along one row r1 up to y, turns there to a row r2,
// which it keeps down to x (crossing c), turns to a row r3 and keeps it up
// to c. The vertices where [t1, t2] and the part after t3 cross c, in layer
// c, differ, so r1 ≠ r3; r2 is 1 apart from both, so r2 = 1 and r1, r3 are the
// outer rows 0 and 2. The rise in B is in upOuter(B), the fall (the second
// vertex of the turn at y to the first of the turn at x) in downMiddle(I),
// the rise in A in upOuter(A); the rest goes as before. F′ is mirrored the
// same way. An atom then occurs ⌈log2(m+1)⌉ times in F, plus its copies in
// its layer's sequence.
//
// Short stretches. With three rows, 0 2 1 0 2 (rows) holds every simple
// path of a layer of three vertices, with the middle atom once, and 1 0 2 1
// holds the simple paths of at most two vertices of the layer (single
// vertices and edges between rows 1 apart), with the middle atom twice. The
// first three full passes use 1 0 2 1, or, in variants that move copies
// from the middle atom to the outer ones, 0 2 1 0 2 in the first pass or in
// the first and the third; the last lists each vertex once (see below).
// They hold what they must: the parts of a path given to UP and DOWN above
// are the rise from a, the fall to x and the rise to b (and, mirrored, the
// fall from a, the rise from the bottom and the fall to b). Each layer
// inside one of them is met again by the other part of its excursion or by
// the forward part, and so is the first (last) layer of the path when an
// excursion follows (precedes) it, so their stretches there have at most
// two vertices. A stretch of three vertices where two passes meet (the turn
// of an excursion) is split: its first two vertices to the earlier pass, the
// last to the later one; where F or F′ is one of the two parts, all of it
// goes to F or F′.
//
// The last pass. The last DOWN holds only the fall to b of a path with
// a > b, and that fall meets one vertex per layer, so the last DOWN lists
// each layer's vertices once, rows or not. The path's part in F′ runs from
// its top layer, at or above the top w of that fall, to its bottom layer,
// below b, and the rise from the bottom runs from there to w: every layer
// from b to w holds at least one vertex of each, so with at most three
// vertices per layer the fall has a single vertex in each layer strictly
// between b and w and at b. The turn at w has at most two vertices (F′
// holds one there): all but its last go to the rise, whose pass holds the
// paths of two vertices of a layer, and the fall keeps the last.
//
// Bases. With three rows, a base of F (one layer k) mostly needs only to
// list its layer's outer vertices (rows 0 and 2) once, the levels doing the
// rest. Let A = [k] be the left half of I. A stretch in layer k is held by
// the base, downMiddle(I) and upOuter(A): its middle vertex, if any, from
// downMiddle(I), an outer vertex after it from upOuter(A), one before it
// from the base. So is a path that stays in A, the part in A of a path
// crossing c once (the rest is in F(B), after upOuter(A)), and the part
// before t1 of one crossing c three times (one vertex, on the outer row r1:
// layer k also holds the turn at x, whose vertices are in downMiddle(I) and
// upOuter(A)). Let B = [k] be the right half: the same holds with
// upOuter(B), downMiddle(I) and the base, in that order, for a path in B,
// for the part after t3 (one vertex, on the outer row r3), and for the part
// of a path after crossing c once, provided its part before is in F(A),
// before upOuter(B). In all of these the base gives only outer vertices,
// the middle one always coming from downMiddle(I). That needs more only
// when A is a base too, I two layers: there the base of A holds every path
// of its layer (0 2 1 0 2). F′ mirrored: in an interval of two layers, the
// right base holds every path.
//
// The copies grow with log m, not with m. They cannot stay bounded on
// bidirectional 3×n grids whatever the construction: simple paths visit the
// middle row's even columns in the order of every layered permutation, and
// a word holding all layered permutations of 2^r letters has a letter r+1
// times (DEVELOPERS.md has the proof), so some atom needs about log2(n/2)
// copies.

// minBisectionLayers is the fewest layers for which bisection is tried; on
// shorter components the other constructions are as good.
const minBisectionLayers = 4

// maxEndCandidates bounds the low-degree vertices paired up to find thin
// layerings by distance differences.
const maxEndCandidates = 8

// bisection returns the bisection construction for the strongly connected
// digraph d with the fewest copies, or nil when no thin layering of it is
// found. On layerings with three rows it uses the levels of one pass (see
// rowsOf).
func (s *searcher) bisection(d *digraph, depth int) []int32 {
	var best []int32
	for _, seq := range s.bisections(d, depth) {
		if better(d.n, seq, best) {
			best = seq
		}
	}
	return best
}

// bisections returns, for each variant of the bisection construction, the
// sequence with the fewest copies over the thin layerings of d, when one
// fits the copy limit: levels of two passes and, with rows, levels of one
// pass with zero, one or two passes of whole layer sequences.
func (s *searcher) bisections(d *digraph, depth int) [][]int32 {
	u := d.undirected()
	var out [4][]int32
	for _, layers := range layerings(u) {
		if s.ctx.Err() != nil {
			break
		}
		if len(layers) < minBisectionLayers || !thin(u, layers) {
			continue
		}
		inner := make([][]int32, len(layers))
		for j, l := range layers {
			if inner[j] = s.layerSeq(d, l, depth); inner[j] == nil {
				return nonNil(out[:])
			}
		}
		cands := [4][]int32{bisect(layers, inner, nil, 0)}
		if row := rowsOf(u, layers); row != nil {
			for whole := 0; whole <= 2; whole++ {
				cands[1+whole] = bisect(layers, inner, row, whole)
			}
		}
		for i, seq := range cands {
			if seq != nil && s.fits(len(seq)) && better(d.n, seq, out[i]) {
				out[i] = seq
			}
		}
	}
	return nonNil(out[:])
}

// nonNil returns the sequences of seqs that are not nil.
func nonNil(seqs [][]int32) [][]int32 {
	var out [][]int32
	for _, seq := range seqs {
		if seq != nil {
			out = append(out, seq)
		}
	}
	return out
}

// bisect builds UP · DOWN · F · F′ · UP · DOWN over the layers, with inner[j]
// a sequence holding every simple path of layer j. The last DOWN lists each
// layer's vertices once. With row not nil (rows as rowsOf returns them), the
// levels of F and F′ have one pass per vertex, the layer sequences of the
// other three full passes hold the paths of at most two vertices
// (shortLayers), except that the first (with whole ≥ 1) and the third (with
// whole = 2) hold every path, which spreads the copies from the middle row
// to the outer ones, and the bases of F and F′ list their layer's outer
// vertices once, except those that come first in an interval of two layers,
// which hold every path.
func bisect(layers, inner [][]int32, row []int8, whole int) []int32 {
	m := len(layers) - 1
	var seq []int32
	passes := [3][][]int32{inner, inner, inner}
	base := inner
	if row != nil {
		all, short := shortLayers(layers, inner, row, true), shortLayers(layers, inner, row, false)
		passes = [3][][]int32{short, short, short}
		if whole >= 1 {
			passes[0] = all
		}
		if whole >= 2 {
			passes[2] = all
		}
		base = all
	}
	up := func(full [][]int32) {
		for j := 0; j <= m; j++ {
			seq = append(seq, full[j]...)
		}
	}
	down := func(full [][]int32) {
		for j := m; j >= 0; j-- {
			seq = append(seq, full[j]...)
		}
	}
	up(passes[0])
	down(passes[1])
	seq = append(seq, levels(layers, base, row, false)...)
	seq = append(seq, levels(layers, base, row, true)...)
	up(passes[2])
	down(layers)
	return seq
}

// levels returns F over the layers, or F′ with mirror, with base[j] a
// sequence holding every simple path of layer j. Without rows (row nil),
// each level has an up and a down pass over each half, and every base is
// base[j]. With rows, each level has one pass per vertex, and a base is
// base[j] when it comes first in an interval of two layers, else the
// layer's outer vertices once.
func levels(layers, base [][]int32, row []int8, mirror bool) []int32 {
	var seq []int32
	// pass appends the vertices of layers lo to hi in increasing order, or
	// decreasing with down: all of them, or those kept by keep.
	pass := func(lo, hi int, down bool, keep func(int8) bool) {
		for i := lo; i <= hi; i++ {
			j := i
			if down {
				j = lo + hi - i
			}
			for _, v := range layers[j] {
				if keep == nil || keep(row[v]) {
					seq = append(seq, v)
				}
			}
		}
	}
	outer := func(r int8) bool { return r != 1 }
	middle := func(r int8) bool { return r == 1 }
	// build appends F (or F′) over [lo, hi]; whole says that a base there
	// must hold every path of its layer.
	var build func(lo, hi int, whole bool)
	build = func(lo, hi int, whole bool) {
		if lo == hi {
			if row == nil || whole {
				seq = append(seq, base[lo]...)
			} else {
				for _, v := range layers[lo] {
					if row[v] != 1 {
						seq = append(seq, v)
					}
				}
			}
			return
		}
		if !mirror {
			c := (lo + hi) / 2
			build(lo, c, hi == lo+1)
			if row != nil {
				pass(c+1, hi, false, outer)
				pass(lo, hi, true, middle)
				pass(lo, c, false, outer)
			} else {
				pass(c+1, hi, false, nil)
				pass(c+1, hi, true, nil)
				pass(lo, c, true, nil)
				pass(lo, c, false, nil)
			}
			build(c+1, hi, false)
			return
		}
		c := (lo + hi + 1) / 2
		build(c, hi, hi == lo+1)
		if row != nil {
			pass(lo, c-1, true, outer)
			pass(lo, hi, false, middle)
			pass(c, hi, true, outer)
		} else {
			pass(lo, c-1, true, nil)
			pass(lo, c-1, false, nil)
			pass(c, hi, false, nil)
			pass(c, hi, true, nil)
		}
		build(lo, c-1, false)
	}
	build(0, len(layers)-1, true)
	return seq
}

// shortLayers returns, for a layering with rows (see rowsOf), layer
// sequences for a layer of three vertices by rows: 0 2 1 0 2 with all,
// which holds every simple path of the layer, else 1 0 2 1, which holds
// those of at most two vertices, unless inner[j] is shorter; inner[j] for
// smaller layers.
func shortLayers(layers, inner [][]int32, row []int8, all bool) [][]int32 {
	out := make([][]int32, len(layers))
	for j, l := range layers {
		out[j] = inner[j]
		if len(l) != 3 {
			continue
		}
		var at [3]int32
		for _, v := range l {
			at[row[v]] = v
		}
		seq := []int32{at[1], at[0], at[2], at[1]}
		if all {
			seq = []int32{at[0], at[2], at[1], at[0], at[2]}
		}
		if len(seq) < len(inner[j]) || all && len(seq) == len(inner[j]) {
			out[j] = seq
		}
	}
	return out
}

// rowsOf returns rows 0, 1 or 2 for the vertices of the undirected graph u
// with the thin layering layers, such that the vertices of a layer have
// distinct rows, every edge between consecutive layers joins two vertices of
// one row, and every edge inside a layer joins rows 1 apart; nil when it
// finds none. The layers are given rows in order, each the first
// assignment (of the permutations of 0, 1, 2 in lexicographic order) that
// agrees with the edges inside it and to the layer before, going back to
// the layer before when none does (a corner missing from a grid leaves a
// first layer of two vertices whose first assignment fails one layer
// later); it gives up after maxRowSteps placements per layer.
func rowsOf(u *digraph, layers [][]int32) []int8 {
	row := make([]int8, u.n)
	for i := range row {
		row[i] = -1
	}
	perms := [][3]int8{{0, 1, 2}, {0, 2, 1}, {1, 0, 2}, {1, 2, 0}, {2, 0, 1}, {2, 1, 0}}
	layer := make([]int32, u.n)
	for j, l := range layers {
		for _, v := range l {
			layer[v] = int32(j)
		}
	}
	fits := func(j int, l []int32) bool {
		for _, v := range l {
			for _, w := range u.succ(v) {
				switch {
				case layer[w] == int32(j):
					if d := row[v] - row[w]; d != 1 && d != -1 {
						return false
					}
				case row[w] >= 0 && row[w] != row[v]:
					return false
				}
			}
		}
		return true
	}
	// Depth-first over the layers: next[j] is the permutation layer j
	// tries next; a layer with none left is cleared and the one before
	// tries its next.
	next := make([]int, len(layers))
	steps := 0
	for j := 0; j < len(layers); {
		if steps++; steps > maxRowSteps*len(layers) {
			return nil
		}
		l := layers[j]
		placed := false
		for next[j] < len(perms) && !placed {
			p := perms[next[j]]
			next[j]++
			for i, v := range l {
				row[v] = p[i]
			}
			placed = fits(j, l)
		}
		if placed {
			if j++; j < len(layers) {
				next[j] = 0
			}
			continue
		}
		for _, v := range l {
			row[v] = -1
		}
		if j--; j < 0 {
			return nil
		}
	}
	return row
}

// maxRowSteps bounds the layer placements of rowsOf's search, per layer
// (common practice, no source).
const maxRowSteps = 64

// thin reports whether layers is a thin layering of the undirected graph u:
// every vertex in exactly one layer, at most three vertices per layer, every
// edge inside a layer or between consecutive ones, and at most three edges
// between any two consecutive layers.
func thin(u *digraph, layers [][]int32) bool {
	layer := make([]int32, u.n)
	for i := range layer {
		layer[i] = -1
	}
	seen := 0
	for j, l := range layers {
		if len(l) == 0 || len(l) > 3 {
			return false
		}
		for _, v := range l {
			if layer[v] >= 0 {
				return false
			}
			layer[v] = int32(j)
			seen++
		}
	}
	if seen != u.n {
		return false
	}
	cut := make([]int, len(layers))
	for v := int32(0); v < int32(u.n); v++ {
		for _, w := range u.succ(v) {
			if w <= v {
				continue
			}
			switch layer[w] - layer[v] {
			case 0:
			case 1, -1:
				j := min(layer[v], layer[w])
				if cut[j]++; cut[j] > 3 {
					return false
				}
			default:
				return false
			}
		}
	}
	return true
}

// layerings returns candidate layerings of the connected undirected graph
// u: breadth-first layers from a peripheral vertex (and from it with one of
// its neighbours), and, for pairs (p, q) of low-degree vertices, the classes
// of dist(p, ·) − dist(q, ·) in increasing order, which on a grid with p and
// q at the two ends of one side are its columns. Candidates may fail to be
// thin; the caller checks.
func layerings(u *digraph) [][][]int32 {
	if u.n == 0 {
		return nil
	}
	root := peripheral(u)
	out := [][][]int32{bfsLayers(u, []int32{root})}
	for i, w := range u.succ(root) {
		if i == 4 {
			break
		}
		out = append(out, bfsLayers(u, []int32{root, w}))
	}
	// Low-degree vertices: the ends of long thin shapes.
	ends := make([]int32, u.n)
	for i := range ends {
		ends[i] = int32(i)
	}
	slices.SortStableFunc(ends, func(a, b int32) int { return len(u.succ(a)) - len(u.succ(b)) })
	ends = ends[:min(len(ends), maxEndCandidates)]
	if !slices.Contains(ends, root) {
		ends[len(ends)-1] = root
	}
	dist := make([][]int32, len(ends))
	for i, p := range ends {
		dist[i] = distances(u, p)
	}
	for i := range ends {
		for j := i + 1; j < len(ends); j++ {
			out = append(out, classes(dist[i], dist[j]))
		}
	}
	return out
}

// distances returns the breadth-first distances from p in u (−1 where
// unreached).
func distances(u *digraph, p int32) []int32 {
	dist := make([]int32, u.n)
	for i := range dist {
		dist[i] = -1
	}
	dist[p] = 0
	queue := []int32{p}
	for len(queue) > 0 {
		v := queue[0]
		queue = queue[1:]
		for _, w := range u.succ(v) {
			if dist[w] < 0 {
				dist[w] = dist[v] + 1
				queue = append(queue, w)
			}
		}
	}
	return dist
}

// classes groups the vertices by dp − dq, in increasing order of the
// difference, each class sorted.
func classes(dp, dq []int32) [][]int32 {
	lo, hi := int32(0), int32(0)
	for v := range dp {
		k := dp[v] - dq[v]
		if v == 0 || k < lo {
			lo = k
		}
		if v == 0 || k > hi {
			hi = k
		}
	}
	buckets := make([][]int32, hi-lo+1)
	for v := range dp {
		k := dp[v] - dq[v] - lo
		buckets[k] = append(buckets[k], int32(v))
	}
	var layers [][]int32
	for _, b := range buckets {
		if len(b) > 0 {
			layers = append(layers, b)
		}
	}
	return layers
}
