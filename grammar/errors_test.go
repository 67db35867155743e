package grammar

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
)

const stmtStarts = "an atom, or one of forbid, choose, penalty, param, display, include"

// TestSyntaxErrors checks the first error of malformed inputs: its
// line:column and its message.
func TestSyntaxErrors(t *testing.T) {
	tests := syntaxErrorTests
	for _, tt := range tests {
		t.Run(tt.src, func(t *testing.T) {
			_, err := ParseFile("bad.trl", []byte(tt.src))
			var list ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("ParseFile(%q) = %v, want an ErrorList", tt.src, err)
			}
			got := list[0].Error()
			if want := "bad.trl:" + tt.want; got != want {
				t.Errorf("ParseFile(%q):\n got %s\nwant %s", tt.src, got, want)
			}
		})
	}
	if len(tests) < 40 {
		t.Errorf("only %d malformed inputs", len(tests))
	}
}

// syntaxErrorTests are malformed inputs with their first error. FuzzParse
// uses them as seeds too.
var syntaxErrorTests = []struct {
	src  string
	want string // line:column: message
}{
	// Periods and statement ends.
	{"p(a)", "1:5: expected a period to end the fact, or `if` to start a body, found the end of the file"},
	{"p(a) q(b).", "1:6: expected a period to end the fact, or `if` to start a body, found the name `q`"},
	{"p(a)\nq(b).", "1:5: expected a period to end the fact"},
	{"p if q\nr.", "1:7: expected a period to end the rule"},
	{"forbid p(X) q.", "1:13: expected a period to end the constraint, or a comma and another literal, found the name `q`"},
	{"p if q;r.", "1:7: expected a period to end the rule, or a comma and another literal, found `;`"},
	{"p :- q.", "1:3: expected a period to end the fact, or `if` to start the rule's body, found `:`"},
	{"p(a)) .", "1:5: expected a period to end the fact, or `if` to start a body, found `)`"},
	{"choose any of p if q", "1:21: expected a period to end the choice, or a comma and another literal, found the end of the file"},
	{`include "a"`, "1:12: expected a period to end the include statement, found the end of the file"},
	{"display p/1 q/2.", "1:13: expected a period to end the display statement, or a comma and another predicate, found the name `q`"},
	// Statement starts.
	{"X(a).", "1:1: a variable cannot be a predicate name"},
	{"if(a).", "1:1: a statement cannot start with the reserved word `if`; statements start with an atom or with one of forbid, choose, penalty, param, display, include"},
	{"42.", "1:1: expected a statement (" + stmtStarts + "), found the number 42"},
	{"(p).", "1:1: expected a statement (" + stmtStarts + "), found `(`"},
	// Bodies and literals.
	{"forbid.", "1:7: expected a literal after `forbid`, found a period"},
	{"p if .", "1:6: expected a literal after `if`, found a period"},
	{"p if q,.", "1:8: expected another literal after the comma, found a period"},
	{"p(X) if q(X) , , r.", "1:16: expected a literal, found `,`"},
	{"p if X.", "1:6: a variable cannot be a predicate name"},
	{"p if 3.", "1:6: expected an atom or a comparison, found a term with no comparison operator"},
	{"p if not X(a).", "1:10: a variable cannot be a predicate name"},
	{"p if not X = 3.", "1:10: `not` applies to atoms only; to negate a comparison, use the opposite operator"},
	{"p if not 3 < X.", "1:10: `not` applies to atoms only; to negate a comparison, use the opposite operator"},
	{"p if not count(X : q(X)) > 1.", "1:10: `not` cannot be applied to an aggregate; use the opposite comparison instead"},
	{"p if not .", "1:10: expected an atom after `not`, found a period"},
	{"p(a) if not not q.", "1:13: `not` is a reserved word and cannot be used as a predicate name"},
	{"p(X) if X > .", "1:13: expected a term, found a period"},
	{"p(a) if q(X) =< 3.", "1:15: expected a term, found `<`"},
	// Terms.
	{"p(a if q.", "1:5: expected a comma or `)` to close the argument list, found the reserved word `if`"},
	{"p(if).", "1:3: expected a term, found the reserved word `if` (reserved words cannot be used as names)"},
	{"p(a,).", "1:5: expected a term, found `)`"},
	{"p(3 + ).", "1:7: expected a term, found `)`"},
	{"p(1..).", "1:6: expected a term, found `)`"},
	{"p(().", "1:4: expected a term, found `)`"},
	{"p((1).", "1:6: expected a comma or `)` to close the argument list, found a period"},
	{"p((1 + 2).", "1:10: expected a comma or `)` to close the argument list, found a period"},
	{"p(1 + (2.", "1:9: expected `)` to close the parenthesis, found a period"},
	{"p(Y(1)).", "1:3: a variable cannot have arguments: function and predicate names start with a lowercase letter"},
	{"p(1..2..3).", "1:7: an interval cannot be the end of another interval; use parentheses"},
	{"p(1 + 2..3 * 4..5).", "1:15: an interval cannot be the end of another interval; use parentheses"},
	{"p(a) if q(X + Y..).", "1:18: expected a term, found `)`"},
	// Lexical errors.
	{"p(\"abc).\nq.", "1:3: unterminated string: a string must end with a double quote on the same line"},
	{"p(\"a\\tb\").", "1:5: unknown escape sequence \\t in string: the escapes are \\\", \\\\ and \\n"},
	{"p(a) ! q.", "1:6: unexpected `!`: write `!=` for \"not equal\" or `not` for negation"},
	{"p('a').", "1:3: unexpected single quote: strings use double quotes"},
	{"p(3.5).", "1:3: malformed number \"3.5\": only integers are supported"},
	{"p(a) if q(\n\n", "1:11: expected a term, found the end of the file"},
	{"p(3x).", "1:3: malformed number \"3x\": a number is made of digits only"},
	{"p(a) if q(é).", "1:11: unexpected character 'é'"},
	{"p(\xff).", "1:3: invalid UTF-8 byte 0xff"},
	{"p(9223372036854775808).", "1:3: integer 9223372036854775808 does not fit in 64 bits (the range is -9223372036854775808 to 9223372036854775807)"},
	{"p(-9223372036854775809).", "1:3: integer -9223372036854775809 does not fit in 64 bits (the range is -9223372036854775808 to 9223372036854775807)"},
	{"p(99999999999999999999999).", "1:3: integer 99999999999999999999999 does not fit in 64 bits (the range is -9223372036854775808 to 9223372036854775807)"},
	// Aggregates.
	{"p(a) if count(X q(X)) > 2.", "1:17: expected `:` between the aggregate's tuple and its condition, found the name `q`"},
	{"p if count(X : q(X)).", "1:21: expected a comparison such as `> 2` after the aggregate, found a period"},
	{"p if count X.", "1:12: expected `(` after `count`, found the variable `X`"},
	{"p if count(X : count(Y : q(Y)) > 1) > 2.", "1:16: an aggregate cannot appear inside another aggregate"},
	{"p if count(X : q(X) > 2.", "1:24: expected a comma or `)` to close the aggregate, found a period"},
	// Choices.
	{"choose any buy(X).", "1:12: expected `of` after the choice bound, found the name `buy`"},
	{"choose at 2 of p.", "1:11: expected `most` or `least` after `at`, found the number 2"},
	{"choose between 1 of p.", "1:18: expected `and` between the two bounds of `between`, found the reserved word `of`"},
	{"choose exactly of p.", "1:16: expected a term, found the reserved word `of` (reserved words cannot be used as names)"},
	{"choose of p.", "1:8: expected a choice bound (any, exactly N, at most N, at least N or between N and M) after `choose`, found the reserved word `of`"},
	{"choose any of p, q.", "1:16: choice elements are separated by semicolons, not commas"},
	{"choose any of p for .", "1:21: expected a literal after `for`, found a period"},
	{"choose any of P.", "1:15: a variable cannot be a predicate name"},
	// Penalties.
	{"penalty 3.", "1:10: expected `if` and the condition of the penalty, found a period"},
	{"penalty 3 at 2 if p.", "1:14: expected `priority` after `at`, found the number 2"},
	{"penalty if p.", "1:9: expected a term, found the reserved word `if` (reserved words cannot be used as names)"},
	// Parameters, display, include.
	{"param = 3.", "1:7: expected a parameter name after `param`, found `=`"},
	{"param X = 3.", "1:7: a parameter name must start with a lowercase letter"},
	{"param n 3.", "1:9: expected `=` after the parameter name, found the number 3"},
	{"display p.", "1:10: expected `/` and the number of arguments after the predicate name, found a period"},
	{"display p/.", "1:11: expected the number of arguments after `/`, found a period"},
	{"display P/1.", "1:9: a variable cannot be a predicate name"},
	{"display p/99999999999.", "1:9: arity 99999999999 of p is too large (at most 1000000)"},
	{"include foo.", "1:9: expected a quoted file name after `include`, found the name `foo`"},
	// Positions on later lines and after tabs (columns count bytes).
	{"p.\n\n  q(.", "3:5: expected a term, found a period"},
	{"p.\n\tq if r s.", "2:9: expected a period to end the rule, or a comma and another literal, found the name `s`"},
}

// TestSeveralErrors checks that independent errors are all reported, in
// file order, and that the statements between them still parse.
func TestSeveralErrors(t *testing.T) {
	src := "good(1).\nbad(if).\ngood(2).\nforbid.\np(\"open\ngood(3).\nX(a). good(4).\n"
	f, err := ParseFile("m.trl", []byte(src))
	var list ErrorList
	if !errors.As(err, &list) {
		t.Fatalf("want an ErrorList, got %v", err)
	}
	var got []string
	for _, e := range list {
		got = append(got, e.Error())
	}
	want := []string{
		"m.trl:2:5: expected a term, found the reserved word `if` (reserved words cannot be used as names)",
		"m.trl:4:7: expected a literal after `forbid`, found a period",
		"m.trl:5:3: unterminated string: a string must end with a double quote on the same line",
		"m.trl:7:1: a variable cannot be a predicate name",
	}
	if diff := cmp.Diff(want, got); diff != "" {
		t.Errorf("errors differ (-want +got):\n%s", diff)
	}
	// good(3) is swallowed by the unterminated string's statement.
	var heads []string
	for _, s := range f.Statements {
		heads = append(heads, AtomString(&s.(*Fact).Head))
	}
	if diff := cmp.Diff([]string{"good(1)", "good(2)", "good(4)"}, heads); diff != "" {
		t.Errorf("statements differ (-want +got):\n%s", diff)
	}
}

// TestMissingPeriodRecovery checks that parsing resumes on the next line
// after a statement whose period is missing at the line end.
func TestMissingPeriodRecovery(t *testing.T) {
	src := "a(1)\nb(if).\nc(2)\nd(3) if e\nf(4).\ng(5) h(6).\n"
	f, err := ParseFile("r.trl", []byte(src))
	var got []string
	for _, e := range err.(ErrorList) {
		got = append(got, e.Error())
	}
	want := []string{
		"r.trl:1:5: expected a period to end the fact",
		"r.trl:2:3: expected a term, found the reserved word `if` (reserved words cannot be used as names)",
		"r.trl:3:5: expected a period to end the fact",
		"r.trl:4:10: expected a period to end the rule",
		"r.trl:6:6: expected a period to end the fact, or `if` to start a body, found the name `h`",
	}
	if diff := cmp.Diff(want, got); diff != "" {
		t.Errorf("errors differ (-want +got):\n%s", diff)
	}
	var heads []string
	for _, s := range f.Statements {
		heads = append(heads, StatementString(s))
	}
	if diff := cmp.Diff([]string{"f(4)."}, heads); diff != "" {
		t.Errorf("statements differ (-want +got):\n%s", diff)
	}
}

func TestErrorLimit(t *testing.T) {
	var b strings.Builder
	for i := 0; i < 50; i++ {
		b.WriteString("p(.\n")
	}
	for _, limit := range []int{0, 5} {
		_, err := Config{MaxErrors: limit}.ParseFile("many.trl", []byte(b.String()))
		list := err.(ErrorList)
		n := limit
		if n == 0 {
			n = DefaultMaxErrors
		}
		if len(list) != n+1 {
			t.Fatalf("limit %d: %d errors, want %d and a final note", limit, len(list), n+1)
		}
		for i, e := range list[:n] {
			if e.Pos.Line != i+1 {
				t.Errorf("limit %d: error %d on line %d, want %d", limit, i, e.Pos.Line, i+1)
			}
		}
		last := list[n].Msg
		if want := fmt.Sprintf("too many errors: stopped after %d (raise Config.MaxErrors to see more)", n); last != want {
			t.Errorf("limit %d: last message %q, want %q", limit, last, want)
		}
	}
}

// TestErrorLimitScanner checks that a file full of bad characters stops
// at the limit too, and that errors before the cut are kept.
func TestErrorLimitScanner(t *testing.T) {
	src := "p(.\n" + strings.Repeat("é", 100000)
	_, err := ParseFile("chars.trl", []byte(src))
	list := err.(ErrorList)
	if len(list) != DefaultMaxErrors+1 {
		t.Fatalf("%d errors, want %d", len(list), DefaultMaxErrors+1)
	}
	if got, want := list[0].Error(), "chars.trl:1:3: expected a term, found a period"; got != want {
		t.Errorf("first error %q, want %q", got, want)
	}
	if got, want := list[1].Error(), "chars.trl:2:1: unexpected character 'é'"; got != want {
		t.Errorf("second error %q, want %q", got, want)
	}
}

func TestNestingLimit(t *testing.T) {
	deep := DefaultMaxNesting + 1
	tests := []struct{ src, want string }{
		{"p(" + strings.Repeat("(", deep) + "1" + strings.Repeat(")", deep) + ").", fmt.Sprintf("1:%d: terms nested more than %d levels deep (raise Config.MaxNesting to allow more)", 2+DefaultMaxNesting, DefaultMaxNesting)},
		{"p(" + strings.Repeat("-", 100000) + "1).", fmt.Sprintf("1:3: terms nested more than %d levels deep (raise Config.MaxNesting to allow more)", DefaultMaxNesting)},
		{"p(" + strings.Repeat("f(", deep) + "1" + strings.Repeat(")", deep) + ").", fmt.Sprintf("1:%d: terms nested more than %d levels deep (raise Config.MaxNesting to allow more)", 2+2*DefaultMaxNesting, DefaultMaxNesting)},
	}
	for _, tt := range tests {
		_, err := ParseFile("", []byte(tt.src))
		if err == nil || err.(ErrorList)[0].Error() != tt.want {
			t.Errorf("%.20q...: got %v, want %s", tt.src, err, tt.want)
		}
	}
	// Long operator chains are bounded too.
	long := "p(1" + strings.Repeat(" + 1", 50*DefaultMaxNesting+1) + ")."
	want := fmt.Sprintf("1:%d: a term with more than %d operators (raise Config.MaxNesting to allow more)", 5+4*50*DefaultMaxNesting, 50*DefaultMaxNesting)
	if _, err := ParseFile("", []byte(long)); err == nil || err.(ErrorList)[0].Error() != want {
		t.Errorf("long sum: got %v, want %s", err, want)
	}
	// Just under the limit parses.
	ok := "p(" + strings.Repeat("(", DefaultMaxNesting-1) + "1" + strings.Repeat(")", DefaultMaxNesting-1) + ")."
	if _, err := ParseFile("", []byte(ok)); err != nil {
		t.Errorf("nesting %d: %v", DefaultMaxNesting, err)
	}
	// A higher limit lets deeper terms through.
	deeper := "p(" + strings.Repeat("(", 1000) + "1" + strings.Repeat(")", 1000) + ")."
	if _, err := (Config{MaxNesting: 1001}).ParseFile("", []byte(deeper)); err != nil {
		t.Errorf("nesting 1001 with the limit raised: %v", err)
	}
}

func TestRender(t *testing.T) {
	src := []byte("p(a).\n\tq(X) if r(é, if).\nlast(")
	_, err := ParseFile("r.trl", src)
	got := err.(ErrorList).Render(src)
	want := "r.trl:2:12: unexpected character 'é'\n" +
		"\tq(X) if r(é, if).\n" +
		"\t          ^\n" +
		"r.trl:3:6: expected a term, found the end of the file\n" +
		"last(\n" +
		"     ^\n"
	if got != want {
		t.Errorf("Render:\n%s\nwant:\n%s", got, want)
	}
}

// TestRenderWideCharacters checks that the caret counts characters, not
// bytes, before the column.
func TestRenderWideCharacters(t *testing.T) {
	src := []byte("p(\"é→\", if).")
	_, err := ParseFile("w.trl", src)
	want := "w.trl:1:12: expected a term, found the reserved word `if` (reserved words cannot be used as names)\n" +
		"p(\"é→\", if).\n" +
		"        ^\n"
	if got := err.(ErrorList).Render(src); got != want {
		t.Errorf("Render:\n%s\nwant:\n%s", got, want)
	}
}

func TestRenderOutsideSource(t *testing.T) {
	e := &Error{Pos: Pos{Filename: "x.trl", Line: 9, Column: 3}, Msg: "gone"}
	if got, want := RenderError(e, []byte("one line\n")), "x.trl:9:3: gone\n"; got != want {
		t.Errorf("RenderError = %q, want %q", got, want)
	}
	e.Pos = Pos{Filename: "x.trl", Line: 1, Column: 12}
	if got, want := RenderError(e, []byte("ab\x01c")), "x.trl:1:12: gone\nab c\n           ^\n"; got != want {
		t.Errorf("RenderError = %q, want %q", got, want)
	}
}

func TestErrorListSort(t *testing.T) {
	var l ErrorList
	l.Add(Pos{Filename: "b", Line: 1, Column: 1}, "b1")
	l.Add(Pos{Filename: "a", Line: 2, Column: 1}, "a2")
	l.Add(Pos{Filename: "a", Line: 1, Column: 5}, "a1-5")
	l.Add(Pos{Filename: "a", Line: 1, Column: 2}, "z")
	l.Add(Pos{Filename: "a", Line: 1, Column: 2}, "y")
	l.Sort()
	var got []string
	for _, e := range l {
		got = append(got, e.Msg)
	}
	if diff := cmp.Diff([]string{"y", "z", "a1-5", "a2", "b1"}, got); diff != "" {
		t.Errorf("order differs (-want +got):\n%s", diff)
	}
	if ErrorList(nil).Err() != nil {
		t.Error("empty list: Err() != nil")
	}
	if got, want := l.Error(), "a:1:2: y (and 4 more errors)"; got != want {
		t.Errorf("Error() = %q, want %q", got, want)
	}
}

func TestPosString(t *testing.T) {
	tests := []struct {
		p    Pos
		want string
	}{
		{Pos{Filename: "m.trl", Line: 3, Column: 7}, "m.trl:3:7"},
		{Pos{Line: 3, Column: 7}, "3:7"},
		{Pos{Filename: "m.trl"}, "m.trl"},
		{Pos{}, "-"},
	}
	for _, tt := range tests {
		if got := tt.p.String(); got != tt.want {
			t.Errorf("%#v.String() = %q, want %q", tt.p, got, tt.want)
		}
	}
}
