package compile

import (
	"math"
	"testing"

	"github.com/crillab/gophersat/solver"
	"pgregory.net/rapid"

	"trellis/ground"
)

// cptValue returns the value of literal l (possibly a constant) in the
// total assignment a.
func cptValue(a []int8, l Lit) bool {
	switch l {
	case cpTrue:
		return true
	case cpFalse:
		return false
	}
	if l.IsNeg() {
		return a[l.Var()] < 0
	}
	return a[l.Var()] > 0
}

// cptCheckDefined enumerates the models of the builder's CNF over inputs
// 1..n and checks that every assignment of the inputs extends to exactly one
// model (the auxiliary variables are defined), calling check on each model.
func cptCheckDefined(t *rapid.T, c *cpBuilder, n int, check func(a []int8, input uint)) {
	if c.err != nil {
		t.Fatal(c.err)
	}
	seen := make([]int, 1<<n)
	cptEnum(&c.f, func(a []int8) {
		var input uint
		for i := 0; i < n; i++ {
			if a[i+1] > 0 {
				input |= 1 << i
			}
		}
		seen[input]++
		check(a, input)
	})
	for input, k := range seen {
		if k != 1 {
			t.Fatalf("input %0*b has %d models, want exactly 1", n, input, k)
		}
	}
}

// cptDrawAggregate draws an aggregate over inputs 0..n-1 (repetitions
// allowed) whose bound lies near a sum of weights, so that comparisons hit
// their edges. Huge weights exercise the overflow guards; their absolute sum
// stays below 2^63 (at most 8·5·2^57), as the grounder guarantees.
func cptDrawAggregate(t *rapid.T, n int) ground.Aggregate {
	g := ground.Aggregate{
		Atom: ground.Atom(n),
		Kind: ground.AggregateKind(rapid.IntRange(0, 3).Draw(t, "kind")),
		Op:   ground.CmpOp(rapid.IntRange(0, 5).Draw(t, "op")),
	}
	huge := rapid.IntRange(0, 4).Draw(t, "scale") == 0
	m := rapid.IntRange(0, 8).Draw(t, "elements")
	var subset int64
	for j := 0; j < m; j++ {
		w := int64(1)
		if g.Kind != ground.Count {
			w = int64(rapid.IntRange(-5, 5).Draw(t, "weight"))
			if huge {
				w *= 1 << 57
			}
		}
		a := ground.Atom(rapid.IntRange(0, max(n-1, 0)).Draw(t, "atom"))
		if n == 0 {
			continue
		}
		g.Elements = append(g.Elements, ground.WeightedAtom{Atom: a, Weight: w})
		if rapid.Bool().Draw(t, "in subset") {
			subset += w
		}
	}
	switch rapid.IntRange(0, 5).Draw(t, "bound kind") {
	case 0:
		g.Bound = math.MaxInt64 - int64(rapid.IntRange(0, 1).Draw(t, "delta"))
	case 1:
		g.Bound = math.MinInt64 + int64(rapid.IntRange(0, 1).Draw(t, "delta"))
	default:
		g.Bound = subset + int64(rapid.IntRange(-1, 1).Draw(t, "delta"))
	}
	return g
}

// TestAggregateEncoding checks every aggregate function and operator
// against Aggregate.Holds on all assignments of up to 8 inputs, and that
// the diagram's variables are defined (one model per assignment).
func TestAggregateEncoding(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		for range cptRounds() {
			n := rapid.IntRange(0, 8).Draw(t, "inputs")
			g := cptDrawAggregate(t, n)
			c := cptBuilder(t)
			c.f.NumVars = n
			lit := c.aggregate(&g)
			cptCheckDefined(t, c, n, func(a []int8, input uint) {
				want := g.Holds(func(x ground.Atom) bool { return input&(1<<x) != 0 })
				if got := cptValue(a, lit); got != want {
					t.Fatalf("%v %v %d over %v, input %0*b: encoding %v, Holds %v", g.Kind, g.Op, g.Bound, g.Elements, n, input, got, want)
				}
			})
		}
	})
}

// TestSumDiagram queries one sum diagram at every threshold from below the
// least to above the greatest sum, so that nodes are shared between
// thresholds through their intervals, and checks every output against the
// sum on all assignments of up to 8 inputs.
func TestSumDiagram(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 8).Draw(t, "inputs")
		var elems []ground.WeightedAtom
		var lo, hi int64
		for i := 0; i < n; i++ {
			w := int64(rapid.IntRange(-9, 9).Draw(t, "weight"))
			elems = append(elems, ground.WeightedAtom{Atom: ground.Atom(i), Weight: w})
			if w < 0 {
				lo += w
			} else {
				hi += w
			}
		}
		c := cptBuilder(t)
		c.f.NumVars = n
		s := c.newSum(elems)
		var out []Lit
		for b := lo - 1; b <= hi+1; b++ {
			out = append(out, s.atLeast(b))
		}
		cptCheckDefined(t, c, n, func(a []int8, input uint) {
			var sum int64
			for _, e := range elems {
				if input&(1<<e.Atom) != 0 {
					sum += e.Weight
				}
			}
			for i, l := range out {
				b := lo - 1 + int64(i)
				if got := cptValue(a, l); got != (sum >= b) {
					t.Fatalf("weights %v, input %0*b (sum %d): output >= %d is %v", elems, n, input, sum, b, got)
				}
			}
		})
	})
}

// TestSumDiagramSize checks that diagramSize bounds the number of nodes the
// diagram of one threshold has (the bound that decides between a diagram
// and adders), for sums of up to 12 weights.
func TestSumDiagramSize(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 12).Draw(t, "inputs")
		var elems []ground.WeightedAtom
		for i := 0; i < n; i++ {
			w := int64(rapid.IntRange(1, 30).Draw(t, "weight"))
			elems = append(elems, ground.WeightedAtom{Atom: ground.Atom(i), Weight: w})
		}
		c := cptBuilderWidth(math.MaxInt64)
		c.f.NumVars = n
		s := c.newSum(elems)
		b := rapid.Int64Range(1, s.rest[0]).Draw(t, "bound")
		bound := s.diagramSize(b)
		s.atLeast(b)
		var nodes int64
		for _, lv := range s.levels {
			nodes += int64(len(lv))
		}
		if nodes > bound {
			t.Fatalf("weights %v, bound %d: %d nodes, diagramSize %d", elems, b, nodes, bound)
		}
	})
}

// TestCounterEncoding checks the sequential counter: every output (≥ k) is
// the count of true inputs compared with k, on all assignments of up to 8
// inputs, with repeated and negated inputs.
func TestCounterEncoding(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 8).Draw(t, "inputs")
		m := rapid.IntRange(0, 9).Draw(t, "counted")
		xs := make([]Lit, m)
		for i := range xs {
			xs[i] = Var(rapid.IntRange(1, n).Draw(t, "var")).Pos()
			if rapid.IntRange(0, 3).Draw(t, "negated") == 0 {
				xs[i] = xs[i].Not()
			}
		}
		ks := rapid.SliceOfN(rapid.Int64Range(-1, int64(m)+2), 1, 3).Draw(t, "thresholds")
		c := cptBuilder(t)
		c.f.NumVars = n
		out := c.atLeast(xs, ks)
		cptCheckDefined(t, c, n, func(a []int8, input uint) {
			var count int64
			for _, x := range xs {
				if cptValue(a, x) {
					count++
				}
			}
			for i, k := range ks {
				if got := cptValue(a, out[i]); got != (count >= k) {
					t.Fatalf("count %d of %v, output >= %d is %v", count, xs, k, got)
				}
			}
		})
	})
}

// TestAggregateSatisfiable asks gophersat (an independent CDCL
// solver, github.com/crillab/gophersat) whether the encoding of a random
// aggregate with its condition asserted is satisfiable, and compares with a
// brute-force search for an assignment satisfying Aggregate.Holds.
func TestAggregateSatisfiable(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		n := rapid.IntRange(1, 8).Draw(t, "inputs")
		g := cptDrawAggregate(t, n)
		c := cptBuilder(t)
		c.f.NumVars = n
		lit := c.aggregate(&g)
		c.clause(lit)
		want := false
		for input := uint(0); input < 1<<n && !want; input++ {
			want = g.Holds(func(x ground.Atom) bool { return input&(1<<x) != 0 })
		}
		if got := cptGophersat(&c.f).Solve() == solver.Sat; got != want {
			t.Fatalf("%v %v %d over %v: gophersat says satisfiable %v, brute force %v", g.Kind, g.Op, g.Bound, g.Elements, got, want)
		}
	})
}

// cptWidths are the width limits tests use: the default, always adders,
// always counters and diagrams.
var cptWidths = []int64{cpMaxWidth, 0, math.MaxInt64}

// cptBuilderWidth returns a gate builder with width limit w; the limit 0
// also sets the node budget of diagrams to 0, so that every sum is adders.
func cptBuilderWidth(w int64) *cpBuilder {
	c := cpNewBuilder()
	c.maxWidth = w
	if w == 0 {
		c.maxNodes = 0
	}
	return c
}

// cptBuilder returns a gate builder with a width limit drawn from
// cptWidths.
func cptBuilder(t *rapid.T) *cpBuilder {
	return cptBuilderWidth(rapid.SampledFrom(cptWidths).Draw(t, "width limit"))
}

// cptGophersat returns a gophersat solver for f.
func cptGophersat(f *CNF) *solver.Solver {
	clauses := make([][]int, f.NumClauses())
	for i := range clauses {
		for _, l := range f.Clause(i) {
			clauses[i] = append(clauses[i], int(l))
		}
	}
	return solver.New(solver.ParseSliceNb(clauses, f.NumVars))
}

// TestLargeSum checks a sum of 40 elements with weights up to 10^12, too
// many distinct partial sums for a decision diagram, so the default builder
// falls back to adders: the encoding must stay small, and under random
// assignments of the inputs gophersat (github.com/crillab/gophersat) must
// find the condition's literal forced to the value of Aggregate.Holds.
func TestLargeSum(t *testing.T) {
	n := 40
	if testing.Short() {
		n = 24
	}
	rapid.Check(t, func(t *rapid.T) {
		g := ground.Aggregate{Kind: ground.Sum, Op: ground.CmpOp(rapid.IntRange(0, 5).Draw(t, "op"))}
		for i := 0; i < n; i++ {
			w := rapid.Int64Range(-1e12, 1e12).Draw(t, "weight")
			g.Elements = append(g.Elements, ground.WeightedAtom{Atom: ground.Atom(i), Weight: w})
			if rapid.Bool().Draw(t, "in bound") {
				g.Bound += w
			}
		}
		g.Bound += rapid.Int64Range(-1, 1).Draw(t, "delta")
		c := cpNewBuilder()
		c.f.NumVars = n
		lit := c.aggregate(&g)
		if k := c.f.NumClauses(); k > 100000 {
			t.Fatalf("%d clauses for a sum of %d elements", k, n)
		}
		for range 5 {
			input := rapid.Uint64Range(0, 1<<n-1).Draw(t, "input")
			want := g.Holds(func(a ground.Atom) bool { return input&(1<<a) != 0 })
			for _, assert := range []Lit{lit, lit.Not()} {
				f := CNF{NumVars: c.f.NumVars, Lits: append([]Lit(nil), c.f.Lits...), Start: append([]int32(nil), c.f.Start...)}
				for i := 0; i < n; i++ {
					if input&(1<<i) != 0 {
						f.AddClause(Var(i + 1).Pos())
					} else {
						f.AddClause(Var(i + 1).Neg())
					}
				}
				switch assert {
				case cpTrue:
				case cpFalse:
					f.AddClause()
				default:
					f.AddClause(assert)
				}
				sat := cptGophersat(&f).Solve() == solver.Sat
				if sat != (want == (assert == lit)) {
					t.Fatalf("input %0*b: asserting %v the formula is satisfiable %v, but Holds is %v", n, input, assert == lit, sat, want)
				}
			}
		}
	})
}
