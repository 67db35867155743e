package ground

import (
	"context"
	"io"
	"os"
	"path/filepath"
	"testing"
	"time"
)

// FuzzGround grounds arbitrary text: it must return a program or an error,
// never panic, within a small ground-size limit.
func FuzzGround(f *testing.F) {
	files, _ := filepath.Glob("testdata/*.trl")
	for _, file := range files {
		if src, err := os.ReadFile(file); err == nil {
			f.Add(string(src))
		}
	}
	for _, s := range []string{
		"p(1..3). q(X) if p(X), not r(X, _), X > 1.",
		"p(X) if q(Y).",
		"q(0). p(X) if q(Y), X = 1 / Y.",
		"p if count(X : q(X)) > N.",
		"choose exactly 2 of a(X) for b(X) if c. b(1..3). c.",
		"penalty 3 per X if q(X). q(1). q(2).",
		"p(X) if q(X), sum(Y : p(Y)) > 1. q(1).",
		"param n = m. param m = n.",
		"include \"x.trl\".",
		"p(f(X, g(Y))) if q(X), r(Y), f(X) = f(Y). q(1). r(1).",
		"p(-9223372036854775808). q(-X) if p(X).",
		"p(9223372036854775806..9223372036854775807).",
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, src string) {
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Second)
		defer cancel()
		opts := Options{MaxRules: 20000, ReadFile: func(string) ([]byte, error) { return nil, os.ErrNotExist }}
		p, _, err := Ground(ctx, "fuzz.trl", []byte(src), opts)
		if err == nil {
			if err := checkProgram(p); err != nil {
				t.Fatalf("%v\n%s", err, src)
			}
			if err := p.Dump(io.Discard); err != nil {
				t.Fatal(err)
			}
		}
	})
}
