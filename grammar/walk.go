package grammar

// Inspect walks the syntax tree below n in source order, depth first. It
// calls f for n and, when f returns true, for each node inside n. The
// nodes visited are statements, *Atom, *ChoiceElement, *PredicateRef,
// literals and terms; a File visits its statements (not its comments).
// Nil terms (an absent penalty priority or choice bound) are skipped; the
// term of an `exactly` bound, stored as both Low and High, is visited once.
func Inspect(n Node, f func(Node) bool) {
	if n == nil || !f(n) {
		return
	}
	terms := func(ts []Term) {
		for _, t := range ts {
			Inspect(t, f)
		}
	}
	literals := func(ls []Literal) {
		for _, l := range ls {
			Inspect(l, f)
		}
	}
	switch n := n.(type) {
	case *File:
		for _, s := range n.Statements {
			Inspect(s, f)
		}
	case *Fact:
		Inspect(&n.Head, f)
	case *Rule:
		Inspect(&n.Head, f)
		literals(n.Body)
	case *Constraint:
		literals(n.Body)
	case *Choice:
		if n.Bound.Low != nil {
			Inspect(n.Bound.Low, f)
		}
		if n.Bound.High != nil && n.Bound.High != n.Bound.Low {
			Inspect(n.Bound.High, f)
		}
		for i := range n.Elements {
			Inspect(&n.Elements[i], f)
		}
		literals(n.Body)
	case *ChoiceElement:
		Inspect(&n.Atom, f)
		literals(n.For)
	case *Penalty:
		Inspect(n.Weight, f)
		if n.Priority != nil {
			Inspect(n.Priority, f)
		}
		terms(n.Per)
		literals(n.Body)
	case *Param:
		Inspect(n.Value, f)
	case *Display:
		for i := range n.Predicates {
			Inspect(&n.Predicates[i], f)
		}
	case *Atom:
		terms(n.Args)
	case *AtomLiteral:
		Inspect(&n.Atom, f)
	case *Comparison:
		Inspect(n.Left, f)
		Inspect(n.Right, f)
	case *Aggregate:
		terms(n.Tuple)
		literals(n.Condition)
		Inspect(n.Bound, f)
	case *Compound:
		terms(n.Args)
	case *Binary:
		Inspect(n.Left, f)
		Inspect(n.Right, f)
	case *Unary:
		Inspect(n.Operand, f)
	}
}

// Position returns the position of the file's first statement, or a
// position holding only the file name when it has none.
func (f *File) Position() Pos {
	if len(f.Statements) > 0 {
		return f.Statements[0].Position()
	}
	return Pos{Filename: f.Filename}
}
