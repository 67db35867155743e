package unfold

import "slices"

// Valid reports whether seq, a sequence of atoms of the component comp of g
// (comp as returned by g.Component), holds every simple directed path of the
// component's subgraph as a subsequence, paths read in the direction body to
// head. This is the condition under which unfolding along seq is correct.
//
// The check enumerates simple paths and takes exponential time; it is meant
// for components of up to a dozen or so atoms.
func Valid(g *Graph, comp []int32, seq []int32) bool {
	vs := slices.Clone(comp)
	slices.Sort(vs)
	local := make([]int32, len(seq))
	for i, a := range seq {
		j, ok := slices.BinarySearch(vs, a)
		if !ok {
			return false
		}
		local[i] = int32(j)
	}
	ok, _, _ := g.local(vs).valid(local, -1)
	return ok
}

// valid reports whether every simple path of d occurs as a subsequence of
// seq. A depth-first search walks the simple paths, embedding each greedily
// at the earliest possible positions (greedy embedding finds a subsequence
// whenever one exists). A state (vertex, visited set, position) is skipped
// when the same vertex was already reached with the same visited set at a
// later or equal position and every continuation embedded from there: the
// continuations are the same, and an earlier position only helps. With budget >= 0, the search gives up after that many
// steps and reports decided == false. It also returns the steps taken.
func (d *digraph) valid(seq []int32, budget int) (ok, decided bool, steps int) {
	return d.validFrom(seq, budget, nil, nil)
}

// validFrom is valid for the simple paths that start at a vertex marked in
// entry (every vertex when entry is nil). memo, when not nil, is cleared and
// used as the memo table, so that repeated checks reuse its storage.
func (d *digraph) validFrom(seq []int32, budget int, entry []bool, memo map[uint64]int32) (ok, decided bool, steps int) {
	n, L := d.n, len(seq)
	// next[p*n+w] is the first position q >= p with seq[q] == w, or L.
	next := make([]int32, (L+1)*n)
	for w := 0; w < n; w++ {
		next[L*n+w] = int32(L)
	}
	for p := L - 1; p >= 0; p-- {
		copy(next[p*n:(p+1)*n], next[(p+1)*n:(p+2)*n])
		next[p*n+int(seq[p])] = int32(p)
	}
	c := checker{d: d, next: next, L: int32(L), budget: budget, visited: make([]bool, n)}
	if n <= 58 {
		if memo == nil {
			memo = make(map[uint64]int32)
		}
		clear(memo)
		c.memo = memo
	}
	for v := 0; v < n; v++ {
		if entry != nil && !entry[v] {
			continue
		}
		p := next[v]
		if p == int32(L) {
			return false, true, c.steps
		}
		c.visited[v] = true
		c.mask = 1 << uint(v)
		r := c.walk(int32(v), p)
		c.visited[v] = false
		if r != walkOK {
			return false, r == walkFail, c.steps
		}
	}
	return true, true, c.steps
}

const (
	walkOK = iota
	walkFail
	walkGiveUp
)

type checker struct {
	d       *digraph
	next    []int32
	L       int32
	budget  int
	steps   int
	visited []bool
	mask    uint64
	memo    map[uint64]int32 // (visited set << 6 | vertex) → position
}

// maxMemo bounds the memo table of the validity checker.
const maxMemo = 1 << 20

func (c *checker) walk(v, p int32) int {
	c.steps++
	if c.budget >= 0 {
		if c.budget == 0 {
			return walkGiveUp
		}
		c.budget--
	}
	if c.memo != nil {
		k := c.mask<<6 | uint64(v)
		q, ok := c.memo[k]
		if ok && q >= p {
			return walkOK
		}
		if ok || len(c.memo) < maxMemo {
			// Stored before the continuations are explored: the same
			// key cannot recur among them (their visited sets are
			// larger), and a failure ends the whole check.
			c.memo[k] = p
		}
	}
	n := int32(c.d.n)
	for _, w := range c.d.succ(v) {
		if c.visited[w] {
			continue
		}
		q := c.next[(p+1)*n+w]
		if q == c.L {
			return walkFail
		}
		c.visited[w] = true
		old := c.mask
		c.mask |= 1 << uint(w)
		r := c.walk(w, q)
		c.mask = old
		c.visited[w] = false
		if r != walkOK {
			return r
		}
	}
	return walkOK
}
