package ground

import (
	"fmt"
	"strconv"
	"strings"
)

// TermKind says which kind of ground term a Term is.
type TermKind uint8

// The kinds of ground terms, in the order in which LANGUAGE.md sorts them.
const (
	IntTerm      TermKind = iota // a 64-bit signed integer
	NameTerm                     // a constant such as `cpu`
	StringTerm                   // a quoted string
	CompoundTerm                 // a function symbol applied to arguments
)

// Term is an interned ground term: an index into a TermTable.
type Term int32

// termData is the flat record of one interned term.
type termData struct {
	kind  TermKind
	value int64  // IntTerm: the value; otherwise unused
	name  string // NameTerm, StringTerm: the text; CompoundTerm: the functor
	args  []Term // CompoundTerm: the arguments
}

// TermTable interns ground terms: every distinct term gets one Term index.
// The zero value is ready to use.
type TermTable struct {
	terms []termData
	index map[string]Term
}

// key returns a unique key for a term's content.
func termKey(kind TermKind, value int64, name string, args []Term) string {
	var b strings.Builder
	b.WriteByte(byte('0' + kind))
	switch kind {
	case IntTerm:
		b.WriteString(strconv.FormatInt(value, 10))
	case NameTerm, StringTerm:
		b.WriteString(name)
	case CompoundTerm:
		b.WriteString(strconv.Itoa(len(name)))
		b.WriteByte(':')
		b.WriteString(name)
		for _, a := range args {
			b.WriteByte(',')
			b.WriteString(strconv.Itoa(int(a)))
		}
	}
	return b.String()
}

func (t *TermTable) intern(kind TermKind, value int64, name string, args []Term) Term {
	if t.index == nil {
		t.index = make(map[string]Term)
	}
	k := termKey(kind, value, name, args)
	if id, ok := t.index[k]; ok {
		return id
	}
	id := Term(len(t.terms))
	t.terms = append(t.terms, termData{kind: kind, value: value, name: name, args: append([]Term(nil), args...)})
	t.index[k] = id
	return id
}

// Int interns an integer term.
func (t *TermTable) Int(v int64) Term { return t.intern(IntTerm, v, "", nil) }

// Name interns a constant (a lowercase name).
func (t *TermTable) Name(s string) Term { return t.intern(NameTerm, 0, s, nil) }

// String interns a string term; s is the decoded text, without quotes.
func (t *TermTable) String(s string) Term { return t.intern(StringTerm, 0, s, nil) }

// Compound interns the term functor(args...). With no arguments it is the
// constant functor.
func (t *TermTable) Compound(functor string, args ...Term) Term {
	if len(args) == 0 {
		return t.Name(functor)
	}
	return t.intern(CompoundTerm, 0, functor, args)
}

// Len returns the number of interned terms.
func (t *TermTable) Len() int { return len(t.terms) }

// Kind returns the kind of term x.
func (t *TermTable) Kind(x Term) TermKind { return t.terms[x].kind }

// IntValue returns the value of an integer term and whether x is one.
func (t *TermTable) IntValue(x Term) (int64, bool) {
	d := &t.terms[x]
	return d.value, d.kind == IntTerm
}

// Text returns the name of a constant, the text of a string or the functor of
// a compound term.
func (t *TermTable) Text(x Term) string { return t.terms[x].name }

// Args returns the arguments of a compound term (nil for other kinds).
// The caller must not modify the slice.
func (t *TermTable) Args(x Term) []Term { return t.terms[x].args }

// Compare orders two terms as LANGUAGE.md prescribes: integers numerically,
// then names by bytes, then strings by bytes, then compound terms by arity,
// then functor, then arguments. It returns -1, 0 or +1.
func (t *TermTable) Compare(a, b Term) int {
	if a == b {
		return 0
	}
	x, y := &t.terms[a], &t.terms[b]
	if x.kind != y.kind {
		if x.kind < y.kind {
			return -1
		}
		return 1
	}
	switch x.kind {
	case IntTerm:
		switch {
		case x.value < y.value:
			return -1
		case x.value > y.value:
			return 1
		}
		return 0
	case NameTerm, StringTerm:
		return strings.Compare(x.name, y.name)
	}
	if len(x.args) != len(y.args) {
		if len(x.args) < len(y.args) {
			return -1
		}
		return 1
	}
	if c := strings.Compare(x.name, y.name); c != 0 {
		return c
	}
	for i := range x.args {
		if c := t.Compare(x.args[i], y.args[i]); c != 0 {
			return c
		}
	}
	return 0
}

// Format appends the source form of term x to b: integers in decimal, names
// as they are, strings quoted with escapes, compound terms as f(a,b) without
// spaces.
func (t *TermTable) Format(b []byte, x Term) []byte {
	d := &t.terms[x]
	switch d.kind {
	case IntTerm:
		return strconv.AppendInt(b, d.value, 10)
	case NameTerm:
		return append(b, d.name...)
	case StringTerm:
		return appendQuoted(b, d.name)
	}
	b = append(b, d.name...)
	b = append(b, '(')
	for i, a := range d.args {
		if i > 0 {
			b = append(b, ',')
		}
		b = t.Format(b, a)
	}
	return append(b, ')')
}

// TermString returns the source form of term x.
func (t *TermTable) TermString(x Term) string { return string(t.Format(nil, x)) }

func appendQuoted(b []byte, s string) []byte {
	b = append(b, '"')
	for i := 0; i < len(s); i++ {
		switch c := s[i]; c {
		case '"':
			b = append(b, '\\', '"')
		case '\\':
			b = append(b, '\\', '\\')
		case '\n':
			b = append(b, '\\', 'n')
		default:
			b = append(b, c)
		}
	}
	return append(b, '"')
}

// GoString is for debugging only.
func (x Term) GoString() string { return fmt.Sprintf("Term(%d)", int32(x)) }
