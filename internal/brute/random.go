package brute

import (
	"pgregory.net/rapid"

	"trellis/ground"
)

// Options shapes the random programs of Program.
type Options struct {
	MaxAtoms    int  // atoms p(0)..p(n-1), n drawn in [2, MaxAtoms]; 0 means 7
	MaxRules    int  // 0 means 2*MaxAtoms
	Choices     bool // add choices with random bounds
	Aggregates  bool // add count, sum, min and max conditions (never on a cycle)
	Penalties   bool // add penalties
	Priorities  int  // number of distinct priorities for penalties; 0 means 2
	Constraints bool // add constraints
	Negation    bool // allow negative body literals
}

// Program returns a generator of random small ground programs with positive
// recursion through cycles (rules draw their bodies from all atoms of their
// layer), optionally with negation, choices, aggregates, constraints and
// penalties. The atoms are p(0), ..., p(n-1) plus auxiliary aggregate atoms;
// atoms are split into two layers, and aggregates range over the lower layer
// and are used only by the upper one, so no aggregate lies on a cycle.
// The programs stay within MaxGuess guessed atoms.
func Program(opts Options) *rapid.Generator[*ground.Program] {
	if opts.MaxAtoms == 0 {
		opts.MaxAtoms = 7
	}
	if opts.MaxRules == 0 {
		opts.MaxRules = 2 * opts.MaxAtoms
	}
	if opts.Priorities == 0 {
		opts.Priorities = 2
	}
	return rapid.Custom(func(t *rapid.T) *ground.Program {
		p := &ground.Program{}
		n := rapid.IntRange(2, opts.MaxAtoms).Draw(t, "atoms")
		atoms := make([]ground.Atom, n)
		for i := range atoms {
			atoms[i] = p.AddAtom("p", []ground.Term{p.Terms.Int(int64(i))})
		}
		low := n
		if opts.Aggregates {
			low = rapid.IntRange(1, n).Draw(t, "lower layer")
		}
		// pick draws up to max distinct atoms of from.
		pick := func(label string, from []ground.Atom, max int) []ground.Atom {
			if len(from) == 0 {
				return nil
			}
			k := rapid.IntRange(0, max).Draw(t, label+" size")
			var out []ground.Atom
			seen := map[ground.Atom]bool{}
			for j := 0; j < k; j++ {
				a := from[rapid.IntRange(0, len(from)-1).Draw(t, label)]
				if !seen[a] {
					seen[a] = true
					out = append(out, a)
				}
			}
			return out
		}
		var upperExtra []ground.Atom
		if opts.Aggregates && low < n {
			na := rapid.IntRange(0, 2).Draw(t, "aggregates")
			for j := 0; j < na; j++ {
				g := ground.Aggregate{
					Atom: p.NewAux("agg"),
					Kind: ground.AggregateKind(rapid.IntRange(0, 3).Draw(t, "kind")),
					Op:   ground.CmpOp(rapid.IntRange(0, 5).Draw(t, "op")),
				}
				for _, a := range pick("element", atoms[:low], 3) {
					w := int64(1)
					if g.Kind != ground.Count {
						w = int64(rapid.IntRange(-3, 4).Draw(t, "weight"))
					}
					g.Elements = append(g.Elements, ground.WeightedAtom{Atom: a, Weight: w})
				}
				g.Bound = int64(rapid.IntRange(-2, 4).Draw(t, "bound"))
				p.Aggregates = append(p.Aggregates, g)
				upperExtra = append(upperExtra, g.Atom)
			}
		}
		layerOf := func(head int) []ground.Atom {
			if head < low {
				return atoms[:low]
			}
			return append(append([]ground.Atom(nil), atoms...), upperExtra...)
		}
		nr := rapid.IntRange(1, opts.MaxRules).Draw(t, "rules")
		for j := 0; j < nr; j++ {
			h := rapid.IntRange(0, n-1).Draw(t, "head")
			from := layerOf(h)
			r := ground.Rule{Head: atoms[h], Pos: pick("pos", from, 2)}
			if opts.Negation {
				r.Neg = pick("neg", from, 1)
			}
			p.Rules = append(p.Rules, r)
		}
		if opts.Choices {
			nc := rapid.IntRange(0, 2).Draw(t, "choices")
			for j := 0; j < nc; j++ {
				lowLayer := rapid.Bool().Draw(t, "choice layer")
				var elems, from []ground.Atom
				if lowLayer {
					from = atoms[:low]
					elems = pick("element", atoms[:low], 3)
				} else {
					from = layerOf(n - 1)
					elems = pick("element", atoms[low:], 3)
					if len(elems) == 0 {
						elems = pick("element", atoms, 3)
						from = atoms[:low]
					}
				}
				c := ground.Choice{Elements: elems, Lower: 0, Upper: ground.NoUpper, Pos: pick("choice pos", from, 1)}
				if opts.Negation {
					c.Neg = pick("choice neg", from, 1)
				}
				if rapid.Bool().Draw(t, "bounded") {
					c.Lower = int64(rapid.IntRange(0, 2).Draw(t, "lower"))
					c.Upper = int64(rapid.IntRange(int(c.Lower), 3).Draw(t, "upper"))
				}
				p.Choices = append(p.Choices, c)
			}
		}
		if opts.Constraints {
			nk := rapid.IntRange(0, 2).Draw(t, "constraints")
			all := layerOf(n - 1)
			for j := 0; j < nk; j++ {
				r := ground.Rule{Head: ground.NoAtom, Pos: pick("constraint pos", all, 2)}
				if opts.Negation {
					r.Neg = pick("constraint neg", all, 1)
				}
				if len(r.Pos)+len(r.Neg) > 0 {
					p.Rules = append(p.Rules, r)
				}
			}
		}
		if opts.Penalties {
			np := rapid.IntRange(0, 5).Draw(t, "penalties")
			all := layerOf(n - 1)
			for j := 0; j < np; j++ {
				p.Penalties = append(p.Penalties, ground.Penalty{
					Atom:     all[rapid.IntRange(0, len(all)-1).Draw(t, "penalty atom")],
					Weight:   int64(rapid.IntRange(-3, 6).Draw(t, "penalty weight")),
					Priority: int64(rapid.IntRange(0, opts.Priorities-1).Draw(t, "priority")),
				})
			}
		}
		p.Shown = append(p.Shown, atoms...)
		p.SortAtoms(p.Shown)
		return p
	})
}
