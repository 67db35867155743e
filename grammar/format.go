package grammar

import (
	"sort"
	"strconv"
	"strings"
)

// Format returns the canonical source form of f: one statement per line,
// single spaces after commas and around operators and keywords. Comments
// stay in place: a comment at the end of a statement's last line stays at
// the end of that statement's line, other comments inside a statement move
// to the lines after it, and comments between statements keep their lines.
// A single blank line is kept wherever the source had blank lines between
// statements. Parsing the result gives the same statements as f.
//
// Statements that did not parse are not in f, so a File from a failed
// ParseFile formats without them.
func Format(f *File) []byte {
	var b strings.Builder
	comments := append([]*Comment(nil), f.Comments...)
	sort.SliceStable(comments, func(i, j int) bool { return comments[i].Pos.Offset < comments[j].Pos.Offset })
	ci := 0
	lastLine := 0 // source line of the previous printed item, for keeping blank lines
	writeComment := func(c *Comment) {
		b.WriteString("#")
		b.WriteString(strings.TrimRight(c.Text, " \t\r"))
	}
	for si, s := range f.Statements {
		p := s.Position()
		for ci < len(comments) && comments[ci].Pos.Offset < p.Offset {
			c := comments[ci]
			writeGap(&b, lastLine, c.Pos.Line)
			writeComment(c)
			b.WriteByte('\n')
			lastLine = c.Pos.Line
			ci++
		}
		writeGap(&b, lastLine, p.Line)
		writeStatement(&b, s)
		end := statementEndLine(s)
		if end < p.Line {
			end = p.Line
		}
		// The comments inside the statement's source or at the end of its
		// last line: those before the next statement, up to its last line.
		nextOff := -1
		if si+1 < len(f.Statements) {
			nextOff = f.Statements[si+1].Position().Offset
		}
		cj := ci
		for cj < len(comments) && comments[cj].Pos.Line <= end && (nextOff < 0 || comments[cj].Pos.Offset < nextOff) {
			cj++
		}
		post := comments[ci:cj]
		ci = cj
		if n := len(post); n > 0 && post[n-1].Pos.Line == end {
			b.WriteByte(' ')
			writeComment(post[n-1])
			post = post[:n-1]
		}
		b.WriteByte('\n')
		for _, c := range post {
			writeComment(c)
			b.WriteByte('\n')
		}
		lastLine = end
	}
	for ; ci < len(comments); ci++ {
		c := comments[ci]
		writeGap(&b, lastLine, c.Pos.Line)
		writeComment(c)
		b.WriteByte('\n')
		lastLine = c.Pos.Line
	}
	return []byte(b.String())
}

// writeGap writes one blank line when the source had at least one blank line
// between the previous item (ending on line last) and the next (on line
// next). Positions from hand-built ASTs (line 0) never produce gaps.
func writeGap(b *strings.Builder, last, next int) {
	if last > 0 && next > last+1 && b.Len() > 0 {
		b.WriteByte('\n')
	}
}

// statementEndLine returns the largest line of any position inside s, an
// estimate of the line where s ends.
func statementEndLine(s Statement) int {
	end := s.Position().Line
	see := func(p Pos) {
		if p.Line > end {
			end = p.Line
		}
	}
	var term func(Term)
	term = func(t Term) {
		if t == nil {
			return
		}
		see(t.Position())
		switch t := t.(type) {
		case *Compound:
			for _, a := range t.Args {
				term(a)
			}
		case *Binary:
			term(t.Left)
			term(t.Right)
		case *Unary:
			term(t.Operand)
		}
	}
	atom := func(a *Atom) {
		see(a.Pos)
		for _, t := range a.Args {
			term(t)
		}
	}
	var lits func([]Literal)
	lits = func(ls []Literal) {
		for _, l := range ls {
			see(l.Position())
			switch l := l.(type) {
			case *AtomLiteral:
				atom(&l.Atom)
			case *Comparison:
				term(l.Left)
				term(l.Right)
			case *Aggregate:
				for _, t := range l.Tuple {
					term(t)
				}
				lits(l.Condition)
				term(l.Bound)
			}
		}
	}
	switch s := s.(type) {
	case *Fact:
		atom(&s.Head)
	case *Rule:
		atom(&s.Head)
		lits(s.Body)
	case *Constraint:
		lits(s.Body)
	case *Choice:
		term(s.Bound.Low)
		term(s.Bound.High)
		for i := range s.Elements {
			atom(&s.Elements[i].Atom)
			lits(s.Elements[i].For)
		}
		lits(s.Body)
	case *Penalty:
		term(s.Weight)
		term(s.Priority)
		for _, t := range s.Per {
			term(t)
		}
		lits(s.Body)
	case *Param:
		term(s.Value)
	case *Display:
		for _, r := range s.Predicates {
			see(r.Pos)
		}
	}
	return end
}

// StatementString returns the canonical source form of s, with its final
// period and without a newline.
func StatementString(s Statement) string {
	var b strings.Builder
	writeStatement(&b, s)
	return b.String()
}

// LiteralString returns the canonical source form of l.
func LiteralString(l Literal) string {
	var b strings.Builder
	writeLiteral(&b, l)
	return b.String()
}

// AtomString returns the canonical source form of a.
func AtomString(a *Atom) string {
	var b strings.Builder
	writeAtom(&b, a)
	return b.String()
}

func writeStatement(b *strings.Builder, s Statement) {
	switch s := s.(type) {
	case *Fact:
		writeAtom(b, &s.Head)
	case *Rule:
		writeAtom(b, &s.Head)
		b.WriteString(" if ")
		writeLiterals(b, s.Body)
	case *Constraint:
		b.WriteString("forbid ")
		writeLiterals(b, s.Body)
	case *Choice:
		b.WriteString("choose ")
		writeBound(b, &s.Bound)
		b.WriteString(" of ")
		for i := range s.Elements {
			if i > 0 {
				b.WriteString("; ")
			}
			e := &s.Elements[i]
			writeAtom(b, &e.Atom)
			if len(e.For) > 0 {
				b.WriteString(" for ")
				writeLiterals(b, e.For)
			}
		}
		if len(s.Body) > 0 {
			b.WriteString(" if ")
			writeLiterals(b, s.Body)
		}
	case *Penalty:
		b.WriteString("penalty ")
		writeTerm(b, s.Weight)
		if s.Priority != nil {
			b.WriteString(" at priority ")
			writeTerm(b, s.Priority)
		}
		if len(s.Per) > 0 {
			b.WriteString(" per ")
			writeTerms(b, s.Per)
		}
		b.WriteString(" if ")
		writeLiterals(b, s.Body)
	case *Param:
		b.WriteString("param ")
		b.WriteString(s.Name)
		b.WriteString(" = ")
		writeTerm(b, s.Value)
	case *Display:
		b.WriteString("display ")
		for i, r := range s.Predicates {
			if i > 0 {
				b.WriteString(", ")
			}
			b.WriteString(r.Name)
			b.WriteByte('/')
			b.WriteString(strconv.Itoa(r.Arity))
		}
	case *Include:
		b.WriteString("include ")
		b.WriteString(quote(s.Path))
	}
	b.WriteByte('.')
}

func writeBound(b *strings.Builder, c *ChoiceBound) {
	switch c.Kind {
	case BoundAny:
		b.WriteString("any")
	case BoundExactly:
		b.WriteString("exactly ")
		writeTerm(b, c.Low)
	case BoundAtMost:
		b.WriteString("at most ")
		writeTerm(b, c.High)
	case BoundAtLeast:
		b.WriteString("at least ")
		writeTerm(b, c.Low)
	case BoundBetween:
		b.WriteString("between ")
		writeTerm(b, c.Low)
		b.WriteString(" and ")
		writeTerm(b, c.High)
	}
}

func writeLiterals(b *strings.Builder, ls []Literal) {
	for i, l := range ls {
		if i > 0 {
			b.WriteString(", ")
		}
		writeLiteral(b, l)
	}
}

func writeLiteral(b *strings.Builder, l Literal) {
	switch l := l.(type) {
	case *AtomLiteral:
		if l.Negated {
			b.WriteString("not ")
		}
		writeAtom(b, &l.Atom)
	case *Comparison:
		writeTerm(b, l.Left)
		b.WriteByte(' ')
		b.WriteString(l.Op.String())
		b.WriteByte(' ')
		writeTerm(b, l.Right)
	case *Aggregate:
		b.WriteString(l.Func.String())
		b.WriteByte('(')
		writeTerms(b, l.Tuple)
		b.WriteString(" :")
		if len(l.Condition) > 0 {
			b.WriteByte(' ')
			writeLiterals(b, l.Condition)
		}
		b.WriteString(") ")
		b.WriteString(l.Op.String())
		b.WriteByte(' ')
		writeTerm(b, l.Bound)
	}
}

func writeAtom(b *strings.Builder, a *Atom) {
	b.WriteString(a.Predicate)
	if len(a.Args) > 0 {
		b.WriteByte('(')
		writeTerms(b, a.Args)
		b.WriteByte(')')
	}
}

func writeTerms(b *strings.Builder, ts []Term) {
	for i, t := range ts {
		if i > 0 {
			b.WriteString(", ")
		}
		writeTerm(b, t)
	}
}

// precedence returns the binding strength of a term's outermost operator:
// higher binds tighter.
func precedence(t Term) int {
	switch t := t.(type) {
	case *Binary:
		switch t.Op {
		case Interval:
			return 1
		case Add, Subtract:
			return 2
		default:
			return 3
		}
	case *Unary:
		return 4
	}
	return 5
}

func writeTerm(b *strings.Builder, t Term) {
	switch t := t.(type) {
	case nil:
		b.WriteString("<nil>")
	case *Name:
		b.WriteString(t.Name)
	case *Variable:
		b.WriteString(t.Name)
	case *Integer:
		b.WriteString(strconv.FormatInt(t.Value, 10))
	case *String:
		b.WriteString(quote(t.Value))
	case *Compound:
		b.WriteString(t.Name)
		b.WriteByte('(')
		writeTerms(b, t.Args)
		b.WriteByte(')')
	case *Unary:
		b.WriteByte('-')
		switch t.Operand.(type) {
		case *Binary, *Unary, *Integer:
			writeParen(b, t.Operand)
		default:
			writeTerm(b, t.Operand)
		}
	case *Binary:
		p := precedence(t)
		if lp := precedence(t.Left); lp < p || (lp == p && t.Op == Interval) {
			writeParen(b, t.Left)
		} else {
			writeTerm(b, t.Left)
		}
		if t.Op == Interval {
			b.WriteString("..")
		} else {
			b.WriteByte(' ')
			b.WriteString(t.Op.String())
			b.WriteByte(' ')
		}
		if precedence(t.Right) <= p {
			writeParen(b, t.Right)
		} else {
			writeTerm(b, t.Right)
		}
	}
}

func writeParen(b *strings.Builder, t Term) {
	b.WriteByte('(')
	writeTerm(b, t)
	b.WriteByte(')')
}

// quote returns s as a string literal using only the escapes of the
// language: \" \\ and \n. Other bytes are written as they are.
func quote(s string) string {
	var b strings.Builder
	b.Grow(len(s) + 2)
	b.WriteByte('"')
	for i := 0; i < len(s); i++ {
		switch c := s[i]; c {
		case '"':
			b.WriteString(`\"`)
		case '\\':
			b.WriteString(`\\`)
		case '\n':
			b.WriteString(`\n`)
		default:
			b.WriteByte(c)
		}
	}
	b.WriteByte('"')
	return b.String()
}
