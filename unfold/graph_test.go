package unfold

import (
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// randomShape draws a random digraph of 1 to max vertices, biased to
// pairs of vertices joined both ways.
func randomShape(t *rapid.T, lo, hi int) *shape {
	n := rapid.IntRange(lo, hi).Draw(t, "n")
	s := &shape{name: "random", n: n}
	for i := 0; i < n; i++ {
		for j := i; j < n; j++ {
			if i == j {
				if rapid.IntRange(0, 9).Draw(t, "loop") == 0 {
					s.edge(i, i)
				}
				continue
			}
			switch rapid.IntRange(0, 5).Draw(t, "pair") {
			case 1:
				s.edge(i, j)
			case 2:
				s.edge(j, i)
			case 3:
				s.both(i, j)
			}
		}
	}
	return s
}

// TestComponentsMatchReachability compares the components with mutual
// reachability computed by Warshall's transitive closure (Warshall 1962).
func TestComponentsMatchReachability(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		s := randomShape(t, 1, 12)
		g := s.graph()
		n := s.n
		reach := make([][]bool, n)
		for i := range reach {
			reach[i] = make([]bool, n)
		}
		for k := range s.from {
			reach[s.from[k]][s.to[k]] = true
		}
		for k := 0; k < n; k++ {
			for i := 0; i < n; i++ {
				for j := 0; j < n; j++ {
					if reach[i][k] && reach[k][j] {
						reach[i][j] = true
					}
				}
			}
		}
		for i := 0; i < n; i++ {
			for j := 0; j < n; j++ {
				same := i == j || (reach[i][j] && reach[j][i])
				if got := g.ComponentOf(int32(i)) == g.ComponentOf(int32(j)); got != same {
					t.Fatalf("vertices %d and %d: same component %v, mutual reachability %v", i, j, got, same)
				}
			}
			c := g.ComponentOf(int32(i))
			if g.Cyclic(c) != reach[i][i] {
				t.Fatalf("vertex %d: cyclic %v, on a cycle %v", i, g.Cyclic(c), reach[i][i])
			}
			if !slices.Contains(g.Component(c), int32(i)) {
				t.Fatalf("vertex %d missing from its component", i)
			}
		}
		for k := range s.from {
			if g.ComponentOf(s.from[k]) > g.ComponentOf(s.to[k]) {
				t.Fatalf("edge %d→%d goes back in topological order", s.from[k], s.to[k])
			}
		}
		tight := true
		for i := 0; i < n; i++ {
			tight = tight && !reach[i][i]
		}
		if g.Tight() != tight {
			t.Fatalf("Tight() = %v, want %v", g.Tight(), tight)
		}
	})
}

// TestComponentsLarge runs the iterative Tarjan on a million-vertex chain
// and cycle, which a recursive version could not do on a small stack.
func TestComponentsLarge(t *testing.T) {
	if testing.Short() {
		t.Skip("large graphs")
	}
	const n = 1000000
	from := make([]int32, n-1)
	to := make([]int32, n-1)
	for i := range from {
		from[i], to[i] = int32(i), int32(i+1)
	}
	chain := newGraph(n, from, to)
	if chain.NumComponents() != n || !chain.Tight() {
		t.Fatalf("chain: %d components, tight %v", chain.NumComponents(), chain.Tight())
	}
	for i := 0; i < n; i++ {
		if chain.ComponentOf(int32(i)) != i {
			t.Fatalf("chain vertex %d in component %d, want topological order", i, chain.ComponentOf(int32(i)))
		}
	}
	cycle := newGraph(n, append(from, n-1), append(to, 0))
	if cycle.NumComponents() != 1 || cycle.Tight() || len(cycle.Component(0)) != n {
		t.Fatalf("cycle: %d components", cycle.NumComponents())
	}
}

func TestGraphDeduplicatesEdges(t *testing.T) {
	s := &shape{n: 3}
	s.edge(0, 1)
	s.edge(0, 1)
	s.edge(2, 0)
	s.edge(0, 2)
	g := s.graph()
	if g.Edges() != 3 || !slices.Equal(g.Succ(0), []int32{1, 2}) {
		t.Fatalf("edges %d, successors of 0 %v", g.Edges(), g.Succ(0))
	}
}
