package ground

import (
	"fmt"
	"strconv"
	"strings"

	"trellis/grammar"
)

// This file holds the checks made on the syntax tree before grounding:
// predicates used with several arities (a warning) and recursion through
// an aggregate (an error).

func predKey(a *grammar.Atom) string { return a.Predicate + "/" + strconv.Itoa(len(a.Args)) }

// eachAtom calls f for every atom of a list of literals, aggregate
// conditions included.
func eachAtom(lits []grammar.Literal, f func(a *grammar.Atom, inAgg bool)) {
	for _, l := range lits {
		switch l := l.(type) {
		case *grammar.AtomLiteral:
			f(&l.Atom, false)
		case *grammar.Aggregate:
			for _, c := range l.Condition {
				if al, ok := c.(*grammar.AtomLiteral); ok {
					f(&al.Atom, true)
				}
			}
		}
	}
}

// checkArities warns about predicate names used with different arities.
func (g *grounder) checkArities() {
	type first struct {
		arity int
		pos   grammar.Pos
	}
	seen := make(map[string]first)
	warned := make(map[string]bool)
	use := func(name string, arity int, pos grammar.Pos) {
		f, ok := seen[name]
		if !ok {
			seen[name] = first{arity, pos}
			return
		}
		k := name + "/" + strconv.Itoa(arity)
		if f.arity == arity || warned[k] {
			return
		}
		warned[k] = true
		g.warnings.Add(pos, fmt.Sprintf("predicate %s is used with %d arguments here but with %d at %s", name, arity, f.arity, f.pos))
	}
	atom := func(a *grammar.Atom, _ bool) { use(a.Predicate, len(a.Args), a.Pos) }
	for _, st := range g.stmts {
		switch st := st.(type) {
		case *grammar.Fact:
			atom(&st.Head, false)
		case *grammar.Rule:
			atom(&st.Head, false)
			eachAtom(st.Body, atom)
		case *grammar.Constraint:
			eachAtom(st.Body, atom)
		case *grammar.Choice:
			for i := range st.Elements {
				atom(&st.Elements[i].Atom, false)
				eachAtom(st.Elements[i].For, atom)
			}
			eachAtom(st.Body, atom)
		case *grammar.Penalty:
			eachAtom(st.Body, atom)
		case *grammar.Display:
			for _, r := range st.Predicates {
				use(r.Name, r.Arity, r.Pos)
			}
		}
	}
}

// depEdge is an edge of the predicate dependency graph: the head depends on
// the body predicate.
type depEdge struct {
	to     int
	aggPos grammar.Pos // valid when the dependency goes through an aggregate
}

// checkAggregateCycles reports predicates that depend on themselves
// through an aggregate, on the predicate dependency graph (positive and
// negative dependencies alike).
func (g *grounder) checkAggregateCycles() {
	ids := make(map[string]int)
	var names []string
	node := func(a *grammar.Atom) int {
		k := predKey(a)
		if id, ok := ids[k]; ok {
			return id
		}
		ids[k] = len(names)
		names = append(names, k)
		return len(names) - 1
	}
	// out[b] lists the heads derived from b (body -> head).
	var out [][]depEdge
	add := func(from, to int, aggPos grammar.Pos) {
		for len(out) <= from || len(out) <= to {
			out = append(out, nil)
		}
		out[from] = append(out[from], depEdge{to: to, aggPos: aggPos})
	}
	type aggEdge struct {
		from, to int
		pos      grammar.Pos
	}
	var aggEdges []aggEdge
	edges := func(head int, lits []grammar.Literal) {
		for _, l := range lits {
			switch l := l.(type) {
			case *grammar.AtomLiteral:
				add(node(&l.Atom), head, grammar.Pos{})
			case *grammar.Aggregate:
				for _, c := range l.Condition {
					if al, ok := c.(*grammar.AtomLiteral); ok {
						from := node(&al.Atom)
						add(from, head, l.Pos)
						aggEdges = append(aggEdges, aggEdge{from, head, l.Pos})
					}
				}
			}
		}
	}
	for _, st := range g.stmts {
		switch st := st.(type) {
		case *grammar.Rule:
			edges(node(&st.Head), st.Body)
		case *grammar.Choice:
			for i := range st.Elements {
				h := node(&st.Elements[i].Atom)
				edges(h, st.Body)
				edges(h, st.Elements[i].For)
			}
		}
	}
	for len(out) < len(names) {
		out = append(out, nil)
	}
	reported := make(map[grammar.Pos]bool)
	for _, e := range aggEdges {
		if reported[e.pos] {
			continue
		}
		// Shortest path from the head back to the aggregated predicate.
		path := g.depPath(out, e.to, e.from)
		if path == nil {
			continue
		}
		reported[e.pos] = true
		cycle := []string{names[e.from]}
		for _, n := range path {
			cycle = append(cycle, names[n])
		}
		g.errorf(e.pos, "%s depends on itself through the aggregate in %s: %s", names[e.from], names[e.to], strings.Join(cycle, " -> "))
	}
}

// depPath returns a shortest path from a to b (both included), or nil.
func (g *grounder) depPath(out [][]depEdge, a, b int) []int {
	prev := make([]int, len(out))
	for i := range prev {
		prev[i] = -1
	}
	prev[a] = a
	queue := []int{a}
	for len(queue) > 0 {
		x := queue[0]
		queue = queue[1:]
		if x == b {
			var path []int
			for y := b; ; y = prev[y] {
				path = append(path, y)
				if y == a {
					break
				}
			}
			for i, j := 0, len(path)-1; i < j; i, j = i+1, j-1 {
				path[i], path[j] = path[j], path[i]
			}
			return path
		}
		for _, e := range out[x] {
			if prev[e.to] < 0 {
				prev[e.to] = x
				queue = append(queue, e.to)
			}
		}
	}
	return nil
}
