package compile

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"trellis/ground"
)

// cptLargeProgram returns a deterministic random tight program with n atoms
// and 2n rules (bodies of up to four literals over lower atoms, so no
// positive cycle), n/20 choices of up to eight elements with bounds, n/50
// sum and count aggregates of up to twenty elements, n/20 constraints and
// n/10 penalties. The shape is invented, for speed measurements only.
func cptLargeProgram(n int) *ground.Program {
	r := rand.New(rand.NewPCG(1, 2))
	p := &ground.Program{}
	atoms := make([]ground.Atom, n)
	for i := range atoms {
		atoms[i] = p.AddAtom("p", []ground.Term{p.Terms.Int(int64(i))})
	}
	below := func(i, k int) []ground.Atom {
		var out []ground.Atom
		for j := 0; j < k && i > 0; j++ {
			out = append(out, atoms[r.IntN(i)])
		}
		return out
	}
	for j := 0; j < 2*n; j++ {
		h := r.IntN(n)
		p.Rules = append(p.Rules, ground.Rule{Head: atoms[h], Pos: below(h, r.IntN(3)), Neg: below(n, r.IntN(2))})
	}
	for j := 0; j < n/20; j++ {
		lo := r.IntN(n)
		k := 1 + r.IntN(8)
		ch := ground.Choice{Lower: int64(r.IntN(3)), Upper: ground.NoUpper, Neg: below(n, 1)}
		ch.Upper = ch.Lower + int64(r.IntN(4))
		for e := 0; e < k && lo+e < n; e++ {
			ch.Elements = append(ch.Elements, atoms[lo+e])
		}
		ch.Pos = below(lo, 1)
		p.Choices = append(p.Choices, ch)
	}
	for j := 0; j < n/50; j++ {
		g := ground.Aggregate{Atom: p.NewAux("agg"), Kind: ground.AggregateKind(r.IntN(2)), Op: ground.CmpOp(r.IntN(6))}
		var total int64
		for e := 0; e < 1+r.IntN(20); e++ {
			w := int64(1)
			if g.Kind == ground.Sum {
				w = int64(r.IntN(21) - 10)
			}
			total += max(w, 0)
			g.Elements = append(g.Elements, ground.WeightedAtom{Atom: atoms[r.IntN(n)], Weight: w})
		}
		g.Bound = r.Int64N(total + 1)
		p.Aggregates = append(p.Aggregates, g)
		p.Rules = append(p.Rules, ground.Rule{Head: ground.NoAtom, Pos: []ground.Atom{g.Atom}, Neg: below(n, 1)})
	}
	for j := 0; j < n/20; j++ {
		p.Rules = append(p.Rules, ground.Rule{Head: ground.NoAtom, Pos: below(n, 2), Neg: below(n, 1)})
	}
	for j := 0; j < n/10; j++ {
		p.Penalties = append(p.Penalties, ground.Penalty{Atom: atoms[r.IntN(n)], Weight: int64(r.IntN(10))})
	}
	p.Shown = append(p.Shown, atoms...)
	p.SortAtoms(p.Shown)
	return p
}

// BenchmarkComplete measures the completion of a random tight program with
// 10^5 rules and more, in clauses produced per second. The baseline
// sub-benchmark deep-copies the same program (ground.Program.Clone), a
// pass over the same data that does no encoding, so the ratio of the two
// times says how many copies of the program one completion costs and is
// less sensitive to the load of the machine than clauses/s alone.
func BenchmarkComplete(b *testing.B) {
	p := cptLargeProgram(50000)
	b.Run("complete", func(b *testing.B) {
		var clauses int
		for b.Loop() {
			e, err := Complete(p)
			if err != nil {
				b.Fatal(err)
			}
			clauses += e.Report.Clauses
		}
		b.ReportMetric(float64(clauses)/b.Elapsed().Seconds(), "clauses/s")
		b.ReportMetric(float64(len(p.Rules)), "rules")
	})
	b.Run("baseline-clone", func(b *testing.B) {
		for b.Loop() {
			_ = p.Clone()
		}
	})
}

// cptSumProgram returns a program that chooses any subset of n atoms whose
// weights (drawn in 1..maxW, deterministic) sum to at most bound, or to at
// most half the total when bound is 0. The shape is invented, for speed
// measurements only.
func cptSumProgram(n, maxW int, bound int64) *ground.Program {
	r := rand.New(rand.NewPCG(1, uint64(n)))
	p := &ground.Program{}
	ch := ground.Choice{Upper: ground.NoUpper}
	g := ground.Aggregate{Kind: ground.Sum, Op: ground.Le, Bound: bound}
	var total int64
	for i := 0; i < n; i++ {
		a := p.AddAtom("x", []ground.Term{p.Terms.Int(int64(i))})
		ch.Elements = append(ch.Elements, a)
		w := int64(1 + r.IntN(maxW))
		total += w
		g.Elements = append(g.Elements, ground.WeightedAtom{Atom: a, Weight: w})
	}
	if bound == 0 {
		g.Bound = total / 2
	}
	g.Atom = p.NewAux("agg")
	p.Choices = []ground.Choice{ch}
	p.Rules = []ground.Rule{{Head: ground.NoAtom, Neg: []ground.Atom{g.Atom}}}
	p.Aggregates = []ground.Aggregate{g}
	return p
}

// BenchmarkSumCompile compiles (with Compile) the completion of a sum
// condition encoded as a decision diagram and as adders, to compare the two
// encodings by the circuit compiler's time in one run: a count of at most
// 10 of 20 atoms, and a sum of 16 weights in 1..8 up to half the total.
func BenchmarkSumCompile(b *testing.B) {
	cases := []struct {
		name string
		p    *ground.Program
	}{
		{"count20le10", cptSumProgram(20, 1, 10)},
		{"sum16w8", cptSumProgram(16, 8, 0)},
	}
	for _, tc := range cases {
		for _, enc := range []struct {
			name  string
			width int64
		}{{"diagram", math.MaxInt64}, {"adders", 0}} {
			b.Run(tc.name+"/"+enc.name, func(b *testing.B) {
				c := cptBuilderWidth(enc.width)
				e, err := cpComplete(tc.p, c)
				if err != nil {
					b.Fatal(err)
				}
				for b.Loop() {
					if _, _, err := Compile(context.Background(), &e.CNF, Options{}); err != nil {
						b.Fatal(err)
					}
				}
				b.ReportMetric(float64(e.Report.Clauses), "clauses")
			})
		}
	}
}
