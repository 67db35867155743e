package compile

import (
	"context"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
	"pgregory.net/rapid"

	"trellis/ground"
	"trellis/internal/brute"
)

// TestProgramCount checks on random tight programs that the circuit of
// Program has as many models as the brute-force oracle finds stable models,
// that every model of the completion satisfies it, that it is a valid smooth
// decision-DNNF (Verify), and that it carries the completion's metadata.
func TestProgramCount(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := cptTighten(brute.Program(cptAllOptions).Draw(t, "program"))
		c, _, err := Program(context.Background(), p, Options{})
		if err != nil {
			t.Fatalf("Program: %v", err)
		}
		if err := Verify(c); err != nil {
			t.Fatalf("Verify: %v", err)
		}
		want := len(brute.StableModels(p))
		if got := Count(c); !got.IsInt64() || got.Int64() != int64(want) {
			t.Fatalf("circuit has %v models, want %d stable models", got, want)
		}
		e, err := Complete(p)
		if err != nil {
			t.Fatal(err)
		}
		// Every model of the CNF is a model of the circuit; with equal
		// counts the two have the same models.
		cptEnum(&e.CNF, func(a []int8) {
			if !Eval(c, c.Root, func(v Var) bool { return a[v] > 0 }) {
				t.Fatalf("a model of the CNF is not a model of the circuit")
			}
		})
		if diff := cmp.Diff(e.Meta, c.Meta); diff != "" {
			t.Fatalf("meta (-completion +circuit):\n%s", diff)
		}
	})
}

// TestProgramNotTight checks that Program refuses a positive cycle with an
// error that names it.
func TestProgramNotTight(t *testing.T) {
	p := cptAtoms("a", "b")
	p.Rules = []ground.Rule{{Head: 0, Pos: []ground.Atom{1}}, {Head: 1, Pos: []ground.Atom{0}}}
	_, _, err := Program(context.Background(), p, Options{})
	if err == nil || !strings.Contains(err.Error(), "not tight: positive cycle a -> b -> a") {
		t.Fatalf("error %v, want one naming the positive cycle", err)
	}
}
