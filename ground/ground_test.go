package ground

import (
	"bytes"
	"context"
	"errors"
	"flag"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"

	"trellis/grammar"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata")

// goldenParams gives the parameter overrides of golden cases by file name.
var goldenParams = map[string]map[string]string{
	"override": {"n": "4", "who": "\"bob\""},
}

// TestGolden grounds every model in testdata and compares its dump (and
// warnings) with the golden file next to it. Run with -update to rewrite
// the golden files after checking the differences by hand.
func TestGolden(t *testing.T) {
	files, err := filepath.Glob("testdata/*.trl")
	if err != nil || len(files) == 0 {
		t.Fatalf("no test models: %v", err)
	}
	for _, file := range files {
		name := strings.TrimSuffix(filepath.Base(file), ".trl")
		t.Run(name, func(t *testing.T) {
			src, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			got := groundDump(t, file, src, Options{Params: goldenParams[name]})
			if err := groundTwice(file, src, Options{Params: goldenParams[name]}); err != nil {
				t.Error(err)
			}
			golden := strings.TrimSuffix(file, ".trl") + ".golden"
			if *update {
				if err := os.WriteFile(golden, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
				return
			}
			want, err := os.ReadFile(golden)
			if err != nil {
				t.Fatalf("%v (run go test ./ground -run TestGolden -update)", err)
			}
			if diff := cmp.Diff(string(want), got); diff != "" {
				t.Errorf("dump differs from %s (-want +got):\n%s", golden, diff)
			}
		})
	}
}

// groundDump grounds src and returns its dump followed by its warnings.
func groundDump(t *testing.T, filename string, src []byte, opts Options) string {
	t.Helper()
	p, rep, err := Ground(context.Background(), filename, src, opts)
	if err != nil {
		t.Fatalf("Ground: %v", err)
	}
	checkShownOrder(t, p)
	var b bytes.Buffer
	if err := p.Dump(&b); err != nil {
		t.Fatal(err)
	}
	for _, w := range rep.Warnings {
		b.WriteString("warning: " + w.Error() + "\n")
	}
	return b.String()
}

// groundErrors grounds src and returns its errors as "line:column: message".
func groundErrors(filename, src string, opts Options) []string {
	_, _, err := Ground(context.Background(), filename, []byte(src), opts)
	if err == nil {
		return nil
	}
	var list grammar.ErrorList
	if !errors.As(err, &list) {
		return []string{err.Error()}
	}
	var out []string
	for _, e := range list {
		out = append(out, e.Error())
	}
	return out
}

var errNotFound = errors.New("file does not exist")

// checkShownOrder checks that Shown is in the order of Program.SortAtoms.
func checkShownOrder(t *testing.T, p *Program) {
	t.Helper()
	want := append([]Atom(nil), p.Shown...)
	p.SortAtoms(want)
	if !slices.Equal(want, p.Shown) {
		t.Errorf("Shown is not in term order: %v, want %v", p.Shown, want)
	}
}
