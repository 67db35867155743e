package unfold

import (
	"context"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// Lower bounds on the total copies of any valid sequence.
//
// A valid sequence holds every simple path of the component as a
// subsequence (every atom of a grid shape is an entry, so no path may be
// left out). So for any set P of simple paths, a valid sequence is a common
// supersequence of P, and its length is at least the length of a shortest
// common supersequence (SCS) of P. shortestSupersequence computes that
// length exactly, so a small, well chosen P proves a lower bound on the
// total copies of every sequence, whatever the construction.

// shortestSupersequence returns the length of a shortest common
// supersequence of seqs and one such supersequence. It fills the table of
// the usual dynamic programme over the tuple of positions reached in each
// sequence (the m-string form of the two-string recurrence for the longest
// common subsequence, Cormen, Leiserson, Rivest and Stein, Introduction to
// Algorithms, chapter "Longest common subsequence", cited from memory):
// d(positions) = 1 + min over the letters c next in some sequence of
// d(positions with every sequence whose next letter is c advanced), and 0
// when every sequence is done. Advancing every sequence that can take c is
// no loss: an embedding can always match a sequence's next letter at the
// earliest occurrence. The table has ∏(|s_i|+1) entries of one byte.
func shortestSupersequence(seqs [][]int32) (int, []int32) {
	d, stride := supersequenceTable(seqs)
	pos := make([]int, len(seqs))
	decode := func(idx int) {
		for i := range pos {
			pos[i] = idx / stride[i]
			idx %= stride[i]
		}
	}
	next := func(idx int, c int32) int {
		for j, s := range seqs {
			if pos[j] < len(s) && s[pos[j]] == c {
				idx += stride[j]
			}
		}
		return idx
	}
	size := len(d)
	// Follow the table from the start for one shortest supersequence.
	var w []int32
	for idx := 0; idx != size-1; {
		decode(idx)
		for i, s := range seqs {
			if pos[i] == len(s) {
				continue
			}
			if c := s[pos[i]]; d[next(idx, c)]+1 == d[idx] {
				w = append(w, c)
				idx = next(idx, c)
				break
			}
		}
	}
	return int(d[0]), w
}

// supersequenceTable returns the table of shortestSupersequence: entry
// Σ pos[i]·stride[i] is the length of a shortest common supersequence of
// the suffixes seqs[i][pos[i]:].
func supersequenceTable(seqs [][]int32) ([]uint8, []int) {
	m := len(seqs)
	stride := make([]int, m)
	size := 1
	for i := m - 1; i >= 0; i-- {
		stride[i] = size
		size *= len(seqs[i]) + 1
	}
	d := make([]uint8, size)
	pos := make([]int, m)
	// Appending a letter only advances positions, so entries are filled
	// from the last (every sequence done) to the first.
	for idx := size - 1; idx >= 0; idx-- {
		for i, rest := 0, idx; i < m; i++ {
			pos[i] = rest / stride[i]
			rest %= stride[i]
		}
		best := -1
		for i, s := range seqs {
			if pos[i] == len(s) {
				continue
			}
			// Append s's next letter c: every sequence whose next
			// letter is c advances.
			c, next := s[pos[i]], idx
			for j, t := range seqs {
				if pos[j] < len(t) && t[pos[j]] == c {
					next += stride[j]
				}
			}
			if v := 1 + int(d[next]); best < 0 || v < best {
				best = v
			}
		}
		if best > 255 {
			panic("supersequence longer than 255")
		}
		d[idx] = uint8(max(best, 0))
	}
	return d, stride
}

// searchSupersequence returns the length of a shortest common
// supersequence of seqs (at most 16 sequences of at most 15 letters each)
// by A* search (Hart, Nilsson and Raphael 1968, cited from memory) over the
// same tuples of positions as shortestSupersequence, visiting only the
// tuples it needs. The estimate of the letters still to come is the
// largest, over every three sequences (all of them when there are fewer),
// of the exact length for their suffixes alone, read from
// supersequenceTable. It never exceeds the true remainder and drops by at
// most one per letter appended (the three suffixes need at most one letter
// more than what remains of them after it), so the first time the end tuple
// is taken from the queue its distance is exact. When a letter c occurs in
// the remaining suffixes only as their next letter, appending c first is
// no loss (move the first c of a shortest supersequence to the front: the
// suffixes that start with c take it there, the others never use it), so
// only that move is tried.
func searchSupersequence(seqs [][]int32) int {
	m := len(seqs)
	if m > 16 {
		panic("more than 16 sequences")
	}
	// Letters renamed 0, 1, … and, per sequence and letter, the last
	// position where it occurs (-1: nowhere).
	name := map[int32]int{}
	seq := make([][]int, m)
	for i, s := range seqs {
		if len(s) > 15 {
			panic("a sequence longer than 15")
		}
		for _, c := range s {
			if _, ok := name[c]; !ok {
				name[c] = len(name)
			}
			seq[i] = append(seq[i], name[c])
		}
	}
	last := make([]int, m*len(name))
	for i := range last {
		last[i] = -1
	}
	for i, s := range seq {
		for p, c := range s {
			last[i*len(name)+c] = p
		}
	}
	at := func(st uint64, i int) int { return int(st>>(4*i)) & 15 }

	type part struct {
		members []int
		d       []uint8
		stride  []int
	}
	var parts []part
	addPart := func(members ...int) {
		var sub [][]int32
		for _, i := range members {
			sub = append(sub, seqs[i])
		}
		d, stride := supersequenceTable(sub)
		parts = append(parts, part{members, d, stride})
	}
	if m <= 3 {
		all := make([]int, m)
		for i := range all {
			all[i] = i
		}
		addPart(all...)
	}
	for i := 0; i < m; i++ {
		for j := i + 1; j < m; j++ {
			for k := j + 1; k < m && m > 3; k++ {
				addPart(i, j, k)
			}
		}
	}
	estimate := func(st uint64) int {
		best := 0
		for _, p := range parts {
			idx := 0
			for k, i := range p.members {
				idx += at(st, i) * p.stride[k]
			}
			best = max(best, int(p.d[idx]))
		}
		return best
	}

	var goal uint64
	for i, s := range seq {
		goal |= uint64(len(s)) << (4 * i)
	}
	dist := map[uint64]int{0: 0}
	var queue [][]uint64 // queue[f]: tuples whose distance plus estimate was f
	push := func(st uint64, g int) {
		f := g + estimate(st)
		for len(queue) <= f {
			queue = append(queue, nil)
		}
		queue[f] = append(queue[f], st)
	}
	push(0, 0)
	var moves []int
	for f := 0; f < len(queue); f++ {
		for len(queue[f]) > 0 {
			st := queue[f][len(queue[f])-1]
			queue[f] = queue[f][:len(queue[f])-1]
			g := dist[st]
			if g+estimate(st) != f {
				continue // pushed again since with a shorter distance
			}
			if st == goal {
				return g
			}
			moves = moves[:0]
			for i, s := range seq {
				p := at(st, i)
				if p == len(s) || slices.Contains(moves, s[p]) {
					continue
				}
				c := s[p]
				free := true
				for j := range seq {
					if last[j*len(name)+c] > at(st, j) {
						free = false
						break
					}
				}
				if free {
					moves = append(moves[:0], c)
					break
				}
				moves = append(moves, c)
			}
			for _, c := range moves {
				t := st
				for j, s := range seq {
					if p := at(st, j); p < len(s) && s[p] == c {
						t += 1 << (4 * j)
					}
				}
				if old, ok := dist[t]; ok && old <= g+1 {
					continue
				}
				dist[t] = g + 1
				push(t, g+1)
			}
		}
	}
	panic("end tuple never reached")
}

// holds reports whether sub is a subsequence of seq (a plain scan).
func holds(seq, sub []int32) bool {
	i := 0
	for _, x := range seq {
		if i < len(sub) && x == sub[i] {
			i++
		}
	}
	return i == len(sub)
}

// bruteSupersequence returns the length of a shortest common supersequence
// of seqs over letters 0..alpha-1 by trying every word of length 0, 1, 2,
// … in turn.
func bruteSupersequence(seqs [][]int32, alpha int) int {
	for n := 0; ; n++ {
		w := make([]int32, n)
		for {
			ok := true
			for _, s := range seqs {
				if !holds(w, s) {
					ok = false
					break
				}
			}
			if ok {
				return n
			}
			// Next word in lexicographic order, or stop.
			i := n - 1
			for i >= 0 && w[i] == int32(alpha-1) {
				w[i] = 0
				i--
			}
			if i < 0 {
				break
			}
			w[i]++
		}
	}
}

// longestCommonSubsequence is the textbook two-string dynamic programme
// (Cormen, Leiserson, Rivest and Stein, Introduction to Algorithms, chapter
// "Longest common subsequence", cited from memory).
func longestCommonSubsequence(a, b []int32) int {
	c := make([][]int, len(a)+1)
	for i := range c {
		c[i] = make([]int, len(b)+1)
	}
	for i := 1; i <= len(a); i++ {
		for j := 1; j <= len(b); j++ {
			if a[i-1] == b[j-1] {
				c[i][j] = c[i-1][j-1] + 1
			} else {
				c[i][j] = max(c[i-1][j], c[i][j-1])
			}
		}
	}
	return c[len(a)][len(b)]
}

// TestShortestSupersequence checks shortestSupersequence against brute
// force on small random inputs, against the two-string relation
// SCS = |a| + |b| − LCS(a, b) (Maier 1978, "The complexity of some problems
// on subsequences and supersequences", cited from memory) with the
// textbook LCS, and on two known values.
func TestShortestSupersequence(t *testing.T) {
	letters := func(s string) []int32 {
		var out []int32
		for _, r := range s {
			out = append(out, r)
		}
		return out
	}
	// The LCS example of Cormen et al. (from memory): X = ABCBDAB and
	// Y = BDCABA have a longest common subsequence of length 4 (BCBA), so
	// a shortest common supersequence has 7 + 6 − 4 = 9 letters.
	x, y := letters("ABCBDAB"), letters("BDCABA")
	if got := longestCommonSubsequence(x, y); got != 4 {
		t.Errorf("LCS(ABCBDAB, BDCABA) = %d, want 4", got)
	}
	if got, _ := shortestSupersequence([][]int32{x, y}); got != 9 {
		t.Errorf("SCS(ABCBDAB, BDCABA) = %d, want 9", got)
	}
	// The shortest word holding all six permutations of three letters has
	// 7 letters (OEIS A062714, from memory).
	var perms [][]int32
	for _, p := range []string{"abc", "acb", "bac", "bca", "cab", "cba"} {
		perms = append(perms, letters(p))
	}
	if got, _ := shortestSupersequence(perms); got != 7 {
		t.Errorf("SCS of the permutations of 3 letters = %d, want 7", got)
	}

	// words draws m words of at most most letters from an alphabet of
	// alpha letters.
	words := func(t *rapid.T, m, alpha, most int) [][]int32 {
		seqs := make([][]int32, m)
		for i := range seqs {
			seqs[i] = rapid.SliceOfN(rapid.Int32Range(0, int32(alpha-1)), 0, most).Draw(t, "seq")
		}
		return seqs
	}
	check := func(t *rapid.T, seqs [][]int32, want int) {
		got, w := shortestSupersequence(seqs)
		if got != want {
			t.Fatalf("SCS of %v = %d, want %d", seqs, got, want)
		}
		if len(w) != got {
			t.Fatalf("SCS of %v: witness %v has %d letters, not %d", seqs, w, len(w), got)
		}
		for _, s := range seqs {
			if !holds(w, s) {
				t.Fatalf("SCS of %v: witness %v does not hold %v", seqs, w, s)
			}
		}
		if got := searchSupersequence(seqs); got != want {
			t.Fatalf("SCS of %v by search = %d, want %d", seqs, got, want)
		}
	}
	t.Run("brute force", func(t *testing.T) {
		rapid.Check(t, func(t *rapid.T) {
			alpha := rapid.IntRange(1, 3).Draw(t, "alpha")
			m := rapid.IntRange(0, 4).Draw(t, "m")
			seqs := words(t, m, alpha, 3)
			check(t, seqs, bruteSupersequence(seqs, alpha))
		})
	})
	t.Run("search against table", func(t *testing.T) {
		rapid.Check(t, func(t *rapid.T) {
			alpha := rapid.IntRange(1, 8).Draw(t, "alpha")
			m := rapid.IntRange(0, 6).Draw(t, "m")
			seqs := words(t, m, alpha, 6)
			want, _ := shortestSupersequence(seqs)
			check(t, seqs, want)
		})
	})
	t.Run("two strings", func(t *testing.T) {
		rapid.Check(t, func(t *rapid.T) {
			alpha := rapid.IntRange(1, 5).Draw(t, "alpha")
			ab := words(t, 2, alpha, 12)
			a, b := ab[0], ab[1]
			check(t, ab, len(a)+len(b)-longestCommonSubsequence(a, b))
		})
	})
}

// TestGridTotalLowerBound proves that no valid sequence for the
// bidirectional 2×5 and 3×5 grids (every atom an entry) has 5× fewer copies
// in total than the naive sequence (|C|² copies): the shortest common
// supersequence of a few Hamiltonian paths is already longer than |C|²/5:
// 29 and 46 letters for the short sets, 33 and 50 for the longer ones
// (values logged, not hard-coded).
// The paths were found offline by a counterexample loop: compute a
// shortest common supersequence of the paths so far, list the maximal
// simple paths it misses, and add, among the few that miss it by the most
// letters (length minus longest common subsequence), the one that
// lengthens the shortest common supersequence most. The test checks that
// each is a simple path of the grid, so how they were found does not
// matter. It also checks that the sequence the search returns is at least
// as long and holds them.
func TestGridTotalLowerBound(t *testing.T) {
	for _, tc := range []struct {
		k, n  int
		long  bool      // skipped with -short (seconds of search)
		paths [][]int32 // vertex r*n+c at row r, column c, as in gridShape
	}{
		{2, 5, false, [][]int32{
			{0, 1, 2, 3, 4, 9, 8, 7, 6, 5}, // around, from the top left corner
			{5, 6, 7, 8, 9, 4, 3, 2, 1, 0}, // around, from the bottom left corner
			{4, 3, 2, 1, 0, 5, 6, 7, 8, 9}, // around, from the top right corner
			{8, 7, 6, 5, 0, 1, 2, 3, 4, 9}, // around, from the bottom row's column 3
			{4, 9, 8, 3, 2, 7, 6, 5, 0, 1}, // column snake from the top right corner
			{9, 4, 3, 8, 7, 2, 1, 0, 5, 6}, // column snake from the bottom right corner
		}},
		{3, 5, false, [][]int32{
			{0, 1, 2, 3, 4, 9, 8, 7, 6, 5, 10, 11, 12, 13, 14}, // row snake from the top left corner
			{14, 13, 12, 11, 10, 5, 6, 7, 8, 9, 4, 3, 2, 1, 0}, // its reverse
			{0, 5, 10, 11, 12, 13, 14, 9, 8, 7, 6, 1, 2, 3, 4}, // down column 0, then a row snake upwards
			{4, 3, 2, 1, 0, 5, 6, 7, 8, 9, 14, 13, 12, 11, 10}, // row snake from the top right corner
			{4, 9, 14, 13, 8, 3, 2, 7, 12, 11, 10, 5, 0, 1, 6}, // column snake from the top right, around columns 0 and 1
		}},
		// Longer sets from the same loop, for larger bounds.
		{2, 5, true, [][]int32{
			{0, 1, 2, 3, 4, 9, 8, 7, 6, 5},
			{5, 6, 7, 8, 9, 4, 3, 2, 1, 0},
			{4, 3, 2, 1, 0, 5, 6, 7, 8, 9},
			{9, 8, 7, 6, 5, 0, 1, 2, 3, 4},
			{0, 5, 6, 1, 2, 7, 8, 3, 4, 9},
			{5, 0, 1, 6, 7, 2, 3, 8, 9, 4},
			{1, 0, 5, 6, 7, 2, 3, 4, 9, 8},
			{4, 9, 8, 3, 2, 7, 6, 1, 0, 5},
			{9, 4, 3, 8, 7, 2, 1, 6, 5, 0},
			{3, 4, 9, 8, 7, 2, 1, 0, 5, 6},
		}},
		{3, 5, true, [][]int32{
			{0, 1, 2, 3, 4, 9, 8, 7, 6, 5, 10, 11, 12, 13, 14},
			{14, 13, 12, 11, 10, 5, 6, 7, 8, 9, 4, 3, 2, 1, 0},
			{0, 5, 10, 11, 12, 13, 14, 9, 8, 7, 6, 1, 2, 3, 4},
			{4, 3, 2, 1, 0, 5, 6, 7, 8, 9, 14, 13, 12, 11, 10},
			{4, 9, 14, 13, 8, 3, 2, 7, 12, 11, 10, 5, 0, 1, 6},
			{1, 0, 5, 6, 11, 12, 7, 2, 3, 4, 9, 14, 13, 8},
			{14, 9, 4, 3, 8, 13, 12, 7, 6, 11, 10, 5, 0, 1, 2},
		}},
	} {
		if tc.long && testing.Short() {
			continue
		}
		s := gridShape(tc.k, tc.n)
		size := tc.k * tc.n
		naive := size * size
		// The grid's edges from coordinates, independently of gridShape,
		// and cross-checked against its graph.
		adjacent := func(a, b int32) bool {
			ra, ca, rb, cb := int(a)/tc.n, int(a)%tc.n, int(b)/tc.n, int(b)%tc.n
			dr, dc := ra-rb, ca-cb
			return dr*dr+dc*dc == 1
		}
		g := s.graph()
		for a := int32(0); a < int32(size); a++ {
			for b := int32(0); b < int32(size); b++ {
				if adjacent(a, b) != slices.Contains(g.Succ(a), b) {
					t.Fatalf("%s: edge %d → %d disagrees with gridShape", s.name, a, b)
				}
			}
		}
		for _, p := range tc.paths {
			seen := make([]bool, size)
			for i, v := range p {
				if v < 0 || int(v) >= size || seen[v] {
					t.Fatalf("%s: %v is not a simple path (vertex %d)", s.name, p, v)
				}
				seen[v] = true
				if i > 0 && !adjacent(p[i-1], v) {
					t.Fatalf("%s: %v is not a path (%d, %d not adjacent)", s.name, p, p[i-1], v)
				}
			}
		}
		bound := searchSupersequence(tc.paths)
		t.Logf("%s, %d paths: every valid sequence has at least %d copies (naive %d, 5× fewer would be ≤ %d)",
			s.name, len(tc.paths), bound, naive, naive/5)
		if !tc.long {
			// Small enough for the whole table: both methods agree.
			got, w := shortestSupersequence(tc.paths)
			if got != bound || len(w) != got {
				t.Errorf("%s: table gives %d (supersequence %v), search %d", s.name, got, w, bound)
			}
			for _, p := range tc.paths {
				if !holds(w, p) {
					t.Errorf("%s: supersequence %v misses %v", s.name, w, p)
				}
			}
		}
		if 5*bound <= naive {
			t.Errorf("%s: lower bound %d does not rule out 5× fewer copies than naive %d", s.name, bound, naive)
		}

		comp := g.Component(largestComponent(g))
		seq, how := Sequence(context.Background(), g, comp, Options{})
		if len(seq) < bound {
			t.Errorf("%s: %s sequence has %d copies, below the lower bound %d", s.name, how, len(seq), bound)
		}
		for _, p := range tc.paths {
			if !holds(seq, p) {
				t.Errorf("%s: %s sequence %v misses the simple path %v", s.name, how, seq, p)
			}
		}
	}
}
