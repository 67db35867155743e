package optimize_test

import (
	"context"
	"fmt"
	"math/big"
	"slices"
	"strings"
	"testing"

	"pgregory.net/rapid"

	"trellis/compile"
	"trellis/ground"
	"trellis/internal/brute"
	"trellis/optimize"
	"trellis/unfold"
)

// compileProgram runs a ground program through unfolding and compilation.
func compileProgram(t interface{ Fatalf(string, ...any) }, p *ground.Program) *compile.Circuit {
	ctx := context.Background()
	q, _, err := unfold.Unfold(ctx, p, unfold.Options{})
	if err != nil {
		t.Fatalf("unfold: %v", err)
	}
	c, _, err := compile.Program(ctx, q, compile.Options{})
	if err != nil {
		t.Fatalf("compile: %v", err)
	}
	return c
}

// TestEndToEndAgainstBruteForce checks every answer on random ground
// programs (recursive, with choices, aggregates, constraints and penalties at
// 2 or 3 priorities) against the enumeration of their stable models.
func TestEndToEndAgainstBruteForce(t *testing.T) {
	rapid.Check(t, func(rt *rapid.T) {
		p := brute.Program(brute.Options{
			MaxAtoms:    6,
			Choices:     true,
			Aggregates:  true,
			Penalties:   true,
			Priorities:  rapid.IntRange(2, 3).Draw(rt, "priorities"),
			Constraints: true,
			Negation:    true,
		}).Draw(rt, "program")
		// named atoms in term order; a random subset of them is shown
		var named []ground.Atom
		for a := range p.Atoms {
			if !p.Atoms[a].Aux {
				named = append(named, ground.Atom(a))
			}
		}
		p.SortAtoms(named)
		p.Shown = nil
		for _, a := range named {
			if rapid.IntRange(0, 3).Draw(rt, "shown") > 0 {
				p.Shown = append(p.Shown, a)
			}
		}
		// pins by name
		var pinNames []string
		type pin struct {
			atom  ground.Atom
			value bool
		}
		var pins []pin
		if len(named) > 0 {
			for range rapid.IntRange(0, 2).Draw(rt, "pins") {
				a := named[rapid.IntRange(0, len(named)-1).Draw(rt, "pin atom")]
				v := rapid.Bool().Draw(rt, "pin value")
				pins = append(pins, pin{a, v})
				name := p.AtomString(a)
				if !v {
					name = "not " + name
				}
				pinNames = append(pinNames, name)
			}
		}
		top := rapid.IntRange(0, 20).Draw(rt, "top")

		models := brute.StableModels(p)
		var kept [][]bool
		for _, m := range models {
			ok := true
			for _, pn := range pins {
				ok = ok && m[pn.atom] == pn.value
			}
			if ok {
				kept = append(kept, m)
			}
		}
		c := compileProgram(rt, p)
		res, err := optimize.Solve(context.Background(), c, optimize.Query{PinNames: pinNames, Top: top, WhatIf: true})
		if err != nil {
			rt.Fatalf("Solve: %v", err)
		}
		prio := brute.Priorities(p)
		if res.Total.Cmp(big.NewInt(int64(len(kept)))) != 0 {
			rt.Fatalf("total %s, want %d", res.Total, len(kept))
		}
		if len(kept) == 0 {
			if res.Status != optimize.StatusNone {
				rt.Fatalf("status %s, want none", res.Status)
			}
			return
		}
		// sort by cost, then by the positions of the true shown atoms in
		// term order, then of all named atoms
		type ranked struct {
			cost        []int64
			shown, all  []int
			shownString string
		}
		var rs []ranked
		for _, m := range kept {
			r := ranked{cost: brute.Cost(p, m)}
			var names []string
			shown := map[ground.Atom]bool{}
			for _, a := range p.Shown {
				shown[a] = true
			}
			for i, a := range named {
				if m[a] {
					r.all = append(r.all, i)
					if shown[a] {
						r.shown = append(r.shown, i)
						names = append(names, p.AtomString(a))
					}
				}
			}
			r.shownString = strings.Join(names, " ")
			rs = append(rs, r)
		}
		slices.SortStableFunc(rs, func(a, b ranked) int {
			if c := slices.Compare(a.cost, b.cost); c != 0 {
				return c
			}
			if c := slices.Compare(a.shown, b.shown); c != 0 {
				return c
			}
			return slices.Compare(a.all, b.all)
		})
		best := rs[0].cost
		ties := 0
		for _, r := range rs {
			if slices.Equal(r.cost, best) {
				ties++
			}
		}
		if got, want := costs(res.Cost), fmt.Sprint(prio, best); got != want {
			rt.Fatalf("cost %s, want %s", got, want)
		}
		if res.Ties.Cmp(big.NewInt(int64(ties))) != 0 {
			rt.Fatalf("ties %s, want %d", res.Ties, ties)
		}
		if len(res.Top) != min(top, len(rs)) {
			rt.Fatalf("top has %d, want %d", len(res.Top), min(top, len(rs)))
		}
		for i, r := range res.Top {
			if got, want := costs(r.Cost), fmt.Sprint(prio, rs[i].cost); got != want {
				rt.Fatalf("top[%d] cost %s, want %s", i, got, want)
			}
			if got, want := strings.Join(r.Atoms, " "), rs[i].shownString; got != want {
				rt.Fatalf("top[%d] atoms {%s}, want {%s}", i, got, want)
			}
		}
		// what-if
		shownSorted := append([]ground.Atom(nil), p.Shown...)
		p.SortAtoms(shownSorted)
		if len(res.WhatIf) != len(shownSorted) {
			rt.Fatalf("whatif has %d entries, want %d", len(res.WhatIf), len(shownSorted))
		}
		for k, a := range shownSorted {
			e := res.WhatIf[k]
			if e.Atom != p.AtomString(a) {
				rt.Fatalf("whatif[%d] is %s, want %s", k, e.Atom, p.AtomString(a))
			}
			for _, side := range []struct {
				value bool
				got   *optimize.Outcome
			}{{true, e.With}, {false, e.Without}} {
				var bc []int64
				n := 0
				for _, m := range kept {
					if m[a] != side.value {
						continue
					}
					c := brute.Cost(p, m)
					switch {
					case n == 0 || brute.Less(c, bc):
						bc, n = c, 1
					case slices.Equal(c, bc):
						n++
					}
				}
				switch {
				case n == 0 && side.got != nil:
					rt.Fatalf("whatif %s=%v: got %s, want impossible", e.Atom, side.value, costs(side.got.Cost))
				case n > 0 && side.got == nil:
					rt.Fatalf("whatif %s=%v: impossible, want %v", e.Atom, side.value, bc)
				case n > 0:
					if got, want := costs(side.got.Cost), fmt.Sprint(prio, bc); got != want || side.got.Ties.Cmp(big.NewInt(int64(n))) != 0 {
						rt.Fatalf("whatif %s=%v: %s ×%s, want %s ×%d", e.Atom, side.value, got, side.got.Ties, want, n)
					}
				}
			}
		}
	})
}

// costs prints a cost list as "[priorities] [values]", the form fmt gives
// the brute-force vectors.
func costs(c []optimize.PriorityCost) string {
	var prio, val []int64
	for _, x := range c {
		prio = append(prio, x.Priority)
		val = append(val, x.Value)
	}
	return fmt.Sprint(prio, val)
}
