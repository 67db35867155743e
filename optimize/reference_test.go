package optimize_test

import (
	"context"
	"fmt"
	"math"
	"math/big"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/crillab/gophersat/solver"
	"gonum.org/v1/gonum/graph/path"
	"gonum.org/v1/gonum/graph/simple"
	"gonum.org/v1/gonum/mat"

	"trellis/compile"
	"trellis/ground"
	"trellis/internal/brute"
	"trellis/optimize"
)

// compileSource runs a model in the rule language through grounding,
// unfolding and compilation.
func compileSource(t testing.TB, src string) *compile.Circuit {
	t.Helper()
	p, _, err := ground.Ground(context.Background(), "model.trl", []byte(src), ground.Options{})
	if err != nil {
		t.Fatalf("ground: %v\n%s", err, src)
	}
	return compileProgram(t, p)
}

func solveSource(t testing.TB, src string, q optimize.Query) *optimize.Result {
	t.Helper()
	c := compileSource(t, src)
	res, err := optimize.Solve(context.Background(), c, q)
	if err != nil {
		t.Fatalf("solve: %v", err)
	}
	return res
}

type edge struct{ u, v, w int }

// spanningModel writes the model that buys edges so that every node is
// reachable from node 1, paying each bought edge's weight.
func spanningModel(n int, edges []edge) string {
	var b strings.Builder
	fmt.Fprintf(&b, "node(1..%d).\n", n)
	for _, e := range edges {
		fmt.Fprintf(&b, "edge(%d, %d, %d).\n", e.u, e.v, e.w)
	}
	b.WriteString(`
choose any of buy(X, Y) for edge(X, Y, _).
link(X, Y) if buy(X, Y).
link(Y, X) if buy(X, Y).
reach(1).
reach(Y) if reach(X), link(X, Y).
forbid node(X), not reach(X).
penalty W if buy(X, Y), edge(X, Y, W).
display buy/2.
`)
	return b.String()
}

// randomConnected draws a connected graph on nodes 1..n: a random tree plus
// extra random edges, with weights in 1..maxW.
func randomConnected(r *rand.Rand, n, extra, maxW int) []edge {
	has := map[[2]int]bool{}
	var edges []edge
	add := func(u, v int) {
		if u > v {
			u, v = v, u
		}
		if u == v || has[[2]int{u, v}] {
			return
		}
		has[[2]int{u, v}] = true
		edges = append(edges, edge{u, v, 1 + r.IntN(maxW)})
	}
	for v := 2; v <= n; v++ {
		add(1+r.IntN(v-1), v)
	}
	for range extra {
		add(1+r.IntN(n), 1+r.IntN(n))
	}
	return edges
}

// kruskal is the weight of a minimum spanning tree by gonum's Kruskal.
func kruskal(n int, edges []edge) float64 {
	g := simple.NewWeightedUndirectedGraph(0, math.Inf(1))
	for v := 1; v <= n; v++ {
		g.AddNode(simple.Node(v))
	}
	for _, e := range edges {
		g.SetWeightedEdge(g.NewWeightedEdge(simple.Node(e.u), simple.Node(e.v), float64(e.w)))
	}
	dst := simple.NewWeightedUndirectedGraph(0, math.Inf(1))
	return path.Kruskal(dst, g)
}

// spanningTrees counts the spanning trees of a simple graph by Kirchhoff's
// matrix-tree theorem: the determinant of the Laplacian without its first
// row and column (gonum mat.Det, rounded).
func spanningTrees(n int, edges []edge) int64 {
	lap := mat.NewDense(n-1, n-1, nil)
	for _, e := range edges {
		for _, x := range [][2]int{{e.u, e.v}, {e.v, e.u}} {
			if a := x[0] - 2; a >= 0 {
				lap.Set(a, a, lap.At(a, a)+1)
				if b := x[1] - 2; b >= 0 {
					lap.Set(a, b, lap.At(a, b)-1)
				}
			}
		}
	}
	return int64(math.Round(mat.Det(lap)))
}

// Minimum spanning trees: the optimum of the spanning model equals the
// weight of gonum's Kruskal tree on random connected graphs.
func TestSpanningTreeAgainstKruskal(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	sizes := []int{5, 6, 7, 8}
	if !testing.Short() {
		sizes = append(sizes, 9, 10, 11, 12)
	}
	for _, n := range sizes {
		for trial := 0; trial < 2; trial++ {
			extra := n/2 + trial*n // denser graphs unfold into larger programs
			if n > 10 {
				extra = n/2 + trial
			}
			edges := randomConnected(r, n, extra, 9)
			t.Run(fmt.Sprintf("n%d-%d", n, trial), func(t *testing.T) {
				src := spanningModel(n, edges)
				res := solveSource(t, src, optimize.Query{})
				want := kruskal(n, edges)
				if res.Status != optimize.StatusOptimal || len(res.Cost) != 1 || float64(res.Cost[0].Value) != want {
					upstream(t, src, res)
					t.Errorf("edges %v: cost %v, Kruskal %v", edges, res.Cost, want)
				}
			})
		}
	}
}

// With unit weights the optimal configurations are the spanning trees, so
// the tie count is the number of spanning trees: n^(n-2) for the complete
// graph K_n (Cayley's formula) and the matrix-tree determinant (Kirchhoff's
// theorem) for random graphs.
func TestSpanningTreeCounts(t *testing.T) {
	maxK := 5
	if !testing.Short() {
		maxK = 7
	}
	for n := 2; n <= maxK; n++ {
		t.Run(fmt.Sprintf("K%d", n), func(t *testing.T) {
			var edges []edge
			for u := 1; u <= n; u++ {
				for v := u + 1; v <= n; v++ {
					edges = append(edges, edge{u, v, 1})
				}
			}
			src := spanningModel(n, edges)
			res := solveSource(t, src, optimize.Query{})
			// Cayley's formula
			want := new(big.Int).Exp(big.NewInt(int64(n)), big.NewInt(int64(n-2)), nil)
			if res.Ties.Cmp(want) != 0 || res.Cost[0].Value != int64(n-1) {
				upstream(t, src, res)
				t.Errorf("%s trees of cost %v, want %s of cost %d", res.Ties, res.Cost, want, n-1)
			}
		})
	}
	r := rand.New(rand.NewPCG(3, 4))
	sizes := []int{5, 6, 7, 8}
	if !testing.Short() {
		sizes = append(sizes, 9, 10)
	}
	for _, n := range sizes {
		edges := randomConnected(r, n, n/2+1, 1)
		t.Run(fmt.Sprintf("n%d", n), func(t *testing.T) {
			src := spanningModel(n, edges)
			res := solveSource(t, src, optimize.Query{})
			if want := spanningTrees(n, edges); res.Ties.Cmp(big.NewInt(want)) != 0 {
				upstream(t, src, res)
				t.Errorf("edges %v: %s optimal configurations, Kirchhoff %d", edges, res.Ties, want)
			}
		})
	}
}

// upstream fails a test whose circuit does not have the source model's
// stable models (counted by enumeration), saying that the fault lies before
// this package, in unfolding or compilation. It returns when the circuit is
// faithful, so a wrong answer after it is this package's fault.
func upstream(t *testing.T, src string, res *optimize.Result) {
	t.Helper()
	p, _, err := ground.Ground(context.Background(), "model.trl", []byte(src), ground.Options{})
	if err != nil {
		t.Fatal(err)
	}
	if n := len(brute.StableModels(p)); res.Total.Cmp(big.NewInt(int64(n))) != 0 {
		t.Fatalf("the circuit has %s models, the source model %d stable models: a fault before optimize (unfolding or compilation)", res.Total, n)
	}
}

// coverModel is a tight model: take items so that every element is covered,
// never two conflicting items, paying each item's cost at priority 0 and 1
// at priority 1 for every risky item.
type coverModel struct {
	items, elems int
	cost         []int
	risky        []bool
	covers       [][]int // per element, the items covering it
	conflicts    [][2]int
}

func randomCover(r *rand.Rand, items, elems int) *coverModel {
	m := &coverModel{items: items, elems: elems}
	for i := 0; i < items; i++ {
		m.cost = append(m.cost, 1+r.IntN(9))
		m.risky = append(m.risky, r.IntN(3) == 0)
	}
	for e := 0; e < elems; e++ {
		cov := []int{r.IntN(items)}
		for i := 0; i < items; i++ {
			if r.IntN(4) == 0 && i != cov[0] {
				cov = append(cov, i)
			}
		}
		m.covers = append(m.covers, cov)
	}
	for range items / 2 {
		i, j := r.IntN(items), r.IntN(items)
		if i != j {
			m.conflicts = append(m.conflicts, [2]int{i, j})
		}
	}
	return m
}

func (m *coverModel) source() string {
	var b strings.Builder
	for i := 0; i < m.items; i++ {
		fmt.Fprintf(&b, "item(%d). cost(%d, %d).\n", i, i, m.cost[i])
		if m.risky[i] {
			fmt.Fprintf(&b, "risky(%d).\n", i)
		}
	}
	for e, cov := range m.covers {
		fmt.Fprintf(&b, "elem(%d).\n", e)
		for _, i := range cov {
			fmt.Fprintf(&b, "covers(%d, %d).\n", i, e)
		}
	}
	for _, c := range m.conflicts {
		fmt.Fprintf(&b, "conflict(%d, %d).\n", c[0], c[1])
	}
	b.WriteString(`
choose any of take(I) for item(I).
covered(E) if take(I), covers(I, E).
forbid elem(E), not covered(E).
forbid take(I), take(J), conflict(I, J).
penalty C if take(I), cost(I, C).
penalty 1 at priority 1 if take(I), risky(I).
display take/1.
`)
	return b.String()
}

// opb writes the same problem as pseudo-Boolean constraints, independently
// of the rule language: x_{i+1} is "take item i"; the two priorities are
// folded into one objective with the factor M = Σ cost + 1.
func (m *coverModel) opb() (string, int) {
	var b strings.Builder
	big := 1
	for _, c := range m.cost {
		big += c
	}
	b.WriteString("min:")
	for i := 0; i < m.items; i++ {
		w := m.cost[i]
		if m.risky[i] {
			w += big
		}
		fmt.Fprintf(&b, " +%d x%d", w, i+1)
	}
	b.WriteString(" ;\n")
	for _, cov := range m.covers {
		for _, i := range cov {
			fmt.Fprintf(&b, "+1 x%d ", i+1)
		}
		b.WriteString(">= 1 ;\n")
	}
	for _, c := range m.conflicts {
		fmt.Fprintf(&b, "-1 x%d -1 x%d >= -1 ;\n", c[0]+1, c[1]+1)
	}
	return b.String(), big
}

// On random tight models the optimum equals gophersat's pseudo-Boolean
// optimisation of the same problem.
func TestCoverAgainstGophersat(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 6))
	trials := 20
	if testing.Short() {
		trials = 8
	}
	for trial := 0; trial < trials; trial++ {
		m := randomCover(r, 6+r.IntN(6), 3+r.IntN(5))
		res := solveSource(t, m.source(), optimize.Query{})
		text, factor := m.opb()
		pb, err := solver.ParseOPB(strings.NewReader(text))
		if err != nil {
			t.Fatalf("opb: %v\n%s", err, text)
		}
		want := solver.New(pb).Minimize()
		if want < 0 {
			if res.Status != optimize.StatusNone {
				t.Errorf("trial %d: status %s, gophersat finds no solution", trial, res.Status)
			}
			continue
		}
		if res.Status != optimize.StatusOptimal {
			t.Errorf("trial %d: status %s, gophersat finds cost %d\n%s", trial, res.Status, want, m.source())
			continue
		}
		var got int64
		for _, c := range res.Cost {
			switch c.Priority {
			case 1:
				got += c.Value * int64(factor)
			case 0:
				got += c.Value
			}
		}
		if got != int64(want) {
			t.Errorf("trial %d: cost %v (folded %d), gophersat %d\n%s", trial, res.Cost, got, want, m.source())
		}
	}
}
