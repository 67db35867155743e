package compile

import (
	"math"
	"sort"

	"trellis/ground"
)

// aggregate returns a literal equivalent to the condition of g.
func (c *cpBuilder) aggregate(g *ground.Aggregate) Lit {
	switch g.Kind {
	case ground.Min, ground.Max:
		return c.extremum(g)
	}
	s := c.newSum(g.Elements)
	switch g.Op {
	case ground.Ge:
		return s.atLeast(g.Bound)
	case ground.Gt:
		return s.above(g.Bound)
	case ground.Le:
		return s.above(g.Bound).Not()
	case ground.Lt:
		return s.atLeast(g.Bound).Not()
	}
	eq := c.and([]Lit{s.atLeast(g.Bound), s.above(g.Bound).Not()})
	if g.Op == ground.Ne {
		return eq.Not()
	}
	return eq
}

// extremum encodes a min or max condition. With m the min (or max) of the
// true elements' weights, m < b holds exactly when some element with weight
// below b is true (for max: m > b when some element above b is true), and
// the other comparisons follow by negation and conjunction. The empty min is
// +infinity and the empty max is -infinity, which these formulas respect:
// an empty disjunction is false.
func (c *cpBuilder) extremum(g *ground.Aggregate) Lit {
	some := func(pass func(w int64) bool) Lit {
		var lits []Lit
		for _, e := range g.Elements {
			if pass(e.Weight) {
				lits = append(lits, Var(e.Atom+1).Pos())
			}
		}
		return c.or(lits)
	}
	b := g.Bound
	var lt, le, gt, ge Lit // of the extremum m against b
	if g.Kind == ground.Min {
		lt = some(func(w int64) bool { return w < b })
		le = some(func(w int64) bool { return w <= b })
		gt, ge = le.Not(), lt.Not()
	} else {
		gt = some(func(w int64) bool { return w > b })
		ge = some(func(w int64) bool { return w >= b })
		lt, le = ge.Not(), gt.Not()
	}
	switch g.Op {
	case ground.Lt:
		return lt
	case ground.Le:
		return le
	case ground.Gt:
		return gt
	case ground.Ge:
		return ge
	}
	eq := c.and([]Lit{le, ge})
	if g.Op == ground.Ne {
		return eq.Not()
	}
	return eq
}

// cpSum encodes comparisons of a weighted sum of literals with bounds, as a
// reduced ordered decision diagram whose nodes are defined gate variables,
// or, when the diagram could grow too large, as a comparator over the bits
// of a tree of ripple-carry adders (defined gates too). The sum Σ wᵢ·xᵢ is rewritten as offset + Σ |wᵢ|·yᵢ with yᵢ = xᵢ for
// wᵢ > 0 and yᵢ = ¬xᵢ for wᵢ < 0, offset the sum of the negative weights.
type cpSum struct {
	c      *cpBuilder
	lits   []Lit   // yᵢ, by decreasing weight
	w      []int64 // |wᵢ| > 0
	rest   []int64 // rest[i] = Σ_{j≥i} w[j]
	offset int64   // ≤ 0
	// levels[i] holds the nodes of level i as intervals of thresholds t on
	// which "Σ_{j≥i} w[j]·y[j] ≥ t" is the same function, sorted by lo.
	levels [][]cpInterval
	bits   []Lit // the sum Σ |wᵢ|·yᵢ in binary, least significant first, once built
}

// cpInterval is a node of a cpSum diagram: the thresholds lo..hi share it.
type cpInterval struct {
	lo, hi int64
	lit    Lit
}

func (c *cpBuilder) newSum(elems []ground.WeightedAtom) *cpSum {
	// Merge repeated atoms: the sum adds the weight of each element.
	sorted := append([]ground.WeightedAtom(nil), elems...)
	sort.Slice(sorted, func(i, j int) bool { return sorted[i].Atom < sorted[j].Atom })
	var merged []ground.WeightedAtom
	for _, e := range sorted {
		if k := len(merged); k > 0 && merged[k-1].Atom == e.Atom {
			merged[k-1].Weight += e.Weight
			continue
		}
		merged = append(merged, e)
	}
	s := &cpSum{c: c}
	type item struct {
		lit Lit
		w   int64
	}
	var items []item
	for _, e := range merged {
		switch {
		case e.Weight > 0:
			items = append(items, item{Var(e.Atom + 1).Pos(), e.Weight})
		case e.Weight < 0:
			s.offset += e.Weight
			items = append(items, item{Var(e.Atom + 1).Neg(), -e.Weight})
		}
	}
	// Larger weights first keep the diagram small (common practice, no
	// source); ties by variable, for determinism.
	sort.SliceStable(items, func(i, j int) bool {
		if items[i].w != items[j].w {
			return items[i].w > items[j].w
		}
		return items[i].lit.Var() < items[j].lit.Var()
	})
	s.lits = make([]Lit, len(items))
	s.w = make([]int64, len(items))
	s.rest = make([]int64, len(items)+1)
	for i, it := range items {
		s.lits[i], s.w[i] = it.lit, it.w
	}
	for i := len(items) - 1; i >= 0; i-- {
		s.rest[i] = s.rest[i+1] + s.w[i]
	}
	s.levels = make([][]cpInterval, len(items))
	return s
}

// atLeast returns a literal equivalent to Σ wᵢ·xᵢ ≥ b.
func (s *cpSum) atLeast(b int64) Lit {
	// Σ ≥ b ⟺ Σ |wᵢ|·yᵢ ≥ b - offset.
	t := b - s.offset
	if b > 0 && t < b { // overflow: the threshold exceeds every sum
		return cpFalse
	}
	if t <= 0 {
		return cpTrue
	}
	if t > s.rest[0] {
		return cpFalse
	}
	// Counts (all weights 1) keep the width rule: BenchmarkSumCompile
	// measured a wide count diagram slower than adders.
	weighted := s.w[0] > 1 // weights by decreasing size
	if s.diagramWidth(t) > s.c.maxWidth && (!weighted || s.diagramSize(t) > s.c.maxNodes) {
		return s.adderAtLeast(t)
	}
	lit, _, _ := s.node(0, t)
	return lit
}

// diagramWidth bounds the number of nodes of the widest level of the
// diagram for threshold t: the thresholds that reach level i are t minus a
// subset sum of the first i weights (at most 2^i of them) that lie in
// [max(1, t - Σ_{j<i} w[j]), min(t, rest[i])]; the others are terminals.
//
// The width matters more than the size: a decision diagram's primal graph
// has about its width as treewidth, and the circuit compiler's time grows
// exponentially with treewidth, while an adder tree's treewidth grows with
// the number of bits only. Measured on sums of 14 to 24 elements, adders
// compiled faster from width 8 on, and a diagram of width 250 did not
// compile in 30 seconds. Yet on the bundle benchmark family (weighted
// budget, power and weight sums over options in slots of exactly one), a
// diagram of up to cpMaxNodes nodes, whatever its width, compiled about
// twice as fast as adders, so for weighted sums atLeast turns to adders
// only when both the width and the size bound (diagramSize) are over their
// limits.
func (s *cpSum) diagramWidth(t int64) int64 {
	width, _ := s.diagramLevels(t)
	return width
}

// diagramSize bounds the number of nodes of the diagram for threshold t,
// summing the level bounds of diagramWidth; it saturates at math.MaxInt64.
func (s *cpSum) diagramSize(t int64) int64 {
	_, size := s.diagramLevels(t)
	return size
}

// diagramLevels returns the largest and the sum of the level bounds of the
// diagram for threshold t (see diagramWidth).
func (s *cpSum) diagramLevels(t int64) (width, size int64) {
	for i := range s.w {
		lo := max(1, t-(s.rest[0]-s.rest[i]))
		k := min(t, s.rest[i]) - lo + 1
		if i < 62 {
			k = min(k, int64(1)<<i)
		}
		width = max(width, k)
		if k > 0 {
			size = cpSatAdd(size, k)
		}
	}
	return width, size
}

// adderAtLeast returns a literal for Σ |wᵢ|·yᵢ ≥ t with 0 < t ≤ rest[0],
// comparing the adder tree's output bits with t from the least significant
// bit up: (S ≥ t on bits 0..k) is sₖ ∧ (bits 0..k-1) when bit k of t is
// set, and sₖ ∨ (bits 0..k-1) otherwise.
func (s *cpSum) adderAtLeast(t int64) Lit {
	c := s.c
	if s.bits == nil {
		vecs := make([][]Lit, len(s.w))
		for i, w := range s.w {
			for ; w > 0; w >>= 1 {
				if w&1 != 0 {
					vecs[i] = append(vecs[i], s.lits[i])
				} else {
					vecs[i] = append(vecs[i], cpFalse)
				}
			}
		}
		// Add pairwise, as a balanced tree.
		for len(vecs) > 1 {
			var next [][]Lit
			for i := 0; i+1 < len(vecs); i += 2 {
				next = append(next, c.add(vecs[i], vecs[i+1]))
			}
			if len(vecs)%2 == 1 {
				next = append(next, vecs[len(vecs)-1])
			}
			vecs = next
		}
		s.bits = vecs[0]
	}
	ge := cpTrue // S ≥ t on no bits: 0 ≥ 0
	for k, b := range s.bits {
		if t>>k&1 != 0 {
			ge = c.and([]Lit{b, ge})
		} else {
			ge = c.or([]Lit{b, ge})
		}
	}
	return ge
}

// add returns the bits of the sum of the binary numbers a and b (least
// significant bit first), by a ripple-carry adder of defined gates.
func (c *cpBuilder) add(a, b []Lit) []Lit {
	n := max(len(a), len(b))
	bit := func(v []Lit, k int) Lit {
		if k < len(v) {
			return v[k]
		}
		return cpFalse
	}
	out := make([]Lit, 0, n+1)
	carry := cpFalse
	for k := 0; k < n; k++ {
		x, y := bit(a, k), bit(b, k)
		out = append(out, c.xor(c.xor(x, y), carry))
		// carry' = majority(x, y, carry)
		carry = c.ite(x, c.or([]Lit{y, carry}), c.and([]Lit{y, carry}))
	}
	if carry != cpFalse {
		out = append(out, carry)
	}
	return out
}

// xor returns a literal equivalent to a ⊕ b.
func (c *cpBuilder) xor(a, b Lit) Lit {
	switch {
	case a == cpFalse:
		return b
	case a == cpTrue:
		return b.Not()
	case b == cpFalse:
		return a
	case b == cpTrue:
		return a.Not()
	}
	return c.ite(a, b.Not(), b)
}

// above returns a literal equivalent to Σ wᵢ·xᵢ > b.
func (s *cpSum) above(b int64) Lit {
	if b == math.MaxInt64 {
		return cpFalse
	}
	return s.atLeast(b + 1)
}

// node returns the node for "Σ_{j≥i} w[j]·y[j] ≥ t" and the interval of
// thresholds that share it (Abío, Nieuwenhuis, Oliveras and
// Rodríguez-Carbonell 2012).
func (s *cpSum) node(i int, t int64) (Lit, int64, int64) {
	if t <= 0 {
		return cpTrue, math.MinInt64, 0
	}
	if t > s.rest[i] {
		return cpFalse, s.rest[i] + 1, math.MaxInt64
	}
	// Here i < len(s.w), since rest[len] = 0 < t.
	lv := s.levels[i]
	k := sort.Search(len(lv), func(k int) bool { return lv[k].lo > t }) // first node right of t
	if k > 0 && lv[k-1].hi >= t {
		return lv[k-1].lit, lv[k-1].lo, lv[k-1].hi
	}
	w := s.w[i]
	hi, hlo, hhi := s.node(i+1, t-w)
	lo, llo, lhi := s.node(i+1, t)
	lit := s.c.ite(s.lits[i], hi, lo)
	// t' shares the node when t'-w shares the high child and t' the low one.
	from := max(cpSatAdd(hlo, w), llo)
	to := min(cpSatAdd(hhi, w), lhi)
	lv = s.levels[i]
	k = sort.Search(len(lv), func(k int) bool { return lv[k].lo > t })
	lv = append(lv, cpInterval{})
	copy(lv[k+1:], lv[k:])
	lv[k] = cpInterval{lo: from, hi: to, lit: lit}
	s.levels[i] = lv
	return lit, from, to
}

// cpSatAdd returns a+w for w ≥ 0, keeping the infinities math.MinInt64 and
// math.MaxInt64 and saturating at math.MaxInt64.
func cpSatAdd(a, w int64) int64 {
	if a == math.MinInt64 {
		return a
	}
	if a > math.MaxInt64-w {
		return math.MaxInt64
	}
	return a + w
}
