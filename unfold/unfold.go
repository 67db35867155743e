package unfold

import (
	"context"
	"fmt"
	"slices"
	"time"

	"trellis/ground"
)

// Unfold returns a tight program with the same stable models as p on p's
// atoms, one to one, and a report of what it did. p is not modified.
//
// Atoms outside positive cycles keep their rules. Every cyclic component is
// unfolded along the sequence Sequence finds for it; copies are appended
// after p's atoms (auxiliary, with AtomInfo.Copy set to the original), and
// each original atom of a component keeps a single rule making it equal to
// its last copy. A choice with an element on a cycle is replaced: each such
// element e gets a fresh guess atom g (an unconditional choice, kept equal
// to e by two constraints) and the rule `e if g, body`, which is unfolded
// like any other rule; the choice's bounds become count aggregates over its
// elements with constraints that apply when the body holds.
func Unfold(ctx context.Context, p *ground.Program, opts Options) (*ground.Program, *Report, error) {
	begin := time.Now()
	q := p.Clone()
	g := NewGraph(q)
	rep := &Report{Atoms: len(p.Atoms), Rules: len(p.Rules), Edges: g.Edges()}

	cyclicAtom := make([]bool, len(q.Atoms))
	for i := 0; i < g.NumComponents(); i++ {
		if g.Cyclic(i) {
			for _, v := range g.Component(i) {
				cyclicAtom[v] = true
			}
		}
	}
	for _, a := range q.Aggregates {
		if cyclicAtom[a.Atom] {
			return nil, nil, fmt.Errorf("unfold: aggregate atom %s lies on a positive cycle", q.AtomString(a.Atom))
		}
	}
	rewriteChoices(q, cyclicAtom)
	// The rewritten choices add atoms but no cycles: guesses have no
	// positive in-edges and bound atoms occur only negatively.
	g = NewGraph(q)
	cyclicAtom = append(cyclicAtom, make([]bool, len(q.Atoms)-len(cyclicAtom))...)

	// Rules of cyclic atoms, grouped by head; the others are kept.
	var kept []ground.Rule
	byHead := make([][]ground.Rule, len(q.Atoms))
	for _, r := range q.Rules {
		if r.Head != ground.NoAtom && cyclicAtom[r.Head] {
			byHead[r.Head] = append(byHead[r.Head], r)
		} else {
			kept = append(kept, r)
		}
	}
	q.Rules = kept

	search := newSearcher(ctx, opts)
	var made struct {
		each  []int64 // copies made of each atom so far
		total int
	}
	made.each = make([]int64, len(q.Atoms))
	latest := make([]ground.Atom, len(q.Atoms))
	for i := range latest {
		latest[i] = ground.NoAtom
	}
	for i := 0; i < g.NumComponents(); i++ {
		if !g.Cyclic(i) {
			continue
		}
		if err := ctx.Err(); err != nil {
			return nil, nil, err
		}
		comp := g.Component(i)
		start := time.Now()
		left := opts
		if limit := opts.maxCopies(); limit > 0 {
			left.MaxCopies = max(limit-made.total, 1)
		}
		search.opts = left
		seq, how := search.sequence(g, comp)
		entries := 0
		for _, v := range comp {
			if g.Entry(v) {
				entries++
			}
		}
		if err := ctx.Err(); err != nil {
			return nil, nil, err
		}
		if how == TooLarge {
			return nil, nil, fmt.Errorf("%w: the positive cycles through %s (%d atoms) need more copies than the limit of %d copies in all allows; raise it with --max-copies",
				ErrCopyLimit, q.AtomString(ground.Atom(comp[0])), len(comp), opts.maxCopies())
		}
		total := 0
		var rules []ground.Rule
		for _, v := range seq {
			a := ground.Atom(v)
			// The copy's rules. A copy without any is false in every
			// model, but it is still made: leaving such copies out
			// (and the rules that need them) gave the compiler a
			// harder formula on grid networks (4×4: 8× the nodes).
			rules = rules[:0]
		next:
			for _, r := range byHead[a] {
				pos := make([]ground.Atom, len(r.Pos))
				for k, b := range r.Pos {
					if g.ComponentOf(int32(b)) == i {
						if latest[b] == ground.NoAtom {
							continue next
						}
						b = latest[b]
					}
					pos[k] = b
				}
				rules = append(rules, ground.Rule{Pos: pos, Neg: slices.Clone(r.Neg)})
			}
			made.each[a]++
			total++
			before := len(q.Atoms)
			c := q.AddAtom("#copy", []ground.Term{atomTerm(q, a), q.Terms.Int(made.each[a])})
			if int(c) < before {
				return nil, nil, fmt.Errorf("unfold: the program already has the atom %s that unfolding would make", q.AtomString(c))
			}
			q.Atoms[c].Aux = true
			q.Atoms[c].Copy = a
			for _, r := range rules {
				r.Head = c
				q.Rules = append(q.Rules, r)
			}
			latest[a] = c
		}
		made.total += total
		most := 0
		for _, v := range comp {
			most = max(most, int(made.each[v]))
		}
		rep.Components = append(rep.Components, ComponentReport{
			Index:        len(rep.Components),
			Size:         len(comp),
			Edges:        g.ComponentEdges(i),
			Construction: how,
			MaxCopies:    most,
			TotalCopies:  total,
			Entries:      entries,
			First:        q.AtomString(ground.Atom(comp[0])),
			Seconds:      time.Since(start).Seconds(),
			atoms:        comp,
		})
	}
	for _, c := range rep.Components {
		for _, v := range c.atoms {
			if l := latest[v]; l != ground.NoAtom {
				q.Rules = append(q.Rules, ground.Rule{Head: ground.Atom(v), Pos: []ground.Atom{l}})
			}
		}
	}
	rep.finish(p, q, g, opts)
	rep.Seconds = time.Since(begin).Seconds()
	return q, rep, nil
}

// countCopies returns the largest number of occurrences of one atom in seq
// and the number of distinct atoms.
func countCopies(seq []int32) (most, distinct int) {
	top := int32(-1)
	for _, v := range seq {
		top = max(top, v)
	}
	count := make([]int32, top+1)
	for _, v := range seq {
		if count[v] == 0 {
			distinct++
		}
		count[v]++
		most = max(most, int(count[v]))
	}
	return most, distinct
}

// atomTerm returns a term that names atom a: its predicate applied to its
// arguments.
func atomTerm(p *ground.Program, a ground.Atom) ground.Term {
	info := &p.Atoms[a]
	if len(info.Args) == 0 {
		return p.Terms.Name(info.Pred)
	}
	return p.Terms.Compound(info.Pred, info.Args...)
}

// rewriteChoices replaces every choice with an element on a cycle. For the
// choice `choose [lo, hi] of E if B`, every cyclic element e gets a guess
// atom g_e with `choose any of g_e`, the constraints `forbid g_e, not e` and
// `forbid e, not g_e` (so g_e holds exactly when e does), and the rule
// `e if g_e, B`; the other elements stay in `choose any of E' if B`. When the
// choice has bounds, aggregate atoms ok_lo ⟺ count(E) ≥ lo and
// ok_hi ⟺ count(E) ≤ hi get the constraints `forbid B, not ok_lo` and
// `forbid B, not ok_hi`.
//
// This preserves stable models one to one: given a stable model M of the
// original, setting g_e = e gives a stable model of the result (e's support
// by the choice becomes the rule with g_e as a fact of the reduct), and
// conversely; the guesses are determined by the elements, and the counts
// over true elements are those the choice bounded.
func rewriteChoices(q *ground.Program, cyclicAtom []bool) {
	var choices []ground.Choice
	for _, c := range q.Choices {
		touched := false
		for _, e := range c.Elements {
			if cyclicAtom[e] {
				touched = true
			}
		}
		if !touched {
			choices = append(choices, c)
			continue
		}
		var rest []ground.Atom
		for _, e := range c.Elements {
			if !cyclicAtom[e] {
				rest = append(rest, e)
				continue
			}
			guess := q.NewAux("guess")
			choices = append(choices, ground.Choice{Elements: []ground.Atom{guess}, Lower: 0, Upper: ground.NoUpper})
			q.Rules = append(q.Rules,
				ground.Rule{Head: ground.NoAtom, Pos: []ground.Atom{guess}, Neg: []ground.Atom{e}},
				ground.Rule{Head: ground.NoAtom, Pos: []ground.Atom{e}, Neg: []ground.Atom{guess}},
				ground.Rule{Head: e, Pos: append([]ground.Atom{guess}, c.Pos...), Neg: slices.Clone(c.Neg)},
			)
		}
		if len(rest) > 0 {
			choices = append(choices, ground.Choice{Elements: rest, Lower: 0, Upper: ground.NoUpper,
				Pos: slices.Clone(c.Pos), Neg: slices.Clone(c.Neg)})
		}
		bound := func(side string, op ground.CmpOp, b int64) {
			elems := make([]ground.WeightedAtom, len(c.Elements))
			for k, e := range c.Elements {
				elems[k] = ground.WeightedAtom{Atom: e, Weight: 1}
			}
			ok := q.NewAux("bound_" + side)
			q.Aggregates = append(q.Aggregates, ground.Aggregate{Atom: ok, Kind: ground.Count, Elements: elems, Op: op, Bound: b})
			q.Rules = append(q.Rules, ground.Rule{Head: ground.NoAtom, Pos: slices.Clone(c.Pos),
				Neg: append(slices.Clone(c.Neg), ok)})
		}
		if c.Lower > 0 {
			bound("lower", ground.Ge, c.Lower)
		}
		if c.Upper != ground.NoUpper {
			bound("upper", ground.Le, c.Upper)
		}
	}
	q.Choices = choices
}
