package compile

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"strings"
	"testing"

	"github.com/crillab/gophersat/solver"
	"github.com/google/go-cmp/cmp"
	"pgregory.net/rapid"

	"trellis/ground"
	"trellis/internal/brute"
	"trellis/unfold"
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
	// Also with every sum and counter as adders, and as diagrams.
	for _, w := range cptWidths[1:] {
		c := cptBuilderWidth(w)
		e2, err := cpComplete(p, c)
		if err != nil {
			t.Fatalf("Complete with width limit %d: %v", w, err)
		}
		if got, want := cptProjections(e2, len(p.Atoms)), cptProjections(e, len(p.Atoms)); !slices.Equal(got, want) {
			t.Fatalf("models with width limit %d %v, by default %v", w, got, want)
		}
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
	// gophersat, an independent CDCL solver, must find the CNF satisfiable
	// exactly when there is a stable model, and its model must project to
	// a stable model. (Its model counter is not used: in v1.4.0 it
	// miscounts and panics on some of these formulas.)
	s := cptGophersat(&e.CNF)
	if sat := s.Solve() == solver.Sat; sat != (len(want) > 0) {
		t.Fatalf("gophersat says satisfiable %v with %d stable models", sat, len(want))
	} else if sat {
		m := s.Model()
		b := make([]byte, n)
		for i := range b {
			b[i] = '0'
			if m[e.AtomVar[i]-1] {
				b[i] = '1'
			}
		}
		k := sort.SearchStrings(want, string(b))
		if k == len(want) || want[k] != string(b) {
			t.Fatalf("gophersat's model %s is not a stable model", b)
		}
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
			opts := cptAllOptions
			if i%2 == 1 {
				opts.MaxAtoms, opts.MaxRules = 12, 30 // larger, denser programs
			}
			p := cptTighten(brute.Program(opts).Draw(t, "program"))
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

// cptRounds is the number of programs a property test case draws.
func cptRounds() int {
	if testing.Short() {
		return 2
	}
	return 20
}

// cptAtoms returns a program with the 0-arity atoms named by names.
func cptAtoms(names ...string) *ground.Program {
	p := &ground.Program{}
	for _, s := range names {
		p.AddAtom(s, nil)
	}
	return p
}

// TestCompleteChoiceCounts counts the models of `choose between L and U of
// n atoms`, which must be Σ_{k=L..U} C(n, k) (binomial coefficients,
// textbook formula), through the CNF alone.
func TestCompleteChoiceCounts(t *testing.T) {
	binom := func(n, k int64) int64 {
		r := int64(1)
		for i := int64(1); i <= k; i++ {
			r = r * (n - k + i) / i
		}
		return r
	}
	for n := int64(0); n <= 7; n++ {
		for lower := int64(-1); lower <= n+1; lower++ {
			for _, upper := range []int64{lower - 1, lower, lower + 2, n, ground.NoUpper} {
				p := &ground.Program{}
				ch := ground.Choice{Lower: lower, Upper: upper}
				for i := int64(0); i < n; i++ {
					ch.Elements = append(ch.Elements, p.AddAtom("x", []ground.Term{p.Terms.Int(i)}))
				}
				p.Choices = []ground.Choice{ch}
				var want int64
				for k := max(lower, 0); k <= min(upper, n); k++ {
					want += binom(n, k)
				}
				// Every encoding of the bounds.
				for _, maxWidth := range cptWidths {
					c := cptBuilderWidth(maxWidth)
					e, err := cpComplete(p, c)
					if err != nil {
						t.Fatal(err)
					}
					got := int64(len(cptProjections(e, int(n))))
					if got != want {
						t.Errorf("choose between %d and %d of %d (width limit %d): %d models, want %d", lower, upper, n, maxWidth, got, want)
					}
				}
			}
		}
	}
}

// TestCompleteMeta checks the names, order, shown indices and weights of
// the encoding's metadata. The expected order follows the term order of
// LANGUAGE.md section 2: by arity, then name, then arguments, integers
// numerically.
func TestCompleteMeta(t *testing.T) {
	p := &ground.Program{}
	p10 := p.AddAtom("p", []ground.Term{p.Terms.Int(10)})
	qb := p.AddAtom("q", []ground.Term{p.Terms.Name("b")})
	aux := p.NewAux("pen")
	p2 := p.AddAtom("p", []ground.Term{p.Terms.Int(2)})
	a := p.AddAtom("a", nil)
	p.Rules = []ground.Rule{{Head: a}, {Head: aux, Pos: []ground.Atom{p2}}}
	p.Choices = []ground.Choice{{Elements: []ground.Atom{p10, qb, p2}, Upper: ground.NoUpper}}
	p.Penalties = []ground.Penalty{{Atom: aux, Weight: 5, Priority: 1}, {Atom: qb, Weight: -2}}
	p.Shown = []ground.Atom{p2, qb}
	e, err := Complete(p)
	if err != nil {
		t.Fatal(err)
	}
	want := Meta{
		Atoms: []NamedVar{
			{Name: "a", Var: e.AtomVar[a]},
			{Name: "p(2)", Var: e.AtomVar[p2]},
			{Name: "p(10)", Var: e.AtomVar[p10]},
			{Name: "q(b)", Var: e.AtomVar[qb]},
		},
		Shown: []int32{1, 3},
		Weights: []VarWeight{
			{Var: e.AtomVar[aux], Weight: 5, Priority: 1},
			{Var: e.AtomVar[qb], Weight: -2},
		},
	}
	if diff := cmp.Diff(want, e.Meta); diff != "" {
		t.Errorf("meta (-want +got):\n%s", diff)
	}
	seen := map[Var]bool{}
	for i, v := range e.AtomVar {
		if v < 1 || int(v) > e.CNF.NumVars || seen[v] {
			t.Errorf("atom %d has variable %d: not a fresh variable of the CNF", i, v)
		}
		seen[v] = true
	}
}

// TestCompleteErrors checks that Complete refuses programs it cannot
// encode, with a message that says why.
func TestCompleteErrors(t *testing.T) {
	A := func(i int) ground.Atom { return ground.Atom(i) }
	as := func(x ...int) []ground.Atom {
		var out []ground.Atom
		for _, i := range x {
			out = append(out, A(i))
		}
		return out
	}
	tests := []struct {
		name string
		edit func(p *ground.Program)
		want string
	}{
		{"self loop", func(p *ground.Program) { p.Rules = []ground.Rule{{Head: A(0), Pos: as(0)}} },
			"not tight: positive cycle a -> a"},
		{"two-atom loop", func(p *ground.Program) {
			p.Rules = []ground.Rule{{Head: A(0), Pos: as(1)}, {Head: A(1), Pos: as(2, 0)}}
		}, "not tight: positive cycle a -> b -> a"},
		{"choice loop", func(p *ground.Program) {
			p.Choices = []ground.Choice{{Elements: as(1), Upper: ground.NoUpper, Pos: as(2)}}
			p.Rules = []ground.Rule{{Head: A(2), Pos: as(1)}}
		}, "not tight: positive cycle b -> c -> b"},
		{"aggregate loop", func(p *ground.Program) {
			p.Aggregates = []ground.Aggregate{{Atom: A(2), Kind: ground.Sum, Elements: []ground.WeightedAtom{{Atom: A(0), Weight: -1}}, Op: ground.Lt}}
			p.Rules = []ground.Rule{{Head: A(0), Pos: as(2)}}
		}, "not tight: positive cycle a -> c -> a"},
		{"negative loop is tight", func(p *ground.Program) {
			p.Rules = []ground.Rule{{Head: A(0), Neg: as(1)}, {Head: A(1), Neg: as(0)}}
		}, ""},
		{"atom out of range", func(p *ground.Program) { p.Rules = []ground.Rule{{Head: A(0), Pos: as(7)}} },
			"rule 0 refers to an atom outside the program"},
		{"negative atom", func(p *ground.Program) { p.Penalties = []ground.Penalty{{Atom: -3}} },
			"penalty 0 refers to an atom outside the program"},
		{"bad operator", func(p *ground.Program) { p.Aggregates = []ground.Aggregate{{Atom: A(0), Op: 9}} },
			"unknown function or operator"},
		{"weights overflow", func(p *ground.Program) {
			p.Aggregates = []ground.Aggregate{{Atom: A(0), Kind: ground.Sum, Elements: []ground.WeightedAtom{{Atom: A(1), Weight: math.MaxInt64}, {Atom: A(2), Weight: -1}}}}
		}, "aggregate 0: the sum of its absolute weights exceeds 64 bits"},
		{"sum weight -2^63", func(p *ground.Program) {
			p.Aggregates = []ground.Aggregate{{Atom: A(0), Kind: ground.Sum, Elements: []ground.WeightedAtom{{Atom: A(1), Weight: math.MinInt64}}}}
		}, "exceeds 64 bits"},
		{"min weight -2^63", func(p *ground.Program) {
			p.Aggregates = []ground.Aggregate{{Atom: A(0), Kind: ground.Min, Elements: []ground.WeightedAtom{{Atom: A(1), Weight: math.MinInt64}, {Atom: A(2), Weight: math.MaxInt64}}}}
		}, ""},
		{"shown auxiliary atom", func(p *ground.Program) {
			p.Shown = []ground.Atom{p.NewAux("body")}
		}, "shown atom #body(3) is auxiliary"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			p := cptAtoms("a", "b", "c")
			tc.edit(p)
			_, err := Complete(p)
			switch {
			case tc.want == "" && err != nil:
				t.Fatalf("unexpected error %v", err)
			case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
				t.Fatalf("error %v, want one containing %q", err, tc.want)
			}
		})
	}
}

// TestCompleteUnfolded checks the pipeline on random programs with positive
// cycles: unfold.Unfold makes them tight, and the models of the completion,
// restricted to the original atoms, are the stable models of the original
// program one to one (brute-force oracle).
func TestCompleteUnfolded(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		for range max(cptRounds()/4, 1) {
			p := brute.Program(cptAllOptions).Draw(t, "program")
			q, _, err := unfold.Unfold(context.Background(), p, unfold.Options{})
			if err != nil {
				t.Fatalf("Unfold: %v", err)
			}
			e, err := Complete(q)
			if err != nil {
				t.Fatalf("Complete of the unfolded program: %v", err)
			}
			n := len(p.Atoms)
			want := brute.Restrict(brute.StableModels(p), n)
			if len(want) == 0 {
				want = nil
			}
			if diff := cmp.Diff(want, cptProjections(e, n)); diff != "" {
				t.Fatalf("CNF models of the unfolded program (-stable models +CNF models):\n%s", diff)
			}
		}
	})
}

// cptReachProgram builds the ground program that chooses any subset of the
// undirected edges of a graph on nodes 1..k and derives reach(v) for the
// nodes reachable from node 1 (a dense positive recursion), optionally
// forbidding unreachable nodes.
func cptReachProgram(k int, edges [][2]int, connected bool) *ground.Program {
	p := &ground.Program{}
	atom := func(pred string, xs ...int) ground.Atom {
		var args []ground.Term
		for _, x := range xs {
			args = append(args, p.Terms.Int(int64(x)))
		}
		return p.AddAtom(pred, args)
	}
	ch := ground.Choice{Upper: ground.NoUpper}
	for _, e := range edges {
		ch.Elements = append(ch.Elements, atom("buy", e[0], e[1]))
	}
	p.Choices = []ground.Choice{ch}
	p.Rules = append(p.Rules, ground.Rule{Head: atom("reach", 1)})
	for i, e := range edges {
		b := ch.Elements[i]
		for _, d := range [][2]int{e, {e[1], e[0]}} {
			l := atom("link", d[0], d[1])
			p.Rules = append(p.Rules, ground.Rule{Head: l, Pos: []ground.Atom{b}})
			p.Rules = append(p.Rules, ground.Rule{Head: atom("reach", d[1]), Pos: []ground.Atom{atom("reach", d[0]), l}})
		}
	}
	if connected {
		for v := 2; v <= k; v++ {
			p.Rules = append(p.Rules, ground.Rule{Head: ground.NoAtom, Neg: []ground.Atom{atom("reach", v)}})
		}
	}
	for a := range p.Atoms {
		p.Shown = append(p.Shown, ground.Atom(a))
	}
	p.SortAtoms(p.Shown)
	return p
}

// TestCompleteReachability checks the completion of unfolded reachability
// programs on complete and random graphs of up to 5 nodes: the CNF models
// must be the stable models of the unfolded program, one to one. That the
// unfolded program keeps the original stable models is unfold's promise; a
// loss there is reported as a skip naming it, not as a failure of the
// completion. On the complete graph K_k with every node reachable, the
// models are the connected spanning subgraphs of K_k, counted by OEIS
// A001187 (connected labeled graphs on k nodes: 1, 1, 4, 38, 728).
func TestCompleteReachability(t *testing.T) {
	a001187 := []int{1, 1, 1, 4, 38, 728} // OEIS A001187, from index 0
	type graph struct {
		k        int
		edges    [][2]int
		complete bool
	}
	var graphs []graph
	for k := 2; k <= 5; k++ {
		g := graph{k: k, complete: true}
		for u := 1; u <= k; u++ {
			for v := u + 1; v <= k; v++ {
				g.edges = append(g.edges, [2]int{u, v})
			}
		}
		graphs = append(graphs, g)
	}
	r := rand.New(rand.NewPCG(5, 6))
	for range 4 {
		g := graph{k: 4 + r.IntN(2)}
		for u := 1; u <= g.k; u++ {
			for v := u + 1; v <= g.k; v++ {
				if r.IntN(3) > 0 {
					g.edges = append(g.edges, [2]int{u, v})
				}
			}
		}
		graphs = append(graphs, g)
	}
	for _, g := range graphs {
		for _, connected := range []bool{false, true} {
			t.Run(fmt.Sprintf("%v connected %v", g.edges, connected), func(t *testing.T) {
				p := cptReachProgram(g.k, g.edges, connected)
				// No exhaustive search for sequences: it is slow on K_5
				// and the constructions must be valid too.
				q, _, err := unfold.Unfold(context.Background(), p, unfold.Options{ExactLimit: -1})
				if err != nil {
					t.Fatalf("Unfold: %v", err)
				}
				e, err := Complete(q)
				if err != nil {
					t.Fatalf("Complete: %v", err)
				}
				m := len(q.Atoms)
				stable := brute.Restrict(brute.StableModels(q), m)
				models := cptProjections(e, m)
				if len(stable) == 0 {
					stable = nil
				}
				if diff := cmp.Diff(stable, models); diff != "" {
					t.Fatalf("CNF models (-stable models of the unfolded program +CNF models):\n%s", diff)
				}
				n := len(p.Atoms)
				want := brute.Restrict(brute.StableModels(p), n)
				got := brute.Restrict(brute.StableModels(q), n)
				if !slices.Equal(want, got) {
					t.Skipf("unfold: the unfolded program has %d stable models on the original atoms, the original %d (a fault before completion)", len(got), len(want))
				}
				if g.complete && connected && len(models) != a001187[g.k] {
					t.Fatalf("K_%d: %d models, want %d connected spanning subgraphs", g.k, len(models), a001187[g.k])
				}
			})
		}
	}
}

// TestCompleteBadInput draws programs with arbitrary atom references,
// functions, operators, bounds and weights: Complete must return an error
// or an encoding, never panic, and an encoding's literals must lie within
// its variables.
func TestCompleteBadInput(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(0, 4).Draw(t, "atoms")
		p := cptAtoms([]string{"a", "b", "c", "d"}[:n]...)
		atom := func() ground.Atom { return ground.Atom(rapid.IntRange(-2, n+1).Draw(t, "atom")) }
		atoms := func() []ground.Atom {
			var out []ground.Atom
			for range rapid.IntRange(0, 3).Draw(t, "count") {
				out = append(out, atom())
			}
			return out
		}
		num := rapid.OneOf(rapid.Int64(), rapid.Int64Range(-3, 3), rapid.SampledFrom([]int64{math.MinInt64, math.MaxInt64, ground.NoUpper}))
		for range rapid.IntRange(0, 3).Draw(t, "rules") {
			p.Rules = append(p.Rules, ground.Rule{Head: atom(), Pos: atoms(), Neg: atoms()})
		}
		for range rapid.IntRange(0, 2).Draw(t, "choices") {
			p.Choices = append(p.Choices, ground.Choice{Elements: atoms(), Lower: num.Draw(t, "lower"), Upper: num.Draw(t, "upper"), Pos: atoms(), Neg: atoms()})
		}
		for range rapid.IntRange(0, 2).Draw(t, "aggregates") {
			g := ground.Aggregate{Atom: atom(), Kind: ground.AggregateKind(rapid.IntRange(0, 5).Draw(t, "kind")), Op: ground.CmpOp(rapid.IntRange(0, 7).Draw(t, "op")), Bound: num.Draw(t, "bound")}
			for _, a := range atoms() {
				g.Elements = append(g.Elements, ground.WeightedAtom{Atom: a, Weight: num.Draw(t, "weight")})
			}
			p.Aggregates = append(p.Aggregates, g)
		}
		p.Penalties = append(p.Penalties, ground.Penalty{Atom: atom(), Weight: num.Draw(t, "weight")})
		p.Shown = atoms()
		e, err := Complete(p)
		if err != nil {
			return
		}
		for _, l := range e.CNF.Lits {
			if l == 0 || int(l.Var()) > e.CNF.NumVars {
				t.Fatalf("literal %d outside variables 1..%d", l, e.CNF.NumVars)
			}
		}
	})
}
