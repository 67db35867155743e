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
// eliminated vertex. With fill, the vertex adding the fewest fill edges
// goes next, else the one of least degree; stale heap entries are
// refreshed when they come up. It reports false when it ran out of budget.
func eliminate(adj [][]int32, fill bool) (int, bool) {
	n := len(adj)
	gone := make([]bool, n)
	budget := eliminationBudget
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
	h := &degreeHeap{}
	for v := 0; v < n; v++ {
		if len(adj[v]) > 0 {
			// degreeHeap is a max-heap: store negated scores.
			heap.Push(h, degreeItem{int32(v), -score(int32(v))})
		}
	}
	width := 0
	left := 0 // vertices with neighbours not yet eliminated
	for v := 0; v < n; v++ {
		if len(adj[v]) > 0 {
			left++
		}
	}
	var merged []int32
	for h.Len() > 0 {
		if budget < 0 {
			return max(width, left-1), false
		}
		it := heap.Pop(h).(degreeItem)
		v := it.v
		if gone[v] {
			continue
		}
		if s := -score(v); s != it.key {
			heap.Push(h, degreeItem{v, s})
			continue
		}
		gone[v] = true
		left--
		nb := adj[v]
		width = max(width, len(nb))
		budget -= len(nb) * (len(nb) + 1)
		// Make the neighbourhood a clique and remove v.
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
		for _, a := range nb {
			heap.Push(h, degreeItem{a, -score(a)})
		}
		budget -= len(nb) * 20 // heap work
	}
	return width, true
}
