package compile

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"trellis/ground"
)

// Encoding is the completion of a tight ground program: a CNF whose models
// are the program's stable models, one to one.
type Encoding struct {
	// CNF is the formula. Variables 1..len(AtomVar) are the atoms; the
	// others are auxiliary and each is defined by an equivalence over the
	// atoms, so it takes exactly one value in every model.
	CNF CNF
	// AtomVar gives the variable of every atom of the program.
	AtomVar []Var
	// Meta names the variables of the non-auxiliary atoms, the shown atoms
	// and the penalty weights.
	Meta Meta
	// Report gives the size of the encoding.
	Report CompletionReport
}

// CompletionReport gives the size of an encoding.
type CompletionReport struct {
	Vars     int `json:"vars"`     // variables of the CNF
	Clauses  int `json:"clauses"`  // clauses of the CNF
	AuxVars  int `json:"aux_vars"` // variables that are not atoms (bodies, counters, conditions)
	Literals int `json:"literals"` // literal occurrences in all clauses
}

// Complete returns Clark's completion (Clark 1978) of the tight program p as
// a CNF. For tight programs (no positive cycle) the models of the completion
// are the stable models (Fages 1994; for choices and weight conditions,
// Simons, Niemelä and Soininen 2002). Complete returns an error naming a
// positive cycle when p is not tight; such programs must be unfolded first.
//
// The encoding:
//   - atom a ⟺ (∨ bodies of rules with head a) ∨ (∨ conditions of
//     aggregates defining a), and a → (∨ bodies of choices with element a):
//     a chosen atom needs a choice body that holds;
//   - a body with more than one literal is an auxiliary variable b defined
//     by b ⟺ ∧ literals (identical bodies share one variable); when the
//     body is the only support of its head, the head's variable is b;
//   - a constraint is the clause ∨ ¬literals;
//   - a choice body B with bounds [L, U] over n elements gives B → (≥ L) and
//     B → ¬(≥ U+1), where (≥ k) is an output of a sequential counter
//     (Sinz 2005) whose cells are defined by equivalences, or, for larger
//     k, the count encoded as a sum;
//   - a count or sum condition is a reduced ordered decision diagram over
//     the elements (Eén and Sörensson 2006; interval reduction as in Abío,
//     Nieuwenhuis, Oliveras and Rodríguez-Carbonell 2012), each node an
//     auxiliary variable defined by an if-then-else equivalence, when the
//     diagram is narrow; otherwise a tree of ripple-carry adders of defined
//     gates and a comparator with the bound (narrow structures keep the
//     CNF's treewidth, and so the circuit compiler's work, small); negative
//     weights are turned positive by counting the negated element;
//   - a min or max condition is a disjunction of the elements whose weight
//     passes the bound, or its negation.
func Complete(p *ground.Program) (*Encoding, error) {
	if err := cpCheck(p); err != nil {
		return nil, err
	}
	if err := cpCheckTight(p); err != nil {
		return nil, err
	}
	return cpComplete(p, cpNewBuilder())
}

// cpComplete encodes the checked, tight program p with the gate builder c.
func cpComplete(p *ground.Program, c *cpBuilder) (*Encoding, error) {
	n := len(p.Atoms)
	if n >= math.MaxInt32/2 {
		return nil, fmt.Errorf("compile: %d atoms, more than the %d a CNF can hold", n, math.MaxInt32/2)
	}
	c.f.NumVars = n
	if len(c.andMemo) == 0 {
		c.andMemo = make(map[string]Lit, len(p.Rules)/2)
	}
	refs := n
	for _, r := range p.Rules {
		refs += len(r.Pos) + len(r.Neg) + 1
	}
	for _, ch := range p.Choices {
		refs += len(ch.Pos) + len(ch.Neg) + 4*len(ch.Elements)
	}
	for _, g := range p.Aggregates {
		refs += 8 * len(g.Elements)
	}
	// Rough sizes, to spare most regrowth (common practice, no source).
	c.f.Lits = make([]Lit, 0, 3*refs)
	c.f.Start = make([]int32, 1, refs+1)
	enc := &Encoding{AtomVar: make([]Var, n)}
	for a := range enc.AtomVar {
		enc.AtomVar[a] = Var(a + 1)
	}

	// Supports: for every atom, the literals that derive it (rule bodies,
	// aggregate conditions) and the literals that allow it (choice bodies).
	// An atom with a single support that is a rule is defined as its body
	// directly: the body's gate is the atom's variable, not a new one.
	nsup := make([]int32, n)
	for _, r := range p.Rules {
		if r.Head != ground.NoAtom {
			nsup[r.Head]++
		}
	}
	for _, ch := range p.Choices {
		for _, a := range ch.Elements {
			nsup[a]++
		}
	}
	for _, g := range p.Aggregates {
		nsup[g.Atom]++
	}
	var sup []cpSupport
	for _, r := range p.Rules {
		if r.Head == ground.NoAtom {
			continue
		}
		var as Lit
		if nsup[r.Head] == 1 {
			as = Var(r.Head + 1).Pos()
		}
		sup = append(sup, cpSupport{atom: r.Head, lit: c.body(r.Pos, r.Neg, as), derive: true})
	}
	choiceBody := make([]Lit, len(p.Choices))
	for i := range p.Choices {
		ch := &p.Choices[i]
		choiceBody[i] = c.body(ch.Pos, ch.Neg, 0)
		for _, a := range ch.Elements {
			sup = append(sup, cpSupport{atom: a, lit: choiceBody[i]})
		}
	}
	for i := range p.Aggregates {
		g := &p.Aggregates[i]
		sup = append(sup, cpSupport{atom: g.Atom, lit: c.aggregate(g), derive: true})
	}
	// Group the supports by atom (counting sort, stable).
	start := make([]int32, n+1)
	for _, s := range sup {
		start[s.atom+1]++
	}
	for a := 0; a < n; a++ {
		start[a+1] += start[a]
	}
	byAtom := make([]cpSupport, len(sup))
	next := append([]int32(nil), start[:n]...)
	for _, s := range sup {
		byAtom[next[s.atom]] = s
		next[s.atom]++
	}
	var lits []Lit
	for a := 0; a < n; a++ {
		x := Var(a + 1).Pos()
		lits = append(lits[:0], x.Not())
		for _, s := range byAtom[start[a]:start[a+1]] {
			lits = append(lits, s.lit)
			if s.derive {
				c.clause(s.lit.Not(), x)
			}
		}
		// a → ∨ supports; with no support at all this is the unit ¬a.
		c.clause(lits...)
	}

	// Constraints.
	for _, r := range p.Rules {
		if r.Head != ground.NoAtom {
			continue
		}
		lits = lits[:0]
		for _, a := range r.Pos {
			lits = append(lits, Var(a+1).Neg())
		}
		for _, a := range r.Neg {
			lits = append(lits, Var(a+1).Pos())
		}
		c.clause(lits...)
	}

	// Choice bounds.
	for i := range p.Choices {
		ch := &p.Choices[i]
		m := int64(len(ch.Elements))
		var ks []int64
		if ch.Lower > 0 {
			ks = append(ks, ch.Lower)
		}
		if ch.Upper < m {
			ks = append(ks, ch.Upper+1) // Upper < m, so no overflow
		}
		if len(ks) == 0 {
			continue
		}
		xs := make([]Lit, len(ch.Elements))
		for j, a := range ch.Elements {
			xs[j] = Var(a + 1).Pos()
		}
		var out []Lit
		if slices.Max(ks) <= c.maxWidth {
			out = c.atLeast(xs, ks)
		} else {
			// A wide counter: count with the sum encoding, whose diagram
			// for unit weights is a counter pruned to the cells that
			// matter and which turns to adders when that is still wide.
			elems := make([]ground.WeightedAtom, len(ch.Elements))
			for j, a := range ch.Elements {
				elems[j] = ground.WeightedAtom{Atom: a, Weight: 1}
			}
			s := c.newSum(elems)
			for _, k := range ks {
				out = append(out, s.atLeast(k))
			}
		}
		j := 0
		if ch.Lower > 0 {
			c.clause(choiceBody[i].Not(), out[j])
			j++
		}
		if ch.Upper < m {
			c.clause(choiceBody[i].Not(), out[j].Not())
		}
	}
	if c.err != nil {
		return nil, c.err
	}

	// Meta: atoms in term order, shown atoms, weights.
	var named []ground.Atom
	for a := range p.Atoms {
		if !p.Atoms[a].Aux {
			named = append(named, ground.Atom(a))
		}
	}
	p.SortAtoms(named)
	index := make([]int32, n)
	for a := range index {
		index[a] = -1
	}
	enc.Meta.Atoms = make([]NamedVar, len(named))
	for i, a := range named {
		index[a] = int32(i)
		enc.Meta.Atoms[i] = NamedVar{Name: p.AtomString(a), Var: enc.AtomVar[a]}
	}
	for _, a := range p.Shown {
		if index[a] < 0 {
			return nil, fmt.Errorf("compile: shown atom %s is auxiliary", p.AtomString(a))
		}
		enc.Meta.Shown = append(enc.Meta.Shown, index[a])
	}
	for _, pen := range p.Penalties {
		enc.Meta.Weights = append(enc.Meta.Weights, VarWeight{Var: enc.AtomVar[pen.Atom], Weight: pen.Weight, Priority: pen.Priority})
	}

	enc.CNF = c.f
	if enc.CNF.NumClauses() == 0 {
		enc.CNF.Start = []int32{0}
	}
	enc.Report = CompletionReport{
		Vars:     enc.CNF.NumVars,
		Clauses:  enc.CNF.NumClauses(),
		AuxVars:  enc.CNF.NumVars - n,
		Literals: len(enc.CNF.Lits),
	}
	return enc, nil
}

// cpSupport is one way an atom can become true: a literal (a body or a
// condition) that derives it, or, when derive is false, that allows it to be
// chosen.
type cpSupport struct {
	atom   ground.Atom
	lit    Lit
	derive bool
}

// cpCheck reports an atom reference outside the program.
func cpCheck(p *ground.Program) error {
	n := ground.Atom(len(p.Atoms))
	bad := func(a ground.Atom) bool { return a < 0 || a >= n }
	badAll := func(as []ground.Atom) bool {
		for _, a := range as {
			if bad(a) {
				return true
			}
		}
		return false
	}
	for i, r := range p.Rules {
		if (r.Head != ground.NoAtom && bad(r.Head)) || badAll(r.Pos) || badAll(r.Neg) {
			return fmt.Errorf("compile: rule %d refers to an atom outside the program", i)
		}
	}
	for i, ch := range p.Choices {
		if badAll(ch.Elements) || badAll(ch.Pos) || badAll(ch.Neg) {
			return fmt.Errorf("compile: choice %d refers to an atom outside the program", i)
		}
	}
	for i, g := range p.Aggregates {
		if bad(g.Atom) {
			return fmt.Errorf("compile: aggregate %d refers to an atom outside the program", i)
		}
		for _, e := range g.Elements {
			if bad(e.Atom) {
				return fmt.Errorf("compile: aggregate %d refers to an atom outside the program", i)
			}
		}
		if g.Kind > ground.Max || g.Op > ground.Ge {
			return fmt.Errorf("compile: aggregate %d has an unknown function or operator", i)
		}
		var total int64 // for count and sum, Σ |weight| must fit in 64 bits
		for _, e := range g.Elements {
			if g.Kind != ground.Count && g.Kind != ground.Sum {
				break
			}
			w := e.Weight
			if w < 0 {
				w = -w // MinInt64 stays negative and is caught below
			}
			if w < 0 || total > math.MaxInt64-w {
				return fmt.Errorf("compile: aggregate %d: the sum of its absolute weights exceeds 64 bits", i)
			}
			total += w
		}
	}
	for i, pen := range p.Penalties {
		if bad(pen.Atom) {
			return fmt.Errorf("compile: penalty %d refers to an atom outside the program", i)
		}
	}
	for _, a := range p.Shown {
		if bad(a) {
			return fmt.Errorf("compile: a shown atom is outside the program")
		}
	}
	return nil
}

// cpCheckTight returns an error naming a positive cycle of p, if there is
// one. An atom depends positively on the positive body atoms of its rules
// and of the choices it is an element of, and an aggregate atom on the
// elements of its aggregate. The check is a depth-first search over the
// dependency graph (a topological sort), linear in the size of p.
func cpCheckTight(p *ground.Program) error {
	n := len(p.Atoms)
	start := make([]int32, n+1)
	for _, r := range p.Rules {
		if r.Head != ground.NoAtom {
			start[r.Head+1] += int32(len(r.Pos))
		}
	}
	for _, ch := range p.Choices {
		for _, a := range ch.Elements {
			start[a+1] += int32(len(ch.Pos))
		}
	}
	for _, g := range p.Aggregates {
		start[g.Atom+1] += int32(len(g.Elements))
	}
	for a := 0; a < n; a++ {
		start[a+1] += start[a]
	}
	edges := make([]ground.Atom, start[n])
	next := append([]int32(nil), start[:n]...)
	add := func(from, to ground.Atom) {
		edges[next[from]] = to
		next[from]++
	}
	for _, r := range p.Rules {
		if r.Head != ground.NoAtom {
			for _, b := range r.Pos {
				add(r.Head, b)
			}
		}
	}
	for _, ch := range p.Choices {
		for _, a := range ch.Elements {
			for _, b := range ch.Pos {
				add(a, b)
			}
		}
	}
	for _, g := range p.Aggregates {
		for _, e := range g.Elements {
			add(g.Atom, e.Atom)
		}
	}

	const (
		white = iota
		grey
		black
	)
	color := make([]uint8, n)
	type frame struct {
		atom ground.Atom
		edge int32
	}
	var stack []frame
	for root := 0; root < n; root++ {
		if color[root] != white {
			continue
		}
		color[root] = grey
		stack = append(stack[:0], frame{ground.Atom(root), start[root]})
		for len(stack) > 0 {
			top := &stack[len(stack)-1]
			if top.edge == start[top.atom+1] {
				color[top.atom] = black
				stack = stack[:len(stack)-1]
				continue
			}
			b := edges[top.edge]
			top.edge++
			switch color[b] {
			case white:
				color[b] = grey
				stack = append(stack, frame{b, start[b]})
			case grey:
				// The grey atoms from b to the top of the stack form a cycle.
				i := len(stack) - 1
				for stack[i].atom != b {
					i--
				}
				var names []string
				for _, f := range stack[i:] {
					if len(names) == 8 {
						names = append(names, "...")
						break
					}
					names = append(names, p.AtomString(f.atom))
				}
				names = append(names, p.AtomString(b))
				return fmt.Errorf("compile: the program is not tight: positive cycle %s; unfold it before completion", strings.Join(names, " -> "))
			}
		}
	}
	return nil
}

// The constant literals of cpBuilder. They never appear in clauses.
const (
	cpTrue  Lit = math.MaxInt32
	cpFalse Lit = -cpTrue
)

// cpBuilder builds a CNF of defined gates: every auxiliary variable it makes
// is defined by an equivalence, so its value is a function of the inputs.
// Gates fold constants and are hash-consed, so equal gates share a variable.
type cpBuilder struct {
	f CNF
	// maxWidth bounds the width of the counters and decision diagrams
	// used for choice bounds and sums (see cpSum.diagramWidth); wider
	// ones are adder trees instead.
	maxWidth int64
	// maxNodes bounds the size of the decision diagrams used for sums
	// wider than maxWidth (see cpSum.diagramSize); larger ones are adder
	// trees instead.
	maxNodes int64
	andMemo  map[string]Lit
	iteMemo  map[[3]Lit]Lit
	buf      []Lit // scratch of clause
	bodyBuf  []Lit // scratch of body
	negBuf   []Lit // scratch of and
	key      []byte
	err      error
}

// cpMaxWidth is the default of cpBuilder.maxWidth, from measurements (see
// cpSum.diagramWidth).
const cpMaxWidth = 4

// cpMaxNodes is the default of cpBuilder.maxNodes.
const cpMaxNodes = 200000

func cpNewBuilder() *cpBuilder {
	return &cpBuilder{
		maxWidth: cpMaxWidth,
		maxNodes: cpMaxNodes,
		andMemo:  make(map[string]Lit),
		iteMemo:  make(map[[3]Lit]Lit),
	}
}

func (c *cpBuilder) newVar() Lit {
	if c.f.NumVars >= math.MaxInt32-1 {
		if c.err == nil {
			c.err = fmt.Errorf("compile: the encoding needs more than %d variables", math.MaxInt32-2)
		}
		return cpFalse
	}
	return c.f.NewVar().Pos()
}

// clause adds the clause ∨ lits, without constant false literals and
// duplicates; a clause with a true or complementary literals is dropped.
func (c *cpBuilder) clause(lits ...Lit) {
	buf := c.buf[:0]
	for _, l := range lits {
		switch l {
		case cpTrue:
			return
		case cpFalse:
			continue
		}
		buf = append(buf, l)
	}
	cpSort(buf)
	out := buf[:0]
	for i, l := range buf {
		if i > 0 && l.Var() == buf[i-1].Var() {
			if l == buf[i-1] {
				continue
			}
			c.buf = buf
			return // l ∨ ¬l
		}
		out = append(out, l)
	}
	c.f.AddClause(out...)
	c.buf = buf
}

// cpLess orders literals by variable, negative first.
func cpLess(a, b Lit) bool {
	if a.Var() != b.Var() {
		return a.Var() < b.Var()
	}
	return a < b
}

// cpSort sorts lits by cpLess: by insertion for the short clauses and
// bodies that dominate, else by slices.SortFunc.
func cpSort(lits []Lit) {
	if len(lits) > 12 {
		slices.SortFunc(lits, func(a, b Lit) int {
			switch {
			case cpLess(a, b):
				return -1
			case cpLess(b, a):
				return 1
			}
			return 0
		})
		return
	}
	for i := 1; i < len(lits); i++ {
		for j := i; j > 0 && cpLess(lits[j], lits[j-1]); j-- {
			lits[j], lits[j-1] = lits[j-1], lits[j]
		}
	}
}

// body returns a literal equivalent to the conjunction of the positive
// atoms pos and the negated atoms neg; a new gate uses the literal as, if
// it is not 0 (see andAs).
func (c *cpBuilder) body(pos, neg []ground.Atom, as Lit) Lit {
	lits := c.bodyBuf[:0]
	for _, a := range pos {
		lits = append(lits, Var(a+1).Pos())
	}
	for _, a := range neg {
		lits = append(lits, Var(a+1).Neg())
	}
	c.bodyBuf = lits
	return c.andAs(lits, as)
}

// and returns a literal equivalent to the conjunction of lits. It may
// reorder lits.
func (c *cpBuilder) and(lits []Lit) Lit { return c.andAs(lits, 0) }

// andAs is and, but when the conjunction needs a new gate it uses the
// literal as (unless as is 0) instead of a fresh variable: the caller
// promises that nothing else defines as.
func (c *cpBuilder) andAs(lits []Lit, as Lit) Lit {
	out := lits[:0]
	for _, l := range lits {
		switch l {
		case cpTrue:
			continue
		case cpFalse:
			return cpFalse
		}
		out = append(out, l)
	}
	cpSort(out)
	k := 0
	for i, l := range out {
		if i > 0 && l.Var() == out[k-1].Var() {
			if l == out[k-1] {
				continue
			}
			return cpFalse // l ∧ ¬l
		}
		out[k] = l
		k++
	}
	out = out[:k]
	switch len(out) {
	case 0:
		return cpTrue
	case 1:
		return out[0]
	}
	key := c.key[:0]
	for _, l := range out {
		key = append(key, byte(l), byte(l>>8), byte(l>>16), byte(l>>24))
	}
	c.key = key
	if v, ok := c.andMemo[string(key)]; ok {
		return v
	}
	v := as
	if v == 0 {
		v = c.newVar()
		if v == cpFalse {
			return v
		}
	}
	c.andMemo[string(key)] = v
	// v → l for every l; ∧ l → v.
	for _, l := range out {
		c.clause(v.Not(), l)
	}
	neg := append(c.negBuf[:0], v)
	for _, l := range out {
		neg = append(neg, l.Not())
	}
	c.negBuf = neg
	c.clause(neg...)
	return v
}

// or returns a literal equivalent to the disjunction of lits. It may
// change lits.
func (c *cpBuilder) or(lits []Lit) Lit {
	for i, l := range lits {
		lits[i] = l.Not()
	}
	return c.and(lits).Not()
}

// ite returns a literal equivalent to (x ∧ hi) ∨ (¬x ∧ lo).
func (c *cpBuilder) ite(x, hi, lo Lit) Lit {
	switch {
	case x == cpTrue:
		return hi
	case x == cpFalse:
		return lo
	case hi == lo:
		return hi
	case hi == x || hi == cpTrue:
		return c.or([]Lit{x, lo})
	case hi == x.Not() || hi == cpFalse:
		return c.and([]Lit{x.Not(), lo})
	case lo == x.Not() || lo == cpTrue:
		return c.or([]Lit{x.Not(), hi})
	case lo == x || lo == cpFalse:
		return c.and([]Lit{x, hi})
	}
	// Normalize so the selector is positive.
	if x.IsNeg() {
		x, hi, lo = x.Not(), lo, hi
	}
	key := [3]Lit{x, hi, lo}
	if v, ok := c.iteMemo[key]; ok {
		return v
	}
	v := c.newVar()
	if v == cpFalse {
		return v
	}
	c.iteMemo[key] = v
	c.clause(x.Not(), hi.Not(), v)
	c.clause(x.Not(), hi, v.Not())
	c.clause(x, lo.Not(), v)
	c.clause(x, lo, v.Not())
	// Redundant clauses that help propagation (Eén and Sörensson 2006).
	c.clause(hi.Not(), lo.Not(), v)
	c.clause(hi, lo, v.Not())
	return v
}

// atLeast returns, for every k of ks, a literal equivalent to "at least k
// of xs are true", from one sequential counter (Sinz 2005) whose cells
// s[i][j] ⟺ (at least j of x1..xi) are defined by
// s[i][j] ⟺ ite(xi, s[i-1][j-1], s[i-1][j]). Only the cells the outputs
// depend on are built.
func (c *cpBuilder) atLeast(xs []Lit, ks []int64) []Lit {
	n := int64(len(xs))
	out := make([]Lit, len(ks))
	kmin, kmax := n+1, int64(0)
	for _, k := range ks {
		if k >= 1 && k <= n {
			kmin = min(kmin, k)
			kmax = max(kmax, k)
		}
	}
	if kmax > 0 {
		prev := make([]Lit, kmax+1)
		cur := make([]Lit, kmax+1)
		prev[0] = cpTrue
		for j := int64(1); j <= kmax; j++ {
			prev[j] = cpFalse
		}
		for i := int64(1); i <= n; i++ {
			cur[0] = cpTrue
			// Cells with j < kmin-(n-i) cannot reach an output.
			lo := max(int64(1), kmin-(n-i))
			for j := int64(1); j <= kmax; j++ {
				switch {
				case j > i:
					cur[j] = cpFalse
				case j < lo:
					cur[j] = cpFalse // unused placeholder
				default:
					cur[j] = c.ite(xs[i-1], prev[j-1], prev[j])
				}
			}
			prev, cur = cur, prev
		}
		for i, k := range ks {
			if k >= 1 && k <= n {
				out[i] = prev[k]
			}
		}
	}
	for i, k := range ks {
		switch {
		case k <= 0:
			out[i] = cpTrue
		case k > n:
			out[i] = cpFalse
		}
	}
	return out
}
