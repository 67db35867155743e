// Package optimize evaluates compiled circuits in semirings: the optimum
// cost under lexicographic priorities, the number of models that tie for it,
// the total number of models, the k best models with their atoms, pins
// (conditioning on chosen variables) and what-if tables.
//
// Every query is one or a few passes over the flat arrays of a
// compile.Circuit. A circuit is smooth and a decision-DNNF, so a semiring
// evaluation gives exact answers: the value of an OR node is the sum (⊕) of
// the values of its children, the value of an AND node is the product (⊗).
// Pins change the values of leaves only; the circuit is never rebuilt.
//
// The semirings:
//   - (cost, count): cost vectors over the priorities of the circuit's
//     weights, highest first, compared lexicographically (⊕ keeps the
//     smaller and adds the counts of equal ones, ⊗ adds costs and multiplies
//     counts). Costs are int64 with overflow errors (ErrOverflow); counts are
//     uint64 and the pass is redone with math/big when one overflows. The
//     same pass counts all models (the total).
//   - what-if: the derivatives of the (cost, count) semiring (Darwiche
//     2003), one downward pass giving for every variable the best cost and
//     tie count with it true and with it false.
//   - k best: the best models by cost as deviations from the best derivation
//     (Lawler 1972 and Eppstein 1998 on k shortest paths, carried over to
//     derivation trees: one global queue of derivations, each the best one
//     with a few choices changed, see deviations); and lazy k-best lists
//     with back-pointers (Huang and Chiang 2005), which order models of
//     equal cost by a key, for the tie-break below and as the fallback when
//     a cost does not fit in 64 bits.
//
// Models of equal cost are ordered by a tie-break: the sorted lists of the
// positions in Meta.Atoms (term order) of their true shown atoms, compared
// lexicographically with a proper prefix first; then the same for all atoms;
// then for all variables. This order is not compatible with ⊗ (adding atoms
// in one part of a conjunction can reorder two models of another part), so
// the k best are listed by cost alone and the ties at the k-th cost are
// settled outside the semiring: by a longer list when it holds the whole
// cost level, otherwise by walking the level in tie-break order with pinned
// queries to the lazy lists, which recompute only the nodes above the leaves
// whose pins changed since the last query.
package optimize

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/bits"
	"sort"

	"trellis/compile"
)

// nodeOps is a semiring evaluated node by node. The evaluator calls exactly
// one method per node, in index order (children first); the method reads
// its children's values from the semiring's own flat storage and writes the
// node's value there. So there is one call per node and none per edge: the
// per-edge loops live inside each semiring's methods, specialised to its
// value type.
type nodeOps interface {
	falseNode(n int32)
	trueNode(n int32)
	lit(n int32, l compile.Lit)
	free(n int32, v compile.Var)
	and(n int32, kids []int32)
	or(n int32, kids []int32)
}

// checkEvery is how many nodes a pass evaluates between checks of its
// context.
const checkEvery = 1 << 14

// evalUp runs one bottom-up pass of s over c.
func evalUp[S nodeOps](ctx context.Context, c *compile.Circuit, s S) error {
	for i := range c.Kind {
		if i%checkEvery == 0 && ctx.Err() != nil {
			return ctx.Err()
		}
		n := int32(i)
		switch c.Kind[i] {
		case compile.FalseNode:
			s.falseNode(n)
		case compile.TrueNode:
			s.trueNode(n)
		case compile.LitNode:
			s.lit(n, compile.Lit(c.Arg[i]))
		case compile.FreeNode:
			s.free(n, compile.Var(c.Arg[i]))
		case compile.AndNode:
			s.and(n, c.Children[c.Start[i]:c.Start[i+1]])
		case compile.OrNode:
			s.or(n, c.Children[c.Start[i]:c.Start[i+1]])
		default:
			return fmt.Errorf("optimize: node %d has unknown kind %d", i, c.Kind[i])
		}
	}
	return nil
}

// weights is the cost table of a circuit: the priorities present in its
// weights, highest first, and for every variable its cost vector when true.
type weights struct {
	prio []int64 // distinct priorities, highest first
	p    int     // len(prio)
	w    []int64 // (NumVars+1)*p: w[v*p+j] is the weight of v at prio[j]
	zero []bool  // zero[v]: v's vector is all zeros
}

// ErrOverflow is wrapped by errors reporting that a cost does not fit in 64
// bits.
var ErrOverflow = errors.New("cost does not fit in 64 bits")

func newWeights(c *compile.Circuit) (*weights, error) {
	t := &weights{}
	seen := map[int64]bool{}
	for _, vw := range c.Meta.Weights {
		if vw.Var < 1 || int(vw.Var) > c.NumVars {
			return nil, fmt.Errorf("optimize: weight on variable %d outside 1..%d", vw.Var, c.NumVars)
		}
		if !seen[vw.Priority] {
			seen[vw.Priority] = true
			t.prio = append(t.prio, vw.Priority)
		}
	}
	sort.Slice(t.prio, func(i, j int) bool { return t.prio[i] > t.prio[j] })
	t.p = len(t.prio)
	index := make(map[int64]int, t.p)
	for j, q := range t.prio {
		index[q] = j
	}
	t.w = make([]int64, (c.NumVars+1)*t.p)
	for _, vw := range c.Meta.Weights {
		k := int(vw.Var)*t.p + index[vw.Priority]
		s, ok := addInt(t.w[k], vw.Weight)
		if !ok {
			return nil, fmt.Errorf("optimize: the weights of variable %d at priority %d add up beyond 64 bits: %w", vw.Var, vw.Priority, ErrOverflow)
		}
		t.w[k] = s
	}
	t.zero = make([]bool, c.NumVars+1)
	for v := range t.zero {
		t.zero[v] = isZeroVec(t.w[v*t.p : v*t.p+t.p])
	}
	return t, nil
}

// vec returns the cost vector of variable v when true.
func (t *weights) vec(v compile.Var) []int64 { return t.w[int(v)*t.p : int(v)*t.p+t.p] }

// addInt returns a+b and whether it did not overflow.
func addInt(a, b int64) (int64, bool) {
	s := a + b
	return s, (a >= 0) != (b >= 0) || (s >= 0) == (a >= 0)
}

func isZeroVec(a []int64) bool {
	for _, x := range a {
		if x != 0 {
			return false
		}
	}
	return true
}

// cmpVec compares cost vectors lexicographically (highest priority first).
func cmpVec(a, b []int64) int {
	for i := range a {
		if a[i] != b[i] {
			if a[i] < b[i] {
				return -1
			}
			return 1
		}
	}
	return 0
}

// addVec sets dst = a + b and reports false on overflow.
func addVec(dst, a, b []int64) bool {
	ok := true
	for i := range dst {
		s := a[i] + b[i]
		if (a[i] >= 0) == (b[i] >= 0) && (s >= 0) != (a[i] >= 0) {
			ok = false
		}
		dst[i] = s
	}
	return ok
}

// mulCount multiplies counts, saturating at MaxUint64; ok is false on
// overflow.
func mulCount(a, b uint64) (uint64, bool) {
	hi, lo := bits.Mul64(a, b)
	if hi != 0 {
		return math.MaxUint64, false
	}
	return lo, true
}

// addCount adds counts, saturating at MaxUint64; ok is false on overflow.
func addCount(a, b uint64) (uint64, bool) {
	s, carry := bits.Add64(a, b, 0)
	if carry != 0 {
		return math.MaxUint64, false
	}
	return s, true
}

// Pin fixes a variable to a value for one query. Pins change leaf values
// only: a literal that contradicts a pin gets the semiring's zero, and a free
// variable keeps only its pinned value.
type Pin struct {
	Var   compile.Var
	Value bool
}

// pinTable maps each variable to 0 (free), 1 (pinned true) or -1 (pinned
// false). A variable pinned both ways is recorded as 2 (no value allowed).
type pinTable []int8

func newPinTable(numVars int, pins []Pin) (pinTable, error) {
	t := make(pinTable, numVars+1)
	for _, p := range pins {
		if p.Var < 1 || int(p.Var) > numVars {
			return nil, fmt.Errorf("optimize: pin on variable %d outside 1..%d", p.Var, numVars)
		}
		want := int8(-1)
		if p.Value {
			want = 1
		}
		switch t[p.Var] {
		case 0:
			t[p.Var] = want
		case want:
		default:
			t[p.Var] = 2
		}
	}
	return t, nil
}

// allows reports whether literal l is allowed by the pins.
func (t pinTable) allows(l compile.Lit) bool {
	switch t[l.Var()] {
	case 0:
		return true
	case 1:
		return !l.IsNeg()
	case -1:
		return l.IsNeg()
	}
	return false
}
