package unfold

import (
	"context"
	"testing"

	"pgregory.net/rapid"

	"trellis/ground"
)

// TestEntries checks which atoms count as entries of their component.
func TestEntries(t *testing.T) {
	p := &ground.Program{}
	a := p.AddAtom("a", nil)
	b := p.AddAtom("b", nil)
	c := p.AddAtom("c", nil)
	d := p.AddAtom("d", nil)
	e := p.AddAtom("e", nil)
	x := p.AddAtom("x", nil)
	p.Rules = []ground.Rule{
		{Head: a, Pos: []ground.Atom{b}},
		{Head: b, Pos: []ground.Atom{a}},
		{Head: a, Neg: []ground.Atom{c}},    // a: derivable from outside
		{Head: b, Pos: []ground.Atom{a, x}}, // x is outside the cycle, a inside: not an entry rule
		{Head: c, Pos: []ground.Atom{d}},    // c, d, e: a second cycle
		{Head: d, Pos: []ground.Atom{c}},
		{Head: d, Pos: []ground.Atom{e}},
		{Head: e, Pos: []ground.Atom{d}},
	}
	p.Choices = []ground.Choice{{Elements: []ground.Atom{e}, Pos: []ground.Atom{a}, Upper: ground.NoUpper}} // e: entry by the choice
	g := NewGraph(p)
	for _, tc := range []struct {
		atom ground.Atom
		want bool
	}{{a, true}, {b, false}, {c, false}, {d, false}, {e, true}, {x, false}} {
		if got := g.Entry(int32(tc.atom)); got != tc.want {
			t.Errorf("Entry(%s) = %v, want %v", p.AtomString(tc.atom), got, tc.want)
		}
	}
	// Built from edges alone, every atom is an entry.
	if !gridShape(2, 2).graph().Entry(0) {
		t.Error("an edge-list graph has a non-entry")
	}
}

// TestSequencesHoldPathsFromEntries checks, on random cyclic programs, that
// every sequence the search returns holds every simple path from an entry,
// and counts the components where entries are fewer than atoms and the
// sequence is shorter than one holding every simple path would need to be
// (some simple path not from an entry is missing), so that the weaker
// condition is in fact used; the stable models of the unfolded programs are
// checked against brute force by TestUnfoldPreservesStableModelsCyclic.
func TestSequencesHoldPathsFromEntries(t *testing.T) {
	fewer, weaker := 0, 0
	rapid.Check(t, func(t *rapid.T) {
		p := cyclicProgram().Draw(t, "program")
		g := NewGraph(p)
		for c := 0; c < g.NumComponents(); c++ {
			if !g.Cyclic(c) {
				continue
			}
			comp := g.Component(c)
			seq, how := Sequence(context.Background(), g, comp, Options{})
			if !bruteValidFrom(g, comp, seq, g.Entry) {
				t.Fatalf("%s sequence %v misses a simple path from an entry of %v", how, seq, comp)
			}
			entries := 0
			for _, v := range comp {
				if g.Entry(v) {
					entries++
				}
			}
			if entries < len(comp) {
				fewer++
				if !bruteValid(g, comp, seq) {
					weaker++
				}
			}
		}
	})
	t.Logf("%d components with fewer entries than atoms, %d of them with a sequence that misses some other path", fewer, weaker)
	if weaker == 0 {
		t.Fatal("the search never used the weaker condition")
	}
}

// TestUnfoldWithoutEntries checks that a component no derivation can enter
// gets no copies, and its atoms no rules: they are false in every model.
func TestUnfoldWithoutEntries(t *testing.T) {
	p := &ground.Program{}
	a := p.AddAtom("a", nil)
	b := p.AddAtom("b", nil)
	p.Rules = []ground.Rule{{Head: a, Pos: []ground.Atom{b}}, {Head: b, Pos: []ground.Atom{a}}}
	q, rep, err := Unfold(context.Background(), p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if rep.TotalCopies != 0 || len(q.Rules) != 0 {
		t.Fatalf("%d copies and rules %v, want none", rep.TotalCopies, q.Rules)
	}
}
