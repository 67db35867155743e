package compile

import (
	"bytes"
	"context"
	"fmt"
	"math/bits"
	"testing"

	"github.com/google/go-cmp/cmp"
	"github.com/google/go-cmp/cmp/cmpopts"
	"pgregory.net/rapid"
)

// dcVarWords returns, as a bitset over the 2^n assignments (bit m of the set
// is assignment m, whose bit v-1 is the value of variable v), the
// assignments in which variable v is true.
func dcVarWords(n int, v Var) []uint64 {
	words := max(1, (1<<n)/64)
	out := make([]uint64, words)
	b := int(v) - 1
	for w := range out {
		if b >= 6 {
			if (w>>(b-6))&1 != 0 {
				out[w] = ^uint64(0)
			}
			continue
		}
		var x uint64
		for t := 0; t < 64; t++ {
			if t>>b&1 != 0 {
				x |= 1 << t
			}
		}
		out[w] = x
	}
	if n < 6 {
		out[0] &= 1<<(1<<n) - 1
	}
	return out
}

// dcAllOnes returns the bitset of all 2^n assignments.
func dcAllOnes(n int) []uint64 {
	out := make([]uint64, max(1, (1<<n)/64))
	for w := range out {
		out[w] = ^uint64(0)
	}
	if n < 6 {
		out[0] = 1<<(1<<n) - 1
	}
	return out
}

// cnfModels enumerates the models of f by brute force, as a bitset.
func cnfModels(f *CNF) []uint64 {
	n := f.NumVars
	all := dcAllOnes(n)
	out := dcAllOnes(n)
	vw := make([][]uint64, n+1)
	for v := 1; v <= n; v++ {
		vw[v] = dcVarWords(n, Var(v))
	}
	cl := make([]uint64, len(out))
	for i := 0; i < f.NumClauses(); i++ {
		clear(cl)
		for _, l := range f.Clause(i) {
			for w := range cl {
				x := vw[l.Var()][w]
				if l.IsNeg() {
					x = ^x & all[w]
				}
				cl[w] |= x
			}
		}
		for w := range out {
			out[w] &= cl[w]
		}
	}
	return out
}

// circuitModels evaluates c on all 2^NumVars assignments at once, as a
// bitset.
func circuitModels(c *Circuit) []uint64 {
	n := c.NumVars
	all := dcAllOnes(n)
	vw := make([][]uint64, n+1)
	for v := 1; v <= n; v++ {
		vw[v] = dcVarWords(n, Var(v))
	}
	val := make([][]uint64, len(c.Kind))
	for i, k := range c.Kind {
		x := make([]uint64, len(all))
		kids := c.NodeChildren(int32(i))
		switch k {
		case TrueNode, FreeNode:
			copy(x, all)
		case LitNode:
			l := Lit(c.Arg[i])
			for w := range x {
				x[w] = vw[l.Var()][w]
				if l.IsNeg() {
					x[w] = ^x[w] & all[w]
				}
			}
		case AndNode:
			copy(x, all)
			for _, kid := range kids {
				for w := range x {
					x[w] &= val[kid][w]
				}
			}
		case OrNode:
			for _, kid := range kids {
				for w := range x {
					x[w] |= val[kid][w]
				}
			}
		}
		val[i] = x
	}
	return val[c.Root]
}

func popcount(ws []uint64) uint64 {
	var n uint64
	for _, w := range ws {
		n += uint64(bits.OnesCount64(w))
	}
	return n
}

// randomCNF draws a CNF with 3..16 variables and clauses of random lengths.
func randomCNF(t *rapid.T) *CNF {
	n := rapid.IntRange(3, 16).Draw(t, "vars")
	m := rapid.IntRange(0, 4*n).Draw(t, "clauses")
	f := &CNF{NumVars: n}
	for i := 0; i < m; i++ {
		k := rapid.IntRange(1, 5).Draw(t, "len")
		if k == 1 && rapid.IntRange(0, 3).Draw(t, "keepunit") != 0 {
			k = 2
		}
		var c []Lit
		for j := 0; j < k; j++ {
			v := rapid.IntRange(1, n).Draw(t, "var")
			l := Lit(v)
			if rapid.Bool().Draw(t, "neg") {
				l = -l
			}
			c = append(c, l)
		}
		f.AddClause(c...)
	}
	return f
}

// TestCompileRandom checks on random CNFs that the circuit has exactly the
// models of the formula (brute-force enumeration), that Count agrees, and
// that the circuit passes Verify.
func TestCompileRandom(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		f := randomCNF(t)
		// A small learned-clause budget exercises clause deletion.
		opts := Options{
			MaxLearned: rapid.SampledFrom([]int{0, 2, 5}).Draw(t, "maxlearned"),
			// A tiny cache is emptied often, which must not change answers.
			MaxCacheBytes: rapid.SampledFrom([]int{0, 1, 40}).Draw(t, "maxcache"),
		}
		c, rep, err := Compile(context.Background(), f, opts)
		if err != nil {
			t.Fatal(err)
		}
		if err := Verify(c); err != nil {
			t.Fatalf("%v\n%+v", err, c)
		}
		if err := checkCanonical(c); err != nil {
			t.Fatal(err)
		}
		want := cnfModels(f)
		got := circuitModels(c)
		for w := range want {
			if want[w] != got[w] {
				t.Fatalf("models differ at word %d: cnf %x circuit %x", w, want[w], got[w])
			}
		}
		if n := Count(c); !n.IsUint64() || n.Uint64() != popcount(want) {
			t.Fatalf("Count = %v, brute force %d", n, popcount(want))
		}
		if rep.Nodes != c.NumNodes() || rep.Edges != c.NumEdges() {
			t.Fatalf("report %+v does not match the circuit", rep)
		}
		// Same input, same circuit.
		again, _, err := Compile(context.Background(), f, opts)
		if err != nil {
			t.Fatal(err)
		}
		if diff := cmp.Diff(c, again); diff != "" {
			t.Fatalf("a second compilation differs:\n%s", diff)
		}
		c.Meta = randomMeta(t, c.NumVars)
		var buf bytes.Buffer
		if err := Encode(&buf, c); err != nil {
			t.Fatal(err)
		}
		d, err := Decode(&buf)
		if err != nil {
			t.Fatal(err)
		}
		if diff := cmp.Diff(c, d, cmpopts.EquateEmpty()); diff != "" {
			t.Fatalf("Decode(Encode(c)) differs from c (-want +got):\n%s", diff)
		}
	})
}

// randomMeta draws metadata over variables 1..n.
func randomMeta(t *rapid.T, n int) Meta {
	var m Meta
	na := rapid.IntRange(0, n).Draw(t, "atoms")
	for i := 0; i < na; i++ {
		m.Atoms = append(m.Atoms, NamedVar{
			Name: rapid.StringMatching(`[a-z][a-z0-9_]*(\([a-z0-9,"é ]*\))?`).Draw(t, "name"),
			Var:  Var(rapid.IntRange(1, n).Draw(t, "atomvar")),
		})
	}
	for i := 0; i < na; i++ {
		if rapid.Bool().Draw(t, "shown") {
			m.Shown = append(m.Shown, int32(i))
		}
	}
	nw := rapid.IntRange(0, 4).Draw(t, "weights")
	for i := 0; i < nw; i++ {
		m.Weights = append(m.Weights, VarWeight{
			Var:      Var(rapid.IntRange(1, n).Draw(t, "weightvar")),
			Weight:   rapid.Int64().Draw(t, "weight"),
			Priority: rapid.Int64Range(-3, 3).Draw(t, "priority"),
		})
	}
	return m
}

// checkCanonical checks what hash-consing and constant propagation promise:
// no two nodes are equal, FalseNode appears only as the root, and TrueNode
// is never a child.
func checkCanonical(c *Circuit) error {
	seen := make(map[string]int)
	for i := range c.Kind {
		key := fmt.Sprint(c.Kind[i], c.Arg[i], c.NodeChildren(int32(i)))
		if j, ok := seen[key]; ok {
			return fmt.Errorf("nodes %d and %d are equal", j, i)
		}
		seen[key] = i
		for _, k := range c.NodeChildren(int32(i)) {
			if c.Kind[k] == FalseNode || c.Kind[k] == TrueNode {
				return fmt.Errorf("node %d has constant child %d", i, k)
			}
		}
		if c.Kind[i] == FalseNode && int32(i) != c.Root {
			return fmt.Errorf("FalseNode %d is not the root", i)
		}
	}
	return nil
}
