package optimize

import (
	"context"
	"fmt"
	"math"

	"trellis/compile"
)

// noKey is the key of an entry whose model has no true key variable above
// the threshold.
const noKey = math.MaxInt32

// Entry tags: how an entry's model is made of its operands' models.
const (
	tagTrue uint8 = iota // the empty model
	tagLit               // a holds the literal
	tagOr                // a is the arena index of the chosen child's entry
	tagAnd               // a and b are the arena indices of the two operands' entries
)

// kbest computes the best models of every node lazily, in the order (cost,
// key), with back-pointers (Huang and Chiang 2005, lazy k-best: a node's
// list grows only when a parent asks for the next entry). The key of a model
// is the smallest rank above thr among its true variables (noKey when there
// is none); plain top-k queries use thr = noKey so that only costs order.
//
// An AND node with m ≥ 2 children is evaluated as a balanced tree of binary
// products, so that wide conjunctions add only log m to the depth that every
// further entry has to travel; the inner products are virtual nodes with ids
// after the circuit's, numbered in post-order. The best entry of every node and virtual node is
// computed in one bottom-up pass into flat arrays (arena index = id); further
// entries are appended to the arena on demand.
type kbest struct {
	c    *compile.Circuit
	wt   *weights
	p    int
	nn   int     // circuit nodes
	vid  []int32 // per AND node: the id of its first virtual product
	opL  []int32 // per product id (AND node or virtual): left operand
	opR  []int32 // per product id: right operand
	isOp []bool  // per id: a binary product

	pins pinTable
	rank []int32 // per variable: its key rank, or noKey
	thr  int32

	// arena of entries; entry 0 of id x is at arena index x
	cost  []int64
	key   []int32
	tag   []uint8
	a, b  []int32
	has0  []bool
	state []int32 // per id: index into lazy, 0 when the list is not started
	lazy  []lazyList
	// slabs from which lazy lists take their first few slots
	slab     []int32
	heapSlab []cand
	err      error
	ctx      context.Context
	calls    int

	// the last query, for incremental resets (see update)
	valid     bool
	lastPins  pinTable
	parStart  []int32 // per circuit node: its parents are parents[parStart[n]:parStart[n+1]]
	parents   []int32
	leafStart []int32 // per variable: its leaves are leaves[leafStart[v]:leafStart[v+1]]
	leaves    []int32
	inHeap    []bool
	dirty     []int32 // min-heap of circuit nodes to recompute
	oldCost   []int64
	noUpdate  bool    // always recompute every node (tests)
	changed   []int32 // scratch: variables whose leaves change

	// endMode orders models of equal cost by whether some key variable
	// above the threshold is true, those with none first: the key of a
	// model is 0 when some is, noKey otherwise. (Ordering noKey first
	// with the ranks as keys would not be monotone under products.)
	endMode bool
}

// lazyList is the state of a node's list beyond its best entry: the entries
// found so far and the frontier of candidates. The successors of the last
// entry found are pushed only when the next entry is asked for (pending),
// as in Huang and Chiang's lazy algorithm: pushing them at once would ask
// every child for one entry more than needed, and that look-ahead would
// grow by one at every level of a deep circuit.
type lazyList struct {
	owner   int32 // the id whose list this is
	entries []int32
	heap    []cand
	pending cand
	expand  uint8 // expandNone, expandFirst (successors of the best entry) or expandLast
}

// Values of lazyList.expand.
const (
	expandNone uint8 = iota
	expandFirst
	expandLast
)

// cand is a candidate entry: for an OR, child slot i and child entry j, with
// e the child's arena entry; for a product, left entry i and right entry j
// with e a new arena entry; for a free variable, e the other literal's entry.
type cand struct {
	e, i, j int32
}

func newKbest(c *compile.Circuit, wt *weights) *kbest {
	s := &kbest{c: c, wt: wt, p: wt.p, nn: len(c.Kind)}
	s.vid = make([]int32, s.nn)
	ids := s.nn
	for n := 0; n < s.nn; n++ {
		m := int(c.Start[n+1] - c.Start[n])
		if c.Kind[n] == compile.AndNode && m > 2 {
			s.vid[n] = int32(ids)
			ids += m - 2
		}
	}
	s.opL = make([]int32, ids)
	s.opR = make([]int32, ids)
	s.isOp = make([]bool, ids)
	for n := 0; n < s.nn; n++ {
		kids := c.Children[c.Start[n]:c.Start[n+1]]
		if c.Kind[n] != compile.AndNode || len(kids) < 2 {
			continue
		}
		next := s.vid[n]
		var build func(lo, hi int, top bool) int32
		build = func(lo, hi int, top bool) int32 {
			if hi-lo == 1 {
				return kids[lo]
			}
			mid := (lo + hi) / 2
			l := build(lo, mid, false)
			r := build(mid, hi, false)
			id := int32(n)
			if !top {
				id = next
				next++
			}
			s.opL[id], s.opR[id], s.isOp[id] = l, r, true
			return id
		}
		build(0, len(kids), true)
	}
	s.rank = make([]int32, c.NumVars+1)
	for i := range s.rank {
		s.rank[i] = noKey
	}
	return s
}

func (s *kbest) ids() int { return len(s.opL) }

func (s *kbest) vec(e int32) []int64 { return s.cost[int(e)*s.p : int(e)*s.p+s.p] }

// cmp orders arena entries by (cost, key).
func (s *kbest) cmp(e, f int32) int {
	if c := cmpVec(s.vec(e), s.vec(f)); c != 0 {
		return c
	}
	ke, kf := s.key[e], s.key[f]
	if s.endMode {
		// keys are 0 or noKey, and noKey comes first
		ke, kf = kf, ke
	}
	switch {
	case ke < kf:
		return -1
	case ke > kf:
		return 1
	}
	return 0
}

// keyOf is the key of the model {v} (v true alone).
func (s *kbest) keyOf(v compile.Var) int32 {
	if r := s.rank[v]; r != noKey && r > s.thr {
		if s.endMode {
			return 0
		}
		return r
	}
	return noKey
}

// reset prepares a query with pins, ranks and threshold: it computes the
// best entry of every id bottom-up. When only pins and the threshold
// changed since the last query, it recomputes only the nodes above the
// leaves whose values changed (update).
func (s *kbest) reset(ctx context.Context, pins pinTable, rank []int32, thr int32) error {
	if s.valid && !s.noUpdate && (rank == nil || &rank[0] == &s.rank[0]) {
		return s.update(ctx, pins, thr)
	}
	s.ctx, s.pins, s.thr, s.err = ctx, pins, thr, nil
	if rank != nil {
		s.rank = rank
	}
	s.valid = false
	ids := s.ids()
	if cap(s.key) < ids {
		s.cost = make([]int64, ids*s.p, 2*ids*s.p)
		s.key = make([]int32, ids, 2*ids)
		s.tag = make([]uint8, ids, 2*ids)
		s.a = make([]int32, ids, 2*ids)
		s.b = make([]int32, ids, 2*ids)
		s.has0 = make([]bool, ids)
		s.state = make([]int32, ids)
		s.lazy = append(s.lazy[:0], lazyList{}) // index 0 means "not started"
	} else {
		s.dropLists()
	}
	for n := 0; n < s.nn; n++ {
		if n%checkEvery == 0 && ctx.Err() != nil {
			return ctx.Err()
		}
		s.node(n)
	}
	if s.err == nil {
		s.valid = true
		s.lastPins = append(s.lastPins[:0], pins...)
	}
	return s.err
}

// dropLists forgets the lists beyond the best entries.
func (s *kbest) dropLists() {
	ids := s.ids()
	for _, l := range s.lazy[min(1, len(s.lazy)):] {
		s.state[l.owner] = 0
	}
	s.lazy = append(s.lazy[:0], lazyList{}) // index 0 means "not started"
	s.cost, s.key, s.tag, s.a, s.b = s.cost[:ids*s.p], s.key[:ids], s.tag[:ids], s.a[:ids], s.b[:ids]
}

// update is reset for a query that differs from the last only in pins and
// threshold: the leaves of the variables whose pin or key changed are
// recomputed, and then, in index order, every node with a child whose best
// entry changed (in cost, key or existence).
func (s *kbest) update(ctx context.Context, pins pinTable, thr int32) error {
	if s.parStart == nil {
		s.buildParents()
	}
	s.ctx, s.err = ctx, nil
	s.dropLists()
	lo, hi := min(thr, s.thr), max(thr, s.thr)
	// the variables whose leaves change: pin changed, or key crossed by
	// the threshold
	limit := len(pins) / 8
	changed := s.changed[:0]
	for v := 1; v < len(pins) && len(changed) <= limit; v++ {
		if r := s.rank[v]; pins[v] != s.lastPins[v] || r != noKey && r > lo && r <= hi {
			changed = append(changed, int32(v))
		}
	}
	s.changed = changed
	if len(changed) > limit {
		// most of the circuit changes: a plain pass is cheaper
		s.valid = false
		return s.reset(ctx, pins, nil, thr)
	}
	s.pins, s.thr = pins, thr
	for _, v := range changed {
		s.lastPins[v] = pins[v]
		for _, x := range s.leaves[s.leafStart[v]:s.leafStart[v+1]] {
			s.pushDirty(x)
		}
	}
	if cap(s.oldCost) < s.p {
		s.oldCost = make([]int64, s.p)
	}
	old := s.oldCost[:s.p]
	for len(s.dirty) > 0 {
		s.calls++
		if s.calls%checkEvery == 0 && ctx.Err() != nil {
			s.valid = false
			return ctx.Err()
		}
		x := s.popDirty()
		had, key := s.has0[x], s.key[x]
		copy(old, s.vec(x))
		s.node(int(x))
		if had == s.has0[x] && (!had || key == s.key[x] && cmpVec(old, s.vec(x)) == 0) {
			continue
		}
		for _, q := range s.parents[s.parStart[x]:s.parStart[x+1]] {
			s.pushDirty(q)
		}
	}
	if s.err != nil {
		s.valid = false
	}
	return s.err
}

// buildParents indexes the parents of every circuit node and the leaves of
// every variable.
func (s *kbest) buildParents() {
	c := s.c
	s.parStart = make([]int32, s.nn+1)
	s.leafStart = make([]int32, c.NumVars+2)
	for n := 0; n < s.nn; n++ {
		for _, k := range c.NodeChildren(int32(n)) {
			s.parStart[k+1]++
		}
		if c.Kind[n] == compile.LitNode || c.Kind[n] == compile.FreeNode {
			s.leafStart[compile.Lit(c.Arg[n]).Var()+1]++
		}
	}
	for i := 1; i < len(s.parStart); i++ {
		s.parStart[i] += s.parStart[i-1]
	}
	for i := 1; i < len(s.leafStart); i++ {
		s.leafStart[i] += s.leafStart[i-1]
	}
	s.parents = make([]int32, s.parStart[s.nn])
	s.leaves = make([]int32, s.leafStart[c.NumVars+1])
	pnext := append([]int32(nil), s.parStart[:s.nn]...)
	lnext := append([]int32(nil), s.leafStart[:c.NumVars+1]...)
	for n := 0; n < s.nn; n++ {
		for _, k := range c.NodeChildren(int32(n)) {
			s.parents[pnext[k]] = int32(n)
			pnext[k]++
		}
		if c.Kind[n] == compile.LitNode || c.Kind[n] == compile.FreeNode {
			v := compile.Lit(c.Arg[n]).Var()
			s.leaves[lnext[v]] = int32(n)
			lnext[v]++
		}
	}
	s.inHeap = make([]bool, s.nn)
}

func (s *kbest) pushDirty(x int32) {
	if s.inHeap[x] {
		return
	}
	s.inHeap[x] = true
	s.dirty = append(s.dirty, x)
	heapUp(s.dirty, lowerIndex)
}

func (s *kbest) popDirty() int32 {
	var top int32
	top, s.dirty = heapPop(s.dirty, lowerIndex)
	s.inHeap[top] = false
	return top
}

// lowerIndex orders the dirty nodes bottom-up: children before parents.
func lowerIndex(a, b int32) bool { return a < b }

// node computes the best entry of circuit node n (and of its virtual
// products) from its children's.
func (s *kbest) node(n int) {
	c := s.c
	x := int32(n)
	s.has0[x] = false
	kids := c.Children[c.Start[n]:c.Start[n+1]]
	switch c.Kind[n] {
	case compile.TrueNode:
		s.setTrue(x)
	case compile.LitNode:
		l := compile.Lit(c.Arg[n])
		if s.pins.allows(l) {
			s.setLit(x, l)
		}
	case compile.FreeNode:
		v := compile.Var(c.Arg[n])
		pos, neg := s.pins.allows(v.Pos()), s.pins.allows(v.Neg())
		switch {
		case pos && neg:
			// the better literal first; on a tie, false first
			w := s.wt.vec(v)
			cz := cmpZero(w)
			if cz < 0 || cz == 0 && (s.keyOf(v) != noKey) != s.endMode {
				s.setLit(x, v.Pos())
			} else {
				s.setLit(x, v.Neg())
			}
		case pos:
			s.setLit(x, v.Pos())
		case neg:
			s.setLit(x, v.Neg())
		}
	case compile.OrNode:
		s.bestChild(x, kids)
	case compile.AndNode:
		switch len(kids) {
		case 0:
			s.setTrue(x)
		case 1:
			s.bestChild(x, kids)
		default:
			// the virtual products in post-order, then x itself
			for t := 0; t < len(kids)-1; t++ {
				id := x
				if t < len(kids)-2 {
					id = s.vid[n] + int32(t)
				}
				l, r := s.opL[id], s.opR[id]
				if !s.has0[l] || !s.has0[r] {
					s.has0[id] = false
					continue
				}
				if !addVec(s.vec(id), s.vec(l), s.vec(r)) && s.err == nil {
					s.err = fmt.Errorf("optimize: a cost at circuit node %d: %w", n, ErrOverflow)
				}
				s.key[id] = min(s.key[l], s.key[r])
				s.tag[id], s.a[id], s.b[id] = tagAnd, l, r
				s.has0[id] = true
			}
		}
	}
}

func (s *kbest) setTrue(x int32) {
	clear(s.vec(x))
	s.key[x], s.tag[x], s.has0[x] = noKey, tagTrue, true
}

func (s *kbest) setLit(x int32, l compile.Lit) {
	if l.IsNeg() {
		clear(s.vec(x))
		s.key[x] = noKey
	} else {
		copy(s.vec(x), s.wt.vec(l.Var()))
		s.key[x] = s.keyOf(l.Var())
	}
	s.tag[x], s.a[x], s.has0[x] = tagLit, int32(l), true
}

// bestChild sets the best entry of an OR-like node: the best of its
// children's best entries, the first child on a tie.
func (s *kbest) bestChild(x int32, kids []int32) {
	best := int32(-1)
	slot := int32(-1)
	for i, k := range kids {
		if s.has0[k] && (best < 0 || s.cmp(k, best) < 0) {
			best, slot = k, int32(i)
		}
	}
	if best < 0 {
		return
	}
	copy(s.vec(x), s.vec(best))
	s.key[x], s.tag[x], s.a[x], s.b[x], s.has0[x] = s.key[best], tagOr, best, slot, true
}

// newEntry appends an arena entry and returns its index.
func (s *kbest) newEntry() int32 {
	e := int32(len(s.key))
	var zero [4]int64
	for n := s.p; n > 0; n -= len(zero) {
		s.cost = append(s.cost, zero[:min(n, len(zero))]...)
	}
	s.key = append(s.key, noKey)
	s.tag = append(s.tag, 0)
	s.a = append(s.a, 0)
	s.b = append(s.b, 0)
	return e
}

// get returns the arena index of the i-th best entry of id x (from 0), or
// -1 when x has at most i models.
func (s *kbest) get(x int32, i int) int32 {
	if !s.has0[x] || s.err != nil {
		return -1
	}
	if i == 0 {
		return x
	}
	st := s.state[x]
	if st == 0 {
		st = int32(len(s.lazy))
		s.lazy = append(s.lazy, lazyList{owner: x, entries: s.carveEntries(x), heap: s.carveHeap(), expand: expandFirst})
		s.state[x] = st
	}
	for len(s.lazy[st].entries) <= i {
		s.calls++
		if s.calls%checkEvery == 0 && s.ctx.Err() != nil {
			s.err = s.ctx.Err()
			return -1
		}
		switch s.lazy[st].expand {
		case expandFirst:
			s.lazy[st].expand = expandNone
			s.first(x, st)
		case expandLast:
			s.lazy[st].expand = expandNone
			s.successors(x, st, s.lazy[st].pending)
		}
		if len(s.lazy[st].heap) == 0 || s.err != nil {
			return -1
		}
		top := s.pop(st)
		e := top.e
		if !s.isOp[x] && s.c.Kind[x] != compile.FreeNode {
			// an OR-like node: the new entry points to the child's entry
			f := s.newEntry()
			copy(s.vec(f), s.vec(e))
			s.key[f], s.tag[f], s.a[f], s.b[f] = s.key[e], tagOr, e, top.i
			e = f
		}
		s.lazy[st].entries = append(s.lazy[st].entries, e)
		s.lazy[st].pending, s.lazy[st].expand = top, expandLast
	}
	return s.lazy[st].entries[i]
}

// carveEntries returns a list holding x with room for a few more entries,
// cut from a shared slab so that most lists cost no allocation of their own.
func (s *kbest) carveEntries(x int32) []int32 {
	const room = 4
	if len(s.slab) < room {
		s.slab = make([]int32, 4096*room)
	}
	e := s.slab[:1:room]
	s.slab = s.slab[room:]
	e[0] = x
	return e
}

// carveHeap returns an empty frontier with room for a few candidates.
func (s *kbest) carveHeap() []cand {
	const room = 4
	if len(s.heapSlab) < room {
		s.heapSlab = make([]cand, 4096*room)
	}
	h := s.heapSlab[:0:room]
	s.heapSlab = s.heapSlab[room:]
	return h
}

// first fills the frontier of x with the candidates that may follow its
// best entry.
func (s *kbest) first(x int32, st int32) {
	switch {
	case s.isOp[x]:
		s.successors(x, st, cand{e: x, i: 0, j: 0})
	case s.c.Kind[x] == compile.FreeNode:
		l := compile.Lit(s.a[x])
		if s.pins.allows(l.Not()) {
			f := s.newEntry()
			if l.IsNeg() {
				copy(s.vec(f), s.wt.vec(l.Var()))
				s.key[f] = s.keyOf(l.Var())
			} else {
				clear(s.vec(f))
			}
			s.tag[f], s.a[f] = tagLit, int32(l.Not())
			s.push(st, cand{e: f, i: 1})
		}
	case s.c.Kind[x] == compile.OrNode || s.c.Kind[x] == compile.AndNode:
		kids := s.c.NodeChildren(x)
		taken := s.b[x]
		for i, k := range kids {
			if int32(i) == taken {
				if e := s.get(k, 1); e >= 0 {
					s.push(st, cand{e: e, i: int32(i), j: 1})
				}
			} else if s.has0[k] {
				s.push(st, cand{e: k, i: int32(i), j: 0})
			}
		}
	}
}

// successors pushes the candidates that follow the popped candidate t of x.
func (s *kbest) successors(x int32, st int32, t cand) {
	switch {
	case s.isOp[x]:
		l, r := s.opL[x], s.opR[x]
		if er := s.get(r, int(t.j)+1); er >= 0 {
			el := s.get(l, int(t.i))
			s.pushProduct(x, st, el, er, t.i, t.j+1)
		}
		if t.j == 0 {
			if el := s.get(l, int(t.i)+1); el >= 0 {
				s.pushProduct(x, st, el, r, t.i+1, 0)
			}
		}
	case s.c.Kind[x] == compile.FreeNode:
	default:
		k := s.c.NodeChildren(x)[t.i]
		if e := s.get(k, int(t.j)+1); e >= 0 {
			s.push(st, cand{e: e, i: t.i, j: t.j + 1})
		}
	}
}

func (s *kbest) pushProduct(x, st, el, er, i, j int32) {
	f := s.newEntry()
	if !addVec(s.vec(f), s.vec(el), s.vec(er)) && s.err == nil {
		s.err = fmt.Errorf("optimize: a cost at circuit node %d: %w", min(int(x), s.nn-1), ErrOverflow)
	}
	s.key[f] = min(s.key[el], s.key[er])
	s.tag[f], s.a[f], s.b[f] = tagAnd, el, er
	s.push(st, cand{e: f, i: i, j: j})
}

// less orders candidates by their entries, then by position, so that equal
// entries come out in a fixed order.
func (s *kbest) less(u, v cand) bool {
	if c := s.cmp(u.e, v.e); c != 0 {
		return c < 0
	}
	if u.i != v.i {
		return u.i < v.i
	}
	return u.j < v.j
}

func (s *kbest) push(st int32, t cand) {
	s.lazy[st].heap = append(s.lazy[st].heap, t)
	heapUp(s.lazy[st].heap, s.less)
}

func (s *kbest) pop(st int32) cand {
	var top cand
	top, s.lazy[st].heap = heapPop(s.lazy[st].heap, s.less)
	return top
}

// decode writes the model of arena entry e into assign (1 true, -1 false).
func (s *kbest) decode(e int32, assign []int8, stack []int32) []int32 {
	stack = append(stack[:0], e)
	for len(stack) > 0 {
		e := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		switch s.tag[e] {
		case tagLit:
			l := compile.Lit(s.a[e])
			if l.IsNeg() {
				assign[l.Var()] = -1
			} else {
				assign[l.Var()] = 1
			}
		case tagOr:
			stack = append(stack, s.a[e])
		case tagAnd:
			stack = append(stack, s.a[e], s.b[e])
		}
	}
	return stack
}
