// Package unfold breaks the positive cycles of a ground program by unfolding
// each strongly connected component of its positive dependency graph along a
// sequence of its atoms, so that the result is tight (its positive dependency
// graph is acyclic) and has the same stable models on the original atoms, one
// to one.
//
// The unfolding works as follows. For a component C and a sequence s over C,
// walking s, every occurrence of an atom a makes a new copy of a whose rules
// are a's rules with each positive body atom of C replaced by its latest copy
// so far (a rule that needs a copy not yet made is dropped for this copy).
// Finally a is made equivalent to its last copy. The result is correct when
// every simple directed path of C (read in the direction body to head)
// occurs as a subsequence of s; Valid checks that condition, and the
// constructions of this package (see Sequence) guarantee it.
//
// It is enough that the simple paths starting at an entry of C (an atom with
// a rule whose positive body has no atom of C, see Graph.Entry) occur. In a
// stable model M, let every atom a of C in M pick a rule whose body holds at
// an earlier stage of the least model of the reduct; following the picked
// rules' body atoms in C from a back to atoms whose picked rule has none
// gives a tree whose root-to-leaf paths are simple (stages decrease) and
// whose leaves are entries. Copies are monotone along s (a later copy of an
// atom uses later copies of the same body atoms), so a's first true copy
// comes right after the latest first true copy of its picked body atoms: the
// one reached along some leaf-to-a path, which holds when that path occurs
// in s. The search uses this weaker condition where it checks sequences
// itself (exhaustive search and pruning of small components); the
// constructions hold every simple path anyway.
//
// The package has the positive dependency graph with its strongly connected
// components (Graph, by an iterative Tarjan), the sequence search (Sequence:
// feedback-set constructions around a feedback vertex set or a set that
// leaves trees of two-way edges, repetition, sweeps, bisection of thin
// layerings and exhaustive search; a construction is used only where its
// validity is proved or checked), the
// validity checker (Valid), the unfolding itself (Unfold), a treewidth
// estimate by greedy elimination (Width), and the report of an unfolding
// with its text, JSON and Graphviz forms (Report, WriteDot).
package unfold

import (
	"slices"

	"trellis/ground"
)

// Graph is the positive dependency graph of a ground program, with its
// strongly connected components. It has an edge b → a for every rule with
// head a and b in its positive body, for every choice element a and atom b of
// the choice's positive body, and for every aggregate atom a and element b of
// the aggregate. Adjacency lists are stored flat (compressed sparse rows).
type Graph struct {
	n     int
	start []int32 // successors of v are succ[start[v]:start[v+1]], sorted
	succ  []int32

	comp      []int32 // component of each vertex
	compStart []int32 // members of component i are compAtoms[compStart[i]:compStart[i+1]]
	compAtoms []int32 // members, components in topological order, members sorted
	selfLoop  []bool  // per component: some member has an edge to itself
	// entry, when not nil, marks the atoms with support from outside
	// their component (see Entry); nil means every atom.
	entry []bool
}

// NewGraph returns the positive dependency graph of p with its components.
func NewGraph(p *ground.Program) *Graph {
	var from, to []int32
	add := func(b, a ground.Atom) {
		from = append(from, int32(b))
		to = append(to, int32(a))
	}
	for _, r := range p.Rules {
		if r.Head == ground.NoAtom {
			continue
		}
		for _, b := range r.Pos {
			add(b, r.Head)
		}
	}
	for _, c := range p.Choices {
		for _, a := range c.Elements {
			for _, b := range c.Pos {
				add(b, a)
			}
		}
	}
	for _, g := range p.Aggregates {
		for _, e := range g.Elements {
			add(e.Atom, g.Atom)
		}
	}
	g := newGraph(len(p.Atoms), from, to)
	g.entries(p)
	return g
}

// entries marks the atoms that a rule or choice element can derive without
// any positive body atom of their own component; aggregate atoms are marked
// too (to be safe: they can never lie on a cycle of an unfolded program).
func (g *Graph) entries(p *ground.Program) {
	g.entry = make([]bool, g.n)
	outside := func(head ground.Atom, pos []ground.Atom) bool {
		for _, b := range pos {
			if g.comp[b] == g.comp[head] {
				return false
			}
		}
		return true
	}
	for _, r := range p.Rules {
		if r.Head != ground.NoAtom && outside(r.Head, r.Pos) {
			g.entry[r.Head] = true
		}
	}
	for _, c := range p.Choices {
		for _, a := range c.Elements {
			if outside(a, c.Pos) {
				g.entry[a] = true
			}
		}
	}
	for _, a := range p.Aggregates {
		g.entry[a.Atom] = true
	}
}

// Entry reports whether atom v has a rule (or is a choice element) whose
// positive body has no atom of v's component: the atoms from which a
// derivation can enter the component. A derivation inside a component runs
// along a simple path that starts at an entry, so unfolding only needs the
// simple paths that start at an entry (see Unfold). Graphs built from edge
// lists alone count every atom as an entry.
func (g *Graph) Entry(v int32) bool { return g.entry == nil || g.entry[v] }

// newGraph builds a graph with n vertices from parallel edge lists.
func newGraph(n int, from, to []int32) *Graph {
	g := &Graph{n: n}
	g.start, g.succ = csr(n, from, to)
	g.components()
	return g
}

// csr returns the sorted, duplicate-free adjacency of the edges from[i] →
// to[i] over n vertices in compressed sparse row form.
func csr(n int, from, to []int32) (start, adj []int32) {
	start = make([]int32, n+1)
	for _, f := range from {
		start[f+1]++
	}
	for v := 0; v < n; v++ {
		start[v+1] += start[v]
	}
	adj = make([]int32, len(from))
	fill := append([]int32(nil), start[:n]...)
	for i, f := range from {
		adj[fill[f]] = to[i]
		fill[f]++
	}
	// Sort and deduplicate each list, compacting in place.
	w := int32(0)
	for v := 0; v < n; v++ {
		list := adj[start[v]:start[v+1]]
		slices.Sort(list)
		list = slices.Compact(list)
		start[v] = w
		w += int32(copy(adj[w:], list))
	}
	start[n] = w
	return start, adj[:w:w]
}

// Len returns the number of vertices (atoms).
func (g *Graph) Len() int { return g.n }

// Edges returns the number of distinct edges.
func (g *Graph) Edges() int { return len(g.succ) }

// Succ returns the successors of v (the heads that depend positively on v),
// sorted. The slice must not be modified.
func (g *Graph) Succ(v int32) []int32 { return g.succ[g.start[v]:g.start[v+1]] }

// NumComponents returns the number of strongly connected components.
func (g *Graph) NumComponents() int { return len(g.compStart) - 1 }

// Component returns the members of component i, sorted. Components are
// numbered in topological order: every edge goes from a component to itself
// or to a later one. The slice must not be modified.
func (g *Graph) Component(i int) []int32 { return g.compAtoms[g.compStart[i]:g.compStart[i+1]] }

// ComponentOf returns the component of vertex v.
func (g *Graph) ComponentOf(v int32) int { return int(g.comp[v]) }

// Cyclic reports whether component i has a cycle: more than one member, or
// a member with an edge to itself.
func (g *Graph) Cyclic(i int) bool {
	return g.compStart[i+1]-g.compStart[i] > 1 || g.selfLoop[i]
}

// Tight reports whether the graph is acyclic.
func (g *Graph) Tight() bool {
	for i := 0; i < g.NumComponents(); i++ {
		if g.Cyclic(i) {
			return false
		}
	}
	return true
}

// ComponentEdges returns the number of edges inside component i.
func (g *Graph) ComponentEdges(i int) int {
	n := 0
	for _, v := range g.Component(i) {
		for _, w := range g.Succ(v) {
			if g.comp[w] == int32(i) {
				n++
			}
		}
	}
	return n
}

// components computes the strongly connected components with an iterative
// version of Tarjan's algorithm (Tarjan 1972), numbering them in topological
// order.
func (g *Graph) components() {
	comp, count := tarjan(g.n, g.start, g.succ)
	// Tarjan finds components in reverse topological order; renumber.
	for v := range comp {
		comp[v] = int32(count-1) - comp[v]
	}
	g.comp = comp
	g.compStart = make([]int32, count+1)
	for _, c := range comp {
		g.compStart[c+1]++
	}
	for i := 0; i < count; i++ {
		g.compStart[i+1] += g.compStart[i]
	}
	g.compAtoms = make([]int32, g.n)
	fill := append([]int32(nil), g.compStart[:count]...)
	for v := 0; v < g.n; v++ { // increasing v keeps members sorted
		c := comp[v]
		g.compAtoms[fill[c]] = int32(v)
		fill[c]++
	}
	g.selfLoop = make([]bool, count)
	for v := 0; v < g.n; v++ {
		if _, found := slices.BinarySearch(g.Succ(int32(v)), int32(v)); found {
			g.selfLoop[comp[v]] = true
		}
	}
}

// tarjan returns the strongly connected component of each vertex of the
// graph (start, adj) over n vertices, numbered in the order Tarjan's algorithm
// completes them (reverse topological order), and the number of components. It uses explicit stacks, so the depth
// of the graph does not matter.
func tarjan(n int, start, adj []int32) (comp []int32, count int) {
	const unvisited = -1
	index := make([]int32, n)
	low := make([]int32, n)
	comp = make([]int32, n)
	for v := range index {
		index[v] = unvisited
		comp[v] = -1
	}
	var stack []int32 // Tarjan's stack of vertices
	var call []int32  // DFS call stack: vertices
	var next []int32  // DFS call stack: next edge position
	counter := int32(0)
	for root := 0; root < n; root++ {
		if index[root] != unvisited {
			continue
		}
		index[root], low[root] = counter, counter
		counter++
		stack = append(stack, int32(root))
		call = append(call, int32(root))
		next = append(next, start[root])
		for len(call) > 0 {
			top := len(call) - 1
			v := call[top]
			if e := next[top]; e < start[v+1] {
				next[top]++
				w := adj[e]
				if index[w] == unvisited {
					index[w], low[w] = counter, counter
					counter++
					stack = append(stack, w)
					call = append(call, w)
					next = append(next, start[w])
				} else if comp[w] < 0 && index[w] < low[v] {
					low[v] = index[w]
				}
				continue
			}
			// v is finished.
			call, next = call[:top], next[:top]
			if top > 0 {
				u := call[top-1]
				if low[v] < low[u] {
					low[u] = low[v]
				}
			}
			if low[v] == index[v] {
				for {
					w := stack[len(stack)-1]
					stack = stack[:len(stack)-1]
					comp[w] = int32(count)
					if w == v {
						break
					}
				}
				count++
			}
		}
	}
	return comp, count
}
