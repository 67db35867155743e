package compile

import (
	"context"
	"errors"
	"strings"
	"testing"
)

// countdownCtx is a context whose Err reports an expired deadline after a
// given number of calls, so tests stop compilation at a chosen point
// without depending on the clock.
type countdownCtx struct {
	context.Context
	calls int
}

func (c *countdownCtx) Err() error {
	c.calls--
	if c.calls < 0 {
		return context.DeadlineExceeded
	}
	return nil
}

func TestNodeLimit(t *testing.T) {
	_, _, err := Compile(context.Background(), queensCNF(8), Options{MaxNodes: 50})
	if err == nil {
		t.Fatal("Compile succeeded beyond the node limit")
	}
	if !errors.Is(err, ErrNodeLimit) {
		t.Errorf("error %q does not match ErrNodeLimit", err)
	}
	for _, want := range []string{"node limit of 50 nodes", "estimated width", "--max-nodes"} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q does not contain %q", err, want)
		}
	}
	// The same formula within a sufficient limit compiles.
	if _, _, err := Compile(context.Background(), queensCNF(8), Options{MaxNodes: 1_000_000}); err != nil {
		t.Errorf("Compile within the limit: %v", err)
	}
}

func TestContextStops(t *testing.T) {
	tests := []struct {
		name  string
		calls int // calls to Err that succeed
		want  string
	}{
		{"during the decomposition", 0, "compilation stopped at the time limit while computing a tree decomposition"},
		{"during the search", 3, "compilation stopped at the time limit after"},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			ctx := &countdownCtx{context.Background(), tt.calls}
			_, _, err := Compile(ctx, queensCNF(10), Options{})
			if err == nil {
				t.Fatal("Compile succeeded with an expired context")
			}
			if !strings.Contains(err.Error(), tt.want) || !strings.Contains(err.Error(), "estimated width") && tt.calls > 0 {
				t.Errorf("error %q, want it to contain %q and the estimated width", err, tt.want)
			}
			if !errors.Is(err, context.DeadlineExceeded) {
				t.Errorf("error %v does not wrap context.DeadlineExceeded", err)
			}
		})
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, _, err := Compile(ctx, queensCNF(6), Options{})
	if !errors.Is(err, context.Canceled) || !strings.Contains(err.Error(), "compilation cancelled") {
		t.Errorf("cancelled context: error %v", err)
	}
}

// TestEdgeCases covers formulas without clauses, with an empty clause, with
// contradictory units and with variables in no clause.
func TestEdgeCases(t *testing.T) {
	tests := []struct {
		name    string
		vars    int
		clauses [][]Lit
		want    int64 // 2^vars for no clause, 0 for an empty clause: by definition
	}{
		{"no variables", 0, nil, 1},
		{"no clauses", 5, nil, 32},
		{"empty clause", 3, [][]Lit{{1, 2}, {}}, 0},
		{"contradictory units", 3, [][]Lit{{2}, {-2}}, 0},
		{"units only", 4, [][]Lit{{2}, {-3}}, 4},
		{"tautology", 2, [][]Lit{{1, -1}}, 4},
		{"unused variables", 6, [][]Lit{{1, 2}}, 3 * 16},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f := &CNF{NumVars: tt.vars}
			for _, c := range tt.clauses {
				f.AddClause(c...)
			}
			c, _, err := Compile(context.Background(), f, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if err := Verify(c); err != nil {
				t.Fatal(err)
			}
			if got := Count(c); got.Int64() != tt.want || !got.IsInt64() {
				t.Errorf("Count = %v, want %d", got, tt.want)
			}
		})
	}
	// Literals outside the variables are an error, not a crash.
	f := &CNF{NumVars: 2}
	f.AddClause(1, 3)
	if _, _, err := Compile(context.Background(), f, Options{}); err == nil {
		t.Error("Compile accepted literal 3 over 2 variables")
	}
}

// TestCountBig checks the big-integer path of Count: a formula with no
// single clause (x1 ∨ x2) over 100 variables has 3 · 2^98 models.
func TestCountBig(t *testing.T) {
	f := &CNF{NumVars: 100}
	f.AddClause(1, 2)
	c, _, err := Compile(context.Background(), f, Options{})
	if err != nil {
		t.Fatal(err)
	}
	got := Count(c)
	want := dpllCount(f)
	if got.Cmp(want) != 0 {
		t.Errorf("Count = %v, want %v", got, want)
	}
}
