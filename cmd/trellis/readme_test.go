package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
)

// readmeCommand is a trellis command shown in README.md, with the exit code
// and the output the README documents.
type readmeCommand struct {
	line   int      // line number in README.md
	args   []string // arguments after `trellis`
	code   int      // documented exit code (0 unless a comment says otherwise)
	output string   // the lines shown after the command, up to the next command
	dollar bool     // shown after a `$ ` sign, so output lines may follow
	stdin  string   // the file redirected to standard input (`< FILE`), if any
}

// exitComment is how the README documents a non-zero exit code: a shell
// comment after the command, `# exit code N`.
var exitComment = regexp.MustCompile(`\s+#\s*exit code (\d+)\s*$`)

// stdinRedirect is how the README feeds a file to standard input: `< FILE`
// at the end of the command (before an exit code comment).
var stdinRedirect = regexp.MustCompile(`\s*<\s*([^\s<>|&;]+)\s*$`)

// readmeCommands extracts the commands of the shell blocks of the README:
// lines `$ trellis …` or `$ go run ./cmd/trellis …`, each followed by the
// output it prints, up to the next `$ ` sign. A command may end with
// `< FILE` to read FILE on standard input. Lines without the `$ ` sign
// that start with the command are commands shown without output; other
// lines without it are ignored.
func readmeCommands(t *testing.T, text string) []readmeCommand {
	t.Helper()
	var cmds []readmeCommand
	inShell := false
	var cur *readmeCommand
	flush := func() {
		if cur != nil {
			cmds = append(cmds, *cur)
			cur = nil
		}
	}
	for i, line := range strings.Split(text, "\n") {
		trimmed := strings.TrimSpace(line)
		if strings.HasPrefix(trimmed, "```") {
			if inShell {
				flush()
				inShell = false
			} else {
				lang := strings.TrimPrefix(trimmed, "```")
				inShell = lang == "sh" || lang == "shell" || lang == "console" || lang == "bash"
			}
			continue
		}
		if !inShell {
			continue
		}
		dollar := strings.HasPrefix(line, "$ ")
		cmdLine := strings.TrimPrefix(line, "$ ")
		var rest string
		switch {
		case strings.HasPrefix(cmdLine, "trellis "):
			rest = strings.TrimPrefix(cmdLine, "trellis ")
		case strings.HasPrefix(cmdLine, "go run ./cmd/trellis"):
			rest = strings.TrimPrefix(cmdLine, "go run ./cmd/trellis")
		default:
			if dollar {
				flush()
			} else if cur != nil && cur.dollar {
				cur.output += line + "\n"
			}
			continue
		}
		flush()
		c := readmeCommand{line: i + 1, dollar: dollar}
		if m := exitComment.FindStringSubmatch(rest); m != nil {
			c.code, _ = strconv.Atoi(m[1])
			rest = rest[:len(rest)-len(m[0])]
		}
		if m := stdinRedirect.FindStringSubmatch(rest); m != nil {
			c.stdin = m[1]
			rest = rest[:len(rest)-len(m[0])]
		}
		args, err := splitShell(rest)
		if err != nil {
			t.Fatalf("README.md:%d: %v", i+1, err)
		}
		c.args = args
		cur = &c
	}
	flush()
	return cmds
}

// splitShell splits a command line into words the way a POSIX shell does
// for the simple lines of the README: blanks separate words, single quotes
// keep everything, double quotes keep everything but \" and \\, and a
// backslash outside quotes keeps the next character.
func splitShell(s string) ([]string, error) {
	var words []string
	var b strings.Builder
	inWord := false
	for i := 0; i < len(s); i++ {
		c := s[i]
		switch {
		case c == ' ' || c == '\t':
			if inWord {
				words = append(words, b.String())
				b.Reset()
				inWord = false
			}
		case c == '\'':
			j := strings.IndexByte(s[i+1:], '\'')
			if j < 0 {
				return nil, fmt.Errorf("unterminated single quote in %q", s)
			}
			b.WriteString(s[i+1 : i+1+j])
			i += j + 1
			inWord = true
		case c == '"':
			i++
			for ; i < len(s) && s[i] != '"'; i++ {
				if s[i] == '\\' && i+1 < len(s) && (s[i+1] == '"' || s[i+1] == '\\') {
					i++
				}
				b.WriteByte(s[i])
			}
			if i >= len(s) {
				return nil, fmt.Errorf("unterminated double quote in %q", s)
			}
			inWord = true
		case c == '\\' && i+1 < len(s):
			i++
			b.WriteByte(s[i])
			inWord = true
		case strings.IndexByte("|&;<>()$`*?[", c) >= 0:
			return nil, fmt.Errorf("shell syntax %q is not supported in README commands: %q", c, s)
		default:
			b.WriteByte(c)
			inWord = true
		}
	}
	if inWord {
		words = append(words, b.String())
	}
	return words, nil
}

// TestReadmeRedirect checks how readmeCommands reads `< FILE` and the exit
// code comment together.
func TestReadmeRedirect(t *testing.T) {
	text := "```sh\n" +
		"$ trellis solve - --top 1 < scenarios/a.trl\n" +
		"out\n" +
		"$ trellis check -<bad.trl   # exit code 2\n" +
		"$ trellis count x.trl\n" +
		"```\n"
	cmds := readmeCommands(t, text)
	want := []readmeCommand{
		{line: 2, args: []string{"solve", "-", "--top", "1"}, output: "out\n", dollar: true, stdin: "scenarios/a.trl"},
		{line: 4, args: []string{"check", "-"}, code: 2, dollar: true, stdin: "bad.trl"},
		{line: 5, args: []string{"count", "x.trl"}, dollar: true},
	}
	if diff := cmp.Diff(want, cmds, cmp.AllowUnexported(readmeCommand{})); diff != "" {
		t.Errorf("readmeCommands differs (-want +got):\n%s", diff)
	}
}

func TestSplitShell(t *testing.T) {
	for _, tc := range []struct {
		in   string
		want []string
	}{
		{"solve", []string{"solve"}},
		{"  solve   a.trl  --top 2 ", []string{"solve", "a.trl", "--top", "2"}},
		{"solve --pin 'buy(a, b)' --pin=-x", []string{"solve", "--pin", "buy(a, b)", "--pin=-x"}},
		{`solve --pin "s(\"x y\")"`, []string{"solve", "--pin", `s("x y")`}},
		{`a\ b c`, []string{"a b", "c"}},
		{`''`, []string{""}},
	} {
		got, err := splitShell(tc.in)
		if err != nil || strings.Join(got, "|") != strings.Join(tc.want, "|") || len(got) != len(tc.want) {
			t.Errorf("splitShell(%q) = %q, %v; want %q", tc.in, got, err, tc.want)
		}
	}
	for _, bad := range []string{"solve 'x", `solve "x`, "solve x | head", "solve $(x)"} {
		if _, err := splitShell(bad); err == nil {
			t.Errorf("splitShell(%q) succeeded, want an error", bad)
		}
	}
}

// TestReadme runs every trellis command the README shows, in order, in a
// directory that holds a copy of the scenarios, and checks its exit code.
// For the commands whose output is an answer (solve, count, query, fmt, in
// text), the output the README shows must match what trellis prints (or be
// part of it); the sizes and times that other commands print change as the
// stages improve, so for those only the exit code is checked.
func TestReadme(t *testing.T) {
	root := repoRoot(t)
	data, err := os.ReadFile(filepath.Join(root, "README.md"))
	if err != nil {
		t.Fatal(err)
	}
	cmds := readmeCommands(t, string(data))
	if len(cmds) < 8 {
		t.Fatalf("README.md shows only %d trellis commands", len(cmds))
	}
	dir := t.TempDir()
	if err := os.CopyFS(filepath.Join(dir, "scenarios"), os.DirFS(filepath.Join(root, "scenarios"))); err != nil {
		t.Fatal(err)
	}
	seen := map[string]bool{}
	codes := map[int]bool{}
	for _, c := range cmds {
		name := fmt.Sprintf("README.md:%d: trellis %s", c.line, strings.Join(c.args, " "))
		var stdin io.Reader
		if c.stdin != "" {
			data, err := os.ReadFile(filepath.Join(dir, c.stdin))
			if err != nil {
				t.Errorf("%s: the file for standard input: %v", name, err)
				continue
			}
			stdin = bytes.NewReader(data)
			name += " < " + c.stdin
		}
		r := trellisIn(t, dir, stdin, []string{"NO_COLOR=1"}, c.args...)
		if r.code != c.code {
			t.Errorf("%s: exit code %d, README says %d; stderr:\n%s", name, r.code, c.code, r.stderr)
			continue
		}
		if len(c.args) > 0 {
			seen[c.args[0]] = true
		}
		codes[c.code] = true
		shown := strings.TrimRight(c.output, "\n")
		if shown == "" || !isAnswer(c.args) || c.code == exitLimit {
			continue
		}
		got := r.stdout
		if got == "" {
			got = r.stderr
		}
		if !strings.Contains(got, shown) {
			t.Errorf("%s: the README shows\n%s\nbut trellis printed\n%s", name, shown, got)
		}
	}
	for _, cmd := range []string{"solve", "count", "check", "ground", "explain", "fmt", "compile", "query"} {
		if !seen[cmd] {
			t.Errorf("README.md shows no working example of trellis %s", cmd)
		}
	}
	for _, code := range []int{exitOK, exitNone, exitInput, exitLimit} {
		if !codes[code] {
			t.Errorf("README.md shows no command that exits with %d", code)
		}
	}
}

// isAnswer reports whether a command prints an answer that does not depend
// on the heuristics of the stages: solve, count, query or fmt, in text.
func isAnswer(args []string) bool {
	if len(args) == 0 {
		return false
	}
	for _, a := range args {
		if a == "--json" {
			return false
		}
	}
	switch args[0] {
	case "solve", "count", "query", "fmt":
		return true
	}
	return false
}
