package unfold

import (
	"context"
	"slices"
	"strings"
	"testing"

	"pgregory.net/rapid"

	"trellis/ground"
	"trellis/internal/brute"
)

// cyclicProgram generates small programs whose positive dependency graphs
// are random digraphs of 3 to 7 atoms biased to positive cycles (many pairs
// of atoms depend on each other both ways), with negation, facts, choices
// (bounded or not, with bodies on the cycles) and constraints. Invented
// data for property tests.
func cyclicProgram() *rapid.Generator[*ground.Program] {
	return rapid.Custom(func(t *rapid.T) *ground.Program {
		p := &ground.Program{}
		n := rapid.IntRange(3, 7).Draw(t, "atoms")
		atoms := make([]ground.Atom, n)
		for i := range atoms {
			atoms[i] = p.AddAtom("q", []ground.Term{p.Terms.Int(int64(i))})
		}
		// in[j] lists the atoms with an edge into j.
		in := make([][]ground.Atom, n)
		for i := 0; i < n; i++ {
			for j := i + 1; j < n; j++ {
				// rapid favours small values: 0 joins the pair both ways.
				switch rapid.IntRange(0, 5).Draw(t, "pair") {
				case 0, 3:
					in[j] = append(in[j], atoms[i])
					in[i] = append(in[i], atoms[j])
				case 1:
					in[j] = append(in[j], atoms[i])
				case 2:
					in[i] = append(in[i], atoms[j])
				}
			}
			if rapid.IntRange(0, 9).Draw(t, "self") == 0 {
				in[i] = append(in[i], atoms[i])
			}
		}
		negation := rapid.Bool().Draw(t, "negation")
		pick := func(label string, from []ground.Atom, most int) []ground.Atom {
			var out []ground.Atom
			k := rapid.IntRange(0, most).Draw(t, label+" size")
			for j := 0; j < k && len(from) > 0; j++ {
				a := from[rapid.IntRange(0, len(from)-1).Draw(t, label)]
				if !slices.Contains(out, a) {
					out = append(out, a)
				}
			}
			return out
		}
		for h := 0; h < n; h++ {
			nr := rapid.IntRange(1, 2).Draw(t, "rules")
			for k := 0; k < nr; k++ {
				r := ground.Rule{Head: atoms[h], Pos: pick("pos", in[h], 2)}
				if len(r.Pos) == 0 {
					r.Pos = pick("pos", in[h], 1)
				}
				if negation {
					r.Neg = pick("neg", atoms, 1)
				}
				p.Rules = append(p.Rules, r)
			}
		}
		// Support from outside the cycles: facts and choices.
		for _, a := range pick("fact", atoms, 1) {
			p.Rules = append(p.Rules, ground.Rule{Head: a})
		}
		nc := rapid.IntRange(1, 2).Draw(t, "choices")
		for k := 0; k < nc; k++ {
			c := ground.Choice{Elements: pick("element", atoms, 3), Lower: 0, Upper: ground.NoUpper}
			if len(c.Elements) == 0 {
				c.Elements = []ground.Atom{atoms[rapid.IntRange(0, n-1).Draw(t, "element")]}
			}
			if len(c.Elements) == 0 {
				continue
			}
			// A body atom on the cycle puts the elements on it too.
			c.Pos = pick("choice pos", atoms, 1)
			if negation {
				c.Neg = pick("choice neg", atoms, 1)
			}
			if rapid.Bool().Draw(t, "bounded") {
				c.Lower = int64(rapid.IntRange(0, 2).Draw(t, "lower"))
				if rapid.Bool().Draw(t, "upper bounded") {
					c.Upper = int64(rapid.IntRange(int(c.Lower), 3).Draw(t, "upper"))
				}
			}
			p.Choices = append(p.Choices, c)
		}
		nk := rapid.IntRange(0, 2).Draw(t, "constraints")
		for k := 0; k < nk; k++ {
			r := ground.Rule{Head: ground.NoAtom, Pos: pick("constraint pos", atoms, 2)}
			if negation {
				r.Neg = pick("constraint neg", atoms, 1)
			}
			if len(r.Pos)+len(r.Neg) > 0 {
				p.Rules = append(p.Rules, r)
			}
		}
		p.Shown = slices.Clone(atoms)
		return p
	})
}

// checkUnfold unfolds p and checks the promises of Unfold against the
// brute-force oracle (stable models from the definition, Gelfond and
// Lifschitz 1988).
func checkUnfold(t *rapid.T, p *ground.Program) *Report {
	return checkUnfoldWith(t, p, Options{NoWidth: true})
}

func checkUnfoldWith(t *rapid.T, p *ground.Program, opts Options) *Report {
	orig := p.Clone()
	q, rep, err := Unfold(context.Background(), p, opts)
	if err != nil {
		t.Fatalf("Unfold: %v", err)
	}
	if !NewGraph(q).Tight() {
		t.Fatalf("unfolded program is not tight")
	}
	n := len(p.Atoms)
	if len(q.Atoms) < n {
		t.Fatalf("atoms lost: %d < %d", len(q.Atoms), n)
	}
	for a := 0; a < n; a++ {
		if q.AtomString(ground.Atom(a)) != p.AtomString(ground.Atom(a)) {
			t.Fatalf("atom %d renamed: %s became %s", a, p.AtomString(ground.Atom(a)), q.AtomString(ground.Atom(a)))
		}
	}
	copiesSeen := 0
	for a := n; a < len(q.Atoms); a++ {
		info := q.Atoms[a]
		if !info.Aux {
			t.Fatalf("new atom %s is not auxiliary", q.AtomString(ground.Atom(a)))
		}
		if info.Copy != ground.NoAtom {
			copiesSeen++
		}
	}
	if copiesSeen != rep.TotalCopies {
		t.Fatalf("report says %d copies, program has %d", rep.TotalCopies, copiesSeen)
	}
	if !slices.Equal(q.Shown, p.Shown) || !slices.Equal(q.Penalties, p.Penalties) {
		t.Fatalf("shown atoms or penalties changed")
	}
	// p is not modified.
	if len(p.Rules) != len(orig.Rules) || len(p.Atoms) != len(orig.Atoms) || len(p.Choices) != len(orig.Choices) {
		t.Fatalf("input modified")
	}
	before, after := brute.StableModels(p), brute.StableModels(q)
	if len(before) != len(after) {
		t.Fatalf("%d stable models before unfolding, %d after", len(before), len(after))
	}
	// Equal sorted lists of restrictions, with as many entries as models:
	// a one-to-one correspondence on the original atoms.
	want := brute.Restrict(before, n)
	got := brute.Restrict(after, n)
	if !slices.Equal(got, want) {
		t.Fatalf("stable models differ on the original atoms:\n got  %v\n want %v", got, want)
	}
	return rep
}

func TestUnfoldPreservesStableModelsCyclic(t *testing.T) {
	runs, cyclic, choices, models := 0, 0, 0, 0
	rapid.Check(t, func(rt *rapid.T) {
		p := cyclicProgram().Draw(rt, "program")
		rep := checkUnfold(rt, p)
		runs++
		if len(rep.Components) > 0 {
			cyclic++
		}
		if rep.AtomsAfter > len(p.Atoms)+rep.TotalCopies {
			choices++ // guesses or bound atoms were added
		}
		if len(brute.StableModels(p)) > 1 {
			models++
		}
	})
	// The generator must exercise what it is for.
	t.Logf("%d programs: %d with positive cycles, %d with choices on cycles, %d with several models", runs, cyclic, choices, models)
	if cyclic < runs/2 || choices == 0 || models == 0 {
		t.Errorf("generator too tame: %d of %d cyclic, %d with choices on cycles, %d with several models", cyclic, runs, choices, models)
	}
}

func TestUnfoldPreservesStableModelsRandom(t *testing.T) {
	for _, opts := range []brute.Options{
		{Negation: true, Constraints: true},
		{Negation: true, Choices: true, Constraints: true},
		{Negation: true, Choices: true, Aggregates: true, Constraints: true, Penalties: true},
		{MaxAtoms: 5, MaxRules: 14, Choices: true},
	} {
		rapid.Check(t, func(t *rapid.T) {
			checkUnfold(t, brute.Program(opts).Draw(t, "program"))
		})
	}
}

// TestUnfoldKeepsTightPrograms checks that a program without positive
// cycles comes back with the same rules.
func TestUnfoldKeepsTightPrograms(t *testing.T) {
	p := &ground.Program{}
	a := p.AddAtom("a", nil)
	b := p.AddAtom("b", nil)
	c := p.AddAtom("c", nil)
	p.Rules = []ground.Rule{{Head: a}, {Head: b, Pos: []ground.Atom{a}}, {Head: c, Pos: []ground.Atom{b}, Neg: []ground.Atom{a}}}
	q, rep, err := Unfold(context.Background(), p, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(rep.Components) != 0 || len(q.Atoms) != 3 || len(q.Rules) != 3 {
		t.Fatalf("tight program changed: %d components, %d atoms, %d rules", len(rep.Components), len(q.Atoms), len(q.Rules))
	}
}

// TestUnfoldTextbook checks the classic example of unfounded support
// (Gelfond and Lifschitz 1988; Fages 1994 on why completion alone is not
// enough): with `a if b. b if a.` the atoms stay false, while `a if b.
// b if a. a if not c.` has the single model {a, b}.
func TestUnfoldTextbook(t *testing.T) {
	p := &ground.Program{}
	a := p.AddAtom("a", nil)
	b := p.AddAtom("b", nil)
	c := p.AddAtom("c", nil)
	p.Rules = []ground.Rule{{Head: a, Pos: []ground.Atom{b}}, {Head: b, Pos: []ground.Atom{a}}}
	for _, tc := range []struct {
		extra []ground.Rule
		want  []string
	}{
		{nil, []string{"000"}},
		{[]ground.Rule{{Head: a, Neg: []ground.Atom{c}}}, []string{"110"}},
	} {
		p := p.Clone()
		p.Rules = append(p.Rules, tc.extra...)
		q, _, err := Unfold(context.Background(), p, Options{})
		if err != nil {
			t.Fatal(err)
		}
		got := brute.Restrict(brute.StableModels(q), 3)
		if !slices.Equal(got, tc.want) {
			t.Errorf("models %v, want %v", got, tc.want)
		}
	}
}

func TestUnfoldRejectsAggregateOnCycle(t *testing.T) {
	p := &ground.Program{}
	a := p.AddAtom("a", nil)
	g := p.AddAtom("#agg", nil)
	p.Rules = []ground.Rule{{Head: a, Pos: []ground.Atom{g}}}
	p.Aggregates = []ground.Aggregate{{Atom: g, Kind: ground.Count, Elements: []ground.WeightedAtom{{Atom: a, Weight: 1}}, Op: ground.Ge, Bound: 1}}
	if _, _, err := Unfold(context.Background(), p, Options{}); err == nil {
		t.Fatal("no error for an aggregate on a positive cycle")
	}
}

func TestUnfoldCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	p := &ground.Program{}
	a := p.AddAtom("a", nil)
	b := p.AddAtom("b", nil)
	p.Rules = []ground.Rule{{Head: a, Pos: []ground.Atom{b}}, {Head: b, Pos: []ground.Atom{a}}}
	if _, _, err := Unfold(ctx, p, Options{}); err == nil {
		t.Fatal("no error from a cancelled context")
	}
}

// TestUnfoldCopyLimit checks that a component needing more copies than the
// limit is refused with a message naming the limit, before any copy is made.
func TestUnfoldCopyLimit(t *testing.T) {
	p := completeShape(6).program()
	_, _, err := Unfold(context.Background(), p, Options{MaxCopies: 10})
	if err == nil || !strings.Contains(err.Error(), "limit of 10 copies") {
		t.Fatalf("error %v, want one naming the copy limit", err)
	}
	if _, _, err := Unfold(context.Background(), p, Options{MaxCopies: -1}); err != nil {
		t.Fatalf("no limit: %v", err)
	}
	g := randomSparseShape(20000, 4).graph()
	seq, how := Sequence(context.Background(), g, g.Component(largestComponent(g)), Options{MaxCopies: 1000})
	if seq != nil || how != TooLarge {
		t.Fatalf("got %d copies by %s within a limit of 1000", len(seq), how)
	}
}

// TestUnfoldRefusesClashingCopyName checks that an input which already has
// an atom named like a copy is refused rather than merged with the copy.
func TestUnfoldRefusesClashingCopyName(t *testing.T) {
	p := &ground.Program{}
	a := p.AddAtom("a", nil)
	b := p.AddAtom("b", nil)
	p.AddAtom("#copy", []ground.Term{p.Terms.Name("a"), p.Terms.Int(1)})
	c := p.AddAtom("c", nil)
	p.Rules = []ground.Rule{{Head: a, Pos: []ground.Atom{b}}, {Head: b, Pos: []ground.Atom{a}}, {Head: a, Neg: []ground.Atom{c}}}
	if _, _, err := Unfold(context.Background(), p, Options{}); err == nil || !strings.Contains(err.Error(), "#copy(a,1)") {
		t.Fatalf("error %v, want one naming #copy(a,1)", err)
	}
}

// TestUnfoldOtherOptions runs the property with the naive sequence, without
// exhaustive search and checker, and with widths, on cyclic programs.
func TestUnfoldOtherOptions(t *testing.T) {
	for _, opts := range []Options{
		{Naive: true, NoWidth: true},
		{ExactLimit: -1, CheckLimit: -1, NoWidth: true},
		{WidthLimit: 1},
	} {
		rapid.Check(t, func(t *rapid.T) {
			checkUnfoldWith(t, cyclicProgram().Draw(t, "program"), opts)
		})
	}
}
