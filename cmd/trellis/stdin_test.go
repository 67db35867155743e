package main

import (
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"time"
)

// TestStdinSameAsFile checks that every command that reads a model prints
// the same for `- < FILE` as for FILE, apart from the name positions and
// messages carry.
func TestStdinSameAsFile(t *testing.T) {
	root := repoRoot(t)
	model := filepath.Join("scenarios", "network", "model.trl")
	src, err := os.ReadFile(filepath.Join(root, model))
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, tc := range []struct {
		name string
		args func(file string) []string
	}{
		{"solve", func(f string) []string { return []string{"solve", f, "--whatif", "--top", "2"} }},
		{"solve json", func(f string) []string { return []string{"solve", f, "--json", "--no-times"} }},
		{"count", func(f string) []string { return []string{"count", f} }},
		{"check", func(f string) []string { return []string{"check", f} }},
		{"ground", func(f string) []string { return []string{"ground", f} }},
		{"explain", func(f string) []string { return []string{"explain", f, "--no-times"} }},
		{"fmt", func(f string) []string { return []string{"fmt", f} }},
		{"compile", func(f string) []string {
			return []string{"compile", f, "-o", filepath.Join(dir, "m.trc"), "--json", "--no-times"}
		}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			want := trellis(t, root, nil, tc.args(model)...)
			got := trellisIn(t, root, bytes.NewReader(src), nil, tc.args("-")...)
			if got.code != want.code || want.code != exitOK {
				t.Fatalf("exit code %d from standard input, %d from the file; stderr:\n%s%s", got.code, want.code, got.stderr, want.stderr)
			}
			if w := strings.ReplaceAll(want.stdout, model, stdinFilename); got.stdout != w {
				t.Errorf("standard output from standard input:\n%s\nfrom the file (its name replaced):\n%s", got.stdout, w)
			}
			if got.stderr != "" {
				t.Errorf("standard error should be empty, is:\n%s", got.stderr)
			}
		})
	}
}

// TestStdinBadModel checks that errors in a model read from standard input
// are positioned <stdin>:line:column, with the source line and a caret,
// exactly like errors in a file (see TestBadModel), for every command.
func TestStdinBadModel(t *testing.T) {
	dir := t.TempDir()
	for _, cmd := range [][]string{{"fmt"}, {"check"}, {"solve"}, {"count"}, {"explain"}, {"ground"}, {"compile", "-o", "x.trc"}} {
		t.Run(cmd[0], func(t *testing.T) {
			r := trellisIn(t, dir, strings.NewReader(badModel), []string{"NO_COLOR=1"}, append(cmd, "-")...)
			checkBadModel(t, r, dir, "<stdin>")
		})
	}
}

// TestStdinFmt checks that fmt - prints the canonical model, and that
// fmt -w - is a usage error that reads nothing and writes nothing.
func TestStdinFmt(t *testing.T) {
	dir := t.TempDir()
	messy := "# rooms\nroom(a).   room( b ).\nok(R)   if room(R),not bad(R).\n"
	// The same canonical text TestFmt expects from a file.
	want := "# rooms\nroom(a).\nroom(b).\nok(R) if room(R), not bad(R).\n"
	r := trellisIn(t, dir, strings.NewReader(messy), nil, "fmt", "-")
	if r.code != exitOK || r.stdout != want || r.stderr != "" {
		t.Errorf("fmt -: exit code %d, printed\n%s\nwant\n%s\nstderr:\n%s", r.code, r.stdout, want, r.stderr)
	}
	for _, args := range [][]string{{"fmt", "-w", "-"}, {"fmt", "-", "-w"}, {"fmt", "--json", "-w", "-"}} {
		r := trellisIn(t, dir, strings.NewReader(messy), nil, args...)
		if r.code != exitInput {
			t.Errorf("%s: exit code %d, want %d", strings.Join(args, " "), r.code, exitInput)
		}
		if !strings.Contains(r.stderr, "fmt -w rewrites a file in place, and standard input (-) is not one") ||
			!strings.Contains(r.stderr, "Run 'trellis fmt --help'") {
			t.Errorf("%s: standard error does not explain the mistake:\n%s", strings.Join(args, " "), r.stderr)
		}
		if r.stdout != "" {
			t.Errorf("%s: standard output should be empty, is:\n%s", strings.Join(args, " "), r.stdout)
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("fmt with standard input left files behind: %v", entries)
	}
}

// TestStdinInclude checks that the files a model on standard input
// includes are found relative to the current directory.
func TestStdinInclude(t *testing.T) {
	dir := t.TempDir()
	if err := os.Mkdir(filepath.Join(dir, "parts"), 0o755); err != nil {
		t.Fatal(err)
	}
	top := "include \"parts/rooms.trl\".\nlit(R) if room(R).\n"
	writeFile(t, dir, "parts/rooms.trl", "room(a).\nroom(b) if .\n")
	r := trellisIn(t, dir, strings.NewReader(top), nil, "check", "-")
	lines := strings.Split(r.stderr, "\n")
	if r.code != exitInput || len(lines) < 3 || !strings.HasPrefix(lines[0], filepath.Join("parts", "rooms.trl")+":2:12: ") ||
		lines[1] != "room(b) if ." || lines[2] != strings.Repeat(" ", 11)+"^" {
		t.Errorf("the error in the included file is not shown with its line (exit code %d):\n%s", r.code, r.stderr)
	}

	writeFile(t, dir, "parts/rooms.trl", "room(a).\nroom(b).\n")
	want := trellis(t, dir, nil, "solve", writeFile(t, dir, "main.trl", top))
	r = trellisIn(t, dir, strings.NewReader(top), nil, "solve", "-")
	if r.code != exitOK || want.code != exitOK || r.stdout != want.stdout {
		t.Errorf("solve - with an include: exit code %d, output\n%s%s\nwant (from the file)\n%s", r.code, r.stdout, r.stderr, want.stdout)
	}

	// An include cycle through the model on standard input is not one:
	// standard input cannot be included.
	writeFile(t, dir, "parts/rooms.trl", "room(a).\n")
	r = trellisIn(t, filepath.Join(dir, "parts"), strings.NewReader("include \"rooms.trl\".\n"), nil, "count", "-")
	if r.code != exitOK || r.stdout != "1 valid configuration\n" {
		t.Errorf("count - including a file in the current directory: exit code %d, output\n%s%s", r.code, r.stdout, r.stderr)
	}
}

// TestStdinQuery checks that query - reads a circuit file from standard
// input and answers like query FILE, and refuses a model or a damaged
// circuit on standard input.
func TestStdinQuery(t *testing.T) {
	root := repoRoot(t)
	trc := filepath.Join(t.TempDir(), "network.trc")
	if r := trellis(t, root, nil, "compile", "scenarios/network/model.trl", "-o", trc); r.code != exitOK {
		t.Fatalf("compile: exit code %d; stderr:\n%s", r.code, r.stderr)
	}
	data, err := os.ReadFile(trc)
	if err != nil {
		t.Fatal(err)
	}
	args := []string{"query", "--whatif", "--pin", "buy(lobby,studio)", "--top", "2"}
	want := trellis(t, root, nil, append(args, trc)...)
	got := trellisIn(t, root, bytes.NewReader(data), nil, append(args, "-")...)
	if want.code != exitOK || got.code != want.code || got.stdout != want.stdout || got.stderr != "" {
		t.Errorf("query -: exit code %d, output\n%s%s\nwant (from the file, exit code %d)\n%s", got.code, got.stdout, got.stderr, want.code, want.stdout)
	}

	model, err := os.ReadFile(filepath.Join(root, "scenarios", "network", "model.trl"))
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name  string
		input []byte
		want  string
	}{
		{"model", model, "standard input is not a circuit file; for a model on standard input use: trellis solve -"},
		{"truncated", data[:len(data)/2], "the circuit file is damaged (<stdin>: "},
		{"empty", nil, "standard input is not a circuit file"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			r := trellisIn(t, root, bytes.NewReader(tc.input), nil, "query", "-")
			if r.code != exitInput || !strings.Contains(r.stderr, tc.want) || r.stdout != "" {
				t.Errorf("exit code %d, want %d and %q; output:\n%s%s", r.code, exitInput, tc.want, r.stdout, r.stderr)
			}
		})
	}
}

// TestStdinReadError checks that a standard input that cannot be read
// (here a directory) is bad input with a clear message.
func TestStdinReadError(t *testing.T) {
	dir := t.TempDir()
	for _, args := range [][]string{{"solve", "-"}, {"fmt", "-"}, {"query", "-"}} {
		f, err := os.Open(dir)
		if err != nil {
			t.Fatal(err)
		}
		r := trellisIn(t, dir, f, nil, args...)
		f.Close()
		want := "cannot read the model from standard input: "
		if args[0] == "query" {
			want = "cannot read the circuit file from standard input: "
		}
		if r.code != exitInput || !strings.Contains(r.stderr, want) || r.stdout != "" {
			t.Errorf("%s: exit code %d, want %d and %q; output:\n%s%s", strings.Join(args, " "), r.code, exitInput, want, r.stdout, r.stderr)
		}
	}
}

// TestStdinWaiting checks that a standard input that never ends does not
// hold trellis past --timeout or an interrupt (Ctrl-C): both end with exit
// code 3 and their usual message. The bounds on the waits are generous;
// they only catch a read that ignores the deadline or the signal.
func TestStdinWaiting(t *testing.T) {
	for _, tc := range []struct {
		name      string
		args      []string
		interrupt bool
		want      string
	}{
		{"timeout", []string{"solve", "-", "--timeout", "300ms"}, false, "the time limit was reached (300ms)"},
		{"timeout fmt", []string{"fmt", "--timeout", "300ms", "-"}, false, "the time limit was reached (300ms)"},
		{"timeout query", []string{"query", "-", "--timeout", "300ms"}, false, "the time limit was reached (300ms)"},
		{"interrupt", []string{"count", "-"}, true, "interrupted"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			cmd := exec.Command(binary, tc.args...)
			cmd.Dir = t.TempDir()
			in, err := cmd.StdinPipe()
			if err != nil {
				t.Fatal(err)
			}
			defer in.Close()
			var out, errb bytes.Buffer
			cmd.Stdout, cmd.Stderr = &out, &errb
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			if tc.interrupt {
				interrupt(t, cmd)
			}
			waitLimit(t, cmd, 30*time.Second, "trellis kept waiting for standard input", &errb)
			if !strings.Contains(errb.String(), tc.want) {
				t.Errorf("standard error lacks %q:\n%s", tc.want, errb.String())
			}
			if out.Len() != 0 {
				t.Errorf("standard output should be empty:\n%s", out.String())
			}
		})
	}
}

// TestStdinInProcess runs trellis in-process: without a standard input,
// - is bad input; on a terminal, trellis says it is reading and how to end
// the input, on standard error only.
func TestStdinInProcess(t *testing.T) {
	getenv := func(string) string { return "" }
	var out, errb bytes.Buffer
	code := run([]string{"count", "-"}, &out, &errb, environment{getenv: getenv})
	if code != exitInput || !strings.Contains(errb.String(), "cannot read the model from standard input: there is none") {
		t.Errorf("no standard input: exit code %d; stderr:\n%s", code, errb.String())
	}

	out.Reset()
	errb.Reset()
	env := environment{getenv: getenv, stdin: strings.NewReader("choose any of a; b.\n"), stdinTerm: true}
	code = run([]string{"count", "-"}, &out, &errb, env)
	// "choose any of" two atoms: 2^2 = 4 subsets.
	if code != exitOK || out.String() != "4 valid configurations\n" {
		t.Errorf("count - on a terminal: exit code %d, output\n%s%s", code, out.String(), errb.String())
	}
	if !strings.Contains(errb.String(), "trellis: reading the model from standard input; end it with Ctrl-") {
		t.Errorf("no hint on a terminal:\n%s", errb.String())
	}

	out.Reset()
	errb.Reset()
	env.stdin, env.stdinTerm = strings.NewReader("choose any of a; b.\n"), false
	if code := run([]string{"count", "-"}, &out, &errb, env); code != exitOK || errb.Len() != 0 {
		t.Errorf("count - on a pipe: exit code %d, standard error should be empty:\n%s", code, errb.String())
	}
}
