// Package grammar reads and writes trellis model files: it holds the lexer,
// the parser, the syntax tree with source positions, the canonical
// formatter and positioned error lists.
//
// ParseFile turns source text into a *File; Format turns a *File back into
// canonical source. Errors are reported as an ErrorList sorted by position;
// ErrorList.Render prints each error with its source line and a caret.
//
// The package knows nothing about grounding: it checks the shape of
// statements, not whether variables are bound or terms evaluate.
package grammar
