package scenarios

import (
	"context"
	"fmt"
	"math/big"
	"sort"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"

	"trellis/compile"
	"trellis/ground"
	"trellis/internal/brute"
	"trellis/optimize"
	"trellis/unfold"
)

// shownTrue returns the shown atoms true in model m, in term order.
func shownTrue(p *ground.Program, m []bool) []string {
	var out []string
	for _, a := range p.Shown {
		if m[a] {
			out = append(out, p.AtomString(a))
		}
	}
	return out
}

// costList pairs brute-force cost values with their priorities.
func costList(p *ground.Program, values []int64) []Cost {
	prios := brute.Priorities(p)
	out := make([]Cost, len(values))
	for i, v := range values {
		out[i] = Cost{Priority: prios[i], Value: v}
	}
	return out
}

func groundScenario(t *testing.T, name string) *ground.Program {
	t.Helper()
	src, err := Model(name)
	if err != nil {
		t.Fatal(err)
	}
	p, _, err := ground.Ground(context.Background(), name+"/model.trl", src, ground.Options{})
	if err != nil {
		t.Fatalf("grounding: %v", err)
	}
	return p
}

// TestExpectedByEnumeration checks every scenario's expected.json against
// the brute-force enumeration of the stable models of its ground program
// (package internal/brute, which shares no code with the compiler).
// TestExpectedByStory checks the same values against enumerations written
// straight from each story, without the grounder.
func TestExpectedByEnumeration(t *testing.T) {
	for _, name := range Names() {
		t.Run(name, func(t *testing.T) {
			want, err := Answers(name)
			if err != nil {
				t.Fatal(err)
			}
			p := groundScenario(t, name)
			s := summarize(t, p)
			if got := fmt.Sprint(len(s.Models)); got != want.Total {
				t.Errorf("%s valid configurations by enumeration, expected.json says %s", got, want.Total)
			}
			if got := fmt.Sprint(s.Ties); got != want.Ties {
				t.Errorf("%s tied optima by enumeration, expected.json says %s", got, want.Ties)
			}
			if diff := cmp.Diff(want.Optimum, costList(p, s.Optimum)); diff != "" {
				t.Errorf("optimum differs from enumeration (-expected.json +enumeration):\n%s", diff)
			}
			var optimal [][]string
			for i, m := range s.Models {
				if !brute.Less(s.Optimum, s.Costs[i]) && !brute.Less(s.Costs[i], s.Optimum) {
					optimal = append(optimal, shownTrue(p, m))
				}
			}
			sortConfigs(optimal)
			exp := append([][]string(nil), want.Optimal...)
			sortConfigs(exp)
			if diff := cmp.Diff(exp, optimal); diff != "" {
				t.Errorf("optimal configurations differ from enumeration (-expected.json +enumeration):\n%s", diff)
			}
		})
	}
}

// summarize enumerates p's stable models; a scenario too large for the
// enumerator fails the test with a message that says so.
func summarize(t *testing.T, p *ground.Program) (s brute.Summary) {
	t.Helper()
	defer func() {
		if r := recover(); r != nil {
			t.Fatalf("the brute-force enumerator refuses this scenario (%v); scenarios must stay small enough for it", r)
		}
	}()
	return brute.Summarize(p)
}

func sortConfigs(cs [][]string) {
	sort.Slice(cs, func(i, j int) bool { return strings.Join(cs[i], " ") < strings.Join(cs[j], " ") })
}

// TestExpectedByCircuit runs the pipeline of trellis (ground, unfold,
// compile, optimize) on every scenario and checks it against expected.json,
// which TestExpectedByEnumeration checks against brute force.
func TestExpectedByCircuit(t *testing.T) {
	ctx := context.Background()
	for _, name := range Names() {
		t.Run(name, func(t *testing.T) {
			want, err := Answers(name)
			if err != nil {
				t.Fatal(err)
			}
			p := groundScenario(t, name)
			q, _, err := unfold.Unfold(ctx, p, unfold.Options{})
			if err != nil {
				t.Fatalf("unfolding: %v", err)
			}
			c, _, err := compile.Program(ctx, q, compile.Options{})
			if err != nil {
				t.Fatalf("compiling: %v", err)
			}
			if got := compile.Count(c).String(); got != want.Total {
				t.Errorf("compile.Count = %s, expected.json says %s", got, want.Total)
			}
			ties, _ := new(big.Int).SetString(want.Ties, 10)
			res, err := optimize.Solve(ctx, c, optimize.Query{Top: int(ties.Int64()) + 1})
			if err != nil {
				t.Fatal(err)
			}
			if res.Status != optimize.StatusOptimal {
				t.Fatalf("status %q", res.Status)
			}
			var cost []Cost
			for _, pc := range res.Cost {
				cost = append(cost, Cost{Priority: pc.Priority, Value: pc.Value})
			}
			if diff := cmp.Diff(want.Optimum, cost); diff != "" {
				t.Errorf("optimum differs (-expected.json +trellis):\n%s", diff)
			}
			if res.Ties.String() != want.Ties || res.Total.String() != want.Total {
				t.Errorf("ties %s, total %s; expected.json says %s and %s", res.Ties, res.Total, want.Ties, want.Total)
			}
			var optimal [][]string
			for _, r := range res.Top {
				if cmp.Equal(r.Cost, res.Cost) {
					optimal = append(optimal, r.Atoms)
				}
			}
			sortConfigs(optimal)
			exp := append([][]string(nil), want.Optimal...)
			sortConfigs(exp)
			if diff := cmp.Diff(exp, optimal); diff != "" {
				t.Errorf("optimal configurations differ (-expected.json +trellis):\n%s", diff)
			}
		})
	}
}
