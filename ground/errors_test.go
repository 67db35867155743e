package ground

import (
	"context"
	"errors"
	"testing"

	"github.com/google/go-cmp/cmp"

	"trellis/grammar"
)

// TestErrors checks the exact position and message of every check.
func TestErrors(t *testing.T) {
	tests := []struct {
		name string
		src  string
		opts Options
		want []string
		file string
	}{
		{name: "unsafe head", src: "p(X) if q(Y).\nq(1).", opts: Options{}, want: []string{"1:3: unsafe variable X: no positive body literal binds it (bind it with an atom of the body or with X = term)"}},
		{name: "unsafe negation", src: "q(1).\np if q(X), not r(X, Y).", opts: Options{}, want: []string{"2:21: unsafe variable Y: no positive body literal binds it (bind it with an atom of the body or with Y = term)"}},
		{name: "unsafe comparison", src: "p(X) if q(X), Y > 2.\nq(1).", opts: Options{}, want: []string{"1:15: unsafe variable Y: no positive body literal binds it (bind it with an atom of the body or with Y = term)"}},
		{name: "unsafe anonymous in comparison", src: "p if _ > 2.", opts: Options{}, want: []string{"1:6: unsafe anonymous variable _: only an argument of an atom may be _"}},
		{name: "unsafe fact", src: "p(X).", opts: Options{}, want: []string{"1:3: unsafe variable X: no positive body literal binds it (bind it with an atom of the body or with X = term)"}},
		{name: "unsafe arithmetic", src: "p(Y) if q(X + Y).\nq(1).", opts: Options{}, want: []string{"1:11: unsafe variable X: no positive body literal binds it (bind it with an atom of the body or with X = term)", "1:15: unsafe variable Y: no positive body literal binds it (bind it with an atom of the body or with Y = term)"}},
		{name: "unsafe penalty", src: "penalty W if q(X).\nq(1).", opts: Options{}, want: []string{"1:9: unsafe variable W: no positive body literal binds it (bind it with an atom of the body or with W = term)"}},
		{name: "unsafe aggregate bound", src: "p if count(X : q(X)) > N.\nq(1).", opts: Options{}, want: []string{"1:24: unsafe variable N: no positive body literal binds it (bind it with an atom of the body or with N = term)"}},
		{name: "unsafe choice bound", src: "choose exactly N of a.", opts: Options{}, want: []string{"1:16: unsafe variable N: no positive body literal binds it (bind it with an atom of the body or with N = term)"}},
		{name: "unsafe choice element", src: "choose any of a(X).", opts: Options{}, want: []string{"1:17: unsafe variable X: no positive body literal binds it (bind it with an atom of the body or with X = term)"}},
		{name: "division by zero", src: "q(0).\np(X) if q(Y), X = 1 / Y.", opts: Options{}, want: []string{"2:19: division by zero: 1 / 0"}},
		{name: "modulo by zero", src: "p(5 % 0).", opts: Options{}, want: []string{"1:3: division by zero: 5 % 0"}},
		{name: "overflow add", src: "q(9223372036854775807).\np(X + 1) if q(X).", opts: Options{}, want: []string{"2:3: integer overflow: 9223372036854775807 + 1 does not fit in 64 bits"}},
		{name: "overflow mul", src: "p(4611686018427387904 * 2).", opts: Options{}, want: []string{"1:3: integer overflow: 4611686018427387904 * 2 does not fit in 64 bits"}},
		{name: "overflow neg", src: "q(-9223372036854775808).\np(-X) if q(X).", opts: Options{}, want: []string{"2:3: integer overflow: -(-9223372036854775808) does not fit in 64 bits"}},
		{name: "non-integer arithmetic", src: "q(a).\np(X + 1) if q(X).", opts: Options{}, want: []string{"2:3: operand of + is not an integer: a"}},
		{name: "interval in body", src: "q(1).\np if q(1..2).", opts: Options{}, want: []string{"2:8: an interval L..U may only be an argument of a fact, a rule head or a choice element"}},
		{name: "sum weight not integer", src: "q(a).\np if sum(X : q(X)) > 1.", opts: Options{}, want: []string{"2:10: the first element of a sum tuple must be an integer, not a"}},
		{name: "aggregate bound not integer", src: "q(1).\np if count(X : q(X)) > a.", opts: Options{}, want: []string{"2:24: the bound of an aggregate must be an integer, not a"}},
		{name: "penalty weight not integer", src: "penalty a if b.\nb.", opts: Options{}, want: []string{"1:9: a penalty weight must be an integer, not a"}},
		{name: "choice bound not integer", src: "choose exactly a of b.", opts: Options{}, want: []string{"1:16: a choice bound must be an integer, not a"}},
		{name: "aggregate recursion", src: "q(1).\np(X) if q(X), count(Y : p(Y)) > 1.", opts: Options{}, want: []string{"2:15: p/1 depends on itself through the aggregate in p/1: p/1 -> p/1"}},
		{name: "aggregate recursion cycle", src: "r(1).\np(X) if q(X).\nq(X) if r(X), sum(Y : p(Y)) > 1.", opts: Options{}, want: []string{"3:15: p/1 depends on itself through the aggregate in q/1: p/1 -> q/1 -> p/1"}},
		{name: "undecided for", src: "choose any of a; b.\nchoose any of c(X) for d(X).\nd(1) if a.", opts: Options{}, want: []string{"2:24: the for condition of a choice element must be decided when grounding (by facts and rules over facts), but it depends on d(1), which is not"}},
		{name: "undecided second for literal", src: "choose any of a; b.\nchoose any of c(X) for d(X), not e(X).\nd(1).\ne(1) if a.", want: []string{"2:30: the for condition of a choice element must be decided when grounding (by facts and rules over facts), but it depends on e(1), which is not"}},
		{name: "unknown parameter", src: "param n = 1.\np(n).", opts: Options{Params: map[string]string{"m": "2"}}, want: []string{"parameter m: unknown parameter m: the model declares no `param m = ...`"}},
		{name: "bad parameter value", src: "param n = 1.\np(n).", opts: Options{Params: map[string]string{"n": "2 +"}}, want: []string{"parameter n: the value \"2 +\" given for parameter n is not a term"}},
		{name: "parameter twice", src: "param n = 1.\nparam n = 2.", opts: Options{}, want: []string{"2:1: parameter n is defined twice (first at 1:1)"}},
		{name: "parameter cycle", src: "param n = m.\nparam m = n + 1.\np(n).", opts: Options{}, want: []string{"2:11: parameter n is defined in terms of itself"}},
		{name: "parameter with variable", src: "param n = X.\np(n).", opts: Options{}, want: []string{"1:11: the value of parameter n must be a ground term (without variables)"}},
		{name: "missing include", src: "include \"nowhere.trl\".", opts: Options{ReadFile: func(string) ([]byte, error) { return nil, errNotFound }}, want: []string{"1:1: cannot read included file \"nowhere.trl\": file does not exist"}},
		{name: "include cycle", src: "include \"b.trl\".", opts: Options{ReadFile: func(p string) ([]byte, error) { return []byte("\ninclude \"main.trl\"."), nil }}, file: "main.trl", want: []string{"b.trl:2:1: include cycle: main.trl -> b.trl -> main.trl"}},
		{name: "term depth", src: "p(a).\np(f(X)) if p(X).", want: []string{"2:3: a term nested more than 1000 levels deep (MaxTermDepth): does a rule build ever deeper terms?"}},
		{name: "limit", src: "n(1..100).\np(X, Y) if n(X), n(Y).", opts: Options{MaxRules: 500}, want: []string{"2:1: grounding exceeds the limit of 500 ground rules; this statement produced the most (401); raise the limit with --max-rules"}},
		{name: "syntax", src: "p(.", opts: Options{}, want: []string{"1:3: expected a term, found a period"}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			got := groundErrors(tt.file, tt.src, tt.opts)
			if diff := cmp.Diff(tt.want, got); diff != "" {
				t.Errorf("errors of %q (-want +got):\n%s", tt.src, diff)
			}
		})
	}
}

// TestCancel checks that grounding stops with the context's error.
func TestCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	src := "n(0..200).\np(X, Y, Z) if n(X), n(Y), n(Z), X + Y + Z < 0."
	_, _, err := Ground(ctx, "c.trl", []byte(src), Options{})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("got %v, want %v", err, context.Canceled)
	}
}

// TestWarnings checks the arity warning.
func TestWarnings(t *testing.T) {
	_, rep, err := Ground(context.Background(), "", []byte("p(1).\nq if p(1, 2).\ndisplay p/3."), Options{})
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for _, w := range rep.Warnings {
		got = append(got, w.Error())
	}
	want := []string{
		"2:6: predicate p is used with 2 arguments here but with 1 at 1:1",
		"3:9: predicate p is used with 3 arguments here but with 1 at 1:1",
	}
	if diff := cmp.Diff(want, got); diff != "" {
		t.Errorf("warnings (-want +got):\n%s", diff)
	}
}

// TestReport checks the sizes the report gives against the program.
func TestReport(t *testing.T) {
	src := "n(1..3).\nchoose any of c(X) for n(X).\nd(X, Y) if c(X), c(Y), X < Y.\npenalty 1 if c(X).\nforbid count(X : c(X)) > 2."
	p, rep, err := Ground(context.Background(), "r.trl", []byte(src), Options{})
	if err != nil {
		t.Fatal(err)
	}
	got := []int{rep.Atoms, rep.Rules, rep.Choices, rep.Aggregates, rep.Penalties}
	want := []int{len(p.Atoms), len(p.Rules), len(p.Choices), len(p.Aggregates), len(p.Penalties)}
	if diff := cmp.Diff(want, got); diff != "" {
		t.Errorf("report sizes (-program +report):\n%s", diff)
	}
	// Three facts, three d rules and one constraint; one choice, one
	// aggregate, three penalties. The choice has the most instances: its
	// body once and its element three times.
	if want := []int{7, 1, 1, 3}; !cmp.Equal(want, []int{len(p.Rules), len(p.Choices), len(p.Aggregates), len(p.Penalties)}) {
		t.Errorf("sizes %v, want %v", []int{len(p.Rules), len(p.Choices), len(p.Aggregates), len(p.Penalties)}, want)
	}
	if rep.Largest.Line != 2 || rep.LargestInstances != 4 {
		t.Errorf("largest statement at %v with %d instances, want line 2 with 4", rep.Largest, rep.LargestInstances)
	}
	if len(rep.Files) != 1 || rep.Files[0] != "r.trl" {
		t.Errorf("files %v", rep.Files)
	}
}

// TestLimitError checks that the ground-size limit is recognisable as such
// and still renders as a positioned error list.
func TestLimitError(t *testing.T) {
	src := "n(1..100).\np(X, Y) if n(X), n(Y)."
	_, _, err := Ground(context.Background(), "l.trl", []byte(src), Options{MaxRules: 500})
	if !errors.Is(err, ErrLimit) {
		t.Fatalf("got %v, want an error matching ErrLimit", err)
	}
	var list grammar.ErrorList
	if !errors.As(err, &list) || len(list) != 1 || list[0].Pos.Line != 2 {
		t.Fatalf("got %v, want one positioned error on line 2", err)
	}
	// A model within the limit is not a limit error.
	if _, _, err := Ground(context.Background(), "l.trl", []byte(src), Options{MaxRules: 20000}); err != nil {
		t.Fatalf("within the limit: %v", err)
	}
}
