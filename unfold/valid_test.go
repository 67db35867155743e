package unfold

import (
	"context"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// TestSequencesAreValid checks every sequence the search returns on random
// components with the independent brute-force check, and that Valid agrees
// with that check on the sequence with any one element removed.
func TestSequencesAreValid(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		s := randomShape(t, 2, 8)
		g := s.graph()
		for c := 0; c < g.NumComponents(); c++ {
			if !g.Cyclic(c) {
				continue
			}
			comp := g.Component(c)
			seq, how := Sequence(context.Background(), g, comp, Options{})
			if !bruteValid(g, comp, seq) {
				t.Fatalf("%s sequence %v misses a path of component %v", how, seq, comp)
			}
			if !Valid(g, comp, seq) {
				t.Fatalf("Valid rejects %s sequence %v", how, seq)
			}
			for i := range seq {
				cut := slices.Delete(slices.Clone(seq), i, i+1)
				if got, want := Valid(g, comp, cut), bruteValid(g, comp, cut); got != want {
					t.Fatalf("Valid(%v) = %v, brute force says %v", cut, got, want)
				}
			}
		}
	})
}

// TestValidAgreesOnRandomSequences compares Valid, and the greedy path walk
// of the bisection tests (holdsAllPaths), with the brute-force check on
// random sequences over random components.
func TestValidAgreesOnRandomSequences(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		s := randomShape(t, 2, 8)
		g := s.graph()
		c := largestComponent(g)
		if c < 0 {
			return
		}
		comp := g.Component(c)
		seq := rapid.SliceOfN(rapid.SampledFrom(comp), 0, 4*len(comp)).Draw(t, "seq")
		want := bruteValid(g, comp, seq)
		if got := Valid(g, comp, seq); got != want {
			t.Fatalf("Valid(%v) = %v, brute force says %v", seq, got, want)
		}
		local := make([]int32, len(seq))
		for i, v := range seq {
			j, _ := slices.BinarySearch(comp, v)
			local[i] = int32(j)
		}
		if ok, done, _ := holdsAllPaths(g.local(comp), local, 1<<24); !done || ok != want {
			t.Fatalf("holdsAllPaths(%v) = %v (done %v), brute force says %v", local, ok, done, want)
		}
	})
}

// TestConstructionsAreValid checks each construction on its own, beyond
// the one the search picks.
func TestConstructionsAreValid(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		s := randomShape(t, 2, 9)
		g := s.graph()
		c := largestComponent(g)
		if c < 0 || len(g.Component(c)) < 2 {
			return
		}
		comp := g.Component(c)
		d := g.local(comp)
		sr := newSearcher(context.Background(), Options{CheckLimit: -1})
		x := sr.fvs(d)
		cands := map[string][]int32{
			"feedback-set": sr.feedbackSet(d, x),
			"repetition":   sr.repetition(d, x),
			"naive":        naive(d),
		}
		if sw := sr.sweeps(d, 0); sw != nil {
			cands["sweeps"] = sw
		}
		for name, seq := range cands {
			atoms := make([]int32, len(seq))
			for i, v := range seq {
				atoms[i] = comp[v]
			}
			if !bruteValid(g, comp, atoms) {
				t.Fatalf("%s sequence %v is not valid", name, atoms)
			}
		}
	})
}

// TestLadderSweepsProved checks the proved bound of four sweeps on random
// subgraphs of ladders (the layers of a ladder-like layering are its
// rungs), without the validity checker's help in the construction.
func TestLadderSweepsProved(t *testing.T) {
	runs, checked, capped := 0, 0, 0
	defer func() {
		t.Logf("%d ladders, %d with proved sweeps checked, %d of them capped", runs, checked, capped)
		if checked < runs/4 {
			t.Errorf("only %d of %d random ladders exercised the proved sweeps", checked, runs)
		}
	}()
	rapid.Check(t, func(t *rapid.T) {
		runs++
		n := rapid.IntRange(2, 5).Draw(t, "n")
		s := &shape{n: 2 * n}
		for c := 0; c < n; c++ {
			edges := [][2]int{{c, c + n}} // rung
			if c+1 < n {
				edges = append(edges, [2]int{c, c + 1}, [2]int{c + n, c + 1 + n})
			}
			for _, e := range edges {
				switch rapid.IntRange(0, 4).Draw(t, "edge") {
				case 1:
					s.edge(e[0], e[1])
				case 2:
					s.edge(e[1], e[0])
				case 3, 4:
					s.both(e[0], e[1])
				}
			}
		}
		if rapid.Bool().Draw(t, "caps") {
			// Close the ladder into a ring-like shape with caps at
			// both ends, each joined to the two atoms of its rung.
			a, z := s.n, s.n+1
			s.n += 2
			for _, e := range [][2]int{{a, 0}, {a, n}, {z, n - 1}, {z, 2*n - 1}} {
				switch rapid.IntRange(0, 3).Draw(t, "cap edge") {
				case 1:
					s.edge(e[0], e[1])
				case 2:
					s.edge(e[1], e[0])
				case 3:
					s.both(e[0], e[1])
				}
			}
		}
		g := s.graph()
		c := largestComponent(g)
		if c < 0 || len(g.Component(c)) < 3 {
			return
		}
		comp := g.Component(c)
		d := g.local(comp)
		sr := newSearcher(context.Background(), Options{CheckLimit: -1})
		seq := sr.sweeps(d, 0)
		if seq == nil {
			return // layering not ladder-like
		}
		checked++
		if s.n%2 == 1 || s.n > 2*n {
			capped++
		}
		atoms := make([]int32, len(seq))
		for i, v := range seq {
			atoms[i] = comp[v]
		}
		if !bruteValid(g, comp, atoms) {
			t.Fatalf("proved sweeps %v are not valid on %v", atoms, s.from)
		}
	})
}

// TestSharedSearchAcrossComponents checks the sequences of one search
// shared by many components (with its cache of identical component graphs
// and its shared budgets) against the brute-force check.
func TestSharedSearchAcrossComponents(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		parts := rapid.SliceOfN(rapid.Custom(func(t *rapid.T) *shape { return randomShape(t, 2, 6) }), 1, 4).Draw(t, "parts")
		// Each part twice, at different offsets.
		s := &shape{}
		for _, part := range append(parts, parts...) {
			for k := range part.from {
				s.edge(s.n+int(part.from[k]), s.n+int(part.to[k]))
			}
			s.n += part.n
		}
		g := s.graph()
		search := newSearcher(context.Background(), Options{})
		for c := 0; c < g.NumComponents(); c++ {
			if !g.Cyclic(c) {
				continue
			}
			comp := g.Component(c)
			seq, how := search.sequence(g, comp)
			if !bruteValid(g, comp, seq) {
				t.Fatalf("%s sequence %v misses a path of component %v", how, seq, comp)
			}
		}
	})
}
