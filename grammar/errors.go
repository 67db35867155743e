package grammar

import (
	"bytes"
	"fmt"
	"sort"
	"strings"
)

// Error is a positioned error.
type Error struct {
	Pos Pos
	Msg string
}

// Error returns "file:line:column: message".
func (e *Error) Error() string {
	return e.Pos.String() + ": " + e.Msg
}

// ErrorList is a list of errors, kept sorted by position by Sort.
// The zero value is an empty list ready to use.
type ErrorList []*Error

// Add appends an error at pos with the given message.
func (l *ErrorList) Add(pos Pos, msg string) {
	*l = append(*l, &Error{Pos: pos, Msg: msg})
}

// Len returns the number of errors.
func (l ErrorList) Len() int { return len(l) }

// Swap swaps errors i and j.
func (l ErrorList) Swap(i, j int) { l[i], l[j] = l[j], l[i] }

// Less orders errors by file name, line, column, then message.
func (l ErrorList) Less(i, j int) bool {
	a, b := l[i].Pos, l[j].Pos
	if a != b {
		if a.Filename != b.Filename {
			return a.Filename < b.Filename
		}
		if a.Line != b.Line {
			return a.Line < b.Line
		}
		if a.Column != b.Column {
			return a.Column < b.Column
		}
	}
	return l[i].Msg < l[j].Msg
}

// Sort sorts the list by position. It is stable, so errors at the same
// position keep their order of discovery after sorting by message.
func (l ErrorList) Sort() { sort.Stable(l) }

// Error returns the first error and, if there are more, how many follow.
func (l ErrorList) Error() string {
	switch len(l) {
	case 0:
		return "no errors"
	case 1:
		return l[0].Error()
	}
	return fmt.Sprintf("%s (and %d more errors)", l[0], len(l)-1)
}

// Err returns nil for an empty list and the list itself otherwise.
func (l ErrorList) Err() error {
	if len(l) == 0 {
		return nil
	}
	return l
}

// Render returns every error in the list, one after the other, as
// "file:line:column: message" followed by the source line and a caret under
// the column. src is the content of the file the errors refer to; an error
// whose position falls outside src is printed without a source line.
func (l ErrorList) Render(src []byte) string {
	var b strings.Builder
	for _, e := range l {
		b.WriteString(RenderError(e, src))
	}
	return b.String()
}

// RenderError renders one error as "file:line:column: message", a newline,
// the source line and a line with a caret under the column. It ends with a
// newline.
func RenderError(e *Error, src []byte) string {
	var b strings.Builder
	b.WriteString(e.Error())
	b.WriteByte('\n')
	line, ok := sourceLine(src, e.Pos.Line)
	if !ok {
		return b.String()
	}
	line = strings.TrimRight(line, "\r")
	b.WriteString(printable(line))
	b.WriteByte('\n')
	col := e.Pos.Column
	if col < 1 {
		col = 1
	}
	// Keep tabs so the caret lines up in a terminal.
	for i := 0; i < col-1 && i < len(line); i++ {
		if line[i] == '\t' {
			b.WriteByte('\t')
		} else if line[i]&0xC0 != 0x80 { // one space per character, not per byte
			b.WriteByte(' ')
		}
	}
	for i := len(line); i < col-1; i++ {
		b.WriteByte(' ')
	}
	b.WriteString("^\n")
	return b.String()
}

// sourceLine returns line n (counting from 1) of src without its newline.
func sourceLine(src []byte, n int) (string, bool) {
	if n < 1 {
		return "", false
	}
	for i := 1; i < n; i++ {
		j := bytes.IndexByte(src, '\n')
		if j < 0 {
			return "", false
		}
		src = src[j+1:]
	}
	if j := bytes.IndexByte(src, '\n'); j >= 0 {
		src = src[:j]
	}
	return string(src), true
}

// printable replaces control characters other than tab by spaces, so a
// rendered error cannot disturb a terminal. It keeps byte lengths, so the
// caret stays under the right column.
func printable(s string) string {
	for i := 0; i < len(s); i++ {
		if c := s[i]; (c < 0x20 && c != '\t') || c == 0x7f {
			b := []byte(s)
			for j := i; j < len(b); j++ {
				if c := b[j]; (c < 0x20 && c != '\t') || c == 0x7f {
					b[j] = ' '
				}
			}
			return string(b)
		}
	}
	return s
}
