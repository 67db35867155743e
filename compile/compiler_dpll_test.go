package compile

import (
	"context"
	"math/big"
	"testing"

	"pgregory.net/rapid"
)

// dpll is a plain DPLL search with unit propagation over clause counters,
// written as simply as possible to serve as a reference and a baseline.
type dpll struct {
	f        *CNF
	occ      [][]int32 // per variable, clauses containing it
	val      []int8    // per variable: 1, -1 or 0
	nTrue    []int32   // per clause
	nFalse   []int32
	trail    []Var
	open     int // clauses not yet satisfied
	enumAll  bool
	models   uint64
	count    *big.Int
	maxModel uint64
}

func newDPLL(f *CNF) *dpll {
	d := &dpll{f: f, occ: make([][]int32, f.NumVars+1), val: make([]int8, f.NumVars+1),
		nTrue: make([]int32, f.NumClauses()), nFalse: make([]int32, f.NumClauses()), count: new(big.Int)}
	for i := 0; i < f.NumClauses(); i++ {
		for _, l := range f.Clause(i) {
			if o := d.occ[l.Var()]; len(o) == 0 || o[len(o)-1] != int32(i) {
				d.occ[l.Var()] = append(o, int32(i))
			}
		}
	}
	d.open = f.NumClauses()
	return d
}

// set assigns v and reports false on a conflict (the assignment is made
// either way).
func (d *dpll) set(v Var, b bool) bool {
	d.val[v] = 1
	if !b {
		d.val[v] = -1
	}
	d.trail = append(d.trail, v)
	ok := true
	for _, c := range d.occ[v] {
		for _, l := range d.f.Clause(int(c)) {
			if l.Var() != v {
				continue
			}
			if l.IsNeg() != b {
				if d.nTrue[c] == 0 {
					d.open--
				}
				d.nTrue[c]++
			} else {
				d.nFalse[c]++
				if d.nTrue[c] == 0 && int(d.nFalse[c]) == len(d.f.Clause(int(c))) {
					ok = false
				}
			}
		}
	}
	return ok
}

func (d *dpll) undo(mark int) {
	for len(d.trail) > mark {
		v := d.trail[len(d.trail)-1]
		d.trail = d.trail[:len(d.trail)-1]
		b := d.val[v] == 1
		for _, c := range d.occ[v] {
			for _, l := range d.f.Clause(int(c)) {
				if l.Var() != v {
					continue
				}
				if l.IsNeg() != b {
					d.nTrue[c]--
					if d.nTrue[c] == 0 {
						d.open++
					}
				} else {
					d.nFalse[c]--
				}
			}
		}
		d.val[v] = 0
	}
}

// unit propagates the clauses of the variables assigned from trail
// position from on, or of all clauses if from < 0; it reports false on a
// conflict.
func (d *dpll) unit(from int) bool {
	check := func(c int32) bool {
		cl := d.f.Clause(int(c))
		if d.nTrue[c] > 0 || int(d.nFalse[c]) < len(cl)-1 {
			return true
		}
		var free Lit
		for _, l := range cl {
			if d.val[l.Var()] == 0 {
				free = l
			}
		}
		if free == 0 {
			return false
		}
		return d.set(free.Var(), !free.IsNeg())
	}
	if from < 0 {
		for c := 0; c < d.f.NumClauses(); c++ {
			if !check(int32(c)) {
				return false
			}
		}
		from = 0
	}
	for i := from; i < len(d.trail); i++ {
		for _, c := range d.occ[d.trail[i]] {
			if !check(c) {
				return false
			}
		}
	}
	return true
}

func (d *dpll) search(next Var, from int) {
	if d.maxModel > 0 && d.models >= d.maxModel {
		return
	}
	mark := len(d.trail)
	if !d.unit(from) {
		d.undo(mark)
		return
	}
	for next <= Var(d.f.NumVars) && d.val[next] != 0 {
		next++
	}
	if !d.enumAll && d.open == 0 {
		free := 0
		for v := next; v <= Var(d.f.NumVars); v++ {
			if d.val[v] == 0 {
				free++
			}
		}
		d.count.Add(d.count, new(big.Int).Lsh(big.NewInt(1), uint(free)))
		d.undo(mark)
		return
	}
	if next > Var(d.f.NumVars) {
		d.models++
		d.undo(mark)
		return
	}
	for _, b := range []bool{true, false} {
		m := len(d.trail)
		if d.set(next, b) {
			d.search(next+1, m)
		}
		d.undo(m)
	}
	d.undo(mark)
}

// dpllCount counts the models of f by DPLL, counting 2^k at once when all
// clauses are satisfied with k variables left.
func dpllCount(f *CNF) *big.Int {
	d := newDPLL(f)
	d.search(1, -1)
	return d.count.Add(d.count, new(big.Int).SetUint64(d.models))
}

// dpllEnumerate counts the models of f by visiting them one at a time.
func dpllEnumerate(f *CNF) uint64 {
	d := newDPLL(f)
	d.enumAll = true
	d.search(1, -1)
	return d.models
}

// blockCNF draws independent random 3-CNF blocks joined by a few clauses over
// linking variables: once the linking variables are decided the blocks fall
// apart into components, some of them often unsatisfiable. This exercises
// the cache together with clause learning.
func blockCNF(t *rapid.T) *CNF {
	blocks := rapid.IntRange(2, 5).Draw(t, "blocks")
	size := rapid.IntRange(3, 20/blocks).Draw(t, "size")
	links := rapid.IntRange(1, 3).Draw(t, "links")
	f := &CNF{NumVars: links + blocks*size}
	lit := func(v int) Lit {
		if rapid.Bool().Draw(t, "neg") {
			return Lit(-v)
		}
		return Lit(v)
	}
	for b := 0; b < blocks; b++ {
		base := links + b*size
		m := rapid.IntRange(size, 5*size).Draw(t, "clauses")
		for i := 0; i < m; i++ {
			var c []Lit
			for j := 0; j < 3; j++ {
				if j == 0 && rapid.IntRange(0, 3).Draw(t, "linked") == 0 {
					c = append(c, lit(rapid.IntRange(1, links).Draw(t, "link")))
					continue
				}
				c = append(c, lit(base+rapid.IntRange(1, size).Draw(t, "var")))
			}
			f.AddClause(c...)
		}
	}
	return f
}

// TestCompileAgainstDPLL compares Count with a plain DPLL counter on larger
// random formulas than brute force can handle.
func TestCompileAgainstDPLL(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		var f *CNF
		if rapid.Bool().Draw(t, "blocks") {
			f = blockCNF(t)
		} else {
			n := rapid.IntRange(10, 22).Draw(t, "vars")
			ratio := rapid.Float64Range(1, 5).Draw(t, "ratio")
			f = &CNF{NumVars: n}
			for i := 0; i < int(ratio*float64(n)); i++ {
				var c []Lit
				for j := 0; j < 3; j++ {
					l := Lit(rapid.IntRange(1, n).Draw(t, "var"))
					if rapid.Bool().Draw(t, "neg") {
						l = -l
					}
					c = append(c, l)
				}
				f.AddClause(c...)
			}
		}
		opts := Options{
			MaxLearned:    rapid.SampledFrom([]int{0, 3}).Draw(t, "maxlearned"),
			MaxCacheBytes: rapid.SampledFrom([]int{0, 30}).Draw(t, "maxcache"),
		}
		c, _, err := Compile(context.Background(), f, opts)
		if err != nil {
			t.Fatal(err)
		}
		if got, want := Count(c), dpllCount(f); got.Cmp(want) != 0 {
			t.Fatalf("Count = %v, DPLL %v", got, want)
		}
		if c.NumNodes() < 3000 {
			if err := Verify(c); err != nil {
				t.Fatal(err)
			}
		}
	})
}

// TestDPLLReference checks the reference counters themselves against brute
// force.
func TestDPLLReference(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		f := randomCNF(t)
		want := popcount(cnfModels(f))
		if got := dpllCount(f); !got.IsUint64() || got.Uint64() != want {
			t.Fatalf("dpllCount = %v, brute force %d", got, want)
		}
		if got := dpllEnumerate(f); got != want {
			t.Fatalf("dpllEnumerate = %v, brute force %d", got, want)
		}
	})
}
