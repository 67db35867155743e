package grammar

import (
	"fmt"
	"sort"
	"strconv"
	"strings"

	"github.com/alecthomas/participle/v2/lexer"
)

// This file converts the participle syntax tree of syntax.go into the AST,
// checking what the grammar alone does not: integer ranges, that a body
// literal without a comparison operator is an atom, that aggregates do not
// nest, and that arities are small numbers.

// operatorsPerNesting times the nesting limit bounds the number of binary
// operators in one term.
const operatorsPerNesting = 50

// maxArity bounds the arity in display statements; no real predicate comes
// near it.
const maxArity = 1000000

func (p *fileParser) errorAt(pos lexer.Position, format string, args ...any) {
	p.errs.Add(toPos(pos), fmt.Sprintf(format, args...))
}

func (p *fileParser) convertStatement(s *sStatement) Statement {
	pos := toPos(s.Pos)
	n := len(p.errs)
	var out Statement
	switch {
	case s.Param != nil:
		out = &Param{Pos: pos, Name: s.Param.Name, Value: p.term(s.Param.Value)}
	case s.Display != nil:
		d := &Display{Pos: pos}
		for _, r := range s.Display.Refs {
			a, err := strconv.Atoi(r.Arity)
			if err != nil || a > maxArity {
				p.errorAt(r.Pos, "arity %s of %s is too large (at most %d)", r.Arity, r.Name, maxArity)
			}
			d.Predicates = append(d.Predicates, PredicateRef{Pos: toPos(r.Pos), Name: r.Name, Arity: a})
		}
		out = d
	case s.Include != nil:
		out = &Include{Pos: pos, Path: unquote(s.Include.Path.Raw)}
	case s.Forbid != nil:
		out = &Constraint{Pos: pos, Body: p.literals(s.Forbid.Body, false)}
	case s.Choose != nil:
		c := &Choice{Pos: pos, Bound: p.bound(s.Choose.Bound), Body: p.literals(s.Choose.Body, false)}
		for _, e := range s.Choose.Elements {
			c.Elements = append(c.Elements, ChoiceElement{Pos: toPos(e.Pos), Atom: p.atom(e.Atom), For: p.literals(e.For, false)})
		}
		out = c
	case s.Penalty != nil:
		q := s.Penalty
		pen := &Penalty{Pos: pos, Weight: p.term(q.Weight), Body: p.literals(q.Body, false)}
		if q.Priority != nil {
			pen.Priority = p.term(q.Priority)
		}
		pen.Per = p.terms(q.Per)
		out = pen
	case s.Rule != nil:
		head := p.atom(s.Rule.Head)
		if len(s.Rule.Body) == 0 {
			out = &Fact{Pos: pos, Head: head}
		} else {
			out = &Rule{Pos: pos, Head: head, Body: p.literals(s.Rule.Body, false)}
		}
	}
	if len(p.errs) > n {
		return nil
	}
	return out
}

func (p *fileParser) bound(b *sBound) ChoiceBound {
	out := ChoiceBound{Pos: toPos(b.Pos)}
	switch {
	case b.Any:
		out.Kind = BoundAny
	case b.Exactly != nil:
		out.Kind = BoundExactly
		out.Low = p.term(b.Exactly)
		out.High = out.Low
	case b.AtMost != nil:
		out.Kind = BoundAtMost
		out.High = p.term(b.AtMost)
	case b.AtLeast != nil:
		out.Kind = BoundAtLeast
		out.Low = p.term(b.AtLeast)
	case b.Between != nil:
		out.Kind = BoundBetween
		out.Low = p.term(b.Between)
		out.High = p.term(b.And)
	}
	return out
}

func (p *fileParser) atom(a *sAtom) Atom {
	return Atom{Pos: toPos(a.Pos), Predicate: a.Name, Args: p.terms(a.Args)}
}

func (p *fileParser) literals(ls []*sLiteral, inAggregate bool) []Literal {
	if len(ls) == 0 {
		return nil
	}
	out := make([]Literal, 0, len(ls))
	for _, l := range ls {
		if lit := p.literal(l, inAggregate); lit != nil {
			out = append(out, lit)
		}
	}
	return out
}

func (p *fileParser) literal(l *sLiteral, inAggregate bool) Literal {
	pos := toPos(l.Pos)
	switch {
	case l.Negated != nil:
		return &AtomLiteral{Pos: pos, Negated: true, Atom: p.atom(l.Negated)}
	case l.Aggregate != nil:
		a := l.Aggregate
		if inAggregate {
			p.errorAt(a.Pos, "an aggregate cannot appear inside another aggregate")
			return nil
		}
		return &Aggregate{
			Pos:       pos,
			Func:      aggregateFunc(a.Func),
			Tuple:     p.terms(a.Tuple),
			Condition: p.literals(a.Condition, true),
			Op:        compareOp(a.Op),
			Bound:     p.term(a.Bound),
		}
	case l.Compare != nil:
		c := l.Compare
		if c.Op == "" {
			a, ok := p.termAtom(c.Left)
			if !ok {
				return nil
			}
			return &AtomLiteral{Pos: pos, Atom: a}
		}
		return &Comparison{Pos: pos, Left: p.term(c.Left), Op: compareOp(c.Op), Right: p.term(c.Right)}
	}
	return nil
}

// termAtom turns a term standing alone as a literal into an atom. Only a
// name or a name with arguments qualifies.
func (p *fileParser) termAtom(t *sTerm) (Atom, bool) {
	if u := t.Left; len(t.Rest) == 0 && len(u.Minus) == 0 {
		if u.Primary.Name != nil {
			return Atom{Pos: toPos(u.Primary.Pos), Predicate: *u.Primary.Name, Args: p.terms(u.Primary.Args)}, true
		}
		if u.Primary.Variable != nil {
			p.errorAt(t.Pos, "a variable cannot be a predicate name")
			return Atom{}, false
		}
	}
	p.errorAt(t.Pos, "expected an atom or a comparison, found a term with no comparison operator")
	return Atom{}, false
}

// compareOp maps a comparison token to its operator.
func compareOp(s string) CompareOp {
	switch s {
	case "!=":
		return NotEqual
	case "<":
		return Less
	case "<=":
		return LessEqual
	case ">":
		return Greater
	case ">=":
		return GreaterEqual
	}
	return Equal
}

// aggregateFunc maps an aggregate keyword to its function.
func aggregateFunc(s string) AggregateFunc {
	switch s {
	case "sum":
		return Sum
	case "min":
		return Min
	case "max":
		return Max
	}
	return Count
}

func (p *fileParser) terms(ts []*sTerm) []Term {
	if len(ts) == 0 {
		return nil
	}
	out := make([]Term, len(ts))
	for i, t := range ts {
		out[i] = p.term(t)
	}
	return out
}

// binaryOp maps an operator token to its operator.
func binaryOp(s string) BinaryOp {
	switch s {
	case "-":
		return Subtract
	case "*":
		return Multiply
	case "/":
		return Divide
	case "%":
		return Modulo
	case "..":
		return Interval
	}
	return Add
}

// binding returns the binding strength of op: higher binds tighter.
func binding(op BinaryOp) int {
	switch op {
	case Interval:
		return 1
	case Add, Subtract:
		return 2
	}
	return 3
}

func (p *fileParser) term(t *sTerm) Term {
	left := p.operand(t.Left)
	if len(t.Rest) == 0 {
		return left
	}
	// Chains of operators make left-deep trees: bound them like nesting.
	if limit := operatorsPerNesting * p.maxNesting; len(t.Rest) > limit {
		p.errorAt(t.Rest[limit].Pos, "a term with more than %d operators (raise Config.MaxNesting to allow more)", limit)
		return left
	}
	operands := make([]Term, 1, len(t.Rest)+1)
	operands[0] = left
	ops := make([]BinaryOp, 0, len(t.Rest))
	for _, r := range t.Rest {
		operands = append(operands, p.operand(r.Right))
		ops = append(ops, binaryOp(r.Op))
	}
	// Precedence climbing over the flat sequence.
	i := 0
	var climb func(min int) Term
	climb = func(min int) Term {
		lhs := operands[i]
		for i < len(ops) && binding(ops[i]) >= min {
			op, opPos := ops[i], toPos(t.Rest[i].Pos)
			i++
			rhs := operands[i]
			for i < len(ops) && binding(ops[i]) > binding(op) {
				rhs = climb(binding(op) + 1)
			}
			if op == Interval && i < len(ops) && ops[i] == Interval {
				p.errorAt(t.Rest[i].Pos, "an interval cannot be the end of another interval; use parentheses")
			}
			lhs = &Binary{Pos: lhs.Position(), Op: op, Left: lhs, Right: rhs, OpPos: opPos}
		}
		return lhs
	}
	return climb(0)
}

// operand converts a primary term and the minus signs before it. A single
// minus sign directly before digits is part of the integer.
func (p *fileParser) operand(o *sOperand) Term {
	n := len(o.Minus)
	if n == 0 {
		return p.primary(o.Primary)
	}
	var inner Term
	if q := o.Primary; q.Int != nil {
		inner = p.integer(p.minusPos(o.Pos, n-1), *q.Int, true)
		n--
	} else {
		inner = p.primary(o.Primary)
	}
	for k := n - 1; k >= 0; k-- {
		inner = &Unary{Pos: toPos(p.minusPos(o.Pos, k)), Operand: inner}
	}
	return inner
}

// minusPos returns the position of the k-th minus sign (from 0) of the
// run of minus signs that starts at first.
func (p *fileParser) minusPos(first lexer.Position, k int) lexer.Position {
	if k == 0 {
		return first
	}
	toks := p.toks
	i := sort.Search(len(toks), func(i int) bool { return toks[i].Pos.Offset >= first.Offset })
	if i+k < len(toks) {
		return toks[i+k].Pos
	}
	return first
}

func (p *fileParser) primary(q *sPrimary) Term {
	pos := toPos(q.Pos)
	switch {
	case q.Int != nil:
		return p.integer(q.Pos, *q.Int, false)
	case q.String != nil:
		return &String{Pos: pos, Value: unquote(q.String.Raw)}
	case q.Variable != nil:
		return &Variable{Pos: pos, Name: *q.Variable, Anonymous: *q.Variable == "_"}
	case q.Name != nil:
		if len(q.Args) > 0 {
			return &Compound{Pos: pos, Name: *q.Name, Args: p.terms(q.Args)}
		}
		return &Name{Pos: pos, Name: *q.Name}
	case q.Paren != nil:
		return p.term(q.Paren)
	}
	return &Name{Pos: pos}
}

// integer converts a digit sequence, negated when neg is set, reporting
// values outside the 64-bit signed range.
func (p *fileParser) integer(pos lexer.Position, digits string, neg bool) Term {
	text := digits
	if neg {
		text = "-" + digits
	}
	v, err := strconv.ParseInt(text, 10, 64)
	if err != nil {
		p.errorAt(pos, "integer %s does not fit in 64 bits (the range is -9223372036854775808 to 9223372036854775807)", text)
	}
	return &Integer{Pos: toPos(pos), Value: v}
}

// unquote decodes a string token the scanner has already checked.
func unquote(raw string) string {
	if len(raw) < 2 {
		return ""
	}
	raw = raw[1 : len(raw)-1]
	if !strings.Contains(raw, `\`) {
		return raw
	}
	var b strings.Builder
	for i := 0; i < len(raw); i++ {
		c := raw[i]
		if c == '\\' && i+1 < len(raw) {
			i++
			switch raw[i] {
			case 'n':
				b.WriteByte('\n')
			default:
				b.WriteByte(raw[i])
			}
			continue
		}
		b.WriteByte(c)
	}
	return b.String()
}
