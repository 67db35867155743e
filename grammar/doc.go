// Package grammar reads and writes trellis model files: it holds the
// scanner, the parser, the syntax tree with source positions, the canonical
// formatter and positioned error lists. It checks the shape of statements
// only; whether variables are bound or terms evaluate is for the grounder.
//
// # Entry points
//
// ParseFile turns source text into a *File. On errors it still returns the
// statements that parsed, and an ErrorList sorted by position: at most
// DefaultMaxErrors errors, then a note saying it stopped
// (Config.MaxErrors changes the limit).
// ErrorList.Render and RenderError print each error as
// "file:line:column: message", the source line and a caret under the
// column. Format turns a *File back into canonical source; parse, format
// and parse again gives the same tree, and formatting is idempotent.
// Inspect walks a tree.
//
// # Syntax
//
// Comments run from # to the end of the line. Names start with a lowercase
// letter, variables with an uppercase letter or _; both continue with
// letters, digits and _. The reserved words (see IsReserved) are not names.
// Integers are decimal and must fit in 64 bits; strings are in double quotes
// with the escapes \" \\ and \n.
//
//	statement  = atom [ "if" literals ] "."
//	           | "forbid" literals "."
//	           | "choose" bound "of" element { ";" element } [ "if" literals ] "."
//	           | "penalty" term [ "at" "priority" term ] [ "per" terms ] "if" literals "."
//	           | "param" name "=" term "."
//	           | "display" name "/" integer { "," name "/" integer } "."
//	           | "include" string "." .
//	bound      = "any" | "exactly" term | "at" "most" term | "at" "least" term
//	           | "between" term "and" term .
//	element    = atom [ "for" literals ] .
//	literals   = literal { "," literal } .
//	literal    = atom | "not" atom | term compare term
//	           | aggfunc "(" terms ":" [ literals ] ")" compare term .
//	aggfunc    = "count" | "sum" | "min" | "max" .
//	compare    = "=" | "!=" | "<" | "<=" | ">" | ">=" .
//	atom       = name [ "(" terms ")" ] .
//	terms      = term { "," term } .
//	term       = operand { operator operand } .
//	operator   = ".." | "+" | "-" | "*" | "/" | "%" .
//	operand    = { "-" } ( name [ "(" terms ")" ] | variable | integer | string | "(" term ")" ) .
//
// Operators bind as usual: * / % tighter than + -, which bind tighter than
// the interval operator .., which does not chain without parentheses.
// Unary minus binds tightest; a minus sign directly before digits is part
// of the integer. Aggregates do not nest.
//
// # Implementation
//
// A hand-written scanner produces participle tokens; the file is cut into
// statements at periods and each statement is parsed with a participle
// grammar (syntax.go) into a concrete tree, which is converted into the
// syntax tree of ast.go. Cutting at periods lets one bad statement be
// reported without hiding the errors of the next ones. When participle
// rejects a statement, a small recursive walk over the same grammar
// (diagnose.go) finds the first problem and names it in plain words.
// Facts whose arguments are plain constants, the bulk of large data files,
// are read straight from their tokens; tests and the fuzzer check that this
// gives exactly what participle gives.
package grammar
