package brute

import (
	"testing"

	"github.com/google/go-cmp/cmp"
	"pgregory.net/rapid"

	"trellis/ground"
)

// build makes a program over atoms a, b, c, ... (0-arity).
func build(n int) (*ground.Program, []ground.Atom) {
	p := &ground.Program{}
	atoms := make([]ground.Atom, n)
	for i := range atoms {
		atoms[i] = p.AddAtom(string(rune('a'+i)), nil)
	}
	return p, atoms
}

func TestStableModelsTextbook(t *testing.T) {
	type rule = ground.Rule
	r := func(h ground.Atom, pos, neg []ground.Atom) rule { return rule{Head: h, Pos: pos, Neg: neg} }
	A := func(i int) ground.Atom { return ground.Atom(i) }
	tests := []struct {
		name  string
		n     int
		rules []rule
		ch    []ground.Choice
		want  []string
	}{
		// Gelfond and Lifschitz (1988): p :- not q. q :- not p. has two
		// stable models, {p} and {q}.
		{"even negative loop", 2, []rule{r(A(0), nil, []ground.Atom{A(1)}), r(A(1), nil, []ground.Atom{A(0)})}, nil, []string{"01", "10"}},
		// p :- not p. has no stable model (standard example, from memory).
		{"odd negative loop", 1, []rule{r(A(0), nil, []ground.Atom{A(0)})}, nil, nil},
		// A positive loop supports nothing: p :- q. q :- p. has the single
		// stable model {} (unlike its completion, which also has {p, q}).
		{"positive loop", 2, []rule{r(A(0), []ground.Atom{A(1)}, nil), r(A(1), []ground.Atom{A(0)}, nil)}, nil, []string{"00"}},
		// A fact feeding a loop: a. b :- a. b :- c. c :- b.
		{"fed loop", 3, []rule{r(A(0), nil, nil), r(A(1), []ground.Atom{A(0)}, nil), r(A(1), []ground.Atom{A(2)}, nil), r(A(2), []ground.Atom{A(1)}, nil)}, nil, []string{"111"}},
		// choose exactly 1 of a; b: two models.
		{"exactly one", 2, nil, []ground.Choice{{Elements: []ground.Atom{A(0), A(1)}, Lower: 1, Upper: 1}}, []string{"01", "10"}},
		// choose any of a; b: four models.
		{"any", 2, nil, []ground.Choice{{Elements: []ground.Atom{A(0), A(1)}, Upper: ground.NoUpper}}, []string{"00", "01", "10", "11"}},
		// choose any of a if c; c not derivable: only the empty model.
		{"choice body false", 3, nil, []ground.Choice{{Elements: []ground.Atom{A(0)}, Upper: ground.NoUpper, Pos: []ground.Atom{A(2)}}}, []string{"000"}},
		// Bound counts derived elements too: a. choose at most 0 of a: no model.
		{"bound counts derived", 1, []rule{r(A(0), nil, nil)}, []ground.Choice{{Elements: []ground.Atom{A(0)}, Upper: 0}}, nil},
		// Constraint: choose any of a; forbid not a: only {a}.
		{"constraint", 1, []rule{r(ground.NoAtom, nil, []ground.Atom{A(0)})}, []ground.Choice{{Elements: []ground.Atom{A(0)}, Upper: ground.NoUpper}}, []string{"1"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p, _ := build(tc.n)
			p.Rules = tc.rules
			p.Choices = tc.ch
			got := Restrict(StableModels(p), tc.n)
			if len(got) == 0 {
				got = nil
			}
			if diff := cmp.Diff(tc.want, got); diff != "" {
				t.Errorf("models (-want +got):\n%s", diff)
			}
		})
	}
}

func TestAggregateHolds(t *testing.T) {
	p, at := build(3)
	// min over nothing is +infinity: min < 5 fails, min > 5 holds.
	g := ground.Aggregate{Kind: ground.Min, Elements: []ground.WeightedAtom{{Atom: at[0], Weight: 3}, {Atom: at[1], Weight: 7}}, Op: ground.Lt, Bound: 5}
	none := func(ground.Atom) bool { return false }
	if g.Holds(none) {
		t.Error("min of nothing < 5 should be false")
	}
	g.Op = ground.Gt
	if !g.Holds(none) {
		t.Error("min of nothing > 5 should be true")
	}
	g.Kind, g.Op = ground.Sum, ground.Eq
	g.Bound = 10
	all := func(ground.Atom) bool { return true }
	if !g.Holds(all) {
		t.Error("3 + 7 = 10 should hold")
	}
	_ = p
}

// TestGeneratorWithinLimits checks that generated programs stay small enough
// for the enumerator and that every model satisfies the constraints.
func TestGeneratorWithinLimits(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := Program(Options{Choices: true, Aggregates: true, Penalties: true, Constraints: true, Negation: true}).Draw(t, "program")
		s := Summarize(p)
		for i, m := range s.Models {
			if !satisfiesConstraints(p, m) {
				t.Fatalf("model %d violates a constraint", i)
			}
		}
		if len(s.Models) > 0 && s.Ties < 1 {
			t.Fatal("no model reaches the optimum")
		}
	})
}
