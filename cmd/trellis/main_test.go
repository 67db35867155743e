package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// binary is the trellis command built once for the end-to-end tests.
var binary string

func TestMain(m *testing.M) {
	flag.Parse()
	dir, err := os.MkdirTemp("", "trellis-test")
	if err != nil {
		fmt.Fprintln(os.Stderr, err)
		os.Exit(1)
	}
	binary = filepath.Join(dir, "trellis")
	build := exec.Command("go", "build", "-o", binary, ".")
	build.Stdout, build.Stderr = os.Stderr, os.Stderr
	if err := build.Run(); err != nil {
		fmt.Fprintln(os.Stderr, "building trellis:", err)
		os.RemoveAll(dir)
		os.Exit(1)
	}
	code := m.Run()
	os.RemoveAll(dir)
	os.Exit(code)
}

// result is what one run of the binary produced.
type result struct {
	stdout, stderr string
	code           int
}

// trellis runs the built binary in dir with args and extra environment
// variables (NAME=VALUE), with an empty standard input.
func trellis(t *testing.T, dir string, env []string, args ...string) result {
	t.Helper()
	return trellisIn(t, dir, nil, env, args...)
}

// trellisIn is trellis with stdin as the standard input (nil: empty).
func trellisIn(t *testing.T, dir string, stdin io.Reader, env []string, args ...string) result {
	t.Helper()
	cmd := exec.Command(binary, args...)
	cmd.Dir = dir
	cmd.Stdin = stdin
	cmd.Env = append(os.Environ(), env...)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err := cmd.Run()
	code := 0
	if err != nil {
		ee, ok := err.(*exec.ExitError)
		if !ok {
			t.Fatalf("running trellis %s: %v", strings.Join(args, " "), err)
		}
		code = ee.ExitCode()
	}
	return result{out.String(), errb.String(), code}
}

// repoRoot is the module root, two levels above this package.
func repoRoot(t *testing.T) string {
	t.Helper()
	root, err := filepath.Abs(filepath.Join("..", ".."))
	if err != nil {
		t.Fatal(err)
	}
	return root
}

// golden compares got with testdata/name, or rewrites the file with
// -update.
func golden(t *testing.T, name, got string) {
	t.Helper()
	path := filepath.Join("testdata", name)
	if *update {
		if err := os.MkdirAll("testdata", 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
		return
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("output differs from %s (run go test -update after checking it):\n--- got\n%s\n--- want\n%s", path, got, want)
	}
}

// writeFile writes a file into dir and returns its path.
func writeFile(t *testing.T, dir, name, content string) string {
	t.Helper()
	path := filepath.Join(dir, name)
	if err := os.WriteFile(path, []byte(content), 0o644); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestUsageErrors(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, dir, "ok.trl", "choose any of a.\n")
	for _, tc := range []struct {
		args []string
		want string // in standard error
	}{
		{[]string{}, "expected one of"},
		{[]string{"frobnicate"}, "unexpected argument frobnicate"},
		{[]string{"count"}, "expected \"<file>\""},
		{[]string{"solve", "a.trl", "b.trl"}, "Run 'trellis solve --help'"},
		{[]string{"solve", "--top", "-1", "x.trl"}, "--top must not be negative"},
		{[]string{"solve", "--timeout", "soon"}, "--timeout"},
		{[]string{"solve", "--param", "budget"}, "write NAME=VALUE"},
		{[]string{"solve", "--param", "Budget=3"}, "write NAME=VALUE"},
		{[]string{"solve", "--param", "b=1", "--param", "b=2"}, "given twice"},
		{[]string{"compile", "x.trl"}, "missing flags: --output"},
		{[]string{"count", "missing.trl"}, "missing.trl: no such file"},
		{[]string{"compile", "ok.trl", "-o", "nowhere/x.trc"}, "cannot write the circuit file nowhere/x.trc: no such file or directory"},
	} {
		t.Run(strings.Join(tc.args, " "), func(t *testing.T) {
			r := trellis(t, dir, nil, tc.args...)
			if r.code != exitInput {
				t.Errorf("exit code %d, want %d; stderr:\n%s", r.code, exitInput, r.stderr)
			}
			if !strings.Contains(r.stderr, tc.want) {
				t.Errorf("standard error lacks %q:\n%s", tc.want, r.stderr)
			}
			if r.stdout != "" {
				t.Errorf("standard output should be empty, is:\n%s", r.stdout)
			}
		})
	}
}

func TestHelp(t *testing.T) {
	r := trellis(t, t.TempDir(), nil, "--help")
	if r.code != exitOK {
		t.Fatalf("exit code %d", r.code)
	}
	for _, cmd := range []string{"solve", "count", "check", "ground", "explain", "fmt", "compile", "query"} {
		if !strings.Contains(r.stdout, "  "+cmd+" ") {
			t.Errorf("help does not list %s:\n%s", cmd, r.stdout)
		}
	}
}

// TestInternalError checks that a panic ends in exit code 4 with a message
// that calls it a bug; the environment variable makes trellis panic on
// purpose.
func TestInternalError(t *testing.T) {
	r := trellis(t, t.TempDir(), []string{panicEnv + "=1"}, "fmt", "whatever.trl")
	if r.code != exitInternal {
		t.Errorf("exit code %d, want %d", r.code, exitInternal)
	}
	if !strings.Contains(r.stderr, "internal error (a bug in trellis") {
		t.Errorf("standard error does not call it a bug:\n%s", r.stderr)
	}
	if r.stdout != "" {
		t.Errorf("standard output should be empty, is:\n%s", r.stdout)
	}
}

const badModel = `room(a). room(b).
ok(R) if room(R) wired(R).
forbid x y.
`

// TestBadModel checks the positioned errors: file:line:column: message,
// the source line, a caret under the column, on standard error, exit 2.
func TestBadModel(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, dir, "bad.trl", badModel)
	for _, cmd := range [][]string{{"fmt"}, {"check"}, {"solve"}, {"count"}, {"explain"}, {"ground"}, {"compile", "-o", "x.trc"}} {
		t.Run(cmd[0], func(t *testing.T) {
			r := trellis(t, dir, []string{"NO_COLOR=1"}, append(cmd, "bad.trl")...)
			checkBadModel(t, r, dir, "bad.trl")
		})
	}
}

// checkBadModel checks the output of a command run on badModel, read as
// the named file: exit 2, the first error at name:2:18 with its source line
// and a caret, the second at name:3:10, nothing on standard output and no
// circuit file x.trc in dir.
func checkBadModel(t *testing.T, r result, dir, name string) {
	t.Helper()
	if r.code != exitInput {
		t.Fatalf("exit code %d, want %d; stderr:\n%s", r.code, exitInput, r.stderr)
	}
	lines := strings.Split(r.stderr, "\n")
	if len(lines) < 3 {
		t.Fatalf("want an error, a source line and a caret; got:\n%s", r.stderr)
	}
	// badModel's second line: the missing comma is before `wired` in
	// column 18.
	if !strings.HasPrefix(lines[0], name+":2:18: ") {
		t.Errorf("first line %q, want it to start with %s:2:18: ", lines[0], name)
	}
	if lines[1] != "ok(R) if room(R) wired(R)." {
		t.Errorf("second line %q, want the source line", lines[1])
	}
	if lines[2] != strings.Repeat(" ", 17)+"^" {
		t.Errorf("third line %q, want a caret under column 18", lines[2])
	}
	if !strings.Contains(r.stderr, "\n"+name+":3:10: ") {
		t.Errorf("the second error is missing:\n%s", r.stderr)
	}
	if r.stdout != "" {
		t.Errorf("standard output should be empty, is:\n%s", r.stdout)
	}
	if _, err := os.Stat(filepath.Join(dir, "x.trc")); err == nil {
		t.Error("compile wrote a circuit file for a bad model")
	}
}

func TestFmt(t *testing.T) {
	dir := t.TempDir()
	messy := "# rooms\nroom(a).   room( b ).\nok(R)   if room(R),not bad(R).\n"
	path := writeFile(t, dir, "m.trl", messy)
	r := trellis(t, dir, nil, "fmt", "m.trl")
	if r.code != exitOK {
		t.Fatalf("exit code %d; stderr:\n%s", r.code, r.stderr)
	}
	want := "# rooms\nroom(a).\nroom(b).\nok(R) if room(R), not bad(R).\n"
	if r.stdout != want {
		t.Errorf("fmt printed\n%s\nwant\n%s", r.stdout, want)
	}
	if data, _ := os.ReadFile(path); string(data) != messy {
		t.Error("fmt without -w changed the file")
	}
	if err := os.Chmod(path, 0o600); err != nil {
		t.Fatal(err)
	}
	r = trellis(t, dir, nil, "fmt", "-w", "m.trl")
	if r.code != exitOK || r.stdout != "" {
		t.Fatalf("fmt -w: exit code %d, stdout %q, stderr:\n%s", r.code, r.stdout, r.stderr)
	}
	data, _ := os.ReadFile(path)
	if string(data) != want {
		t.Errorf("fmt -w wrote\n%s\nwant\n%s", data, want)
	}
	if st, _ := os.Stat(path); st.Mode().Perm() != 0o600 {
		t.Errorf("fmt -w changed the permissions to %v", st.Mode().Perm())
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("fmt -w left files behind: %v", entries)
	}
	// JSON: the canonical text without -w, whether it was written with -w.
	r = trellis(t, dir, nil, "fmt", "--json", "m.trl")
	var j struct {
		Status  string
		Changed bool
		Written bool
		Source  string
	}
	if err := json.Unmarshal([]byte(r.stdout), &j); err != nil || r.code != exitOK {
		t.Fatalf("fmt --json: exit code %d, %v:\n%s", r.code, err, r.stdout)
	}
	if j.Status != "unchanged" || j.Changed || j.Written || j.Source != want {
		t.Errorf("fmt --json on a formatted file: %+v", j)
	}
	writeFile(t, dir, "m2.trl", messy)
	r = trellis(t, dir, nil, "fmt", "--json", "-w", "m2.trl")
	j.Source = ""
	if err := json.Unmarshal([]byte(r.stdout), &j); err != nil || r.code != exitOK {
		t.Fatalf("fmt --json -w: exit code %d, %v:\n%s", r.code, err, r.stdout)
	}
	if j.Status != "formatted" || !j.Changed || !j.Written || j.Source != "" {
		t.Errorf("fmt --json -w on a messy file: %+v", j)
	}
	os.Remove(filepath.Join(dir, "m2.trl"))
	// A file that does not parse is left alone.
	bad := writeFile(t, dir, "bad.trl", badModel)
	if r := trellis(t, dir, nil, "fmt", "-w", "bad.trl"); r.code != exitInput {
		t.Errorf("fmt -w on a bad model: exit code %d", r.code)
	}
	if data, _ := os.ReadFile(bad); string(data) != badModel {
		t.Error("fmt -w changed a file that does not parse")
	}
}

// TestColour runs trellis in-process as if both streams were terminals:
// colour appears unless NO_COLOR is set; with the real binary (streams
// are pipes) it never appears.
func TestColour(t *testing.T) {
	dir := t.TempDir()
	path := writeFile(t, dir, "bad.trl", badModel)
	for _, noColor := range []string{"", "1"} {
		var out, errb bytes.Buffer
		env := environment{
			getenv: func(k string) string {
				if k == "NO_COLOR" {
					return noColor
				}
				return ""
			},
			stdoutTerm: true,
			stderrTerm: true,
		}
		code := run([]string{"fmt", path}, &out, &errb, env)
		if code != exitInput {
			t.Fatalf("exit code %d", code)
		}
		hasEscape := strings.Contains(errb.String(), "\x1b[")
		if noColor == "" && !hasEscape {
			t.Errorf("no colour on a terminal:\n%q", errb.String())
		}
		if noColor != "" && hasEscape {
			t.Errorf("colour despite NO_COLOR:\n%q", errb.String())
		}
	}
	r := trellis(t, dir, nil, "fmt", "bad.trl")
	if strings.Contains(r.stderr, "\x1b[") {
		t.Errorf("colour on a pipe:\n%q", r.stderr)
	}
}
