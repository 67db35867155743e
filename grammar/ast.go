package grammar

import (
	"fmt"
	"strings"
)

// Pos is a position in a source file. Line and Column count from 1; Column
// counts bytes. Offset is the byte offset from the start of the file. The
// zero Pos is "no position".
type Pos struct {
	Filename string
	Offset   int
	Line     int
	Column   int
}

// IsValid reports whether p holds a real position (its line is at least 1).
func (p Pos) IsValid() bool { return p.Line > 0 }

// String renders p as file:line:column. Missing parts are left out: a Pos
// without a file name prints as line:column, and the zero Pos prints as "-".
func (p Pos) String() string {
	if !p.IsValid() {
		if p.Filename != "" {
			return p.Filename
		}
		return "-"
	}
	if p.Filename == "" {
		return fmt.Sprintf("%d:%d", p.Line, p.Column)
	}
	return fmt.Sprintf("%s:%d:%d", p.Filename, p.Line, p.Column)
}

// Before reports whether p comes before q in file order (file name first,
// then line, then column).
func (p Pos) Before(q Pos) bool {
	if p.Filename != q.Filename {
		return p.Filename < q.Filename
	}
	if p.Line != q.Line {
		return p.Line < q.Line
	}
	return p.Column < q.Column
}

// Node is implemented by every AST node. Every node stores its position in a
// field named Pos; Position returns it.
type Node interface {
	Position() Pos
}

// File is a parsed model file.
type File struct {
	Filename   string
	Statements []Statement
	// Comments holds the comments of the file in source order. They carry no
	// meaning; Format uses them to keep comments in place.
	Comments []*Comment
}

// Comment is a `#` comment. Text is the comment without the leading `#` and
// without the line end.
type Comment struct {
	Pos  Pos
	Text string
}

// Position returns the position of the `#`.
func (c *Comment) Position() Pos { return c.Pos }

// ---------------------------------------------------------------------------
// Statements

// Statement is a top-level statement. It is implemented by *Fact, *Rule,
// *Constraint, *Choice, *Penalty, *Param, *Display and *Include.
type Statement interface {
	Node
	statementNode()
}

// Fact is `atom.`: the atom holds in every configuration. Arguments of the
// head may contain intervals (Binary with Op Interval).
type Fact struct {
	Pos  Pos
	Head Atom
}

// Rule is `atom if literal, ..., literal.` with a non-empty Body. Arguments
// of the head may contain intervals.
type Rule struct {
	Pos  Pos
	Head Atom
	Body []Literal
}

// Constraint is `forbid literal, ..., literal.` with a non-empty Body.
type Constraint struct {
	Pos  Pos
	Body []Literal
}

// Choice is `choose BOUND of ELEMENT; ...; ELEMENT [if literal, ...].`.
// Body is empty when there is no `if` part.
type Choice struct {
	Pos      Pos
	Bound    ChoiceBound
	Elements []ChoiceElement
	Body     []Literal
}

// BoundKind tells which kind of bound a choice has.
type BoundKind int

// The choice bound kinds.
const (
	BoundAny     BoundKind = iota // `any`: Low and High are nil
	BoundExactly                  // `exactly T`: Low and High are both T (the same Term)
	BoundAtMost                   // `at most T`: Low is nil, High is T
	BoundAtLeast                  // `at least T`: Low is T, High is nil
	BoundBetween                  // `between L and H`: Low is L, High is H
)

// String returns the source words of k.
func (k BoundKind) String() string {
	switch k {
	case BoundAny:
		return "any"
	case BoundExactly:
		return "exactly"
	case BoundAtMost:
		return "at most"
	case BoundAtLeast:
		return "at least"
	case BoundBetween:
		return "between"
	}
	return fmt.Sprintf("BoundKind(%d)", int(k))
}

// ChoiceBound is the bound of a choice. A nil Low means no lower bound, a
// nil High means no upper bound; see the BoundKind constants.
type ChoiceBound struct {
	Pos  Pos
	Kind BoundKind
	Low  Term
	High Term
}

// ChoiceElement is `atom [for literal, ...]` inside a choice.
type ChoiceElement struct {
	Pos  Pos
	Atom Atom
	For  []Literal
}

// Position returns the position of the element's atom.
func (e *ChoiceElement) Position() Pos { return e.Pos }

// Penalty is `penalty W [at priority P] [per T, ...] if literal, ....`.
// Priority is nil when not given (it then means 0). Per is empty when there
// is no `per` part.
type Penalty struct {
	Pos      Pos
	Weight   Term
	Priority Term
	Per      []Term
	Body     []Literal
}

// Param is `param name = term.`.
type Param struct {
	Pos   Pos
	Name  string
	Value Term
}

// Display is `display name/arity, ....`.
type Display struct {
	Pos        Pos
	Predicates []PredicateRef
}

// PredicateRef is `name/arity` in a display statement.
type PredicateRef struct {
	Pos   Pos
	Name  string
	Arity int
}

// Position returns the position of the predicate name.
func (r *PredicateRef) Position() Pos { return r.Pos }

// String returns name/arity.
func (r PredicateRef) String() string { return fmt.Sprintf("%s/%d", r.Name, r.Arity) }

// Include is `include "path".`. Path is the decoded string, relative to the
// including file.
type Include struct {
	Pos  Pos
	Path string
}

// Position returns the position of the statement's first token.
func (s *Fact) Position() Pos { return s.Pos }

// Position returns the position of the statement's first token.
func (s *Rule) Position() Pos { return s.Pos }

// Position returns the position of the statement's first token.
func (s *Constraint) Position() Pos { return s.Pos }

// Position returns the position of the statement's first token.
func (s *Choice) Position() Pos { return s.Pos }

// Position returns the position of the statement's first token.
func (s *Penalty) Position() Pos { return s.Pos }

// Position returns the position of the statement's first token.
func (s *Param) Position() Pos { return s.Pos }

// Position returns the position of the statement's first token.
func (s *Display) Position() Pos { return s.Pos }

// Position returns the position of the statement's first token.
func (s *Include) Position() Pos { return s.Pos }

func (*Fact) statementNode()       {}
func (*Rule) statementNode()       {}
func (*Constraint) statementNode() {}
func (*Choice) statementNode()     {}
func (*Penalty) statementNode()    {}
func (*Param) statementNode()      {}
func (*Display) statementNode()    {}
func (*Include) statementNode()    {}

// ---------------------------------------------------------------------------
// Atoms and literals

// Atom is `name` or `name(term, ..., term)`. Its predicate is
// Predicate/len(Args).
type Atom struct {
	Pos       Pos
	Predicate string
	Args      []Term
}

// Position returns the position of the predicate name.
func (a *Atom) Position() Pos { return a.Pos }

// Literal is a body literal. It is implemented by *AtomLiteral,
// *Comparison and *Aggregate.
type Literal interface {
	Node
	literalNode()
}

// AtomLiteral is an atom, or `not atom` when Negated. Pos is the position of
// `not` for a negated literal, else of the atom.
type AtomLiteral struct {
	Pos     Pos
	Negated bool
	Atom    Atom
}

// CompareOp is a comparison operator.
type CompareOp int

// The comparison operators.
const (
	Equal        CompareOp = iota // =
	NotEqual                      // !=
	Less                          // <
	LessEqual                     // <=
	Greater                       // >
	GreaterEqual                  // >=
)

// String returns the source form of op.
func (op CompareOp) String() string {
	switch op {
	case Equal:
		return "="
	case NotEqual:
		return "!="
	case Less:
		return "<"
	case LessEqual:
		return "<="
	case Greater:
		return ">"
	case GreaterEqual:
		return ">="
	}
	return fmt.Sprintf("CompareOp(%d)", int(op))
}

// Comparison is `Left Op Right`. Pos is the position of Left.
type Comparison struct {
	Pos   Pos
	Left  Term
	Op    CompareOp
	Right Term
}

// AggregateFunc names an aggregate function.
type AggregateFunc int

// The aggregate functions.
const (
	Count AggregateFunc = iota
	Sum
	Min
	Max
)

// String returns the source name of f.
func (f AggregateFunc) String() string {
	switch f {
	case Count:
		return "count"
	case Sum:
		return "sum"
	case Min:
		return "min"
	case Max:
		return "max"
	}
	return fmt.Sprintf("AggregateFunc(%d)", int(f))
}

// Aggregate is `func(T, ... : literal, ...) Op Bound`. Tuple is non-empty.
// Condition holds only *AtomLiteral and *Comparison values (no nested
// aggregates) and may be empty.
type Aggregate struct {
	Pos       Pos
	Func      AggregateFunc
	Tuple     []Term
	Condition []Literal
	Op        CompareOp
	Bound     Term
}

// Position returns the literal's position.
func (l *AtomLiteral) Position() Pos { return l.Pos }

// Position returns the literal's position.
func (l *Comparison) Position() Pos { return l.Pos }

// Position returns the literal's position (the function name).
func (l *Aggregate) Position() Pos { return l.Pos }

func (*AtomLiteral) literalNode() {}
func (*Comparison) literalNode()  {}
func (*Aggregate) literalNode()   {}

// ---------------------------------------------------------------------------
// Terms

// Term is a term. It is implemented by *Name, *Variable, *Integer,
// *String, *Compound, *Binary and *Unary. Parentheses leave no node.
type Term interface {
	Node
	termNode()
}

// Name is a constant such as `cpu`.
type Name struct {
	Pos  Pos
	Name string
}

// Variable is a variable such as `X` or `_Spare`. The anonymous variable
// `_` has Name "_" and Anonymous set; each occurrence is a fresh variable.
type Variable struct {
	Pos       Pos
	Name      string
	Anonymous bool
}

// Integer is an integer literal. A minus sign written directly before a
// digit sequence is part of the literal (`-7` is Integer -7, so the most
// negative 64-bit value can be written); `-(7)` is a Unary.
type Integer struct {
	Pos   Pos
	Value int64
}

// String is a string literal. Value is the decoded text (escapes resolved).
type String struct {
	Pos   Pos
	Value string
}

// Compound is a function term `name(term, ..., term)` with at least one
// argument.
type Compound struct {
	Pos  Pos
	Name string
	Args []Term
}

// BinaryOp is a binary term operator.
type BinaryOp int

// The binary operators. Interval (`..`) binds loosest; * / % bind tighter
// than + and -. All are left associative except Interval, which does not
// associate.
const (
	Add      BinaryOp = iota // +
	Subtract                 // -
	Multiply                 // *
	Divide                   // /
	Modulo                   // %
	Interval                 // ..
)

// String returns the source form of op.
func (op BinaryOp) String() string {
	switch op {
	case Add:
		return "+"
	case Subtract:
		return "-"
	case Multiply:
		return "*"
	case Divide:
		return "/"
	case Modulo:
		return "%"
	case Interval:
		return ".."
	}
	return fmt.Sprintf("BinaryOp(%d)", int(op))
}

// Binary is `Left Op Right`. Pos is the position of Left; OpPos is the
// position of the operator (for errors such as a division by zero).
type Binary struct {
	Pos   Pos
	Op    BinaryOp
	Left  Term
	Right Term
	OpPos Pos
}

// Unary is a negation `-Operand`. Pos is the position of the minus sign.
type Unary struct {
	Pos     Pos
	Operand Term
}

// Position returns the term's position.
func (t *Name) Position() Pos { return t.Pos }

// Position returns the term's position.
func (t *Variable) Position() Pos { return t.Pos }

// Position returns the term's position.
func (t *Integer) Position() Pos { return t.Pos }

// Position returns the term's position.
func (t *String) Position() Pos { return t.Pos }

// Position returns the term's position.
func (t *Compound) Position() Pos { return t.Pos }

// Position returns the term's position.
func (t *Binary) Position() Pos { return t.Pos }

// Position returns the term's position.
func (t *Unary) Position() Pos { return t.Pos }

func (*Name) termNode()     {}
func (*Variable) termNode() {}
func (*Integer) termNode()  {}
func (*String) termNode()   {}
func (*Compound) termNode() {}
func (*Binary) termNode()   {}
func (*Unary) termNode()    {}

// TermString returns the canonical source form of t, as Format prints it.
func TermString(t Term) string {
	var b strings.Builder
	writeTerm(&b, t)
	return b.String()
}
