package grammar

import (
	"github.com/alecthomas/participle/v2"
	"github.com/alecthomas/participle/v2/lexer"
)

// This file holds the participle grammar: a concrete syntax tree that
// mirrors the source closely. parse.go converts it into the AST of ast.go.
// Each statement is parsed on its own (see ParseFile), so the grammar's
// root is a single statement ending with a period.

type sStatement struct {
	Pos     lexer.Position
	Rule    *sRule       `parser:"(  @@"`
	Param   *sParam      `parser:" | 'param':Keyword @@"`
	Display *sDisplay    `parser:" | 'display':Keyword @@"`
	Include *sInclude    `parser:" | 'include':Keyword @@"`
	Forbid  *sConstraint `parser:" | 'forbid':Keyword @@"`
	Choose  *sChoice     `parser:" | 'choose':Keyword @@"`
	Penalty *sPenalty    `parser:" | 'penalty':Keyword @@ )"`
	Period  bool         `parser:"@'.'"`
}

type sParam struct {
	Name  string `parser:"@Name '='"`
	Value *sTerm `parser:"@@"`
}

type sDisplay struct {
	Refs []*sRef `parser:"@@ ( ',' @@ )*"`
}

type sRef struct {
	Pos   lexer.Position
	Name  string `parser:"@Name '/'"`
	Arity string `parser:"@Int"`
}

type sInclude struct {
	Path sString `parser:"@String"`
}

type sConstraint struct {
	Body []*sLiteral `parser:"@@ ( ',' @@ )*"`
}

type sChoice struct {
	Bound    *sBound     `parser:"@@ 'of':Keyword"`
	Elements []*sElement `parser:"@@ ( ';' @@ )*"`
	Body     []*sLiteral `parser:"( 'if':Keyword @@ ( ',' @@ )* )?"`
}

type sBound struct {
	Pos     lexer.Position
	Any     bool   `parser:"(  @'any':Keyword"`
	Exactly *sTerm `parser:" | 'exactly':Keyword @@"`
	AtMost  *sTerm `parser:" | 'at':Keyword ( 'most':Keyword @@"`
	AtLeast *sTerm `parser:"                | 'least':Keyword @@ )"`
	Between *sTerm `parser:" | 'between':Keyword @@ 'and':Keyword"`
	And     *sTerm `parser:"   @@ )"`
}

type sElement struct {
	Pos  lexer.Position
	Atom *sAtom      `parser:"@@"`
	For  []*sLiteral `parser:"( 'for':Keyword @@ ( ',' @@ )* )?"`
}

type sPenalty struct {
	Weight   *sTerm      `parser:"@@"`
	Priority *sTerm      `parser:"( 'at':Keyword 'priority':Keyword @@ )?"`
	Per      []*sTerm    `parser:"( 'per':Keyword @@ ( ',' @@ )* )?"`
	Body     []*sLiteral `parser:"'if':Keyword @@ ( ',' @@ )*"`
}

type sRule struct {
	Head *sAtom      `parser:"@@"`
	Body []*sLiteral `parser:"( 'if':Keyword @@ ( ',' @@ )* )?"`
}

type sAtom struct {
	Pos  lexer.Position
	Name string   `parser:"@Name"`
	Args []*sTerm `parser:"( '(' @@ ( ',' @@ )* ')' )?"`
}

type sLiteral struct {
	Pos       lexer.Position
	Negated   *sAtom       `parser:"(  'not':Keyword @@"`
	Aggregate *sAggregate  `parser:" | @@"`
	Compare   *sComparison `parser:" | @@ )"`
}

type sAggregate struct {
	Pos       lexer.Position
	Func      string      `parser:"@( 'count':Keyword | 'sum':Keyword | 'min':Keyword | 'max':Keyword ) '('"`
	Tuple     []*sTerm    `parser:"@@ ( ',' @@ )* ':'"`
	Condition []*sLiteral `parser:"( @@ ( ',' @@ )* )? ')'"`
	Op        string      `parser:"@( '=' | '!=' | '<' | '<=' | '>' | '>=' )"`
	Bound     *sTerm      `parser:"@@"`
}

type sComparison struct {
	Pos   lexer.Position
	Left  *sTerm `parser:"@@"`
	Op    string `parser:"( @( '=' | '!=' | '<' | '<=' | '>' | '>=' )"`
	Right *sTerm `parser:"  @@ )?"`
}

// sTerm is a flat operator sequence `operand (op operand)*`; the
// conversion applies the precedence of the operators. Keeping the grammar
// flat makes parsing much cheaper than one grammar level per precedence.
type sTerm struct {
	Pos  lexer.Position
	Left *sOperand `parser:"@@"`
	Rest []*sOp    `parser:"@@*"`
}

type sOp struct {
	Pos   lexer.Position
	Op    string    `parser:"@( '+' | '-' | '*' | '/' | '%' | '..' )"`
	Right *sOperand `parser:"@@"`
}

// sOperand is a primary term after any number of minus signs.
type sOperand struct {
	Pos     lexer.Position
	Minus   []string  `parser:"@'-'*"`
	Primary *sPrimary `parser:"@@"`
}

type sPrimary struct {
	Pos      lexer.Position
	Name     *string  `parser:"(  @Name"`
	Args     []*sTerm `parser:"   ( '(' @@ ( ',' @@ )* ')' )?"`
	Variable *string  `parser:" | @Variable"`
	Int      *string  `parser:" | @Int"`
	String   *sString `parser:" | @String"`
	Paren    *sTerm   `parser:" | '(' @@ ')' )"`
}

// sString is a raw string token, quotes and escapes included.
type sString struct {
	Raw string
}

// Capture keeps the raw token text; decoding happens during conversion.
func (s *sString) Capture(values []string) error {
	s.Raw = values[0]
	return nil
}

// newStatementParser builds the participle parser for one statement.
func newStatementParser() (*participle.Parser[sStatement], error) {
	return participle.Build[sStatement](
		participle.Lexer(tokenDefinition{}),
		participle.UseLookahead(1),
	)
}
