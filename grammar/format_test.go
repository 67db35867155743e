package grammar

import (
	"bytes"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
	"pgregory.net/rapid"
)

// roundTrip formats f, parses the result and checks that the statements
// are the same and that formatting again changes nothing.
func roundTrip(t testing.TB, f *File) {
	t.Helper()
	out := Format(f)
	g, err := ParseFile("formatted.trl", out)
	if err != nil {
		t.Fatalf("formatted source does not parse: %v\n%s", err, out)
	}
	if diff := cmp.Diff(f.Statements, g.Statements, ignorePos); diff != "" {
		t.Fatalf("parse(format(f)) differs from f (-f +reparsed):\n%s\nformatted:\n%s", diff, out)
	}
	if again := Format(g); !bytes.Equal(out, again) {
		t.Fatalf("format is not idempotent:\nfirst:\n%s\nsecond:\n%s", out, again)
	}
}

func TestFormatTestdata(t *testing.T) {
	files, err := filepath.Glob("testdata/*.trl")
	if err != nil || len(files) == 0 {
		t.Fatalf("no testdata: %v", err)
	}
	for _, name := range files {
		t.Run(filepath.Base(name), func(t *testing.T) {
			src, err := os.ReadFile(name)
			if err != nil {
				t.Fatal(err)
			}
			f, err := ParseFile(name, src)
			if err != nil {
				t.Fatal(err)
			}
			roundTrip(t, f)
			// Comments survive formatting.
			g, _ := ParseFile(name, Format(f))
			if len(g.Comments) != len(f.Comments) {
				t.Errorf("%d comments after formatting, want %d", len(g.Comments), len(f.Comments))
			}
		})
	}
}

func TestFormatCanonical(t *testing.T) {
	tests := []struct{ src, want string }{
		{"p( a,b ) .", "p(a, b).\n"},
		{"p(X)if q(X),not r(X).", "p(X) if q(X), not r(X).\n"},
		{"p((1+2)*3, 1+(2*3), (1-2)-3, 1-(2-3), -(3), - 3, -(-X), 1..(2+3)).",
			"p((1 + 2) * 3, 1 + 2 * 3, 1 - 2 - 3, 1 - (2 - 3), -(3), -3, -(-X), 1..2 + 3).\n"},
		{"p((1..2)..3, 1..(2..3)).", "p((1..2)..3, 1..(2..3)).\n"},
		{"forbid count( X:p(X) )>=2.", "forbid count(X : p(X)) >= 2.\n"},
		{"forbid count(1:)<1.", "forbid count(1 :) < 1.\n"},
		{"choose exactly 1 of a;b for c,d if e.", "choose exactly 1 of a; b for c, d if e.\n"},
		{"choose between 1 and 2 of a.", "choose between 1 and 2 of a.\n"},
		{"penalty 3 at priority 2 per X,Y if p(X,Y).", "penalty 3 at priority 2 per X, Y if p(X, Y).\n"},
		{"display a/1,b/2.", "display a/1, b/2.\n"},
		{`include  "x\\y\"z".`, "include \"x\\\\y\\\"z\".\n"},
		{"a. b.\n\n\n\nc.", "a.\nb.\n\nc.\n"},
		{"# top\n\na. # after a\n# before b\nb.\n# end", "# top\n\na. # after a\n# before b\nb.\n# end\n"},
		{"a. b.   # on b   \nd.", "a.\nb. # on b\nd.\n"},
		{"p if\n  q. # last line", "p if q. # last line\n"},
		{"p if # first\n  q, # second\n  r. # third\n\n\n# alone", "p if q, r. # third\n# first\n# second\n\n# alone\n"},
		{"p if\n  q, # why q\n  r.", "p if q, r.\n# why q\n"},
	}
	for _, tt := range tests {
		f, err := ParseFile("", []byte(tt.src))
		if err != nil {
			t.Errorf("%q: %v", tt.src, err)
			continue
		}
		if got := string(Format(f)); got != tt.want {
			t.Errorf("Format(%q) =\n%s\nwant\n%s", tt.src, got, tt.want)
		}
		roundTrip(t, f)
	}
}

// TestFormatRoundTripProperty formats random syntax trees and parses them
// back.
func TestFormatRoundTripProperty(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		f := &File{Statements: rapid.SliceOfN(rapid.Custom(genStatement), 1, 6).Draw(t, "statements")}
		out := Format(f)
		g, err := ParseFile("gen.trl", out)
		if err != nil {
			t.Fatalf("formatted source does not parse: %v\n%s", err, out)
		}
		if diff := cmp.Diff(f.Statements, g.Statements, ignorePos); diff != "" {
			t.Fatalf("round trip differs (-generated +reparsed):\n%s\nformatted:\n%s", diff, out)
		}
		if again := Format(g); !bytes.Equal(out, again) {
			t.Fatalf("format is not idempotent:\n%s\n%s", out, again)
		}
	})
}

var genNames = []string{"a", "p", "room", "x_1", "rack2", "iff", "nota", "counts"}

func genName(t *rapid.T) string { return rapid.SampledFrom(genNames).Draw(t, "name") }

func genTerm(t *rapid.T, depth int) Term {
	kinds := 5
	if depth > 0 {
		kinds = 8
	}
	switch rapid.IntRange(0, kinds-1).Draw(t, "term") {
	case 0:
		return &Name{Name: genName(t)}
	case 1:
		v := rapid.SampledFrom([]string{"X", "Y", "_", "_Spare", "Cost2"}).Draw(t, "var")
		return &Variable{Name: v, Anonymous: v == "_"}
	case 2:
		return &Integer{Value: rapid.OneOf(rapid.Int64Range(-20, 20), rapid.Int64(),
			rapid.Just(int64(math.MinInt64)), rapid.Just(int64(math.MaxInt64))).Draw(t, "int")}
	case 3:
		return &String{Value: rapid.StringMatching(`[a-z "\\\n\t]{0,6}`).Draw(t, "string")}
	case 4:
		return &Name{Name: genName(t)}
	case 5:
		return &Compound{Name: genName(t), Args: genTerms(t, depth-1, 1)}
	case 6:
		op := BinaryOp(rapid.IntRange(int(Add), int(Interval)).Draw(t, "op"))
		return &Binary{Op: op, Left: genTerm(t, depth-1), Right: genTerm(t, depth-1)}
	default:
		return &Unary{Operand: genTerm(t, depth-1)}
	}
}

func genTerms(t *rapid.T, depth, min int) []Term {
	n := rapid.IntRange(min, 3).Draw(t, "terms")
	if n == 0 {
		return nil
	}
	ts := make([]Term, n)
	for i := range ts {
		ts[i] = genTerm(t, depth)
	}
	return ts
}

func genAtom(t *rapid.T) Atom {
	return Atom{Predicate: genName(t), Args: genTerms(t, 2, 0)}
}

func genLiteral(t *rapid.T, aggregates bool) Literal {
	n := 3
	if aggregates {
		n = 4
	}
	switch rapid.IntRange(0, n-1).Draw(t, "literal") {
	case 0:
		return &AtomLiteral{Atom: genAtom(t)}
	case 1:
		return &AtomLiteral{Negated: true, Atom: genAtom(t)}
	case 2:
		return &Comparison{Left: genTerm(t, 2), Op: CompareOp(rapid.IntRange(0, 5).Draw(t, "cmp")), Right: genTerm(t, 2)}
	default:
		return &Aggregate{
			Func:      AggregateFunc(rapid.IntRange(0, 3).Draw(t, "func")),
			Tuple:     genTerms(t, 1, 1),
			Condition: genLiterals(t, 0, false),
			Op:        CompareOp(rapid.IntRange(0, 5).Draw(t, "cmp")),
			Bound:     genTerm(t, 1),
		}
	}
}

func genLiterals(t *rapid.T, min int, aggregates bool) []Literal {
	n := rapid.IntRange(min, 3).Draw(t, "literals")
	if n == 0 {
		return nil
	}
	ls := make([]Literal, n)
	for i := range ls {
		ls[i] = genLiteral(t, aggregates)
	}
	return ls
}

func genStatement(t *rapid.T) Statement {
	switch rapid.IntRange(0, 7).Draw(t, "statement") {
	case 0:
		return &Fact{Head: genAtom(t)}
	case 1:
		return &Rule{Head: genAtom(t), Body: genLiterals(t, 1, true)}
	case 2:
		return &Constraint{Body: genLiterals(t, 1, true)}
	case 3:
		c := &Choice{Bound: ChoiceBound{Kind: BoundKind(rapid.IntRange(0, 4).Draw(t, "bound"))}, Body: genLiterals(t, 0, true)}
		switch c.Bound.Kind {
		case BoundExactly:
			c.Bound.Low = genTerm(t, 1)
			c.Bound.High = c.Bound.Low
		case BoundAtMost:
			c.Bound.High = genTerm(t, 1)
		case BoundAtLeast:
			c.Bound.Low = genTerm(t, 1)
		case BoundBetween:
			c.Bound.Low, c.Bound.High = genTerm(t, 1), genTerm(t, 1)
		}
		for i, n := 0, rapid.IntRange(1, 3).Draw(t, "elements"); i < n; i++ {
			c.Elements = append(c.Elements, ChoiceElement{Atom: genAtom(t), For: genLiterals(t, 0, false)})
		}
		return c
	case 4:
		p := &Penalty{Weight: genTerm(t, 1), Per: genTerms(t, 1, 0), Body: genLiterals(t, 1, true)}
		if rapid.Bool().Draw(t, "priority") {
			p.Priority = genTerm(t, 1)
		}
		return p
	case 5:
		return &Param{Name: genName(t), Value: genTerm(t, 2)}
	case 6:
		d := &Display{}
		for i, n := 0, rapid.IntRange(1, 3).Draw(t, "preds"); i < n; i++ {
			d.Predicates = append(d.Predicates, PredicateRef{Name: genName(t), Arity: rapid.IntRange(0, 5).Draw(t, "arity")})
		}
		return d
	default:
		return &Include{Path: rapid.StringMatching(`[a-z/."\\]{0,8}`).Draw(t, "path")}
	}
}

func TestTermString(t *testing.T) {
	tests := []struct {
		t    Term
		want string
	}{
		{bin(Subtract, in(3), in(-2)), "3 - -2"},
		{neg(in(-2)), "-(-2)"},
		{bin(Multiply, neg(vr("X")), bin(Add, in(1), in(2))), "-X * (1 + 2)"},
		{fn("f", st("a\nb")), `f("a\nb")`},
		{bin(Interval, in(1), bin(Interval, in(2), in(3))), "1..(2..3)"},
	}
	for _, tt := range tests {
		if got := TermString(tt.t); got != tt.want {
			t.Errorf("TermString = %q, want %q", got, tt.want)
		}
	}
	if got := fmt.Sprint(StatementString(&Fact{Head: at("p", in(1))})); got != "p(1)." {
		t.Errorf("StatementString = %q", got)
	}
	if got := LiteralString(not("q", vr("X"))); got != "not q(X)" {
		t.Errorf("LiteralString = %q", got)
	}
}

// TestFormatCommentsProperty sprinkles comments and blank lines over the
// canonical form of random statements: formatting keeps every comment and
// every statement, and formatting again changes nothing.
func TestFormatCommentsProperty(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		f := &File{Statements: rapid.SliceOfN(rapid.Custom(genStatement), 1, 5).Draw(t, "statements")}
		lines := strings.Split(strings.TrimSuffix(string(Format(f)), "\n"), "\n")
		var b strings.Builder
		comments := 0
		for i, line := range lines {
			for k := rapid.IntRange(0, 2).Draw(t, "before"); k > 0; k-- {
				fmt.Fprintf(&b, "# c%d\n", comments)
				comments++
			}
			if rapid.Bool().Draw(t, "blank") {
				b.WriteString("\n")
			}
			b.WriteString(line)
			if rapid.Bool().Draw(t, "trailing") {
				fmt.Fprintf(&b, "  # t%d", i)
				comments++
			}
			b.WriteString("\n")
		}
		src := []byte(b.String())
		g, err := ParseFile("c.trl", src)
		if err != nil {
			t.Fatalf("does not parse: %v\n%s", err, src)
		}
		if diff := cmp.Diff(f.Statements, g.Statements, ignorePos); diff != "" {
			t.Fatalf("statements differ:\n%s", diff)
		}
		out := Format(g)
		h, err := ParseFile("c2.trl", out)
		if err != nil {
			t.Fatalf("formatted source does not parse: %v\n%s", err, out)
		}
		if len(h.Comments) != comments {
			t.Fatalf("%d comments after formatting, want %d:\n%s", len(h.Comments), comments, out)
		}
		if diff := cmp.Diff(f.Statements, h.Statements, ignorePos); diff != "" {
			t.Fatalf("statements differ after formatting:\n%s", diff)
		}
		if again := Format(h); !bytes.Equal(out, again) {
			t.Fatalf("format is not idempotent:\n%s\n---\n%s", out, again)
		}
	})
}
