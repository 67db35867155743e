package compile_test

import (
	"context"
	"fmt"
	"testing"

	"trellis/compile"
	"trellis/ground"
	"trellis/unfold"
)

// connectedModel chooses any set of edges of the complete graph on n nodes
// and requires every node to be reachable from node 1 by a recursive rule,
// so its configurations are the connected labelled graphs on n nodes.
const connectedModel = `
param n = 4.
node(1..n).
choose any of edge(A, B) for node(A), node(B), A < B.
reach(1).
reach(B) if reach(A), edge(A, B).
reach(A) if reach(B), edge(A, B).
forbid node(X), not reach(X).
`

// TestConnectedGraphs counts connected labelled graphs end to end (ground,
// unfold, complete, compile, count) against OEIS A001187.
func TestConnectedGraphs(t *testing.T) {
	want := []int64{1, 1, 4, 38, 728, 26704, 1866256} // OEIS A001187, n = 1..7
	for n := 1; n <= len(want); n++ {
		if n > 6 && testing.Short() {
			break
		}
		t.Run(fmt.Sprint(n), func(t *testing.T) {
			ctx := context.Background()
			p, _, err := ground.Ground(ctx, "connected.trl", []byte(connectedModel),
				ground.Options{Params: map[string]string{"n": fmt.Sprint(n)}})
			if err != nil {
				t.Fatal(err)
			}
			u, _, err := unfold.Unfold(ctx, p, unfold.Options{})
			if err != nil {
				t.Fatal(err)
			}
			c, _, err := compile.Program(ctx, u, compile.Options{})
			if err != nil {
				t.Fatal(err)
			}
			if got := compile.Count(c); !got.IsInt64() || got.Int64() != want[n-1] {
				t.Errorf("n = %d: %v connected graphs, want %d", n, got, want[n-1])
			}
		})
	}
}
