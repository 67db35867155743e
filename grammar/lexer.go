package grammar

import (
	"fmt"
	"io"
	"unicode/utf8"

	"github.com/alecthomas/participle/v2/lexer"
)

// Token types produced by the scanner. The values are the negative
// pseudo-runes that participle expects; lexer.EOF is -1.
const (
	tokEOF      = lexer.EOF
	tokName     = lexer.TokenType(-2 - iota) // lowercase name that is not reserved
	tokKeyword                               // reserved word
	tokVariable                              // variable or _
	tokInt                                   // digit sequence
	tokString                                // string literal, raw with its quotes
	tokPunct                                 // operator or punctuation
	tokBad                                   // malformed input, already reported
)

// IsReserved reports whether word is a reserved word of the language.
func IsReserved(word string) bool {
	switch word {
	case "if", "not", "forbid", "choose", "of", "for", "any", "exactly", "at", "most", "least",
		"between", "and", "penalty", "priority", "per", "param", "display", "include",
		"count", "sum", "min", "max":
		return true
	}
	return false
}

// scanner turns source text into tokens. It never fails: malformed input is
// reported to errs and becomes a tokBad token.
type scanner struct {
	filename string
	src      []byte
	text     string // src as a string; token values are substrings of it
	off      int
	line     int
	lineOff  int // offset of the start of the current line
	toks     []lexer.Token
	comments []*Comment
	errs     *ErrorList
	maxErrs  int // stop scanning once errs holds more than this many errors
}

// scan tokenises src. The token list ends with an EOF token. Scanning
// stops early, with an EOF token, once errs holds more than maxErrs errors.
func scan(filename string, src []byte, errs *ErrorList, maxErrs int) ([]lexer.Token, []*Comment) {
	s := &scanner{filename: filename, src: src, text: string(src), line: 1, errs: errs, maxErrs: maxErrs}
	s.toks = make([]lexer.Token, 0, len(src)/2+1)
	if len(src) >= 3 && src[0] == 0xEF && src[1] == 0xBB && src[2] == 0xBF {
		s.off = 3 // a UTF-8 byte order mark; columns still count its bytes
	}
	s.run()
	return s.toks, s.comments
}

func (s *scanner) pos(off int) lexer.Position {
	return lexer.Position{Filename: s.filename, Offset: off, Line: s.line, Column: off - s.lineOff + 1}
}

func (s *scanner) errorAt(p lexer.Position, format string, args ...any) {
	s.errs.Add(toPos(p), fmt.Sprintf(format, args...))
}

func (s *scanner) emit(t lexer.TokenType, start int, p lexer.Position) {
	s.toks = append(s.toks, lexer.Token{Type: t, Value: s.text[start:s.off], Pos: p})
}

func isLower(c byte) bool  { return 'a' <= c && c <= 'z' }
func isUpper(c byte) bool  { return 'A' <= c && c <= 'Z' }
func isDigit(c byte) bool  { return '0' <= c && c <= '9' }
func isIdent(c byte) bool  { return isLower(c) || isUpper(c) || isDigit(c) || c == '_' }
func isLetter(c byte) bool { return isLower(c) || isUpper(c) }

func (s *scanner) run() {
	src := s.src
	for s.off < len(src) && len(*s.errs) <= s.maxErrs {
		c := src[s.off]
		start := s.off
		p := s.pos(start)
		switch {
		case c == '\n':
			s.off++
			s.line++
			s.lineOff = s.off
		case c == ' ' || c == '\t' || c == '\r':
			s.off++
		case c == '#':
			for s.off < len(src) && src[s.off] != '\n' {
				s.off++
			}
			text := s.text[start+1 : s.off]
			if n := len(text); n > 0 && text[n-1] == '\r' {
				text = text[:n-1]
			}
			s.comments = append(s.comments, &Comment{Pos: toPos(p), Text: text})
		case isLower(c):
			for s.off < len(src) && isIdent(src[s.off]) {
				s.off++
			}
			if IsReserved(s.text[start:s.off]) {
				s.emit(tokKeyword, start, p)
			} else {
				s.emit(tokName, start, p)
			}
		case isUpper(c) || c == '_':
			for s.off < len(src) && isIdent(src[s.off]) {
				s.off++
			}
			s.emit(tokVariable, start, p)
		case isDigit(c):
			for s.off < len(src) && isDigit(src[s.off]) {
				s.off++
			}
			if s.off+1 < len(src) && src[s.off] == '.' && isDigit(src[s.off+1]) {
				s.off++
				for s.off < len(src) && isDigit(src[s.off]) {
					s.off++
				}
				s.errorAt(p, "malformed number %q: only integers are supported", string(src[start:s.off]))
				s.emit(tokBad, start, p)
				continue
			}
			if s.off < len(src) && isLetter(src[s.off]) || s.off < len(src) && src[s.off] == '_' {
				for s.off < len(src) && isIdent(src[s.off]) {
					s.off++
				}
				s.errorAt(p, "malformed number %q: a number is made of digits only", string(src[start:s.off]))
				s.emit(tokBad, start, p)
				continue
			}
			s.emit(tokInt, start, p)
		case c == '"':
			s.scanString(p)
		default:
			s.scanPunct(p)
		}
	}
	s.toks = append(s.toks, lexer.Token{Type: tokEOF, Pos: s.pos(s.off)})
}

func (s *scanner) scanString(p lexer.Position) {
	src := s.src
	start := s.off
	s.off++ // opening quote
	bad := false
	for {
		if s.off >= len(src) || src[s.off] == '\n' {
			s.errorAt(p, "unterminated string: a string must end with a double quote on the same line")
			s.emit(tokBad, start, p)
			return
		}
		c := src[s.off]
		if c == '"' {
			s.off++
			break
		}
		if c == '\\' {
			if s.off+1 >= len(src) || src[s.off+1] == '\n' {
				s.off++
				continue // reported as unterminated
			}
			switch e := src[s.off+1]; e {
			case '"', '\\', 'n':
			default:
				r, _ := utf8.DecodeRune(src[s.off+1:])
				s.errorAt(s.pos(s.off), "unknown escape sequence \\%c in string: the escapes are \\\", \\\\ and \\n", r)
				bad = true
			}
			s.off += 2
			continue
		}
		s.off++
	}
	if bad {
		s.emit(tokBad, start, p)
		return
	}
	s.emit(tokString, start, p)
}

func (s *scanner) scanPunct(p lexer.Position) {
	src := s.src
	start := s.off
	c := src[s.off]
	next := byte(0)
	if s.off+1 < len(src) {
		next = src[s.off+1]
	}
	switch c {
	case '(', ')', ',', ';', ':', '=', '+', '-', '*', '/', '%':
		s.off++
	case '.':
		s.off++
		if next == '.' {
			s.off++
		}
	case '<', '>':
		s.off++
		if next == '=' {
			s.off++
		}
	case '!':
		s.off++
		if next != '=' {
			s.errorAt(p, "unexpected `!`: write `!=` for \"not equal\" or `not` for negation")
			s.emit(tokBad, start, p)
			return
		}
		s.off++
	default:
		r, size := utf8.DecodeRune(src[s.off:])
		s.off += size
		switch {
		case r == utf8.RuneError && size <= 1:
			s.errorAt(p, "invalid UTF-8 byte 0x%02x", c)
		case c == '\'':
			// Skip to the closing quote on the same line, if any, so the
			// quoted text gives one error.
			for s.off < len(src) && src[s.off] != '\n' {
				s.off++
				if src[s.off-1] == '\'' {
					break
				}
			}
			s.errorAt(p, "unexpected single quote: strings use double quotes")
		default:
			s.errorAt(p, "unexpected character %q", r)
		}
		s.emit(tokBad, start, p)
		return
	}
	s.emit(tokPunct, start, p)
}

func toPos(p lexer.Position) Pos {
	return Pos{Filename: p.Filename, Offset: p.Offset, Line: p.Line, Column: p.Column}
}

// tokenDefinition is the lexer.Definition handed to participle. Parsing
// never calls its Lex method: statements are parsed from token slices
// produced by scan.
type tokenDefinition struct{}

// Symbols returns the token types by name, the names the participle
// grammar uses.
func (tokenDefinition) Symbols() map[string]lexer.TokenType {
	return map[string]lexer.TokenType{
		"EOF":      tokEOF,
		"Name":     tokName,
		"Keyword":  tokKeyword,
		"Variable": tokVariable,
		"Int":      tokInt,
		"String":   tokString,
		"Punct":    tokPunct,
		"Bad":      tokBad,
	}
}

// Lex tokenises r. Errors are returned as an ErrorList.
func (tokenDefinition) Lex(filename string, r io.Reader) (lexer.Lexer, error) {
	src, err := io.ReadAll(r)
	if err != nil {
		return nil, err
	}
	var errs ErrorList
	toks, _ := scan(filename, src, &errs, DefaultMaxErrors)
	return &sliceLexer{toks: toks}, errs.Err()
}

// sliceLexer returns tokens from a slice, then EOF tokens forever.
type sliceLexer struct {
	toks []lexer.Token
	i    int
}

// Next returns the next token.
func (l *sliceLexer) Next() (lexer.Token, error) {
	if l.i >= len(l.toks) {
		if len(l.toks) == 0 {
			return lexer.Token{Type: tokEOF}, nil
		}
		last := l.toks[len(l.toks)-1]
		return lexer.Token{Type: tokEOF, Pos: last.Pos}, nil
	}
	t := l.toks[l.i]
	l.i++
	return t, nil
}
