package unfold

import "slices"

// maxCheckedSweeps is the largest number of sweeps tried with the validity
// checker on small components.
const maxCheckedSweeps = 6

// sweeps returns the sweep construction for the strongly connected digraph
// d, or nil when none is known to be valid.
//
// The vertices are split into the layers L0, …, Lm of a breadth-first search
// of d's undirected graph (so every edge joins two vertices of one layer or
// of consecutive layers), and S_j is a sequence holding every simple path of
// the subgraph induced by L_j. A forward sweep is S_0 S_1 … S_m, a backward
// sweep S_m … S_0; the sequence alternates r sweeps starting forward, each
// sweep after the first leaving out the layer the previous one ended with.
// A part of a simple path along which the layer does not decrease is held by
// one forward sweep (its stretch inside each layer is a simple path there),
// and likewise for backward sweeps; at a turn the stretch inside the turning
// layer goes with the earlier sweep, so the left-out layer is never needed.
// Hence r sweeps hold every simple path that splits into at most r−1 such
// monotone parts.
//
// The number of monotone parts is proved bounded for layerings of width
// two whose edges between consecutive layers form a matching (subgraphs of
// ladders, with layers as rungs): a path with layers of one vertex each
// never turns, so two sweeps suffice; otherwise three parts at most, so four
// sweeps suffice. Proof sketch, for a path that rises from layer s to a
// peak h: it meets every layer of [s, h] once while rising; at the peak it
// cannot step back down from its arrival vertex (that vertex's one
// neighbour below is used), so it crosses to the other vertex of layer h and
// descends through the free vertices, filling every layer it passes in
// [s, h]. If it descends to a valley l ≥ s it cannot turn again (the other
// vertex of layer l is taken). If l < s it can turn at l and rise again
// through layers below s, but layer s is full and every layer in (l, s) is
// full once it passes, so it cannot turn a third time: at most three parts.
// A cap (an end layer of one vertex joined to both vertices next to it)
// only adds a way to turn at that end, from one vertex of the next layer to
// the other, which fills that layer just as crossing a rung does.
//
// Other layerings are used only on components small enough for the
// validity checker, with the fewest sweeps it accepts.
func (s *searcher) sweeps(d *digraph, depth int) []int32 {
	u := d.undirected()
	root := peripheral(u)
	sources := [][]int32{{root}}
	for i, w := range u.succ(root) {
		if i == 4 {
			break
		}
		sources = append(sources, []int32{root, w})
	}
	small := d.n <= s.opts.checkLimit()
	var best []int32
	for _, src := range sources {
		if s.ctx.Err() != nil {
			break
		}
		layers := bfsLayers(u, src)
		if len(layers) < 3 {
			continue // too dense to gain anything over the other constructions
		}
		proved := 0
		if ladderLike(u, layers) {
			proved = 4
			if slices.IndexFunc(layers, func(l []int32) bool { return len(l) > 1 }) < 0 {
				proved = 2
			}
		}
		if proved == 0 && !small {
			continue
		}
		for _, balanced := range []bool{false, true} {
			fwd, bwd := s.layerSeqs(d, layers, depth, balanced)
			if fwd == nil {
				continue
			}
			var seq []int32
			if small {
				top := maxCheckedSweeps
				if proved > 0 {
					top = proved - 1
				}
				for r := 1; r <= top; r++ {
					cand := zigzag(fwd, bwd, r)
					if s.check(d, cand) {
						seq = cand
						break
					}
				}
			}
			if seq == nil && proved > 0 {
				seq = zigzag(fwd, bwd, proved)
			}
			if seq != nil && better(d.n, seq, best) {
				best = seq
			}
		}
	}
	return best
}

// layerSeqs returns, for each layer, the sequences used in forward and in
// backward sweeps. With balanced, backward sweeps use a sequence built with
// the layer's vertices in reverse order, which tends to copy other atoms.
func (s *searcher) layerSeqs(d *digraph, layers [][]int32, depth int, balanced bool) (fwd, bwd [][]int32) {
	fwd = make([][]int32, len(layers))
	bwd = make([][]int32, len(layers))
	for j, l := range layers {
		if len(l) == d.n {
			return nil, nil
		}
		fwd[j] = s.layerSeq(d, l, depth)
		bwd[j] = fwd[j]
		if balanced && len(l) > 1 {
			bwd[j] = s.layerSeq(d, reversed(l), depth)
		}
		if fwd[j] == nil || bwd[j] == nil {
			return nil, nil
		}
	}
	return fwd, bwd
}

func reversed(vs []int32) []int32 {
	r := slices.Clone(vs)
	slices.Reverse(r)
	return r
}

// layerSeq returns a sequence of the vertices l of d holding every simple
// path of the subgraph they induce.
func (s *searcher) layerSeq(d *digraph, l []int32, depth int) []int32 {
	part, _ := s.cover(d.induce(l), depth+1)
	if part == nil {
		return nil
	}
	seq := make([]int32, len(part))
	for i, v := range part {
		seq[i] = l[v]
	}
	return seq
}

// zigzag concatenates r alternating sweeps over the layer sequences,
// starting forward; every sweep after the first leaves out the layer the
// previous sweep ended with.
func zigzag(fwd, bwd [][]int32, r int) []int32 {
	m := len(fwd) - 1
	var seq []int32
	for k := 0; k < r; k++ {
		if k%2 == 0 {
			j := 0
			if k > 0 {
				j = 1
			}
			for ; j <= m; j++ {
				seq = append(seq, fwd[j]...)
			}
		} else {
			for j := m - 1; j >= 0; j-- {
				seq = append(seq, bwd[j]...)
			}
		}
	}
	return seq
}

// bfsLayers returns the layers of a breadth-first search of the undirected
// graph u from the sources, each layer sorted; unreached vertices are not
// listed (u is connected for a strongly connected digraph).
func bfsLayers(u *digraph, sources []int32) [][]int32 {
	dist := make([]int32, u.n)
	for i := range dist {
		dist[i] = -1
	}
	cur := slices.Clone(sources)
	for _, v := range cur {
		dist[v] = 0
	}
	var layers [][]int32
	for len(cur) > 0 {
		slices.Sort(cur)
		layers = append(layers, cur)
		var next []int32
		for _, v := range cur {
			for _, w := range u.succ(v) {
				if dist[w] < 0 {
					dist[w] = dist[v] + 1
					next = append(next, w)
				}
			}
		}
		cur = next
	}
	return layers
}

// peripheral returns a vertex far from the others: the last vertex reached
// by a breadth-first search, repeated from there a few times.
func peripheral(u *digraph) int32 {
	v := int32(0)
	for i := 0; i < 3; i++ {
		layers := bfsLayers(u, []int32{v})
		last := layers[len(layers)-1]
		// Prefer a vertex of small degree in the last layer.
		w := last[0]
		for _, x := range last {
			if len(u.succ(x)) < len(u.succ(w)) {
				w = x
			}
		}
		if w == v {
			break
		}
		v = w
	}
	return v
}

// ladderLike reports whether every layer has at most two vertices and the
// edges between consecutive layers form a matching, except that the first
// and the last layer may be a single vertex joined to both vertices of the
// layer next to it (a cap closing the ladder, as in a ring).
func ladderLike(u *digraph, layers [][]int32) bool {
	layer := make([]int32, u.n)
	for j, l := range layers {
		if len(l) > 2 {
			return false
		}
		for _, v := range l {
			layer[v] = int32(j)
		}
	}
	for _, l := range layers {
		for _, v := range l {
			up, down := 0, 0
			for _, w := range u.succ(v) {
				switch layer[w] - layer[v] {
				case 1:
					up++
				case -1:
					down++
				case 0:
				default:
					return false
				}
			}
			j := int(layer[v])
			capped := len(l) == 1 && up+down <= 2 && (j == 0 || j == len(layers)-1)
			if (up > 1 || down > 1) && !capped {
				return false
			}
		}
	}
	return true
}
