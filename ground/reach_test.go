package ground_test

import (
	"context"
	"fmt"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/gonum/graph"
	"gonum.org/v1/gonum/graph/simple"
	"gonum.org/v1/gonum/graph/traverse"
	"pgregory.net/rapid"

	"trellis/ground"
)

// TestReachAgainstGonum grounds reachability over random directed graphs
// and checks the reachable nodes against gonum's breadth-first traversal
// (gonum.org/v1/gonum/graph/traverse.BreadthFirst over graph/simple). With
// the edges as facts every reach atom is certain, so it must be a fact;
// with the edges open to a choice, the possible reach atoms are exactly the
// nodes reachable over all edges, and only the start is certain.
func TestReachAgainstGonum(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 25).Draw(t, "nodes")
		g := simple.NewDirectedGraph()
		for i := 0; i < n; i++ {
			g.AddNode(simple.Node(i))
		}
		var facts strings.Builder
		m := rapid.IntRange(0, 3*n).Draw(t, "edges")
		for k := 0; k < m; k++ {
			x := rapid.IntRange(0, n-1).Draw(t, "from")
			y := rapid.IntRange(0, n-1).Draw(t, "to")
			if x == y || g.HasEdgeFromTo(int64(x), int64(y)) {
				continue
			}
			g.SetEdge(g.NewEdge(simple.Node(x), simple.Node(y)))
			fmt.Fprintf(&facts, "edge(%d, %d).\n", x, y)
		}
		var want []string
		bfs := traverse.BreadthFirst{Visit: func(v graph.Node) { want = append(want, fmt.Sprintf("reach(%d)", v.ID())) }}
		bfs.Walk(g, simple.Node(0), nil)
		sort.Strings(want)

		// Edges as facts: everything reachable is certain.
		src := facts.String() + "reach(0).\nreach(Y) if reach(X), edge(X, Y).\n"
		p, _, err := ground.Ground(context.Background(), "reach.trl", []byte(src), ground.Options{})
		if err != nil {
			t.Fatal(err)
		}
		var got []string
		for _, r := range p.Rules {
			if r.Head != ground.NoAtom && len(r.Pos)+len(r.Neg) == 0 && p.Atoms[r.Head].Pred == "reach" {
				got = append(got, p.AtomString(r.Head))
			} else if r.Head != ground.NoAtom && p.Atoms[r.Head].Pred == "reach" {
				t.Fatalf("rule with a body for a certain atom: %v", r)
			}
		}
		sort.Strings(got)
		if strings.Join(got, " ") != strings.Join(want, " ") {
			t.Fatalf("facts: reach atoms %v, want %v", got, want)
		}

		// Edges open to a choice: the reach atoms are the possible ones.
		src = facts.String() + "choose any of use(X, Y) for edge(X, Y).\nreach(0).\nreach(Y) if reach(X), use(X, Y).\n"
		p, _, err = ground.Ground(context.Background(), "reach.trl", []byte(src), ground.Options{})
		if err != nil {
			t.Fatal(err)
		}
		got = got[:0]
		for a := range p.Atoms {
			if p.Atoms[a].Pred == "reach" {
				got = append(got, p.AtomString(ground.Atom(a)))
			}
		}
		sort.Strings(got)
		if strings.Join(got, " ") != strings.Join(want, " ") {
			t.Fatalf("choice: reach atoms %v, want %v", got, want)
		}
	})
}
