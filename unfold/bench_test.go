package unfold

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"
)

// randomSparseShape returns a random digraph of n vertices with about two
// edges out of each vertex, a third of them joined both ways (invented
// benchmark data, fixed seed).
func randomSparseShape(n int, seed uint64) *shape {
	r := rand.New(rand.NewPCG(seed, 1))
	s := &shape{name: fmt.Sprintf("random %d", n), n: n}
	for v := 0; v < n; v++ {
		for k := 0; k < 2; k++ {
			w := r.IntN(n)
			if w == v {
				continue
			}
			if r.IntN(3) == 0 {
				s.both(v, w)
			} else {
				s.edge(v, w)
			}
		}
	}
	return s
}

// BenchmarkUnfold searches sequences for known shapes and random sparse
// digraphs (the time measured) and reports the largest and total copies,
// next to the naive sequence (the atoms of each component repeated once per
// atom) in the same run: naive-total is the sum of |C|² over the cyclic
// components, total-ratio naive-total / total. Where the copies stay within
// Unfold's default limit it also unfolds and reports the widths before and
// after (-1 otherwise).
func BenchmarkUnfold(b *testing.B) {
	shapes := []*shape{
		cycleShape(100), biPathShape(100), completeShape(6),
		gridShape(2, 5), gridShape(2, 20), gridShape(2, 100),
		gridShape(3, 5), gridShape(3, 20), gridShape(3, 100),
		randomSparseShape(100, 1), randomSparseShape(1000, 2), randomSparseShape(10000, 3),
	}
	for _, s := range shapes {
		g := s.graph()
		b.Run(s.name, func(b *testing.B) {
			most, total, naiveMost, naiveTotal := 0, 0, 0, 0
			for b.Loop() {
				most, total, naiveMost, naiveTotal = 0, 0, 0, 0
				for c := 0; c < g.NumComponents(); c++ {
					if !g.Cyclic(c) {
						continue
					}
					comp := g.Component(c)
					seq, _ := Sequence(context.Background(), g, comp, Options{MaxCopies: -1})
					m, _ := countCopies(seq)
					most, total = max(most, m), total+len(seq)
					naiveMost, naiveTotal = max(naiveMost, len(comp)), naiveTotal+len(comp)*len(comp)
				}
			}
			widthBefore, widthAfter := -1, -1
			if total <= DefaultMaxCopies {
				_, rep, err := Unfold(context.Background(), s.program(), Options{})
				if err != nil {
					b.Fatal(err)
				}
				widthBefore, widthAfter = rep.WidthBefore, rep.WidthAfter
			}
			b.ReportMetric(float64(most), "copies-max")
			b.ReportMetric(float64(total), "copies-total")
			b.ReportMetric(float64(naiveMost), "naive-max")
			b.ReportMetric(float64(naiveTotal), "naive-total")
			b.ReportMetric(float64(naiveTotal)/float64(max(total, 1)), "total-ratio")
			b.ReportMetric(float64(widthBefore), "width-before")
			b.ReportMetric(float64(widthAfter), "width-after")
		})
	}
}

// BenchmarkNaiveWidth reports the width after unfolding along the naive
// sequence, on the shapes where that stays small enough to estimate.
func BenchmarkNaiveWidth(b *testing.B) {
	for _, s := range []*shape{cycleShape(100), biPathShape(100), gridShape(2, 20), gridShape(3, 20), randomSparseShape(100, 1)} {
		p := s.program()
		b.Run(s.name, func(b *testing.B) {
			var rep *Report
			for b.Loop() {
				_, rep, _ = Unfold(context.Background(), p, Options{Naive: true})
			}
			b.ReportMetric(float64(rep.MaxCopies), "copies-max")
			b.ReportMetric(float64(rep.TotalCopies), "copies-total")
			b.ReportMetric(float64(rep.WidthAfter), "width-after")
		})
	}
}
