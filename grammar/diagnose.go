package grammar

import (
	"fmt"

	"github.com/alecthomas/participle/v2/lexer"
)

// diagnoser explains why a statement does not parse. The participle
// grammar decides whether a statement is well formed and builds its tree;
// when it fails, the diagnoser walks the same grammar by hand over the
// statement's tokens and stops at the first problem with a message in plain
// words. It builds nothing.
type diagnoser struct {
	toks []lexer.Token // ends with a period or EOF token
	i    int
	pos  lexer.Position
	msg  string
	// resume is the token index where the next statement starts when the
	// error is a period missing at a line end, else 0.
	resume int
}

// diagnose returns the position and message of the first syntax error in
// the statement made of toks, or ok=false when it finds none.
func diagnose(toks []lexer.Token) (pos lexer.Position, msg string, ok bool) {
	pos, msg, _, ok = diagnoseResume(toks)
	return pos, msg, ok
}

// diagnoseResume is diagnose that also says where parsing may resume: when
// the statement is complete but its period is missing at a line end,
// resume is the index of the first token of the next line, else 0.
func diagnoseResume(toks []lexer.Token) (pos lexer.Position, msg string, resume int, ok bool) {
	d := &diagnoser{toks: toks}
	d.statement()
	if d.msg == "" {
		return lexer.Position{}, "", 0, false
	}
	return d.pos, d.msg, d.resume, true
}

func (d *diagnoser) failed() bool { return d.msg != "" }

func (d *diagnoser) peek() lexer.Token {
	if d.i < len(d.toks) {
		return d.toks[d.i]
	}
	return d.toks[len(d.toks)-1]
}

func (d *diagnoser) next() lexer.Token {
	t := d.peek()
	if d.i < len(d.toks) {
		d.i++
	}
	return t
}

// is reports whether the next token is the punctuation or keyword v.
func (d *diagnoser) is(v string) bool {
	t := d.peek()
	return (t.Type == tokPunct || t.Type == tokKeyword) && t.Value == v
}

// accept consumes the next token if it is v.
func (d *diagnoser) accept(v string) bool {
	if d.is(v) {
		d.i++
		return true
	}
	return false
}

// fail records the first error, at the next token.
func (d *diagnoser) fail(format string, args ...any) {
	if d.msg != "" {
		return
	}
	d.pos = d.peek().Pos
	d.msg = fmt.Sprintf(format, args...)
}

// failFound records "expected ..., found ..." at the next token, with a
// special message when the token is a reserved word.
func (d *diagnoser) failFound(expected string) {
	t := d.peek()
	if t.Type == tokEOF && d.i > 0 && t.Pos.Line > d.toks[d.i-1].Pos.Line && d.msg == "" {
		// The file ends on a later line: point just after the last token.
		d.pos = endPos(d.toks[d.i-1])
		d.msg = fmt.Sprintf("expected %s, found the end of the file", expected)
		return
	}
	d.fail("expected %s, found %s", expected, describe(t))
}

// describe names a token in words.
func describe(t lexer.Token) string {
	switch t.Type {
	case tokEOF:
		return "the end of the file"
	case tokName:
		return fmt.Sprintf("the name `%s`", t.Value)
	case tokKeyword:
		return fmt.Sprintf("the reserved word `%s`", t.Value)
	case tokVariable:
		if t.Value == "_" {
			return "the anonymous variable `_`"
		}
		return fmt.Sprintf("the variable `%s`", t.Value)
	case tokInt:
		return fmt.Sprintf("the number %s", t.Value)
	case tokString:
		return "a string"
	case tokPunct:
		if t.Value == "." {
			return "a period"
		}
		return fmt.Sprintf("`%s`", t.Value)
	}
	return fmt.Sprintf("%q", t.Value)
}

// end expects the period that ends a statement of the given kind.
func (d *diagnoser) end(kind string, more string) {
	if d.failed() {
		return
	}
	if d.accept(".") {
		return
	}
	// A statement that ends at a line end without its period: point just
	// after its last token rather than at the next line.
	if d.i > 0 && d.peek().Pos.Line > d.toks[d.i-1].Pos.Line {
		d.pos = endPos(d.toks[d.i-1])
		d.msg = "expected a period to end the " + kind
		if d.peek().Type != tokEOF {
			d.resume = d.i
		}
		return
	}
	if more != "" {
		d.failFound(fmt.Sprintf("a period to end the %s, or %s", kind, more))
		return
	}
	d.failFound("a period to end the " + kind)
}

func (d *diagnoser) statement() {
	t := d.peek()
	if t.Type == tokKeyword {
		d.i++
		switch t.Value {
		case "param":
			d.param()
			return
		case "display":
			d.display()
			return
		case "include":
			if d.peek().Type != tokString {
				d.failFound("a quoted file name after `include`")
				return
			}
			d.i++
			d.end("include statement", "")
			return
		case "forbid":
			d.literals("`forbid`")
			d.end("constraint", "a comma and another literal")
			return
		case "choose":
			d.choice()
			return
		case "penalty":
			d.penalty()
			return
		}
		d.i--
		d.fail("a statement cannot start with the reserved word `%s`; statements start with an atom or with one of forbid, choose, penalty, param, display, include", t.Value)
		return
	}
	switch t.Type {
	case tokVariable:
		d.fail("a variable cannot be a predicate name")
		return
	case tokName:
	default:
		d.failFound("a statement (an atom, or one of forbid, choose, penalty, param, display, include)")
		return
	}
	d.atom("")
	if d.failed() {
		return
	}
	if d.accept("if") {
		d.literals("`if`")
		d.end("rule", "a comma and another literal")
		return
	}
	if d.is(":") || d.is("<") || d.is("=") {
		d.failFound("a period to end the fact, or `if` to start the rule's body")
		return
	}
	d.end("fact", "`if` to start a body")
}

func (d *diagnoser) param() {
	if !d.name("a parameter name must start with a lowercase letter", "a parameter name after `param`") {
		return
	}
	if !d.accept("=") {
		d.failFound("`=` after the parameter name")
		return
	}
	d.term()
	d.end("parameter", "")
}

func (d *diagnoser) display() {
	for {
		if !d.name("a variable cannot be a predicate name", "a predicate such as `buy/2` after `display`") {
			return
		}
		if !d.accept("/") {
			d.failFound("`/` and the number of arguments after the predicate name")
			return
		}
		if d.peek().Type != tokInt {
			d.failFound("the number of arguments after `/`")
			return
		}
		d.i++
		if !d.accept(",") {
			break
		}
	}
	d.end("display statement", "a comma and another predicate")
}

func (d *diagnoser) choice() {
	switch {
	case d.accept("any"):
	case d.accept("exactly"):
		d.term()
	case d.accept("at"):
		if !d.accept("most") && !d.accept("least") {
			d.failFound("`most` or `least` after `at`")
			return
		}
		d.term()
	case d.accept("between"):
		d.term()
		if !d.failed() && !d.accept("and") {
			d.failFound("`and` between the two bounds of `between`")
			return
		}
		d.term()
	default:
		d.failFound("a choice bound (any, exactly N, at most N, at least N or between N and M) after `choose`")
		return
	}
	if d.failed() {
		return
	}
	if !d.accept("of") {
		d.failFound("`of` after the choice bound")
		return
	}
	for {
		d.atom("a choice element")
		if d.failed() {
			return
		}
		if d.accept("for") {
			d.literals("`for`")
			if d.failed() {
				return
			}
		}
		if !d.accept(";") {
			break
		}
	}
	if d.accept("if") {
		d.literals("`if`")
		d.end("choice", "a comma and another literal")
		return
	}
	if d.is(",") {
		d.fail("choice elements are separated by semicolons, not commas")
		return
	}
	d.end("choice", "a semicolon and another element, or `if` and a body")
}

func (d *diagnoser) penalty() {
	d.term()
	if d.failed() {
		return
	}
	if d.accept("at") {
		if !d.accept("priority") {
			d.failFound("`priority` after `at`")
			return
		}
		d.term()
		if d.failed() {
			return
		}
	}
	if d.accept("per") {
		d.terms()
		if d.failed() {
			return
		}
	}
	if !d.accept("if") {
		d.failFound("`if` and the condition of the penalty")
		return
	}
	d.literals("`if`")
	d.end("penalty", "a comma and another literal")
}

// atom checks `name` or `name(terms)`. what names the atom's role in
// messages ("" for a statement head).
func (d *diagnoser) atom(what string) {
	if t := d.peek(); t.Type == tokKeyword {
		d.fail("`%s` is a reserved word and cannot be used as a predicate name", t.Value)
		return
	}
	if what == "" {
		what = "an atom"
	}
	if d.name("a variable cannot be a predicate name", what) {
		d.arguments()
	}
}

// name consumes a name and reports whether there was one. A variable in
// its place fails with the message notVar, anything else as not the
// expected want.
func (d *diagnoser) name(notVar, want string) bool {
	switch d.peek().Type {
	case tokName:
		d.i++
		return true
	case tokVariable:
		d.fail("%s", notVar)
	default:
		d.failFound(want)
	}
	return false
}

// arguments checks an optional parenthesised argument list.
func (d *diagnoser) arguments() {
	if !d.accept("(") {
		return
	}
	d.terms()
	if d.failed() {
		return
	}
	if !d.accept(")") {
		d.failFound("a comma or `)` to close the argument list")
	}
}

func (d *diagnoser) terms() {
	for {
		d.term()
		if d.failed() || !d.accept(",") {
			return
		}
	}
}

// literals checks a non-empty comma-separated list of literals following
// the word after.
func (d *diagnoser) literals(after string) {
	if d.is(".") || d.peek().Type == tokEOF {
		d.failFound("a literal after " + after)
		return
	}
	for {
		d.literal(false)
		if d.failed() || !d.accept(",") {
			return
		}
		if d.is(".") || d.peek().Type == tokEOF {
			d.failFound("another literal after the comma")
			return
		}
	}
}

// startsTerm reports whether t can begin a term.
func startsTerm(t lexer.Token) bool {
	switch t.Type {
	case tokInt, tokString, tokVariable, tokName:
		return true
	case tokPunct:
		return t.Value == "(" || t.Value == "-"
	}
	return false
}

func isCompare(t lexer.Token) bool {
	if t.Type != tokPunct {
		return false
	}
	switch t.Value {
	case "=", "!=", "<", "<=", ">", ">=":
		return true
	}
	return false
}

func (d *diagnoser) literal(inAggregate bool) {
	t := d.peek()
	if t.Type == tokKeyword {
		switch t.Value {
		case "not":
			d.i++
			n := d.peek()
			switch {
			case n.Type == tokKeyword && (n.Value == "count" || n.Value == "sum" || n.Value == "min" || n.Value == "max"):
				d.fail("`not` cannot be applied to an aggregate; use the opposite comparison instead")
				return
			case n.Type == tokVariable && !(d.i+1 < len(d.toks) && d.toks[d.i+1].Value == "(" && d.toks[d.i+1].Type == tokPunct),
				n.Type == tokInt, n.Type == tokString, n.Type == tokPunct && (n.Value == "-" || n.Value == "("):
				d.fail("`not` applies to atoms only; to negate a comparison, use the opposite operator")
				return
			}
			d.atom("an atom after `not`")
			return
		case "count", "sum", "min", "max":
			if inAggregate {
				d.fail("an aggregate cannot appear inside another aggregate")
				return
			}
			d.aggregate()
			return
		}
		d.fail("expected a literal, found %s", describe(t))
		return
	}
	if t.Type == tokVariable && d.i+1 < len(d.toks) && d.toks[d.i+1].Type == tokPunct && d.toks[d.i+1].Value == "(" {
		d.fail("a variable cannot be a predicate name")
		return
	}
	if !startsTerm(t) {
		d.failFound("a literal")
		return
	}
	d.term()
	if d.failed() {
		return
	}
	if isCompare(d.peek()) {
		d.i++
		d.term()
	}
}

func (d *diagnoser) aggregate() {
	name := d.next().Value
	if !d.accept("(") {
		d.failFound(fmt.Sprintf("`(` after `%s`", name))
		return
	}
	d.terms()
	if d.failed() {
		return
	}
	if !d.accept(":") {
		d.failFound("`:` between the aggregate's tuple and its condition")
		return
	}
	if !d.is(")") {
		for {
			d.literal(true)
			if d.failed() || !d.accept(",") {
				break
			}
		}
		if d.failed() {
			return
		}
	}
	if !d.accept(")") {
		d.failFound("a comma or `)` to close the aggregate")
		return
	}
	if !isCompare(d.peek()) {
		d.failFound("a comparison such as `> 2` after the aggregate")
		return
	}
	d.i++
	d.term()
}

// term checks sum [".." sum].
func (d *diagnoser) term() {
	d.sum()
	if d.accept("..") {
		d.sum()
	}
}

func (d *diagnoser) sum() {
	d.product()
	for !d.failed() && (d.accept("+") || d.accept("-")) {
		d.product()
	}
}

func (d *diagnoser) product() {
	d.unary()
	for !d.failed() && (d.accept("*") || d.accept("/") || d.accept("%")) {
		d.unary()
	}
}

func (d *diagnoser) unary() {
	for d.accept("-") {
	}
	d.primary()
}

func (d *diagnoser) primary() {
	if d.failed() {
		return
	}
	t := d.peek()
	switch t.Type {
	case tokInt, tokString:
		d.i++
	case tokVariable:
		d.i++
		if d.is("(") {
			d.i--
			d.fail("a variable cannot have arguments: function and predicate names start with a lowercase letter")
		}
	case tokName:
		d.i++
		d.arguments()
	case tokKeyword:
		d.fail("expected a term, found the reserved word `%s` (reserved words cannot be used as names)", t.Value)
	default:
		if d.accept("(") {
			d.term()
			if !d.failed() && !d.accept(")") {
				d.failFound("`)` to close the parenthesis")
			}
			return
		}
		d.failFound("a term")
	}
}
