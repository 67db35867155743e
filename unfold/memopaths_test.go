package unfold

import (
	"context"
	"math/rand/v2"
	"slices"
	"testing"
)

// holdsAllPathsMemo reports what holdsAllPaths reports, for digraphs of at
// most 64 vertices, but prunes the walk: a walk at v whose greedy match
// ended at position at can go on exactly along the simple paths of the
// vertices not yet visited that start at v, which depend only on v and the
// set R of vertices reachable from v without revisiting; and a later
// position can only make those matches later. So for each (v, R) it goes on
// only when at is later than every position it went on from before. It
// gives up (done false) after budget states.
func holdsAllPathsMemo(d *digraph, seq []int32, budget int) (ok, done bool, missing []int32) {
	n := d.n
	if n > 64 {
		panic("holdsAllPathsMemo: more than 64 vertices")
	}
	next := nextTable(n, seq)
	type key struct {
		v     int32
		reach uint64
	}
	latest := map[key]int32{}
	var queue []int32
	reachable := func(v int32, visited uint64) uint64 {
		seen := visited | 1<<v
		reach := uint64(0)
		queue = append(queue[:0], v)
		for len(queue) > 0 {
			u := queue[len(queue)-1]
			queue = queue[:len(queue)-1]
			for _, w := range d.succ(u) {
				if seen&(1<<w) == 0 {
					seen |= 1 << w
					reach |= 1 << w
					queue = append(queue, w)
				}
			}
		}
		return reach
	}
	var path []int32
	var walk func(v, at int32, visited uint64) bool
	walk = func(v, at int32, visited uint64) bool {
		k := key{v, reachable(v, visited)}
		if p, seen := latest[k]; seen && p >= at {
			return true
		}
		if budget--; budget < 0 {
			return false
		}
		latest[k] = at
		visited |= 1 << v
		path = append(path, v)
		for _, w := range d.succ(v) {
			if visited&(1<<w) != 0 {
				continue
			}
			p := next[int(at+1)*n+int(w)]
			if p == int32(len(seq)) {
				missing = append(path, w)
				return false
			}
			if !walk(w, p, visited) {
				return false
			}
		}
		path = path[:len(path)-1]
		return true
	}
	for v := int32(0); v < int32(n); v++ {
		p := next[int(v)]
		if p == int32(len(seq)) {
			return false, true, []int32{v}
		}
		if !walk(v, p, 0) {
			return false, missing != nil, missing
		}
	}
	return true, true, nil
}

// TestHoldsAllPathsMemo checks the pruned walk against the plain one on
// grids and their bisection sequences with elements removed at random
// (some of which miss a path), and that a path it reports missing is a
// simple path of the grid that is not a subsequence.
func TestHoldsAllPathsMemo(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 9))
	rejected := 0
	for _, kn := range [][2]int{{2, 5}, {3, 4}, {3, 5}, {3, 6}} {
		d := gridDigraph(kn[0], kn[1], nil)
		full := newSearcher(context.Background(), Options{}).bisection(d, 0)
		for try := 0; try < 60; try++ {
			seq := append([]int32(nil), full...)
			for cut := r.IntN(4); cut > 0 && len(seq) > 1; cut-- {
				i := r.IntN(len(seq))
				seq = append(seq[:i], seq[i+1:]...)
			}
			want, done, _ := holdsAllPaths(d, seq, 1<<26)
			if !done {
				t.Fatalf("%v: plain walk out of budget", kn)
			}
			got, done, missing := holdsAllPathsMemo(d, seq, 1<<26)
			if !done || got != want {
				t.Fatalf("%v, try %d: pruned walk says %v (done %v), plain walk %v", kn, try, got, done, want)
			}
			if !got {
				rejected++
				if !simplePathOf(d, missing) || holds(seq, missing) {
					t.Fatalf("%v: reported path %v is no missing simple path", kn, missing)
				}
			}
		}
	}
	if rejected == 0 {
		t.Fatal("no sequence rejected: the test cannot tell the walks apart")
	}
}

// simplePathOf reports whether path is a simple path of d.
func simplePathOf(d *digraph, path []int32) bool {
	var on uint64
	for i, v := range path {
		if on&(1<<v) != 0 {
			return false
		}
		on |= 1 << v
		if i > 0 {
			found := false
			for _, w := range d.succ(path[i-1]) {
				found = found || w == v
			}
			if !found {
				return false
			}
		}
	}
	return true
}

// TestGridSequencesExact checks, against every simple path, the sequences
// the search returns for bidirectional 3×n grids beyond the sizes the plain
// walk can afford, n = 9 to 16: the feedback-set construction, then
// bisection (chosen from n = 11 on) with four levels of halving.
func TestGridSequencesExact(t *testing.T) {
	if testing.Short() {
		t.Skip("exhaustive path check of 3×9 to 3×16 grids")
	}
	for n := 9; n <= 16; n++ {
		s := gridShape(3, n)
		g := s.graph()
		comp := g.Component(largestComponent(g))
		seq, how := Sequence(context.Background(), g, comp, Options{MaxCopies: -1})
		local := make([]int32, len(seq))
		for i, v := range seq {
			local[i] = int32(slices.Index(comp, v))
		}
		d := g.local(comp)
		ok, done, missing := holdsAllPathsMemo(d, local, 1<<25)
		if !done {
			t.Fatalf("3×%d grid: check ran out of budget", n)
		}
		if !ok {
			t.Errorf("3×%d grid: %s sequence misses the simple path %v", n, how, missing)
		}
		t.Logf("3×%d grid: %s, largest copies %d, total %d, every simple path held", n, how, copies(d.n, local), len(seq))
	}
}
