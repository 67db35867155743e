package grammar

import (
	"bytes"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
)

// FuzzParse checks that ParseFile never panics or hangs, that every error
// is positioned inside the file and renders, and that inputs that parse
// survive format → parse → format unchanged.
func FuzzParse(f *testing.F) {
	files, _ := filepath.Glob("testdata/*.trl")
	for _, name := range files {
		src, err := os.ReadFile(name)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(src)
	}
	for _, s := range []string{
		"p(a).", "p(a", "p(\"x", "p(-9223372036854775808).", "p(1..2..3).", "p((((((1)))))).",
		"forbid count(X : p(X)) > 1.", "choose between 1 and 2 of a; b if c.", "penalty 1 at priority 2 per X if p(X).",
		"p if q. X(a). if. p('a'). p(3x). !", "#c\n", "p(- - - -X).", "display p/1, q/2.", "include \"a\\n\".",
	} {
		f.Add([]byte(s))
	}
	for _, tt := range syntaxErrorTests {
		f.Add([]byte(tt.src))
	}
	f.Fuzz(func(t *testing.T, src []byte) {
		file, err := ParseFile("fuzz.trl", src)
		if file == nil {
			t.Fatal("nil file")
		}
		checkFastPath(t, src, file, err)
		if err != nil {
			var list ErrorList
			if !errors.As(err, &list) || len(list) == 0 {
				t.Fatalf("error is not a non-empty ErrorList: %v", err)
			}
			for _, e := range list {
				if strings.HasPrefix(e.Msg, "internal parser failure") {
					t.Fatalf("parser panicked: %v", e)
				}
				if strings.HasPrefix(e.Msg, "did not expect") || e.Msg == "syntax error" {
					t.Fatalf("the diagnoser found nothing where participle failed: %v", e)
				}
				if e.Pos.Line < 1 || e.Pos.Column < 1 || e.Pos.Offset < 0 || e.Pos.Offset > len(src) {
					t.Fatalf("error outside the file: %v (offset %d, size %d)", e, e.Pos.Offset, len(src))
				}
			}
			if r := list.Render(src); !strings.Contains(r, "^") {
				t.Fatalf("rendered errors without a caret:\n%s", r)
			}
			return
		}
		// The diagnoser agrees that every statement is well formed.
		var errs ErrorList
		toks, _ := scan("fuzz.trl", src, &errs, DefaultMaxErrors)
		start := 0
		for i, tok := range toks {
			if tok.Type == tokPunct && tok.Value == "." {
				if pos, msg, bad := diagnose(toks[start : i+1]); bad {
					t.Fatalf("the diagnoser rejects a statement that parsed: %v: %s", pos, msg)
				}
				start = i + 1
			}
		}
		out := Format(file)
		again, err := ParseFile("formatted.trl", out)
		if err != nil {
			t.Fatalf("formatted source does not parse: %v\n%s", err, out)
		}
		if diff := cmp.Diff(file.Statements, again.Statements, ignorePos); diff != "" {
			t.Fatalf("round trip differs:\n%s", diff)
		}
		if out2 := Format(again); !bytes.Equal(out, out2) {
			t.Fatalf("format is not idempotent:\n%q\n%q", out, out2)
		}
	})
}

// checkFastPath parses src again with every statement going through
// participle and checks that the result, positions and errors included, is
// what ParseFile returned with its fast path for plain facts.
func checkFastPath(t *testing.T, src []byte, file *File, err error) {
	t.Helper()
	slow, slowErr := Config{noFastPath: true}.ParseFile("fuzz.trl", src)
	if diff := cmp.Diff(slow, file); diff != "" {
		t.Fatalf("the fast path changes the tree (-participle +fast):\n%s", diff)
	}
	if fmt.Sprint(slowErr) != fmt.Sprint(err) {
		t.Fatalf("the fast path changes the errors:\nparticiple: %v\nfast: %v", slowErr, err)
	}
}

// TestFastPath compares the fast path for plain facts with participle on
// the testdata, the benchmark model and facts of every plain shape.
func TestFastPath(t *testing.T) {
	inputs := []string{
		string(benchModel(50)),
		"p. p(a). p(X, _, \"s\\\"\", 7, -7, - 7, -9223372036854775808, 9223372036854775807).",
		"p(9223372036854775808). p(-9223372036854775809). p(). p(a,). p(,a). p(a b). p(-). p(--1). p(a)",
		"p(f(a)). p(1..2). p(1 + 2). p(a) if q. p(if). p(\"x). q(a).",
	}
	files, _ := filepath.Glob("testdata/*.trl")
	for _, name := range files {
		src, err := os.ReadFile(name)
		if err != nil {
			t.Fatal(err)
		}
		inputs = append(inputs, string(src))
	}
	for _, tt := range syntaxErrorTests {
		inputs = append(inputs, tt.src)
	}
	for _, in := range inputs {
		file, err := ParseFile("fuzz.trl", []byte(in))
		checkFastPath(t, []byte(in), file, err)
	}
}
