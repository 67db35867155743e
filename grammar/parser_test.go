package grammar

import (
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"

	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"
)

// ignorePos compares syntax trees without their positions.
var ignorePos = cmpopts.IgnoreTypes(Pos{})

// Helpers that build syntax trees for expected values.

func nm(s string) Term            { return &Name{Name: s} }
func vr(s string) Term            { return &Variable{Name: s, Anonymous: s == "_"} }
func in(v int64) Term             { return &Integer{Value: v} }
func st(s string) Term            { return &String{Value: s} }
func fn(f string, a ...Term) Term { return &Compound{Name: f, Args: a} }
func bin(op BinaryOp, l, r Term) Term {
	return &Binary{Op: op, Left: l, Right: r}
}
func neg(t Term) Term                 { return &Unary{Operand: t} }
func at(p string, a ...Term) Atom     { return Atom{Predicate: p, Args: a} }
func pos(p string, a ...Term) Literal { return &AtomLiteral{Atom: at(p, a...)} }
func not(p string, a ...Term) Literal { return &AtomLiteral{Negated: true, Atom: at(p, a...)} }
func cmpl(l Term, op CompareOp, r Term) Literal {
	return &Comparison{Left: l, Op: op, Right: r}
}
func body(ls ...Literal) []Literal { return ls }

func TestParseStatements(t *testing.T) {
	tests := []struct {
		name string
		src  string
		want []Statement
	}{
		{"fact without arguments", "ready.", []Statement{&Fact{Head: at("ready")}}},
		{"fact", `room(entry, 3, "north wing", -7).`, []Statement{
			&Fact{Head: at("room", nm("entry"), in(3), st("north wing"), in(-7))}}},
		{"fact with compound term", "link(pair(a, b), f(g(1))).", []Statement{
			&Fact{Head: at("link", fn("pair", nm("a"), nm("b")), fn("f", fn("g", in(1))))}}},
		{"interval", "slot(1..N + 1).", []Statement{
			&Fact{Head: at("slot", bin(Interval, in(1), bin(Add, vr("N"), in(1))))}}},
		{"two intervals", "cell(1..3, 0..2).", []Statement{
			&Fact{Head: at("cell", bin(Interval, in(1), in(3)), bin(Interval, in(0), in(2)))}}},
		{"rule", "online(B) if online(A), wired(A, B).", []Statement{
			&Rule{Head: at("online", vr("B")), Body: body(pos("online", vr("A")), pos("wired", vr("A"), vr("B")))}}},
		{"negation and anonymous variable", "lonely(X) if node(X), not edge(X, _).", []Statement{
			&Rule{Head: at("lonely", vr("X")), Body: body(pos("node", vr("X")), not("edge", vr("X"), vr("_")))}}},
		{"named underscore variable", "p(_Spare) if q(_Spare).", []Statement{
			&Rule{Head: at("p", vr("_Spare")), Body: body(pos("q", vr("_Spare")))}}},
		{"comparisons", "p(X) if q(X, Y), X = Y, X != 1, X < 2, X <= 3, X > 4, X >= 5.", []Statement{
			&Rule{Head: at("p", vr("X")), Body: body(pos("q", vr("X"), vr("Y")),
				cmpl(vr("X"), Equal, vr("Y")), cmpl(vr("X"), NotEqual, in(1)), cmpl(vr("X"), Less, in(2)),
				cmpl(vr("X"), LessEqual, in(3)), cmpl(vr("X"), Greater, in(4)), cmpl(vr("X"), GreaterEqual, in(5)))}}},
		{"comparison of compound terms", "p if f(X) = f(1), q(X).", []Statement{
			&Rule{Head: at("p"), Body: body(cmpl(fn("f", vr("X")), Equal, fn("f", in(1))), pos("q", vr("X")))}}},
		{"precedence", "p(1 + 2 * 3 - 4 / 5 % 6).", []Statement{
			&Fact{Head: at("p", bin(Subtract, bin(Add, in(1), bin(Multiply, in(2), in(3))),
				bin(Modulo, bin(Divide, in(4), in(5)), in(6))))}}},
		{"mixed precedence", "p(1 * 2 + 3 * 4 - 5 % 6 * 7, 1..2 * 3 + 4, 1 - 2 * 3..4 / 5 + 6).", []Statement{
			&Fact{Head: at("p",
				bin(Subtract, bin(Add, bin(Multiply, in(1), in(2)), bin(Multiply, in(3), in(4))), bin(Multiply, bin(Modulo, in(5), in(6)), in(7))),
				bin(Interval, in(1), bin(Add, bin(Multiply, in(2), in(3)), in(4))),
				bin(Interval, bin(Subtract, in(1), bin(Multiply, in(2), in(3))), bin(Add, bin(Divide, in(4), in(5)), in(6))))}}},
		{"left associativity", "p(1 - 2 - 3, 8 / 4 / 2).", []Statement{
			&Fact{Head: at("p", bin(Subtract, bin(Subtract, in(1), in(2)), in(3)),
				bin(Divide, bin(Divide, in(8), in(4)), in(2)))}}},
		{"parentheses", "p((1 + 2) * 3).", []Statement{
			&Fact{Head: at("p", bin(Multiply, bin(Add, in(1), in(2)), in(3)))}}},
		{"unary minus", "p(-X, -(3), - -X, -X * 2, 3 - -2).", []Statement{
			&Fact{Head: at("p", neg(vr("X")), neg(in(3)), neg(neg(vr("X"))), bin(Multiply, neg(vr("X")), in(2)),
				bin(Subtract, in(3), in(-2)))}}},
		{"extreme integers", "p(-9223372036854775808, 9223372036854775807).", []Statement{
			&Fact{Head: at("p", in(-9223372036854775808), in(9223372036854775807))}}},
		{"string escapes", `p("say \"hi\"\n\\ok").`, []Statement{
			&Fact{Head: at("p", st("say \"hi\"\n\\ok"))}}},
		{"constraint", "forbid room(R), not online(R).", []Statement{
			&Constraint{Body: body(pos("room", vr("R")), not("online", vr("R")))}}},
		{"count aggregate", "forbid count(X : pick(X)) > 2.", []Statement{
			&Constraint{Body: body(&Aggregate{Func: Count, Tuple: []Term{vr("X")},
				Condition: body(pos("pick", vr("X"))), Op: Greater, Bound: in(2)})}}},
		{"sum aggregate", "forbid sum(C, A, B : buy(A, B), run(A, B, C)) > budget.", []Statement{
			&Constraint{Body: body(&Aggregate{Func: Sum, Tuple: []Term{vr("C"), vr("A"), vr("B")},
				Condition: body(pos("buy", vr("A"), vr("B")), pos("run", vr("A"), vr("B"), vr("C"))),
				Op:        Greater, Bound: nm("budget")})}}},
		{"min and max aggregates", "low(M) if size(M), min(S : size(S)) = M, max(S : size(S), not big(S), S < 9) != M.", []Statement{
			&Rule{Head: at("low", vr("M")), Body: body(pos("size", vr("M")),
				&Aggregate{Func: Min, Tuple: []Term{vr("S")}, Condition: body(pos("size", vr("S"))), Op: Equal, Bound: vr("M")},
				&Aggregate{Func: Max, Tuple: []Term{vr("S")},
					Condition: body(pos("size", vr("S")), not("big", vr("S")), cmpl(vr("S"), Less, in(9))),
					Op:        NotEqual, Bound: vr("M")})}}},
		{"aggregate with empty condition", "forbid count(1 :) < 1.", []Statement{
			&Constraint{Body: body(&Aggregate{Func: Count, Tuple: []Term{in(1)}, Op: Less, Bound: in(1)})}}},
		{"choice any", "choose any of buy(A, B) for run(A, B, _).", []Statement{
			&Choice{Bound: ChoiceBound{Kind: BoundAny},
				Elements: []ChoiceElement{{Atom: at("buy", vr("A"), vr("B")), For: body(pos("run", vr("A"), vr("B"), vr("_")))}}}}},
		{"choice exactly with body", "choose exactly 1 of red(X); green(X); blue(X) if node(X).", []Statement{
			&Choice{Bound: ChoiceBound{Kind: BoundExactly, Low: in(1), High: in(1)},
				Elements: []ChoiceElement{{Atom: at("red", vr("X"))}, {Atom: at("green", vr("X"))}, {Atom: at("blue", vr("X"))}},
				Body:     body(pos("node", vr("X")))}}},
		{"choice at most", "choose at most K + 1 of pick(X) for item(X) if limit(K).", []Statement{
			&Choice{Bound: ChoiceBound{Kind: BoundAtMost, High: bin(Add, vr("K"), in(1))},
				Elements: []ChoiceElement{{Atom: at("pick", vr("X")), For: body(pos("item", vr("X")))}},
				Body:     body(pos("limit", vr("K")))}}},
		{"choice at least", "choose at least 2 of on(L) for lamp(L), L != 3.", []Statement{
			&Choice{Bound: ChoiceBound{Kind: BoundAtLeast, Low: in(2)},
				Elements: []ChoiceElement{{Atom: at("on", vr("L")), For: body(pos("lamp", vr("L")), cmpl(vr("L"), NotEqual, in(3)))}}}}},
		{"choice between", "choose between 1 and 3 of a; b.", []Statement{
			&Choice{Bound: ChoiceBound{Kind: BoundBetween, Low: in(1), High: in(3)},
				Elements: []ChoiceElement{{Atom: at("a")}, {Atom: at("b")}}}}},
		{"penalty", "penalty C if buy(A, B), run(A, B, C).", []Statement{
			&Penalty{Weight: vr("C"), Body: body(pos("buy", vr("A"), vr("B")), pos("run", vr("A"), vr("B"), vr("C")))}}},
		{"penalty with priority and per", "penalty -2 at priority 1 per A, f(B) if buy(A, B).", []Statement{
			&Penalty{Weight: in(-2), Priority: in(1), Per: []Term{vr("A"), fn("f", vr("B"))},
				Body: body(pos("buy", vr("A"), vr("B")))}}},
		{"penalty with per only", "penalty 1 per X if p(X).", []Statement{
			&Penalty{Weight: in(1), Per: []Term{vr("X")}, Body: body(pos("p", vr("X")))}}},
		{"param", "param budget = 400.", []Statement{&Param{Name: "budget", Value: in(400)}}},
		{"param expression", `param label = "x".`, []Statement{&Param{Name: "label", Value: st("x")}}},
		{"display", "display buy/2, online/1, ready/0.", []Statement{&Display{Predicates: []PredicateRef{
			{Name: "buy", Arity: 2}, {Name: "online", Arity: 1}, {Name: "ready", Arity: 0}}}}},
		{"include", `include "parts/rooms.trl".`, []Statement{&Include{Path: "parts/rooms.trl"}}},
		{"comments and layout", "# heading\np(a). # trailing\n\n\tq(b)\n\t\t.", []Statement{
			&Fact{Head: at("p", nm("a"))}, &Fact{Head: at("q", nm("b"))}}},
		{"names with digits and underscores", "rack_2(x9_y).", []Statement{&Fact{Head: at("rack_2", nm("x9_y"))}}},
		{"byte order mark and CRLF line ends", "\ufeffp(a).\r\nq(b) if p(a). # c\r\n", []Statement{
			&Fact{Head: at("p", nm("a"))}, &Rule{Head: at("q", nm("b")), Body: body(pos("p", nm("a")))}}},
		{"empty file", "", nil},
		{"only comments", "# nothing here\n# at all", nil},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			f, err := ParseFile("t.trl", []byte(tt.src))
			if err != nil {
				t.Fatalf("ParseFile: %v", err)
			}
			if diff := cmp.Diff(tt.want, f.Statements, ignorePos); diff != "" {
				t.Errorf("statements differ (-want +got):\n%s", diff)
			}
		})
	}
}

func TestPositions(t *testing.T) {
	src := "p(a).\n  q(X) if not r(X, \"s\"),\n\tX < 3 + Y.\nforbid count(Z : z(Z)) > 1.\n"
	f, err := ParseFile("m.trl", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	rule := f.Statements[1].(*Rule)
	neg := rule.Body[0].(*AtomLiteral)
	cmpLit := rule.Body[1].(*Comparison)
	agg := f.Statements[2].(*Constraint).Body[0].(*Aggregate)
	checks := []struct {
		what string
		got  Pos
		want string
	}{
		{"fact", f.Statements[0].Position(), "m.trl:1:1"},
		{"rule", rule.Pos, "m.trl:2:3"},
		{"rule head argument", rule.Head.Args[0].Position(), "m.trl:2:5"},
		{"negated literal", neg.Pos, "m.trl:2:11"},
		{"negated atom", neg.Atom.Pos, "m.trl:2:15"},
		{"string", neg.Atom.Args[1].Position(), "m.trl:2:20"},
		{"comparison", cmpLit.Pos, "m.trl:3:2"},
		{"sum", cmpLit.Right.Position(), "m.trl:3:6"},
		{"sum right operand", cmpLit.Right.(*Binary).Right.Position(), "m.trl:3:10"},
		{"sum operator", cmpLit.Right.(*Binary).OpPos, "m.trl:3:8"},
		{"aggregate", agg.Pos, "m.trl:4:8"},
		{"aggregate condition", agg.Condition[0].Position(), "m.trl:4:18"},
	}
	for _, c := range checks {
		if c.got.String() != c.want {
			t.Errorf("%s: position %s, want %s", c.what, c.got, c.want)
		}
	}
	if got := rule.Pos.Offset; got != 8 {
		t.Errorf("rule offset %d, want 8", got)
	}
	if len(f.Comments) != 0 {
		t.Errorf("found %d comments, want none", len(f.Comments))
	}
}

func TestComments(t *testing.T) {
	f, err := ParseFile("c.trl", []byte("# one\np. # two\r\n#three"))
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, c := range f.Comments {
		got = append(got, c.Pos.String()+" "+c.Text)
	}
	want := []string{"c.trl:1:1  one", "c.trl:2:4  two", "c.trl:3:1 three"}
	if diff := cmp.Diff(want, got); diff != "" {
		t.Errorf("comments differ (-want +got):\n%s", diff)
	}
}

// TestExactlyBoundSharesTerm checks the documented shape of `exactly`: Low
// and High hold the same term.
func TestExactlyBoundSharesTerm(t *testing.T) {
	f, err := ParseFile("", []byte("choose exactly 2 of a; b; c."))
	if err != nil {
		t.Fatal(err)
	}
	b := f.Statements[0].(*Choice).Bound
	if b.Low == nil || b.Low != b.High {
		t.Errorf("exactly bound: Low %v and High %v should be the same term", b.Low, b.High)
	}
}

func TestReservedWords(t *testing.T) {
	words := strings.Fields("if not forbid choose of for any exactly at most least between and penalty priority per param display include count sum min max")
	for _, w := range words {
		if !IsReserved(w) {
			t.Errorf("IsReserved(%q) = false", w)
		}
		// As a constant.
		if _, err := ParseFile("", []byte("p("+w+").")); err == nil {
			t.Errorf("%q accepted as a constant", w)
		}
		// As a predicate name in a body.
		if _, err := ParseFile("", []byte("p if "+w+"(a).")); err == nil {
			t.Errorf("%q accepted as a predicate", w)
		}
	}
	for _, w := range []string{"iff", "nota", "counts", "room", "a"} {
		if IsReserved(w) {
			t.Errorf("IsReserved(%q) = true", w)
		}
		if _, err := ParseFile("", []byte("p("+w+") if "+w+".")); err != nil {
			t.Errorf("%q rejected: %v", w, err)
		}
	}
}

func TestTestdataParses(t *testing.T) {
	files, err := filepath.Glob("testdata/*.trl")
	if err != nil || len(files) == 0 {
		t.Fatalf("no testdata: %v", err)
	}
	for _, name := range files {
		src, err := os.ReadFile(name)
		if err != nil {
			t.Fatal(err)
		}
		f, err := ParseFile(name, src)
		if err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		if len(f.Statements) == 0 {
			t.Errorf("%s: no statements", name)
		}
	}
}

// TestMakerspaceExample checks the statement kinds of the example model of
// the language contract, statement by statement.
func TestMakerspaceExample(t *testing.T) {
	src, err := os.ReadFile("testdata/makerspace.trl")
	if err != nil {
		t.Fatal(err)
	}
	f, err := ParseFile("makerspace.trl", src)
	if err != nil {
		t.Fatal(err)
	}
	var kinds []string
	for _, s := range f.Statements {
		kinds = append(kinds, strings.TrimPrefix(strings.TrimPrefix(typeName(s), "*grammar."), "grammar."))
	}
	want := strings.Fields("Param Fact Fact Fact Fact Fact Fact Fact Fact Fact Fact Fact Fact " +
		"Choice Rule Rule Rule Rule Constraint Constraint Penalty Penalty Penalty Display")
	if diff := cmp.Diff(want, kinds); diff != "" {
		t.Errorf("statement kinds differ (-want +got):\n%s", diff)
	}
	if len(f.Comments) != 2 {
		t.Errorf("%d comments, want 2", len(f.Comments))
	}
}

func typeName(s Statement) string {
	switch s.(type) {
	case *Fact:
		return "Fact"
	case *Rule:
		return "Rule"
	case *Constraint:
		return "Constraint"
	case *Choice:
		return "Choice"
	case *Penalty:
		return "Penalty"
	case *Param:
		return "Param"
	case *Display:
		return "Display"
	case *Include:
		return "Include"
	}
	return "?"
}

// TestConcurrentParse parses from several goroutines at once: the shared
// participle parser must not be disturbed (run with -race to check).
func TestConcurrentParse(t *testing.T) {
	src, err := os.ReadFile("testdata/constructs.trl")
	if err != nil {
		t.Fatal(err)
	}
	want, err := ParseFile("c.trl", src)
	if err != nil {
		t.Fatal(err)
	}
	var wg sync.WaitGroup
	results := make([]*File, 8)
	for i := range results {
		wg.Add(1)
		go func() {
			defer wg.Done()
			results[i], _ = ParseFile("c.trl", src)
		}()
	}
	wg.Wait()
	for i, got := range results {
		if got == nil {
			t.Fatalf("goroutine %d: no file", i)
		}
		if diff := cmp.Diff(want, got); diff != "" {
			t.Errorf("goroutine %d: result differs:\n%s", i, diff)
		}
	}
}
