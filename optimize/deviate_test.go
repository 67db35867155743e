package optimize

import (
	"context"
	"slices"
	"testing"

	"pgregory.net/rapid"

	"trellis/compile"
)

// drawPins draws up to three pins over the circuit's variables.
func drawPins(t *rapid.T, c *compile.Circuit) pinTable {
	var pins []Pin
	if n := c.NumVars; n > 0 {
		for range rapid.IntRange(0, 3).Draw(t, "pins") {
			pins = append(pins, Pin{Var: compile.Var(rapid.IntRange(1, n).Draw(t, "pinVar")), Value: rapid.Bool().Draw(t, "pinValue")})
		}
	}
	table, err := newPinTable(c.NumVars, pins)
	if err != nil {
		t.Fatal(err)
	}
	return table
}

// TestDeviationsMatchLists checks that the top-k by deviations equals the
// top-k by the per-node lazy lists (the earlier method, kept as the
// reference) on random circuits with pins, k up to 20 and many ties (no
// weights in some draws), order and models included.
func TestDeviationsMatchLists(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := genProblem(t, 10)
		c := p.c
		if rapid.IntRange(0, 3).Draw(t, "unweighted") == 0 {
			c.Meta.Weights = nil
		}
		if err := checkCircuit(c); err != nil {
			t.Fatal(err)
		}
		wt, err := newWeights(c)
		if err != nil {
			t.Fatal(err)
		}
		pins := drawPins(t, c)
		k := rapid.IntRange(1, 20).Draw(t, "k")
		noRetry := rapid.Bool().Draw(t, "noRetry")
		ctx := context.Background()
		fast := newRanker(c, wt)
		fast.noRetry = noRetry
		fast.dv = newDeviations(c, wt)
		fast.dv.wide = rapid.IntRange(0, wideAnd).Draw(t, "wide")
		ref := newRanker(c, wt)
		ref.noRetry, ref.lists = noRetry, true
		got, err1 := fast.topK(ctx, pins, k, nil, nil)
		want, err2 := ref.topK(ctx, pins, k, nil, nil)
		if (err1 == nil) != (err2 == nil) {
			t.Fatalf("errors differ: %v, %v", err1, err2)
		}
		if len(got) != len(want) {
			t.Fatalf("%d models, lists give %d", len(got), len(want))
		}
		for i := range got {
			if !slices.Equal(got[i].cost, want[i].cost) || !slices.Equal(got[i].assign, want[i].assign) {
				t.Fatalf("model %d: %v cost %v, lists give %v cost %v", i, got[i].assign, got[i].cost, want[i].assign, want[i].cost)
			}
		}
	})
}

// TestDeviationsCosts checks that the deviations list the same costs as the
// lazy lists, for every prefix length.
func TestDeviationsCosts(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := genProblem(t, 10)
		c := p.c
		wt, err := newWeights(c)
		if err != nil {
			t.Fatal(err)
		}
		pins := drawPins(t, c)
		want := rapid.IntRange(1, 40).Draw(t, "want")
		ctx := context.Background()
		kb := newKbest(c, wt)
		if err := kb.reset(ctx, pins, nil, noKey); err != nil {
			t.Fatal(err)
		}
		var costs [][]int64
		for i := 0; i < want; i++ {
			e := kb.get(c.Root, i)
			if e < 0 {
				break
			}
			costs = append(costs, append([]int64(nil), kb.vec(e)...))
		}
		dv := newDeviations(c, wt)
		dv.wide = rapid.IntRange(0, wideAnd).Draw(t, "wide")
		if ok, err := dv.reset(ctx, pins); !ok || err != nil {
			t.Fatal(ok, err)
		}
		es, err := dv.best(want)
		if err != nil {
			t.Fatal(err)
		}
		if len(es) != len(costs) {
			t.Fatalf("%d models, lists give %d", len(es), len(costs))
		}
		seen := map[uint64]bool{}
		for i, s := range es {
			if !slices.Equal(dv.cost(s), costs[i]) {
				t.Fatalf("model %d costs %v, lists give %v", i, dv.cost(s), costs[i])
			}
			// the model is one of the circuit's, with that cost, and new
			assign := make([]int8, c.NumVars+1)
			dv.decode(s, assign)
			var x uint64
			for v := 1; v <= c.NumVars; v++ {
				if assign[v] == 0 {
					t.Fatalf("model %d leaves variable %d unset", i, v)
				}
				if assign[v] == 1 {
					x |= 1 << (v - 1)
				}
			}
			if !p.isModel(x) {
				t.Fatalf("model %d (%b) is not a model", i, x)
			}
			if seen[x] {
				t.Fatalf("model %d (%b) listed twice", i, x)
			}
			seen[x] = true
		}
	})
}

// TestIncrementalReset checks that kbest queries after an incremental reset
// (pins and threshold changed) list the same entries as after a full one,
// over random sequences of queries like those of the tie walk.
func TestIncrementalReset(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		p := genProblem(t, 10)
		c := p.c
		wt, err := newWeights(c)
		if err != nil {
			t.Fatal(err)
		}
		r := newRanker(c, wt)
		inc := newKbest(c, wt)
		full := newKbest(c, wt)
		full.noUpdate = true
		ctx := context.Background()
		for range rapid.IntRange(1, 8).Draw(t, "queries") {
			pins := drawPins(t, c)
			l := rapid.IntRange(0, numLevels-1).Draw(t, "level")
			thr := int32(rapid.IntRange(-1, c.NumVars).Draw(t, "thr"))
			err1 := inc.reset(ctx, pins, r.ranks[l], thr)
			err2 := full.reset(ctx, pins, r.ranks[l], thr)
			if err1 != nil || err2 != nil {
				t.Fatal(err1, err2)
			}
			for i := 0; i < 6; i++ {
				e, f := inc.get(c.Root, i), full.get(c.Root, i)
				if (e < 0) != (f < 0) {
					t.Fatalf("entry %d: %d, full reset %d", i, e, f)
				}
				if e < 0 {
					break
				}
				a, b := make([]int8, c.NumVars+1), make([]int8, c.NumVars+1)
				inc.decode(e, a, nil)
				full.decode(f, b, nil)
				if !slices.Equal(inc.vec(e), full.vec(f)) || inc.key[e] != full.key[f] || !slices.Equal(a, b) {
					t.Fatalf("entry %d: %v key %d %v, full reset %v key %d %v", i, inc.vec(e), inc.key[e], a, full.vec(f), full.key[f], b)
				}
			}
		}
	})
}

// TestDeviationsMatchListsOnChains compares the two methods as in
// TestDeviationsMatchLists on the deep shared circuits of the benchmarks,
// small: chains of blocks whose two branches share the rest of the chain,
// or the same blocks joined by one AND node.
func TestDeviationsMatchListsOnChains(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		blocks := rapid.IntRange(1, 12).Draw(t, "blocks")
		m := rapid.IntRange(1, 4).Draw(t, "m")
		c := blockCircuit(blocks, m, rapid.Uint64().Draw(t, "seed"), rapid.Bool().Draw(t, "weighted"), rapid.Bool().Draw(t, "wide"))
		if rapid.Bool().Draw(t, "smallWeights") {
			// few distinct costs, so that many models tie
			for i := range c.Meta.Weights {
				c.Meta.Weights[i].Weight %= 3
			}
		}
		wt, err := newWeights(c)
		if err != nil {
			t.Fatal(err)
		}
		pins := drawPins(t, c)
		k := rapid.IntRange(1, 20).Draw(t, "k")
		ctx := context.Background()
		fast := newRanker(c, wt)
		fast.dv = newDeviations(c, wt)
		fast.dv.wide = rapid.IntRange(0, wideAnd).Draw(t, "wideAnd")
		ref := newRanker(c, wt)
		ref.lists = true
		got, err1 := fast.topK(ctx, pins, k, nil, nil)
		want, err2 := ref.topK(ctx, pins, k, nil, nil)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		if len(got) != len(want) {
			t.Fatalf("%d models, lists give %d", len(got), len(want))
		}
		for i := range got {
			if !slices.Equal(got[i].cost, want[i].cost) || !slices.Equal(got[i].assign, want[i].assign) {
				t.Fatalf("model %d: %v cost %v, lists give %v cost %v", i, got[i].assign, got[i].cost, want[i].assign, want[i].cost)
			}
		}
	})
}
