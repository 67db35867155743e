package unfold

import (
	"context"
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/crillab/gophersat/solver"
	"pgregory.net/rapid"
)

// randomDigraph draws a random digraph of lo to hi vertices from a drawn
// seed and density, about deg edges out of each vertex, some of them joined
// both ways and a few self-loops (invented test data).
func randomDigraph(t *rapid.T, lo, hi int) *digraph {
	n := rapid.IntRange(lo, hi).Draw(t, "n")
	deg := rapid.IntRange(1, 8).Draw(t, "deg")
	both := rapid.IntRange(0, 4).Draw(t, "both")
	loops := rapid.Bool().Draw(t, "loops")
	r := rand.New(rand.NewPCG(rapid.Uint64().Draw(t, "seed"), 1))
	var from, to []int32
	for v := 0; v < n; v++ {
		for k := 0; k < deg; k++ {
			w := r.IntN(n)
			if w == v && !loops {
				continue
			}
			from, to = append(from, int32(v)), append(to, int32(w))
			if r.IntN(5) < both {
				from, to = append(from, int32(w)), append(to, int32(v))
			}
		}
	}
	return newDigraph(n, from, to)
}

// isFVS reports whether the vertices x of d meet every cycle.
func isFVS(d *digraph, x []int32) bool {
	removed := make([]bool, d.n)
	for _, v := range x {
		removed[v] = true
	}
	return d.acyclicWithout(removed)
}

// isMinimalFVS reports whether x is a feedback vertex set of d none of
// whose members can be left out.
func isMinimalFVS(d *digraph, x []int32) bool {
	if !isFVS(d, x) {
		return false
	}
	for i := range x {
		if isFVS(d, slices.Delete(slices.Clone(x), i, i+1)) {
			return false
		}
	}
	return true
}

// TestAnnealFVSProperties checks on random digraphs that annealFVS returns
// a minimal feedback vertex set (its budgets do not run out on graphs this
// small), sorted and without repeats, never larger than greedyFVS's, and
// the same set on a second call.
func TestAnnealFVSProperties(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d := randomDigraph(t, 1, 60)
		x := annealFVS(context.Background(), d)
		if !isMinimalFVS(d, x) {
			t.Fatalf("%v is not a minimal feedback vertex set", x)
		}
		if !slices.IsSorted(x) || len(slices.Compact(slices.Clone(x))) != len(x) {
			t.Fatalf("%v is not sorted without repeats", x)
		}
		if g := greedyFVS(d); len(x) > len(g) {
			t.Fatalf("annealFVS found %d vertices, greedyFVS %d", len(x), len(g))
		}
		if again := annealFVS(context.Background(), d); !slices.Equal(x, again) {
			t.Fatalf("second call gave %v, first %v", again, x)
		}
	})
}

// TestMinimalize checks that minimalize, started from no vertex kept,
// leaves a minimal feedback vertex set out, and reports finishing.
func TestMinimalize(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d := randomDigraph(t, 1, 40)
		keep := make([]bool, d.n)
		if !minimalize(context.Background(), d, keep, 1<<30) {
			t.Fatalf("minimalize ran out of a budget it cannot use up")
		}
		var x []int32
		for v, in := range keep {
			if !in {
				x = append(x, int32(v))
			}
		}
		if !isMinimalFVS(d, x) {
			t.Fatalf("%v is not a minimal feedback vertex set", x)
		}
	})
}

// TestReductionsKeepOptimum checks the reductions of Levy and Low (1988)
// against exhaustive search: the vertices they take, together with a
// smallest feedback vertex set of the kernel, form a smallest one of the
// graph (the rules preserve the optimum, as that paper proves).
func TestReductionsKeepOptimum(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d := newDigraphOf(randomShape(t, 1, exactFVSLimit))
		k, orig, taken := reduce(d, reduceWorkPerEdge*(d.edges()+d.n))
		x := slices.Clone(taken)
		for _, v := range exactFVS(k) {
			x = append(x, orig[v])
		}
		want := exactFVS(d)
		if !isFVS(d, x) {
			t.Fatalf("taken %v plus the kernel's set give %v, not a feedback vertex set", taken, x)
		}
		if len(x) != len(want) {
			t.Fatalf("reductions give %d vertices %v, the smallest set has %d: %v", len(x), x, len(want), want)
		}
	})
}

// TestReductionsWithinBudget checks that the reductions stopped at any
// point leave a kernel without self-loops whose minimal feedback vertex
// sets, with the taken vertices, give minimal ones of the graph.
func TestReductionsWithinBudget(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d := newDigraphOf(randomShape(t, 1, exactFVSLimit))
		budget := rapid.IntRange(0, 200).Draw(t, "budget")
		k, orig, taken := reduce(d, budget)
		for v := 0; v < k.n; v++ {
			if slices.Contains(k.succ(int32(v)), int32(v)) {
				t.Fatalf("kernel vertex %d (vertex %d) has a self-loop", v, orig[v])
			}
		}
		x := slices.Clone(taken)
		for _, v := range greedyFVS(k) {
			x = append(x, orig[v])
		}
		if !isMinimalFVS(d, x) {
			t.Fatalf("taken %v plus the kernel's minimal set give %v, not a minimal feedback vertex set", taken, x)
		}
	})
}

// TestAnnealFVSAgainstExact compares annealFVS with exhaustive search on
// small random digraphs, sparse and dense: never smaller (which would be a
// bug), equal when the reductions leave nothing (they keep the optimum),
// and equal in at least 95% of the cases where the annealing had a kernel
// to search (common practice, no source: a threshold that a working search
// clears; the measured rates are logged).
func TestAnnealFVSAgainstExact(t *testing.T) {
	cases, equal, kernels, kernelEqual := 0, 0, 0, 0
	rapid.Check(t, func(t *rapid.T) {
		var d *digraph
		if rapid.Bool().Draw(t, "dense") {
			d = randomDigraph(t, 1, exactFVSLimit)
		} else {
			d = newDigraphOf(randomShape(t, 1, exactFVSLimit))
		}
		x := annealFVS(context.Background(), d)
		want := exactFVS(d)
		if len(x) < len(want) {
			t.Fatalf("annealFVS %v is smaller than the smallest set %v", x, want)
		}
		k, _, _ := reduce(d, reduceWorkPerEdge*(d.edges()+d.n))
		if k.n == 0 && len(x) != len(want) {
			t.Fatalf("empty kernel, yet annealFVS %v is larger than %v", x, want)
		}
		cases++
		if len(x) == len(want) {
			equal++
		}
		if k.n > 0 {
			kernels++
			if len(x) == len(want) {
				kernelEqual++
			}
		}
	})
	t.Logf("annealFVS is smallest in %d of %d cases; %d of the %d with a kernel", equal, cases, kernelEqual, kernels)
	if float64(kernelEqual) < 0.95*float64(kernels) {
		t.Errorf("annealFVS is smallest in only %d of %d cases with a kernel", kernelEqual, kernels)
	}
}

// newDigraphOf returns the digraph of a shape.
func newDigraphOf(s *shape) *digraph { return newDigraph(s.n, s.from, s.to) }

// TestAnnealFVSKnownGraphs checks the size of the set on graphs whose
// smallest feedback vertex set is known.
func TestAnnealFVSKnownGraphs(t *testing.T) {
	var cases []struct {
		s    *shape
		want int
	}
	add := func(s *shape, want int) {
		cases = append(cases, struct {
			s    *shape
			want int
		}{s, want})
	}
	for _, n := range []int{2, 3, 5, 13, 20, 40} {
		// Complete digraph: every two vertices form a 2-cycle, so at
		// most one vertex stays: n−1 (textbook fact, from memory).
		add(completeShape(n), n-1)
	}
	for _, n := range []int{1, 2, 13, 100, 1000} {
		// Directed cycle: one vertex breaks it (textbook fact).
		add(cycleShape(n), 1)
	}
	for _, n := range []int{2, 3, 13, 14, 101, 1000} {
		// Bidirectional path: a set meets every 2-cycle exactly when it
		// is a vertex cover of the path, and a smallest vertex cover of
		// a path of n vertices has ⌊n/2⌋ (textbook fact, from memory).
		add(biPathShape(n), n/2)
	}
	for _, n := range []int{3, 4, 13, 14, 101} {
		// Bidirectional cycle: likewise a smallest vertex cover of the
		// cycle of n vertices, ⌈n/2⌉ (textbook fact, from memory).
		add(ringShape(n), (n+1)/2)
	}
	for _, n := range []int{5, 20, 100} {
		// Bidirectional 2×n and 3×n grids: a smallest vertex cover of a
		// bipartite graph has the size of a largest matching (König's
		// theorem); the grid has a perfect or near-perfect matching, so
		// ⌊kn/2⌋.
		add(gridShape(2, n), n)
		add(gridShape(3, n), 3*n/2)
	}
	for _, c := range cases {
		t.Run(c.s.name, func(t *testing.T) {
			d := newDigraphOf(c.s)
			x := annealFVS(context.Background(), d)
			if !isFVS(d, x) {
				t.Fatalf("%v is not a feedback vertex set", x)
			}
			if len(x) != c.want {
				t.Errorf("annealFVS found %d vertices, want %d", len(x), c.want)
			}
		})
	}
}

// TestAnnealFVSCancelled checks that a cancelled search still returns a
// feedback vertex set.
func TestAnnealFVSCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	for _, s := range []*shape{completeShape(20), randomSparseShape(300, 4), gridShape(3, 30)} {
		d := newDigraphOf(s)
		if x := annealFVS(ctx, d); !isFVS(d, x) {
			t.Errorf("%s: %v is not a feedback vertex set", s.name, x)
		}
	}
}

// denseRandomShape returns a random digraph of n vertices with deg edges
// drawn out of each vertex (invented benchmark data, fixed seed).
func denseRandomShape(n, deg int, seed uint64) *shape {
	r := rand.New(rand.NewPCG(seed, 2))
	s := &shape{name: fmt.Sprintf("random %d deg %d", n, deg), n: n}
	for v := 0; v < n; v++ {
		for k := 0; k < deg; k++ {
			if w := r.IntN(n); w != v {
				s.edge(v, w)
			}
		}
	}
	return s
}

// BenchmarkFVS times annealFVS on the largest component of random digraphs
// (those of BenchmarkUnfold and denser ones) and reports |X|/n for it and,
// in the same run, for greedyFVS, and the share of the vertices left to
// the annealing by the reductions (kernel/n; where it is 0 the set found is
// a smallest one, the reductions keeping the optimum).
func BenchmarkFVS(b *testing.B) {
	shapes := []*shape{
		randomSparseShape(100, 1), randomSparseShape(1000, 2), randomSparseShape(10000, 3),
		denseRandomShape(1000, 3, 5), denseRandomShape(1000, 10, 6),
		denseRandomShape(10000, 3, 7), denseRandomShape(10000, 10, 8),
	}
	for _, s := range shapes {
		g := s.graph()
		d := g.local(g.Component(largestComponent(g)))
		b.Run(s.name, func(b *testing.B) {
			var x []int32
			for b.Loop() {
				x = annealFVS(context.Background(), d)
			}
			greedy := greedyFVS(d)
			k, _, _ := reduce(d, reduceWorkPerEdge*(d.edges()+d.n))
			b.ReportMetric(float64(k.n)/float64(d.n), "kernel/n")
			b.ReportMetric(float64(d.n), "n")
			b.ReportMetric(float64(len(greedy))/float64(d.n), "greedy-X/n")
			b.ReportMetric(float64(len(x))/float64(d.n), "anneal-X/n")
			b.ReportMetric(float64(len(x))/float64(len(greedy)), "X-ratio")
		})
	}
}

// satMinFVS returns the size of a smallest feedback vertex set of d found by
// gophersat's pseudo-Boolean minimisation, from this encoding: x_v (v is
// taken) for each vertex, o_uv (u before v) for each pair u < v with o_vu
// its negation, transitivity o_uv ∧ o_vw → o_uw for each triple, an edge
// u → v needs x_u ∨ x_v ∨ o_uv (a self-loop x_u), and Σ x_v is minimised.
// The kept vertices are then totally ordered with every edge between them
// going forward, which holds exactly when they induce an acyclic graph.
func satMinFVS(d *digraph) int {
	n := d.n
	x := func(v int) int { return v + 1 }
	pair := make([][]int, n)
	next := n + 1
	for u := range pair {
		pair[u] = make([]int, n)
		for v := u + 1; v < n; v++ {
			pair[u][v] = next
			next++
		}
	}
	before := func(u, v int) int {
		if u < v {
			return pair[u][v]
		}
		return -pair[v][u]
	}
	var clauses [][]int
	for u := 0; u < n; u++ {
		for v := 0; v < n; v++ {
			for w := 0; w < n; w++ {
				if u != v && v != w && u != w {
					clauses = append(clauses, []int{-before(u, v), -before(v, w), before(u, w)})
				}
			}
		}
		for _, w := range d.succ(int32(u)) {
			if int(w) == u {
				clauses = append(clauses, []int{x(u)})
			} else {
				clauses = append(clauses, []int{x(u), x(int(w)), before(u, int(w))})
			}
		}
	}
	pb := solver.ParseSliceNb(clauses, next-1)
	lits := make([]solver.Lit, n)
	weights := make([]int, n) // explicit: gophersat v1.4.0 panics sorting nil weights
	for v := range lits {
		lits[v] = solver.IntToLit(int32(x(v)))
		weights[v] = 1
	}
	pb.SetCostFunc(lits, weights)
	return solver.New(pb).Minimize()
}

// TestSATMinFVSAgainstExact checks the encoding of satMinFVS against the
// exhaustive search on small digraphs.
func TestSATMinFVSAgainstExact(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		d := newDigraphOf(randomShape(t, 1, 7))
		if got, want := satMinFVS(d), len(exactFVS(d)); got != want {
			t.Fatalf("gophersat minimum %d, exhaustive search %d", got, want)
		}
	})
}

// TestAnnealFVSAgainstSAT compares annealFVS with an exact minimisation by
// gophersat on random digraphs of 13 to 40 vertices, beyond the exhaustive
// search: never smaller (which would be a bug) and equal in at least 90% of
// the graphs (common practice, no source; the measured rate is logged).
func TestAnnealFVSAgainstSAT(t *testing.T) {
	if testing.Short() {
		t.Skip("exact minimisation")
	}
	r := rand.New(rand.NewPCG(11, 12))
	const graphs = 100
	equal, kernels := 0, 0
	for i := 0; i < graphs; i++ {
		n := 13 + r.IntN(28)
		s := denseRandomShape(n, 2+r.IntN(4), r.Uint64())
		d := newDigraphOf(s)
		got := len(annealFVS(context.Background(), d))
		want := satMinFVS(d)
		if got < want {
			t.Fatalf("graph %d (%d vertices): annealFVS found %d vertices, below the minimum %d", i, n, got, want)
		}
		if got == want {
			equal++
		}
		if k, _, _ := reduce(d, reduceWorkPerEdge*(d.edges()+d.n)); k.n > 0 {
			kernels++
		}
	}
	t.Logf("annealFVS is smallest on %d of %d graphs (%d with a kernel left by the reductions)", equal, graphs, kernels)
	if equal < graphs*9/10 {
		t.Errorf("annealFVS is smallest on only %d of %d graphs", equal, graphs)
	}
}
