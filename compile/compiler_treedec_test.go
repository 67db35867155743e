package compile

import (
	"context"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// eliminationGame plays the elimination game (Rose, Tarjan and Lueker 1976)
// on the graph adj in the given order with an adjacency matrix, and returns
// the width (the largest number of later neighbours of a variable in the
// filled graph) and the elimination tree: the parent of v is its later
// neighbour in the filled graph that is eliminated first, -1 if none (Liu
// 1990, "The role of elimination trees in sparse factorization").
func eliminationGame(adj [][]int32, order []int32) (width int, parent []int32) {
	n := len(adj) - 1
	m := make([][]bool, n+1)
	for v := range m {
		m[v] = make([]bool, n+1)
		for _, u := range adj[v] {
			m[v][u] = true
		}
	}
	pos := make([]int, n+1)
	for i, v := range order {
		pos[v] = i
	}
	parent = make([]int32, n+1)
	for v := range parent {
		parent[v] = -1
	}
	for _, v := range order {
		var later []int32
		for u := 1; u <= n; u++ {
			if m[v][u] && pos[u] > pos[v] {
				later = append(later, int32(u))
			}
		}
		width = max(width, len(later))
		for _, a := range later {
			if parent[v] < 0 || pos[a] < pos[parent[v]] {
				parent[v] = a
			}
			for _, b := range later {
				if a != b {
					m[a][b] = true
				}
			}
		}
	}
	return width, parent
}

// fillOf counts the missing edges among the neighbours of v.
func fillOf(adj [][]int32, v int32) int {
	fill := 0
	for i, a := range adj[v] {
		for _, b := range adj[v][i+1:] {
			if _, ok := slices.BinarySearch(adj[a], b); !ok {
				fill++
			}
		}
	}
	return fill
}

// TestEliminationOrder checks the elimination order, its width and the
// elimination tree against the elimination game played naively, on random
// formulas, with and without the fallback to least degree.
func TestEliminationOrder(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		f := randomCNF(t)
		adj := dcPrimal(f)
		// Two variables are adjacent exactly when they share a clause
		// (the random clauses are short, so every clause is a clique).
		for v := 1; v <= f.NumVars; v++ {
			for u := 1; u <= f.NumVars; u++ {
				share := false
				for i := 0; i < f.NumClauses() && u != v; i++ {
					hasU, hasV := false, false
					for _, l := range f.Clause(i) {
						hasU = hasU || int(l.Var()) == u
						hasV = hasV || int(l.Var()) == v
					}
					share = share || hasU && hasV
				}
				if _, ok := slices.BinarySearch(adj[v], int32(u)); ok != share {
					t.Fatalf("primal graph: %d and %d adjacent %v, share a clause %v", v, u, ok, share)
				}
			}
		}
		budget := rapid.SampledFrom([]int{0, 20, dcWorkBudget}).Draw(t, "budget")
		order, width, err := dcOrder(context.Background(), adj, budget)
		if err != nil {
			t.Fatal(err)
		}
		sorted := slices.Clone(order)
		slices.Sort(sorted)
		for i, v := range sorted {
			if v != int32(i+1) {
				t.Fatalf("order %v is not a permutation of 1..%d", order, f.NumVars)
			}
		}
		wantWidth, wantParent := eliminationGame(adj, order)
		if width != wantWidth {
			t.Fatalf("width %d, the elimination game gives %d", width, wantWidth)
		}
		parent := dcTree(adj, order)
		if !slices.Equal(parent, wantParent) {
			t.Fatalf("elimination tree %v, want %v", parent, wantParent)
		}
		if budget == dcWorkBudget && len(order) > 0 {
			// The first variable eliminated has the least fill.
			least := fillOf(adj, order[0])
			for v := int32(1); v <= int32(f.NumVars); v++ {
				if fillOf(adj, v) < least {
					t.Fatalf("variable %d eliminated first with fill %d, but %d has fill %d", order[0], least, v, fillOf(adj, v))
				}
			}
		}
		depth, height := dcDepths(order, parent)
		for v := int32(1); v <= int32(f.NumVars); v++ {
			want := int32(0)
			if parent[v] >= 0 {
				want = depth[parent[v]] + 1
			}
			if depth[v] != want || int(depth[v]) >= height {
				t.Fatalf("depth of %d is %d (height %d), want %d", v, depth[v], height, want)
			}
		}
	})
}

// TestEliminationOrderLarge checks the elimination order and tree against
// the elimination game on formulas with more than dcChainMax variables, where
// past the work budget the elimination goes on by least degree.
func TestEliminationOrderLarge(t *testing.T) {
	for _, tc := range []struct {
		vars   int
		ratio  float64
		seed   uint64
		budget int
	}{
		{300, 1.2, 1, 0},
		{300, 1.2, 2, 5_000},
		{400, 0.8, 3, 0},
		{400, 0.8, 4, dcWorkBudget},
	} {
		f := randomBenchCNF(tc.vars, tc.ratio, tc.seed)
		adj := dcPrimal(f)
		order, width, err := dcOrder(context.Background(), adj, tc.budget)
		if err != nil {
			t.Fatal(err)
		}
		wantWidth, wantParent := eliminationGame(adj, order)
		if width != wantWidth {
			t.Errorf("%d variables, budget %d: width %d, the elimination game gives %d", tc.vars, tc.budget, width, wantWidth)
		}
		if !slices.Equal(dcTree(adj, order), wantParent) {
			t.Errorf("%d variables, budget %d: the elimination tree differs from the elimination game's", tc.vars, tc.budget)
		}
	}
}
