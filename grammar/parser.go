package grammar

import (
	"errors"
	"fmt"
	"strconv"
	"sync"

	"github.com/alecthomas/participle/v2"
	"github.com/alecthomas/participle/v2/lexer"
)

// DefaultMaxErrors is the number of errors ParseFile reports before it
// stops.
const DefaultMaxErrors = 20

// DefaultMaxNesting bounds how deeply terms may nest (parentheses, unary
// minus signs and function arguments) unless Config.MaxNesting says
// otherwise. The bound keeps the recursive parser's stack small.
const DefaultMaxNesting = 200

var statementParser = sync.OnceValues(newStatementParser)

// ParseFile parses the model in src. filename is used in positions only.
// It returns the statements it could parse; when there are errors, the
// error is an ErrorList sorted by position. After DefaultMaxErrors errors
// parsing stops and a last entry says so.
func ParseFile(filename string, src []byte) (*File, error) {
	return Config{}.ParseFile(filename, src)
}

// Config holds parser settings. The zero Config uses the defaults.
type Config struct {
	// MaxErrors is the number of errors reported before parsing stops;
	// 0 means DefaultMaxErrors.
	MaxErrors int
	// MaxNesting is how deeply terms may nest; 0 means DefaultMaxNesting.
	MaxNesting int

	noFastPath bool // tests: parse every statement with participle
}

// ParseFile parses src like the package-level ParseFile, with c's settings.
func (c Config) ParseFile(filename string, src []byte) (*File, error) {
	p := &fileParser{max: c.MaxErrors, maxNesting: c.MaxNesting, fastPath: !c.noFastPath}
	if p.max <= 0 {
		p.max = DefaultMaxErrors
	}
	if p.maxNesting <= 0 {
		p.maxNesting = DefaultMaxNesting
	}
	return p.parse(filename, src)
}

type fileParser struct {
	max        int  // Config.MaxErrors
	maxNesting int  // Config.MaxNesting
	fastPath   bool // parse plain facts without participle
	errs       ErrorList
	toks       []lexer.Token // the statement being converted
}

func (p *fileParser) parse(filename string, src []byte) (*File, error) {
	f := &File{Filename: filename}
	toks, comments := scan(filename, src, &p.errs, p.max)
	f.Comments = comments
	sp, err := statementParser()
	if err != nil {
		panic("grammar: bad participle grammar: " + err.Error())
	}
	start := 0
	for i, t := range toks {
		if t.Type == tokPunct && t.Value == "." || t.Type == tokEOF {
			chunk := toks[start : i+1]
			start = i + 1
			if t.Type == tokEOF && len(chunk) == 1 {
				break
			}
			// A statement whose period is missing at a line end is reported
			// and parsing resumes on the next line, within the same chunk.
			for {
				s, resume := p.statement(sp, chunk)
				if s != nil {
					f.Statements = append(f.Statements, s)
				}
				if resume == 0 || len(p.errs) > p.max {
					break
				}
				chunk = chunk[resume:]
			}
			if len(p.errs) > p.max {
				break
			}
		}
	}
	p.errs.Sort()
	if len(p.errs) > p.max {
		last := p.errs[p.max-1].Pos
		p.errs = append(p.errs[:p.max:p.max], &Error{Pos: last,
			Msg: fmt.Sprintf("too many errors: stopped after %d (raise Config.MaxErrors to see more)", p.max)})
	}
	return f, p.errs.Err()
}

// statement parses one statement from chunk, which ends with a period or
// with the EOF token. When the statement lacks its period at a line end,
// resume is the index in chunk where the next statement starts.
func (p *fileParser) statement(sp *participle.Parser[sStatement], chunk []lexer.Token) (s Statement, resume int) {
	if p.fastPath {
		if s, ok := p.plainFact(chunk); ok {
			return s, 0
		}
	}
	for _, t := range chunk {
		if t.Type == tokBad {
			return nil, 0 // already reported by the scanner
		}
	}
	if !p.checkNesting(chunk) {
		return nil, 0
	}
	toks := chunk
	if chunk[len(chunk)-1].Type != tokEOF {
		toks = append(chunk[:len(chunk):len(chunk)], lexer.Token{Type: tokEOF, Pos: endPos(chunk[len(chunk)-1])})
	}
	defer func() {
		if r := recover(); r != nil {
			p.errs.Add(toPos(chunk[0].Pos), fmt.Sprintf("internal parser failure on this statement: %v", r))
			s, resume = nil, 0
		}
	}()
	pl, err := lexer.Upgrade(&sliceLexer{toks: toks})
	if err != nil {
		p.errs.Add(toPos(chunk[0].Pos), err.Error())
		return nil, 0
	}
	st, err := sp.ParseFromLexer(pl)
	if err != nil {
		return nil, p.syntaxError(toks, err)
	}
	p.toks = chunk
	return p.convertStatement(st), 0
}

// endPos returns the position just after token t.
func endPos(t lexer.Token) lexer.Position {
	q := t.Pos
	q.Offset += len(t.Value)
	q.Column += len(t.Value)
	return q
}

// checkNesting reports statements whose terms nest deeper than the
// nesting limit.
func (p *fileParser) checkNesting(chunk []lexer.Token) bool {
	depth := 0
	for i, t := range chunk {
		if t.Type != tokPunct {
			continue
		}
		switch t.Value {
		case "(":
			depth++
		case ")":
			depth--
		case "-":
			// A run of minus signs nests like parentheses. Count each run
			// once, from its first sign.
			if i > 0 && chunk[i-1].Type == tokPunct && chunk[i-1].Value == "-" {
				continue
			}
			n := 1
			for j := i + 1; j < len(chunk) && chunk[j].Type == tokPunct && chunk[j].Value == "-"; j++ {
				n++
			}
			if depth+n <= p.maxNesting {
				continue
			}
			depth += n
		}
		if depth > p.maxNesting {
			p.errs.Add(toPos(t.Pos), fmt.Sprintf("terms nested more than %d levels deep (raise Config.MaxNesting to allow more)", p.maxNesting))
			return false
		}
	}
	return true
}

// syntaxError reports why toks (a statement ending with a period or EOF)
// failed to parse, in plain words when the diagnoser can tell.
//
// It returns where parsing may resume inside toks (0 for after toks).
func (p *fileParser) syntaxError(toks []lexer.Token, err error) (resume int) {
	if pos, msg, resume, ok := diagnoseResume(toks); ok {
		p.errs.Add(toPos(pos), msg)
		return resume
	}
	var pe participle.Error
	if errors.As(err, &pe) {
		pos := pe.Position()
		for _, t := range toks {
			if t.Pos.Offset == pos.Offset {
				p.errs.Add(toPos(pos), "did not expect "+describe(t)+" here")
				return 0
			}
		}
		p.errs.Add(toPos(pos), "syntax error")
		return 0
	}
	p.errs.Add(toPos(toks[0].Pos), "syntax error")
	return 0
}

// plainFact parses the most common statement, a fact whose arguments are
// constants, variables, integers and strings (`run(entry, wood, 40).`),
// directly from its tokens, as participle and the conversion would. Large
// data files are mostly such facts. It reports ok=false, having changed
// nothing, for any other shape; the participle grammar then decides.
func (p *fileParser) plainFact(chunk []lexer.Token) (s Statement, ok bool) {
	n := len(chunk)
	if n < 2 || chunk[0].Type != tokName || chunk[n-1].Type != tokPunct || chunk[n-1].Value != "." {
		return nil, false
	}
	head := Atom{Pos: toPos(chunk[0].Pos), Predicate: chunk[0].Value}
	if n == 2 {
		return &Fact{Pos: head.Pos, Head: head}, true
	}
	if !isPunct(chunk[1], "(") || !isPunct(chunk[n-2], ")") || n < 5 {
		return nil, false
	}
	// Arguments sit between chunk[1] and chunk[n-2], separated by commas.
	args := make([]Term, 0, (n-3)/2)
	i := 2
	for {
		t := chunk[i]
		switch t.Type {
		case tokName:
			args = append(args, &Name{Pos: toPos(t.Pos), Name: t.Value})
		case tokVariable:
			args = append(args, &Variable{Pos: toPos(t.Pos), Name: t.Value, Anonymous: t.Value == "_"})
		case tokString:
			args = append(args, &String{Pos: toPos(t.Pos), Value: unquote(t.Value)})
		case tokInt:
			v, err := strconv.ParseInt(t.Value, 10, 64)
			if err != nil {
				return nil, false
			}
			args = append(args, &Integer{Pos: toPos(t.Pos), Value: v})
		case tokPunct:
			if t.Value != "-" || chunk[i+1].Type != tokInt {
				return nil, false
			}
			v, err := strconv.ParseInt("-"+chunk[i+1].Value, 10, 64)
			if err != nil {
				return nil, false
			}
			args = append(args, &Integer{Pos: toPos(t.Pos), Value: v})
			i++
		default:
			return nil, false
		}
		i++
		if i == n-2 {
			break
		}
		if !isPunct(chunk[i], ",") || i+1 >= n-2 {
			return nil, false
		}
		i++
	}
	head.Args = args
	return &Fact{Pos: head.Pos, Head: head}, true
}

// isPunct reports whether t is the punctuation v.
func isPunct(t lexer.Token, v string) bool {
	return t.Type == tokPunct && t.Value == v
}
