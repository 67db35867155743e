package optimize

import (
	"context"
	"encoding/json"
	"fmt"
	"math/big"
	"slices"
	"strings"
	"testing"

	"pgregory.net/rapid"

	"trellis/compile"
)

// checkAgainstBrute compares every answer of Solve on p under pins with
// enumeration.
func checkAgainstBrute(t *rapid.T, p *problem, pins []Pin, top int) {
	c := p.c
	s, err := NewSolver(c)
	if err != nil {
		t.Fatalf("NewSolver: %v", err)
	}
	s.noRetry = rapid.Bool().Draw(t, "noRetry")
	res, err := s.Solve(context.Background(), Query{Pins: pins, Top: top, WhatIf: true})
	if err != nil {
		t.Fatalf("Solve: %v", err)
	}
	prio := priorities(c)
	all := bruteAll(p, prio, pins)
	if got, want := res.Total.String(), fmt.Sprint(len(all)); got != want {
		t.Fatalf("total = %s, want %s", got, want)
	}
	if len(all) == 0 {
		if res.Status != StatusNone || len(res.Top) != 0 || res.Ties.Sign() != 0 {
			t.Fatalf("no models, got status %s, %d top, ties %s", res.Status, len(res.Top), res.Ties)
		}
		return
	}
	if res.Status != StatusOptimal {
		t.Fatalf("status = %s, want optimal", res.Status)
	}
	best := all[0].cost
	if got, want := costString(res.Cost), vecString(prio, best); got != want {
		t.Fatalf("cost = %s, want %s", got, want)
	}
	ties := 0
	for _, m := range all {
		if slices.Equal(m.cost, best) {
			ties++
		}
	}
	if res.Ties.Cmp(bigOf(ties)) != 0 {
		t.Fatalf("ties = %s, want %d", res.Ties, ties)
	}
	// top-k: a prefix of the sorted list, order included
	want := min(top, len(all))
	if len(res.Top) != want {
		t.Fatalf("top has %d entries, want %d", len(res.Top), want)
	}
	for i, r := range res.Top {
		m := all[i]
		if r.Rank != i+1 {
			t.Fatalf("rank %d at position %d", r.Rank, i)
		}
		if got, want := costString(r.Cost), vecString(prio, m.cost); got != want {
			t.Fatalf("top[%d] cost = %s, want %s", i, got, want)
		}
		gap := make([]int64, len(best))
		for j := range gap {
			gap[j] = m.cost[j] - best[j]
		}
		if got, want := costString(r.Gap), vecString(prio, gap); got != want {
			t.Fatalf("top[%d] gap = %s, want %s", i, got, want)
		}
		if got, want := strings.Join(r.Atoms, " "), strings.Join(m.shown, " "); got != want {
			t.Fatalf("top[%d] atoms = {%s}, want {%s} (model %b)", i, got, want, m.x)
		}
	}
	// what-if for every shown atom
	shown := sortedInts(c.Meta.Shown)
	if len(res.WhatIf) != len(shown) {
		t.Fatalf("whatif has %d entries, want %d", len(res.WhatIf), len(shown))
	}
	for k, i := range shown {
		a := c.Meta.Atoms[i]
		e := res.WhatIf[k]
		if e.Atom != a.Name {
			t.Fatalf("whatif[%d] is %s, want %s", k, e.Atom, a.Name)
		}
		for _, side := range []struct {
			value bool
			got   *Outcome
		}{{true, e.With}, {false, e.Without}} {
			bc, n := bestWhere(all, a.Var, side.value)
			if n == 0 {
				if side.got != nil {
					t.Fatalf("whatif %s=%v: got %s, want impossible", a.Name, side.value, costString(side.got.Cost))
				}
				continue
			}
			if side.got == nil {
				t.Fatalf("whatif %s=%v: impossible, want %s", a.Name, side.value, vecString(prio, bc))
			}
			if got, want := costString(side.got.Cost), vecString(prio, bc); got != want || side.got.Ties.Cmp(bigOf(n)) != 0 {
				t.Fatalf("whatif %s=%v: %s ×%s, want %s ×%d", a.Name, side.value, got, side.got.Ties, want, n)
			}
		}
	}
}

func TestSolveAgainstBruteForce(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := genProblem(t, 9)
		top := rapid.IntRange(0, 20).Draw(t, "top")
		checkAgainstBrute(t, p, nil, top)
	})
}

func TestPinsAgainstBruteForce(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := genProblem(t, 9)
		var pins []Pin
		if n := p.c.NumVars; n > 0 {
			for range rapid.IntRange(0, 3).Draw(t, "pins") {
				pins = append(pins, Pin{Var: compile.Var(rapid.IntRange(1, n).Draw(t, "pinVar")), Value: rapid.Bool().Draw(t, "pinValue")})
			}
		}
		top := rapid.IntRange(0, 20).Draw(t, "top")
		checkAgainstBrute(t, p, pins, top)
	})
}

// Counts beyond 64 bits: the conjunction of 70 free variables has 2^70
// models, and the tie count of a zero-weight circuit equals it.
func TestBigCounts(t *testing.T) {
	for _, n := range []int{63, 64, 65, 70, 130} {
		b := newBuilder(n)
		var kids []int32
		for v := 1; v <= n; v++ {
			kids = append(kids, b.node(compile.FreeNode, int32(v)))
		}
		b.c.Root = b.node(compile.AndNode, 0, kids...)
		b.c.Meta.Atoms = []compile.NamedVar{{Name: "x", Var: 1}}
		b.c.Meta.Shown = []int32{0}
		res, err := Solve(context.Background(), b.c, Query{WhatIf: true, Top: 3})
		if err != nil {
			t.Fatal(err)
		}
		want := new(big.Int).Lsh(big.NewInt(1), uint(n))
		half := new(big.Int).Lsh(big.NewInt(1), uint(n-1))
		if res.Total.Cmp(want) != 0 || res.Ties.Cmp(want) != 0 {
			t.Errorf("n=%d: total %s ties %s, want %s", n, res.Total, res.Ties, want)
		}
		if e := res.WhatIf[0]; e.With == nil || e.With.Ties.Cmp(half) != 0 || e.Without.Ties.Cmp(half) != 0 || e.Verdict != VerdictSome {
			t.Errorf("n=%d: whatif %+v, want %s each way", n, e, half)
		}
		// tie-break: the empty model first, then the models whose true
		// variables are {2}, {2,3}, in lexicographic order of sorted lists, x
		// (variable 1) being false in all three
		if len(res.Top) != 3 || len(res.Top[0].Atoms) != 0 || len(res.Top[1].Atoms) != 0 || len(res.Top[2].Atoms) != 0 {
			t.Errorf("n=%d: top %+v", n, res.Top)
		}
	}
}

func TestCostOverflow(t *testing.T) {
	b := newBuilder(2)
	b.c.Root = b.node(compile.AndNode, 0, b.node(compile.LitNode, 1), b.node(compile.LitNode, 2))
	b.c.Meta.Weights = []compile.VarWeight{{Var: 1, Weight: 1 << 62}, {Var: 2, Weight: 1 << 62}}
	for _, q := range []Query{{}, {Top: 2}, {WhatIf: true}} {
		if _, err := Solve(context.Background(), b.c, q); err == nil || !strings.Contains(err.Error(), "64 bits") {
			t.Errorf("%+v: err = %v, want an overflow", q, err)
		}
	}
	b.c.Meta.Weights = []compile.VarWeight{{Var: 1, Weight: 1 << 62}, {Var: 1, Weight: 1 << 62}}
	if _, err := Solve(context.Background(), b.c, Query{}); err == nil {
		t.Errorf("weights of one variable adding beyond 64 bits: no error")
	}
}

func TestPinNames(t *testing.T) {
	b := newBuilder(3)
	var kids []int32
	for v := 1; v <= 3; v++ {
		kids = append(kids, b.node(compile.FreeNode, int32(v)))
	}
	b.c.Root = b.node(compile.AndNode, 0, kids...)
	b.c.Meta.Atoms = []compile.NamedVar{{Name: `buy(entry,wood)`, Var: 1}, {Name: `buy(wood,paint)`, Var: 2}, {Name: `room("north wing")`, Var: 3}}
	b.c.Meta.Shown = []int32{0, 1, 2}
	tests := []struct {
		names []string
		total int64
		err   string
	}{
		{[]string{"buy( entry , wood )"}, 4, ""},
		{[]string{"not buy(entry,wood)", "-buy(wood, paint)"}, 2, ""},
		{[]string{`room("north wing")`}, 4, ""},
		{[]string{`room("northwing")`}, 0, `close names: room("north wing")`},
		{[]string{"buy(entry,wod)"}, 0, "close names: buy(entry,wood)"},
		{[]string{"zzz"}, 0, "no atom has a similar name"},
		{[]string{"buy(entry,wood)", "not buy(entry,wood)"}, 0, ""},
	}
	for _, tt := range tests {
		res, err := Solve(context.Background(), b.c, Query{PinNames: tt.names})
		if tt.err != "" {
			if err == nil || !strings.Contains(err.Error(), tt.err) {
				t.Errorf("%q: err = %v, want %q", tt.names, err, tt.err)
			}
			continue
		}
		if err != nil {
			t.Errorf("%q: %v", tt.names, err)
			continue
		}
		if res.Total.Int64() != tt.total {
			t.Errorf("%q: total %s, want %d", tt.names, res.Total, tt.total)
		}
	}
}

func TestJSON(t *testing.T) {
	b := newBuilder(2)
	b.c.Root = b.node(compile.AndNode, 0, b.node(compile.FreeNode, 1), b.node(compile.LitNode, 2))
	b.c.Meta.Atoms = []compile.NamedVar{{Name: "p", Var: 1}, {Name: "q", Var: 2}}
	b.c.Meta.Shown = []int32{0, 1}
	b.c.Meta.Weights = []compile.VarWeight{{Var: 1, Weight: 3, Priority: 1}, {Var: 2, Weight: 0, Priority: 0}}
	res, err := Solve(context.Background(), b.c, Query{Top: 2, WhatIf: true})
	if err != nil {
		t.Fatal(err)
	}
	data, err := json.Marshal(res)
	if err != nil {
		t.Fatal(err)
	}
	// The expected text follows from the circuit by hand: p costs 3 at
	// priority 1, q is forced and costs 0 at priority 0.
	want := `{"status":"optimal","top":[{"rank":1,"cost":[{"priority":1,"value":0},{"priority":0,"value":0}],"gap":[{"priority":1,"value":0},{"priority":0,"value":0}],"atoms":["q"]},{"rank":2,"cost":[{"priority":1,"value":3},{"priority":0,"value":0}],"gap":[{"priority":1,"value":3},{"priority":0,"value":0}],"atoms":["p","q"]}],"whatif":[{"atom":"p","with":[{"priority":1,"value":3},{"priority":0,"value":0}],"with_ties":"1","without":[{"priority":1,"value":0},{"priority":0,"value":0}],"without_ties":"1","verdict":"in no optimum"},{"atom":"q","with":[{"priority":1,"value":0},{"priority":0,"value":0}],"with_ties":"1","without":null,"without_ties":"0","verdict":"forced"}],"cost":[{"priority":1,"value":0},{"priority":0,"value":0}],"ties":"1","total":"2"}`
	if string(data) != want {
		t.Errorf("json:\n got %s\nwant %s", data, want)
	}
}

func TestCancel(t *testing.T) {
	n := 3 * checkEvery
	b := newBuilder(n)
	var kids []int32
	for v := 1; v <= n; v++ {
		kids = append(kids, b.node(compile.FreeNode, int32(v)))
	}
	b.c.Root = b.node(compile.AndNode, 0, kids...)
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Solve(ctx, b.c, Query{}); err == nil {
		t.Errorf("cancelled context: no error")
	}
}

func TestBadCircuit(t *testing.T) {
	tests := []struct {
		name string
		c    *compile.Circuit
	}{
		{"empty", &compile.Circuit{Start: []int32{0}}},
		{"forward child", &compile.Circuit{NumVars: 1, Kind: []compile.NodeKind{compile.AndNode, compile.TrueNode}, Arg: []int32{0, 0}, Start: []int32{0, 1, 1}, Children: []int32{1}, Root: 0}},
		{"bad var", &compile.Circuit{NumVars: 1, Kind: []compile.NodeKind{compile.LitNode}, Arg: []int32{-2}, Start: []int32{0, 0}}},
		{"bad root", &compile.Circuit{NumVars: 1, Kind: []compile.NodeKind{compile.TrueNode}, Arg: []int32{0}, Start: []int32{0, 0}, Root: 3}},
	}
	for _, tt := range tests {
		if _, err := Solve(context.Background(), tt.c, Query{Top: 1, WhatIf: true}); err == nil {
			t.Errorf("%s: no error", tt.name)
		}
	}
}

// TestBigCountsAgainstBruteForce multiplies a random circuit by a chain of
// 66 decisions on free variables: every count grows by the factor 2^66, past
// 64 bits, and must still be exact in every answer.
func TestBigCountsAgainstBruteForce(t *testing.T) {
	const extra = 66
	rapid.Check(t, func(t *rapid.T) {
		p := genProblem(t, 7)
		var pins []Pin
		if n := p.c.NumVars; n > 0 && rapid.Bool().Draw(t, "pinned") {
			pins = append(pins, Pin{Var: compile.Var(rapid.IntRange(1, n).Draw(t, "pinVar")), Value: rapid.Bool().Draw(t, "pinValue")})
		}
		prio := priorities(p.c)
		all := bruteAll(p, prio, pins)
		b := &builder{c: p.c, memo: map[string]int32{}}
		n0 := p.c.NumVars
		p.c.NumVars += extra
		next := b.node(compile.TrueNode, 0)
		for v := n0 + extra; v > n0; v-- {
			next = b.node(compile.OrNode, int32(v),
				b.node(compile.AndNode, 0, b.node(compile.LitNode, int32(v)), next),
				b.node(compile.AndNode, 0, b.node(compile.LitNode, int32(-v)), next))
		}
		p.c.Root = b.node(compile.AndNode, 0, p.c.Root, next)
		res, err := Solve(context.Background(), p.c, Query{Pins: pins, WhatIf: true})
		if err != nil {
			t.Fatal(err)
		}
		scale := new(big.Int).Lsh(big.NewInt(1), extra)
		scaled := func(n int) *big.Int { return new(big.Int).Mul(bigOf(n), scale) }
		if res.Total.Cmp(scaled(len(all))) != 0 {
			t.Fatalf("total %s, want %d × 2^%d", res.Total, len(all), extra)
		}
		if len(all) == 0 {
			return
		}
		ties := 0
		for _, m := range all {
			if slices.Equal(m.cost, all[0].cost) {
				ties++
			}
		}
		if res.Ties.Cmp(scaled(ties)) != 0 {
			t.Fatalf("ties %s, want %d × 2^%d", res.Ties, ties, extra)
		}
		for k, i := range sortedInts(p.c.Meta.Shown) {
			a := p.c.Meta.Atoms[i]
			e := res.WhatIf[k]
			for _, side := range []struct {
				value bool
				got   *Outcome
			}{{true, e.With}, {false, e.Without}} {
				bc, n := bestWhere(all, a.Var, side.value)
				if (n == 0) != (side.got == nil) {
					t.Fatalf("whatif %s=%v: possible is %v, want %v", a.Name, side.value, side.got != nil, n > 0)
				}
				if n > 0 && (costString(side.got.Cost) != vecString(prio, bc) || side.got.Ties.Cmp(scaled(n)) != 0) {
					t.Fatalf("whatif %s=%v: %s ×%s, want %s ×%d×2^%d", a.Name, side.value, costString(side.got.Cost), side.got.Ties, vecString(prio, bc), n, extra)
				}
			}
		}
	})
}

func TestSkipTotal(t *testing.T) {
	b := newBuilder(2)
	b.c.Root = b.node(compile.AndNode, 0, b.node(compile.FreeNode, 1), b.node(compile.FreeNode, 2))
	s, err := NewSolver(b.c)
	if err != nil {
		t.Fatal(err)
	}
	for _, tt := range []struct {
		skip bool
		want string
	}{{false, `"total":"4"`}, {true, `"total":null`}} {
		res, err := s.Solve(context.Background(), Query{SkipTotal: tt.skip})
		if err != nil {
			t.Fatal(err)
		}
		data, _ := json.Marshal(res)
		if !strings.Contains(string(data), tt.want) || !strings.Contains(string(data), `"ties":"4"`) || !strings.Contains(string(data), `"cost":[]`) {
			t.Errorf("SkipTotal %v: %s, want %s, ties 4 and an empty cost", tt.skip, data, tt.want)
		}
	}
}

// bestWhere returns the least cost among the models in which variable v
// has the given value, and how many models have it (0 when none does).
func bestWhere(all []bruteModel, v compile.Var, value bool) (best []int64, n int) {
	for _, m := range all {
		if (m.x>>(v-1)&1 == 1) != value {
			continue
		}
		switch {
		case n == 0 || slices.Compare(m.cost, best) < 0:
			best, n = m.cost, 1
		case slices.Equal(m.cost, best):
			n++
		}
	}
	return best, n
}
