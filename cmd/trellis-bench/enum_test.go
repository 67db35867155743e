package main

import (
	"context"
	"testing"

	"pgregory.net/rapid"

	"trellis/compile"
)

// TestDPLLCountsLikeBruteForce compares the enumerator's model count on
// random small formulas with a count over all assignments.
func TestDPLLCountsLikeBruteForce(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 10).Draw(t, "vars")
		var f compile.CNF
		f.NumVars = n
		clauses := rapid.IntRange(0, 3*n).Draw(t, "clauses")
		for i := 0; i < clauses; i++ {
			size := rapid.IntRange(0, 4).Draw(t, "size")
			c := make([]compile.Lit, size)
			for j := range c {
				v := compile.Var(rapid.IntRange(1, n).Draw(t, "var"))
				c[j] = v.Pos()
				if rapid.Bool().Draw(t, "neg") {
					c[j] = v.Neg()
				}
			}
			f.AddClause(c...)
		}
		want := 0
		for m := 0; m < 1<<n; m++ {
			ok := true
			for i := 0; i < f.NumClauses() && ok; i++ {
				sat := false
				for _, l := range f.Clause(i) {
					if (m>>(int(l.Var())-1)&1 == 1) != l.IsNeg() {
						sat = true
					}
				}
				ok = sat
			}
			if ok {
				want++
			}
		}
		got := 0
		seen := map[string]bool{}
		err := newDPLL(&f).each(context.Background(), func(val []int8) {
			got++
			key := string(func() []byte {
				b := make([]byte, len(val))
				for i, v := range val {
					b[i] = byte(v + 1)
				}
				return b
			}())
			if seen[key] {
				t.Fatalf("model listed twice: %v", val)
			}
			seen[key] = true
		})
		if err != nil {
			t.Fatal(err)
		}
		if got != want {
			t.Fatalf("DPLL lists %d models, brute force counts %d", got, want)
		}
	})
}
