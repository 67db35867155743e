package grammar

import (
	"fmt"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
)

func TestInspect(t *testing.T) {
	src := `p(X, f(Y)) if q(X), not r(Y, _), X < Y + 1, count(Z : s(Z, X)) > -W.
choose exactly N of a(X) for b(X); c if d(N).
penalty C at priority P per X if e(C, P, X).
param k = 2 * 3.
display a/1, c/0.
include "x.trl".
`
	f, err := ParseFile("w.trl", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	var vars []string
	Inspect(f, func(n Node) bool {
		if v, ok := n.(*Variable); ok {
			vars = append(vars, v.Name)
		}
		return true
	})
	want := strings.Fields("X Y X Y _ X Y Z Z X W N X X N C P X C P X")
	if diff := cmp.Diff(want, vars); diff != "" {
		t.Errorf("variables differ (-want +got):\n%s", diff)
	}

	// Every node kind is visited, in source order.
	var kinds []string
	Inspect(f.Statements[1], func(n Node) bool {
		kinds = append(kinds, strings.TrimPrefix(fmt.Sprintf("%T", n), "*grammar."))
		return true
	})
	wantKinds := strings.Fields("Choice Variable ChoiceElement Atom Variable AtomLiteral Atom Variable ChoiceElement Atom AtomLiteral Atom Variable")
	if diff := cmp.Diff(wantKinds, kinds); diff != "" {
		t.Errorf("node kinds differ (-want +got):\n%s", diff)
	}

	// Returning false skips the children.
	var aggregates, inside int
	Inspect(f, func(n Node) bool {
		switch n.(type) {
		case *Aggregate:
			aggregates++
			return false
		case *Variable:
			if n.Position().Line == 1 && n.Position().Column > 50 {
				inside++
			}
		}
		return true
	})
	if aggregates != 1 || inside != 0 {
		t.Errorf("aggregates %d, variables visited inside %d; want 1 and 0", aggregates, inside)
	}

	var refs []string
	Inspect(f, func(n Node) bool {
		switch n := n.(type) {
		case *PredicateRef:
			refs = append(refs, n.String())
		case *Include:
			refs = append(refs, n.Path)
		}
		return true
	})
	if diff := cmp.Diff([]string{"a/1", "c/0", "x.trl"}, refs); diff != "" {
		t.Errorf("display and include differ (-want +got):\n%s", diff)
	}
}
