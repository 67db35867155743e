package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"pgregory.net/rapid"

	"trellis/ground"
	"trellis/internal/brute"
	"trellis/scenarios"
)

// modelTokens are pieces of the rule language from which
// TestNoCrashOnAnyModel builds models, most of them nonsense, some valid.
var modelTokens = []string{
	"p", "q", "r(X)", "r(1)", "r(2)", "s(X, Y)", "s(1, 2)", "X", "Y", "1", "-3", "\"x\"", "1..3",
	".", ",", ";", ":", "(", ")", " if ", " not ", "forbid ", "choose ", " any ", " exactly 1 ", " of ", " for ",
	"penalty ", " at priority ", "param n = 2", "display p/0", "count(X : r(X))", "sum(X, X : r(X))", " > ", " = ", " < ",
	" + ", " * ", " / ", "n", "include \"nothing.trl\"", "\n", "#c\n",
}

// modelStatements are whole statements; models made of them are mostly
// valid, so that the later stages run too.
var modelStatements = []string{
	"r(1..3).", "choose any of p; q.", "choose exactly 1 of s(X, 1) for r(X).", "p if q.", "q if p.",
	"q if not p.", "forbid p, q.", "forbid not p.", "t(X) if s(X, _).", "t(X) if t(Y), s(Y, X).",
	"penalty 2 if p.", "penalty X at priority 1 if t(X).", "penalty -1 if q.", "forbid count(X : t(X)) > 1.",
	"u if sum(X, X : s(X, 1)) >= 2.", "display t/1.", "param n = 2.", "v(n).", "forbid t(n).",
	"choose between 1 and 2 of w(X) for r(X) if p.", "w(X) if w(Y), r(X), X = Y + 1.",
}

// TestNoCrashOnAnyModel runs every model-reading command on random models
// in-process: trellis may reject them (exit 2) or stop at a limit (exit 3),
// but it must never end in an internal error (exit 4), and standard output
// must stay empty when it fails.
func TestNoCrashOnAnyModel(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "m.trl")
	env := environment{getenv: func(string) string { return "" }}
	rapid.Check(t, func(t *rapid.T) {
		var src string
		if rapid.Bool().Draw(t, "statements") {
			src = strings.Join(rapid.SliceOfN(rapid.SampledFrom(modelStatements), 0, 12).Draw(t, "statements"), "\n")
		} else {
			src = strings.Join(rapid.SliceOfN(rapid.SampledFrom(modelTokens), 0, 30).Draw(t, "tokens"), "")
		}
		if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		cmd := rapid.SampledFrom([]string{"check", "solve", "count", "fmt", "explain", "ground"}).Draw(t, "command")
		args := []string{cmd, path, "--max-rules", "10000", "--max-nodes", "100000", "--timeout", "5s"}
		if cmd == "fmt" {
			args = []string{cmd, path}
		}
		var out, errb bytes.Buffer
		code := run(args, &out, &errb, env)
		switch code {
		case exitOK, exitNone:
		case exitInput, exitLimit:
			if out.Len() != 0 {
				t.Fatalf("exit code %d with standard output:\n%s", code, out.String())
			}
			if errb.Len() == 0 {
				t.Fatalf("exit code %d without a message", code)
			}
		default:
			t.Fatalf("model %q: exit code %d:\n%s", src, code, errb.String())
		}
	})
}

// TestSolveAgreesWithEnumeration runs solve --json in-process on random
// models made of whole statements and compares its optimum, tie count and
// total with a brute-force enumeration of the stable models of the ground
// program (package internal/brute).
func TestSolveAgreesWithEnumeration(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "m.trl")
	env := environment{getenv: func(string) string { return "" }}
	rapid.Check(t, func(t *rapid.T) {
		src := strings.Join(rapid.SliceOfN(rapid.SampledFrom(modelStatements), 1, 12).Draw(t, "statements"), "\n")
		if err := os.WriteFile(path, []byte(src), 0o644); err != nil {
			t.Fatal(err)
		}
		p, _, err := ground.Ground(context.Background(), path, []byte(src), ground.Options{})
		if err != nil {
			t.Skip("does not ground")
		}
		s, ok := summarize(p)
		if !ok {
			t.Skip("too large to enumerate")
		}
		var out, errb bytes.Buffer
		code := run([]string{"solve", path, "--json", "--no-times"}, &out, &errb, env)
		var got struct {
			Status string
			Cost   []struct{ Priority, Value int64 }
			Ties   string
			Total  string
		}
		if err := json.Unmarshal(out.Bytes(), &got); err != nil {
			t.Fatalf("model %q: exit code %d, output not JSON: %v\n%s%s", src, code, err, out.String(), errb.String())
		}
		if got.Total != fmt.Sprint(len(s.Models)) {
			t.Fatalf("model %q: total %s, enumeration finds %d", src, got.Total, len(s.Models))
		}
		if len(s.Models) == 0 {
			if code != exitNone || got.Status != "none" {
				t.Fatalf("model %q: no stable model, but exit code %d and status %q", src, code, got.Status)
			}
			return
		}
		if code != exitOK || got.Status != "optimal" || got.Ties != fmt.Sprint(s.Ties) {
			t.Fatalf("model %q: exit code %d, status %q, ties %s; enumeration finds %d tied optima", src, code, got.Status, got.Ties, s.Ties)
		}
		prios := brute.Priorities(p)
		if len(got.Cost) != len(prios) {
			t.Fatalf("model %q: cost %v, enumeration %v at priorities %v", src, got.Cost, s.Optimum, prios)
		}
		for i, c := range got.Cost {
			if c.Priority != prios[i] || c.Value != s.Optimum[i] {
				t.Fatalf("model %q: cost %v, enumeration %v at priorities %v", src, got.Cost, s.Optimum, prios)
			}
		}
	})
}

// summarize enumerates p's stable models, or reports that p has too many
// guessed atoms for the enumerator.
func summarize(p *ground.Program) (s brute.Summary, ok bool) {
	defer func() {
		if recover() != nil {
			ok = false
		}
	}()
	return brute.Summarize(p), true
}

// TestDamagedCircuitNeverCrashes changes one byte of a circuit file, or
// cuts it short, at random places: query must refuse it as bad input
// (exit 2), never crash or answer.
func TestDamagedCircuitNeverCrashes(t *testing.T) {
	dir := t.TempDir()
	model := filepath.Join(dir, "m.trl")
	if err := os.WriteFile(model, scenarios.Demo(), 0o644); err != nil {
		t.Fatal(err)
	}
	good := filepath.Join(dir, "good.trc")
	env := environment{getenv: func(string) string { return "" }}
	if code := run([]string{"compile", model, "-o", good}, io.Discard, io.Discard, env); code != exitOK {
		t.Fatalf("compile: exit code %d", code)
	}
	data, err := os.ReadFile(good)
	if err != nil {
		t.Fatal(err)
	}
	bad := filepath.Join(dir, "bad.trc")
	rapid.Check(t, func(t *rapid.T) {
		damaged := append([]byte(nil), data...)
		if rapid.Bool().Draw(t, "truncate") {
			damaged = damaged[:rapid.IntRange(0, len(data)-1).Draw(t, "length")]
		} else {
			i := rapid.IntRange(0, len(data)-1).Draw(t, "offset")
			damaged[i] ^= byte(rapid.IntRange(1, 255).Draw(t, "xor"))
		}
		if err := os.WriteFile(bad, damaged, 0o644); err != nil {
			t.Fatal(err)
		}
		var out, errb bytes.Buffer
		code := run([]string{"query", bad, "--whatif"}, &out, &errb, env)
		if code != exitInput || out.Len() != 0 {
			t.Fatalf("exit code %d, output:\n%s%s", code, out.String(), errb.String())
		}
	})
}
