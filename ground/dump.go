package ground

import (
	"bufio"
	"io"
	"strconv"
)

// Dump writes p in a stable, readable source-like form, one statement per
// line, in this order: facts, rules, constraints, choices, aggregates,
// penalties and the shown atoms; within each group in program order.
// Auxiliary atoms print as #kind(n), for instance #body(3).
//
//	p(1).
//	q(1) if p(1), not r(1).
//	forbid a, not b.
//	choose between 1 and 2 of a; b if c.
//	#agg(7) iff sum(3: x; -2: y) > 4.
//	penalty 5 at priority 1 if #body(9).
//	display p(1), q(2).
func (p *Program) Dump(w io.Writer) error {
	bw := bufio.NewWriter(w)
	var b []byte
	line := func() {
		b = append(b, ".\n"...)
		bw.Write(b)
		b = b[:0]
	}
	body := func(pos, neg []Atom) {
		for i, a := range pos {
			if i > 0 {
				b = append(b, ", "...)
			}
			b = p.AppendAtom(b, a)
		}
		for i, a := range neg {
			if i > 0 || len(pos) > 0 {
				b = append(b, ", "...)
			}
			b = append(b, "not "...)
			b = p.AppendAtom(b, a)
		}
	}
	for _, r := range p.Rules {
		if r.Head != NoAtom && len(r.Pos) == 0 && len(r.Neg) == 0 {
			b = p.AppendAtom(b, r.Head)
			line()
		}
	}
	for _, r := range p.Rules {
		if r.Head != NoAtom && (len(r.Pos) > 0 || len(r.Neg) > 0) {
			b = p.AppendAtom(b, r.Head)
			b = append(b, " if "...)
			body(r.Pos, r.Neg)
			line()
		}
	}
	for _, r := range p.Rules {
		if r.Head == NoAtom {
			b = append(b, "forbid"...)
			if len(r.Pos)+len(r.Neg) > 0 {
				b = append(b, ' ')
				body(r.Pos, r.Neg)
			}
			line()
		}
	}
	for _, c := range p.Choices {
		b = append(b, "choose "...)
		b = appendBound(b, c.Lower, c.Upper)
		b = append(b, " of "...)
		if len(c.Elements) == 0 {
			b = append(b, "(nothing)"...)
		}
		for i, a := range c.Elements {
			if i > 0 {
				b = append(b, "; "...)
			}
			b = p.AppendAtom(b, a)
		}
		if len(c.Pos)+len(c.Neg) > 0 {
			b = append(b, " if "...)
			body(c.Pos, c.Neg)
		}
		line()
	}
	for _, g := range p.Aggregates {
		b = p.AppendAtom(b, g.Atom)
		b = append(b, " iff "...)
		b = append(b, g.Kind.String()...)
		b = append(b, '(')
		for i, e := range g.Elements {
			if i > 0 {
				b = append(b, "; "...)
			}
			b = strconv.AppendInt(b, e.Weight, 10)
			b = append(b, ": "...)
			b = p.AppendAtom(b, e.Atom)
		}
		b = append(b, ") "...)
		b = append(b, g.Op.String()...)
		b = append(b, ' ')
		b = strconv.AppendInt(b, g.Bound, 10)
		line()
	}
	for _, pen := range p.Penalties {
		b = append(b, "penalty "...)
		b = strconv.AppendInt(b, pen.Weight, 10)
		if pen.Priority != 0 {
			b = append(b, " at priority "...)
			b = strconv.AppendInt(b, pen.Priority, 10)
		}
		b = append(b, " if "...)
		b = p.AppendAtom(b, pen.Atom)
		line()
	}
	if len(p.Shown) > 0 {
		b = append(b, "display "...)
		for i, a := range p.Shown {
			if i > 0 {
				b = append(b, ", "...)
			}
			b = p.AppendAtom(b, a)
		}
		line()
	}
	return bw.Flush()
}

func appendBound(b []byte, lo, hi int64) []byte {
	switch {
	case lo <= 0 && hi == NoUpper:
		return append(b, "any"...)
	case lo == hi:
		return strconv.AppendInt(append(b, "exactly "...), lo, 10)
	case hi == NoUpper:
		return strconv.AppendInt(append(b, "at least "...), lo, 10)
	case lo <= 0:
		return strconv.AppendInt(append(b, "at most "...), hi, 10)
	}
	b = strconv.AppendInt(append(b, "between "...), lo, 10)
	return strconv.AppendInt(append(b, " and "...), hi, 10)
}
