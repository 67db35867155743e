package compile

import (
	"sort"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
	"pgregory.net/rapid"

	"trellis/ground"
	"trellis/internal/brute"
)

// cptEnum calls visit with every total model of f (a[v] is +1 or -1 for
// variable v), by a plain backtracking search with unit propagation. It is
// the test's own oracle for models of a CNF: deliberately simple, quadratic
// propagation, no learning.
func cptEnum(f *CNF, visit func(a []int8)) {
	a := make([]int8, f.NumVars+1)
	val := func(l Lit) int8 {
		x := a[l.Var()]
		if l.IsNeg() {
			return -x
		}
		return x
	}
	var trail []Var
	set := func(l Lit) {
		if l.IsNeg() {
			a[l.Var()] = -1
		} else {
			a[l.Var()] = 1
		}
		trail = append(trail, l.Var())
	}
	// propagate returns false on a conflict.
	propagate := func() bool {
		for changed := true; changed; {
			changed = false
			for i := 0; i < f.NumClauses(); i++ {
				var unit Lit
				free, sat := 0, false
				for _, l := range f.Clause(i) {
					switch val(l) {
					case 1:
						sat = true
					case 0:
						free++
						unit = l
					}
				}
				switch {
				case sat:
				case free == 0:
					return false
				case free == 1:
					set(unit)
					changed = true
				}
			}
		}
		return true
	}
	var search func()
	search = func() {
		mark := len(trail)
		defer func() {
			for _, v := range trail[mark:] {
				a[v] = 0
			}
			trail = trail[:mark]
		}()
		if !propagate() {
			return
		}
		v := 1
		for v <= f.NumVars && a[v] != 0 {
			v++
		}
		if v > f.NumVars {
			visit(a)
			return
		}
		for _, l := range []Lit{Var(v).Neg(), Var(v).Pos()} {
			m := len(trail)
			set(l)
			search()
			for _, w := range trail[m:] {
				a[w] = 0
			}
			trail = trail[:m]
		}
	}
	search()
}

// cptProjections returns the models of the encoding restricted to the atoms
// 0..n-1, as sorted '0'/'1' strings, one per model of the CNF (so repeated
// projections show models that are not one to one).
func cptProjections(e *Encoding, n int) []string {
	var out []string
	cptEnum(&e.CNF, func(a []int8) {
		b := make([]byte, n)
		for i := 0; i < n; i++ {
			b[i] = '0'
			if a[e.AtomVar[i]] > 0 {
				b[i] = '1'
			}
		}
		out = append(out, string(b))
	})
	sort.Strings(out)
	return out
}

// cptTighten removes the positive body atoms that can close a positive
// cycle in a program of brute.Program: atoms are ranked p(i) by i, and the
// aggregate atoms (which range over the lower layer and feed the upper one)
// between the layers; a rule keeps the positive atoms ranked below its head,
// a choice those ranked below all its elements.
func cptTighten(p *ground.Program) *ground.Program {
	q := p.Clone()
	rank := make([]int, len(q.Atoms))
	for a := range q.Atoms {
		rank[a] = 2 * a
	}
	for _, g := range q.Aggregates {
		lo := 1 << 30
		for _, r := range q.Rules {
			for _, b := range r.Pos {
				if b == g.Atom && r.Head != ground.NoAtom {
					lo = min(lo, rank[r.Head])
				}
			}
		}
		hiEl := -1
		for _, e := range g.Elements {
			hiEl = max(hiEl, rank[e.Atom])
		}
		// Between the elements and the users (the generator keeps them apart).
		rank[g.Atom] = hiEl + 1
		if lo <= hiEl+1 {
			rank[g.Atom] = lo - 1
		}
	}
	keep := func(pos []ground.Atom, below int) []ground.Atom {
		var out []ground.Atom
		for _, b := range pos {
			if rank[b] < below {
				out = append(out, b)
			}
		}
		return out
	}
	for i := range q.Rules {
		r := &q.Rules[i]
		if r.Head != ground.NoAtom {
			r.Pos = keep(r.Pos, rank[r.Head])
		}
	}
	for i := range q.Choices {
		ch := &q.Choices[i]
		lo := 1 << 30
		for _, a := range ch.Elements {
			lo = min(lo, rank[a])
		}
		ch.Pos = keep(ch.Pos, lo)
	}
	return q
}

// cptHasPositiveCycle reports whether p has a positive cycle, from the
// transitive closure of the positive dependency relation (Warshall 1962),
// independently of the depth-first search in Complete.
func cptHasPositiveCycle(p *ground.Program) bool {
	n := len(p.Atoms)
	r := make([][]bool, n)
	for i := range r {
		r[i] = make([]bool, n)
	}
	for _, ru := range p.Rules {
		if ru.Head != ground.NoAtom {
			for _, b := range ru.Pos {
				r[ru.Head][b] = true
			}
		}
	}
	for _, ch := range p.Choices {
		for _, a := range ch.Elements {
			for _, b := range ch.Pos {
				r[a][b] = true
			}
		}
	}
	for _, g := range p.Aggregates {
		for _, e := range g.Elements {
			r[g.Atom][e.Atom] = true
		}
	}
	for k := 0; k < n; k++ {
		for i := 0; i < n; i++ {
			if r[i][k] {
				for j := 0; j < n; j++ {
					if r[k][j] {
						r[i][j] = true
					}
				}
			}
		}
	}
	for i := 0; i < n; i++ {
		if r[i][i] {
			return true
		}
	}
	return false
}

var cptAllOptions = brute.Options{Choices: true, Aggregates: true, Penalties: true, Constraints: true, Negation: true}

// cptCheckModels checks that the models of Complete(p) are the stable
// models of p one to one.
func cptCheckModels(t *rapid.T, p *ground.Program) {
	e, err := Complete(p)
	if err != nil {
		t.Fatalf("Complete: %v", err)
	}
	n := len(p.Atoms)
	want := brute.Restrict(brute.StableModels(p), n)
	got := cptProjections(e, n)
	if len(want) == 0 {
		want = nil
	}
	if diff := cmp.Diff(want, got); diff != "" {
		t.Fatalf("CNF models (-stable models +CNF models):\n%s", diff)
	}
	if e.Report.Vars != e.CNF.NumVars || e.Report.Clauses != e.CNF.NumClauses() || e.Report.AuxVars != e.CNF.NumVars-n || e.Report.Literals != len(e.CNF.Lits) {
		t.Fatalf("report %+v does not match the CNF", e.Report)
	}
}

// TestCompleteStableModels checks on random tight programs that the models
// of the completion are the stable models computed by the brute-force
// oracle, one to one: every stable model extends to exactly one CNF model
// and no CNF model projects elsewhere (Fages 1994: for tight programs the
// completion's models are the stable models).
func TestCompleteStableModels(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		// Several programs per case: each is cheap, and rare shapes (an
		// aggregate that matters) need many draws.
		for i := 0; i < cptRounds(); i++ {
			p := cptTighten(brute.Program(cptAllOptions).Draw(t, "program"))
			if cptHasPositiveCycle(p) {
				t.Fatalf("cptTighten left a positive cycle")
			}
			cptCheckModels(t, p)
		}
	})
}

// TestCompleteRaw checks random programs as drawn, positive cycles
// included: Complete refuses exactly the programs with a positive cycle,
// and is exact on the others.
func TestCompleteRaw(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		for i := 0; i < cptRounds(); i++ {
			cptCheckRaw(t, brute.Program(cptAllOptions).Draw(t, "program"))
		}
	})
}

// cptCheckRaw checks Complete on a program that may have positive cycles.
func cptCheckRaw(t *rapid.T, p *ground.Program) {
	{
		cyclic := cptHasPositiveCycle(p)
		_, err := Complete(p)
		if cyclic != (err != nil) {
			t.Fatalf("positive cycle %v, Complete error %v", cyclic, err)
		}
		if cyclic {
			if !strings.Contains(err.Error(), "not tight") {
				t.Fatalf("error %q does not say the program is not tight", err)
			}
			return
		}
		cptCheckModels(t, p)
	}
}

// cptRounds is the number of programs a property test case draws.
func cptRounds() int {
	if testing.Short() {
		return 2
	}
	return 20
}
