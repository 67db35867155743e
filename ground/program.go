// Package ground holds the ground (variable-free) program that trellis
// derives from a rule model, and the grounder that builds it.
//
// A Program is propositional: atoms are small integers (Atom) indexing
// Program.Atoms, terms are interned in Program.Terms. Its meaning is the set
// of its stable models (Gelfond and Lifschitz 1988), with choice rules and
// weight conditions as in Simons, Niemelä and Soininen (2002):
//
//   - a Rule with a head derives the head when its body holds; a Rule without
//     a head (Head == NoAtom) forbids its body;
//   - a Choice lets any subset of its elements be true when its body holds,
//     and then requires the number of true elements to lie within its bounds;
//   - an Aggregate defines its atom to be true exactly when its condition
//     holds in the model (aggregates never lie on a positive cycle);
//   - a Penalty charges its weight at its priority when its atom is true.
//
// Facts are rules with an empty body. Every atom that can be true has an
// entry in Atoms; atoms that can never be true do not appear at all.
package ground

import (
	"math"
	"sort"
	"strconv"
	"strings"
)

// Atom is a ground atom: an index into Program.Atoms.
type Atom int32

// NoAtom is the head of a constraint (a rule without a head).
const NoAtom Atom = -1

// AtomInfo describes one ground atom.
type AtomInfo struct {
	Pred string // predicate name; auxiliary atoms use a name starting with '#'
	Args []Term // arguments, interned in Program.Terms
	// Aux is true for atoms that trellis introduced (rule bodies, aggregate
	// conditions, penalty conditions, unfolded copies, guesses); they are
	// never shown to users.
	Aux bool
	// Copy is the original atom this atom is an unfolded copy of, or NoAtom.
	Copy Atom
}

// Rule is a normal rule `Head if Pos..., not Neg...`, or a constraint
// `forbid Pos..., not Neg...` when Head is NoAtom. A fact has an empty body.
type Rule struct {
	Head Atom
	Pos  []Atom
	Neg  []Atom
}

// NoUpper is the Upper bound of a choice without an upper bound.
const NoUpper = math.MaxInt64

// Choice is a ground choice: when every atom of Pos is true and every atom of
// Neg is false, any subset of Elements may be chosen, and the number of true
// elements must then lie in [Lower, Upper].
type Choice struct {
	Elements []Atom
	Lower    int64
	Upper    int64 // NoUpper when unbounded
	Pos      []Atom
	Neg      []Atom
}

// AggregateKind names the function of an aggregate.
type AggregateKind uint8

// The aggregate functions of the rule language.
const (
	Count AggregateKind = iota
	Sum
	Min
	Max
)

var aggregateNames = [...]string{"count", "sum", "min", "max"}

// String returns the keyword of the aggregate function.
func (k AggregateKind) String() string { return aggregateNames[k] }

// CmpOp is a comparison operator.
type CmpOp uint8

// The comparison operators of the rule language.
const (
	Eq CmpOp = iota
	Ne
	Lt
	Le
	Gt
	Ge
)

var cmpNames = [...]string{"=", "!=", "<", "<=", ">", ">="}

// String returns the source form of the operator.
func (op CmpOp) String() string { return cmpNames[op] }

// Holds reports whether `a op b` holds.
func (op CmpOp) Holds(a, b int64) bool {
	switch op {
	case Eq:
		return a == b
	case Ne:
		return a != b
	case Lt:
		return a < b
	case Le:
		return a <= b
	case Gt:
		return a > b
	}
	return a >= b
}

// WeightedAtom is an element of an aggregate: an atom (true when its tuple
// holds) and the tuple's weight (1 for count, the first tuple element for
// sum, min and max).
type WeightedAtom struct {
	Atom   Atom
	Weight int64
}

// Aggregate defines Atom to be true exactly when `Kind{Elements} Op Bound`
// holds: count and sum add the weights of the true elements; min and max take
// the least or greatest weight of a true element (min of no element is
// +infinity, max of no element is -infinity). The grounder guarantees that the
// sum of the absolute weights fits in 64 bits.
type Aggregate struct {
	Atom     Atom
	Kind     AggregateKind
	Elements []WeightedAtom
	Op       CmpOp
	Bound    int64
}

// Holds evaluates the aggregate's condition under the assignment isTrue.
func (g *Aggregate) Holds(isTrue func(Atom) bool) bool {
	switch g.Kind {
	case Count, Sum:
		var total int64
		for _, e := range g.Elements {
			if isTrue(e.Atom) {
				total += e.Weight
			}
		}
		return g.Op.Holds(total, g.Bound)
	}
	found := false
	var best int64
	for _, e := range g.Elements {
		if !isTrue(e.Atom) {
			continue
		}
		if !found || (g.Kind == Min && e.Weight < best) || (g.Kind == Max && e.Weight > best) {
			best = e.Weight
		}
		found = true
	}
	if !found {
		// min of nothing is +infinity, max of nothing is -infinity.
		inf := g.Kind == Min
		switch g.Op {
		case Eq:
			return false
		case Ne:
			return true
		case Lt, Le:
			return !inf
		}
		return inf
	}
	return g.Op.Holds(best, g.Bound)
}

// Penalty charges Weight at Priority in every model in which Atom is true.
type Penalty struct {
	Atom     Atom
	Weight   int64
	Priority int64
}

// Program is a ground program. Atom indices are stable: later stages that
// add atoms (such as unfolded copies) append them, so the atoms of the source
// program keep their indices.
type Program struct {
	Terms      TermTable
	Atoms      []AtomInfo
	Rules      []Rule
	Choices    []Choice
	Aggregates []Aggregate
	Penalties  []Penalty
	// Shown lists the atoms answers display, sorted in term order.
	Shown []Atom

	index map[string]Atom
}

func atomKey(pred string, args []Term) string {
	var b strings.Builder
	b.WriteString(pred)
	for _, a := range args {
		b.WriteByte('/')
		b.WriteString(strconv.Itoa(int(a)))
	}
	return b.String()
}

// AddAtom returns the atom pred(args...), adding it when it is new.
// Auxiliary atoms should use predicate names starting with '#'.
func (p *Program) AddAtom(pred string, args []Term) Atom {
	if p.index == nil {
		p.reindex()
	}
	k := atomKey(pred, args)
	if a, ok := p.index[k]; ok {
		return a
	}
	a := Atom(len(p.Atoms))
	p.Atoms = append(p.Atoms, AtomInfo{Pred: pred, Args: append([]Term(nil), args...), Aux: strings.HasPrefix(pred, "#"), Copy: NoAtom})
	p.index[k] = a
	return a
}

// NewAux adds a fresh auxiliary atom named #kind(n) for the next free n.
func (p *Program) NewAux(kind string) Atom {
	n := p.Terms.Int(int64(len(p.Atoms)))
	return p.AddAtom("#"+kind, []Term{n})
}

// Lookup returns the atom pred(args...) if the program has it.
func (p *Program) Lookup(pred string, args []Term) (Atom, bool) {
	if p.index == nil {
		p.reindex()
	}
	a, ok := p.index[atomKey(pred, args)]
	return a, ok
}

func (p *Program) reindex() {
	p.index = make(map[string]Atom, len(p.Atoms))
	for i, a := range p.Atoms {
		p.index[atomKey(a.Pred, a.Args)] = Atom(i)
	}
}

// AtomString returns the source form of atom a, `name(arg,arg)` without
// spaces, strings quoted.
func (p *Program) AtomString(a Atom) string { return string(p.AppendAtom(nil, a)) }

// AppendAtom appends the source form of atom a to b.
func (p *Program) AppendAtom(b []byte, a Atom) []byte {
	info := &p.Atoms[a]
	b = append(b, info.Pred...)
	if len(info.Args) == 0 {
		return b
	}
	b = append(b, '(')
	for i, t := range info.Args {
		if i > 0 {
			b = append(b, ',')
		}
		b = p.Terms.Format(b, t)
	}
	return append(b, ')')
}

// CompareAtoms orders atoms as terms: by arity, then predicate name, then
// arguments in term order. It returns -1, 0 or +1.
func (p *Program) CompareAtoms(a, b Atom) int {
	if a == b {
		return 0
	}
	x, y := &p.Atoms[a], &p.Atoms[b]
	if len(x.Args) != len(y.Args) {
		if len(x.Args) < len(y.Args) {
			return -1
		}
		return 1
	}
	if c := strings.Compare(x.Pred, y.Pred); c != 0 {
		return c
	}
	for i := range x.Args {
		if c := p.Terms.Compare(x.Args[i], y.Args[i]); c != 0 {
			return c
		}
	}
	return 0
}

// SortAtoms sorts atoms in term order.
func (p *Program) SortAtoms(atoms []Atom) {
	sort.Slice(atoms, func(i, j int) bool { return p.CompareAtoms(atoms[i], atoms[j]) < 0 })
}

// Clone returns a deep copy of p that shares no slices with it.
func (p *Program) Clone() *Program {
	q := &Program{
		Terms: TermTable{terms: append([]termData(nil), p.Terms.terms...)},
		Atoms: make([]AtomInfo, len(p.Atoms)),
	}
	for i, a := range p.Atoms {
		a.Args = append([]Term(nil), a.Args...)
		q.Atoms[i] = a
	}
	q.Terms.index = make(map[string]Term, len(p.Terms.terms))
	for i, d := range q.Terms.terms {
		q.Terms.index[termKey(d.kind, d.value, d.name, d.args)] = Term(i)
	}
	for _, r := range p.Rules {
		q.Rules = append(q.Rules, Rule{Head: r.Head, Pos: append([]Atom(nil), r.Pos...), Neg: append([]Atom(nil), r.Neg...)})
	}
	for _, c := range p.Choices {
		c.Elements = append([]Atom(nil), c.Elements...)
		c.Pos = append([]Atom(nil), c.Pos...)
		c.Neg = append([]Atom(nil), c.Neg...)
		q.Choices = append(q.Choices, c)
	}
	for _, g := range p.Aggregates {
		g.Elements = append([]WeightedAtom(nil), g.Elements...)
		q.Aggregates = append(q.Aggregates, g)
	}
	q.Penalties = append([]Penalty(nil), p.Penalties...)
	q.Shown = append([]Atom(nil), p.Shown...)
	return q
}
