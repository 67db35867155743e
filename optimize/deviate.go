package optimize

import (
	"context"
	"slices"

	"trellis/compile"
)

// deviations lists the best models of a circuit by cost as deviations from
// its best derivation, in the manner of Lawler's and Eppstein's k shortest
// paths carried over to derivation trees.
//
// One bottom-up pass gives every node its best cost (inside), its best
// choice (the child of an OR node, the literal of a free variable) and the
// smallest increase that another choice in its best derivation can cause.
// A derivation is then the best derivation with a few choices changed
// (sidetracks); changing node x to child c costs inside(c) − inside(x)
// more, whatever the rest of the derivation. Every derivation other than
// the best has a parent: the same derivation with the sidetrack of smallest
// node index put back to its best choice. Nothing below that sidetrack
// deviates (a descendant has a smaller index), so the parent costs no more,
// and the children of a derivation are its derivation plus one sidetrack at
// a node of index below its own smallest: its candidates. Derivations are
// popped from one global priority queue by cost and offer their children
// when popped; a candidate that cannot beat the most expensive of the k
// cheapest derivations known (the bound) is dropped with all its
// descendants.
//
// The candidates of a derivation D, child of P by the sidetrack x → c, are
// those of P at nodes below x and not under x's best child, and those of the
// best derivation of c. So a popped derivation filters its parent's list of
// candidates and walks only the best derivation of its new child. Walks
// record the candidates they meet in preorder, each with the number of
// records under it (its span), so that "under x" is a range of records; they
// skip every subtree whose smallest increase cannot beat the bound, and they
// copy the records of a node walked before instead of walking it again (the
// best derivation of a node is the same wherever it is used, and the bound
// only tightens, as popped costs only grow). So each further model costs
// about the candidates it can still beat, not a new list entry at every node
// above its sidetrack.
//
// A state stores its parent, its sidetrack (a record) and its cost: the
// choices of its derivation are the best ones overridden along the parent
// chain.
type deviations struct {
	c  *compile.Circuit
	wt *weights
	p  int
	nn int

	pins pinTable
	has  []bool  // per node: it has a model under the pins
	ins  []int64 // per node, p entries: the best cost of its models
	pick []int32 // per OR node: its best child; per free variable: its best literal
	dev  []int64 // per node, p entries: the smallest increase of a choice in its best derivation
	inf  []bool  // per node: no choice in its best derivation has an alternative
	over []int32 // per node, scratch: the overriding choice of the derivation at hand (child+1 or literal), 0 when none
	zero []int64 // the zero vector
	inc  []int64 // scratch vector
	stk  []int32 // scratch stack
	big  bool    // some cost did not fit in 64 bits: the caller falls back
	ctx  context.Context
	err  error
	step int

	base    []int64 // the cost of the state being expanded
	slack   []int64 // see beaten
	slackOK bool

	// wide AND nodes met by walks get their children sorted by dev, once
	// per query: sortAt[x] is 1 + the offset of x's sorted children in
	// sorted, or 0
	sortAt    []int32
	sorted    []int32
	sortedIDs []int32
	sortKeys  []sortKey
	wide      int // wideAnd; tests lower it

	// the best model, decoded once per query
	bestModel []int8
	bestOK    bool
	inBest    []uint32 // per node: bestGen when it is in the best derivation
	bestGen   uint32
	low       int32 // see decodeFrom

	// records: the candidates met by walks, in preorder per walk
	rx    []int32 // node
	ralt  []int32 // alternative: child node or literal
	rspan []int32 // number of records that follow under the node
	rinc  []int64 // p entries: the increase
	// per node: the records of its last walk, valid when memoGen is gen
	memoGen    []uint32
	memoS      []int32
	memoE      []int32
	gen        uint32
	walkStart  []int32 // per node, scratch: its first record in the walk at hand
	candidates []int32 // record lists of expanded states

	// states: index 0 is the best derivation
	scost  []int64 // p entries per state
	parent []int32
	srec   []int32 // the sidetrack's record (-1 for the best derivation)
	cOff   []int32 // per state: its candidates (records) once expanded
	cLen   []int32
	queue  []int32 // min-heap of states by (cost, index)
	bound  []int32 // max-heap of the want cheapest states known
	want   int
}

func newDeviations(c *compile.Circuit, wt *weights) *deviations {
	n := len(c.Kind)
	p := wt.p
	return &deviations{
		c: c, wt: wt, p: p, nn: n, wide: wideAnd,
		has: make([]bool, n), ins: make([]int64, n*p), pick: make([]int32, n),
		dev: make([]int64, n*p), inf: make([]bool, n),
		over: make([]int32, n), sortAt: make([]int32, n), inBest: make([]uint32, n),
		memoGen: make([]uint32, n), memoS: make([]int32, n), memoE: make([]int32, n), walkStart: make([]int32, n),
		base: make([]int64, p), slack: make([]int64, p), zero: make([]int64, p), inc: make([]int64, p),
	}
}

func (d *deviations) vec(a []int64, x int32) []int64 { return a[int(x)*d.p : int(x)*d.p+d.p] }

// sub sets dst = a − b, recording an overflow.
func (d *deviations) sub(dst, a, b []int64) {
	for i := range dst {
		s := a[i] - b[i]
		if (a[i] >= 0) != (b[i] >= 0) && (s >= 0) != (a[i] >= 0) {
			d.big = true
		}
		dst[i] = s
	}
}

func (d *deviations) add(dst, a, b []int64) {
	if !addVec(dst, a, b) {
		d.big = true
	}
}

// lower sets the increase bound of x to the smaller of itself and v.
func (d *deviations) lower(x int32, v []int64) {
	if d.inf[x] || cmpVec(v, d.vec(d.dev, x)) < 0 {
		copy(d.vec(d.dev, x), v)
		d.inf[x] = false
	}
}

// reset runs the bottom-up pass under pins. It reports false when a cost
// did not fit in 64 bits.
func (d *deviations) reset(ctx context.Context, pins pinTable) (bool, error) {
	d.pins, d.ctx, d.big, d.err = pins, ctx, false, nil
	for _, x := range d.sortedIDs {
		d.sortAt[x] = 0
	}
	d.sortedIDs, d.sorted, d.bestOK = d.sortedIDs[:0], d.sorted[:0], false
	c := d.c
	p := d.p
	delta := d.inc
	for n := 0; n < d.nn; n++ {
		if n%checkEvery == 0 && ctx.Err() != nil {
			return false, ctx.Err()
		}
		x := int32(n)
		d.has[x], d.inf[x] = false, true
		iv := d.vec(d.ins, x)
		switch c.Kind[n] {
		case compile.TrueNode:
			clear(iv)
			d.has[x] = true
		case compile.LitNode:
			l := compile.Lit(c.Arg[n])
			if pins.allows(l) {
				d.has[x] = true
				if l.IsNeg() {
					clear(iv)
				} else {
					copy(iv, d.wt.vec(l.Var()))
				}
			}
		case compile.FreeNode:
			v := compile.Var(c.Arg[n])
			pos, neg := pins.allows(v.Pos()), pins.allows(v.Neg())
			w := d.wt.vec(v)
			switch {
			case pos && neg:
				d.has[x] = true
				if cmpZero(w) < 0 {
					d.pick[x] = int32(v.Pos())
					copy(iv, w)
					d.sub(delta, d.zero, w)
				} else {
					d.pick[x] = int32(v.Neg())
					clear(iv)
					copy(delta, w)
				}
				d.lower(x, delta)
			case pos:
				d.has[x] = true
				d.pick[x] = int32(v.Pos())
				copy(iv, w)
			case neg:
				d.has[x] = true
				d.pick[x] = int32(v.Neg())
				clear(iv)
			}
		case compile.AndNode:
			kids := c.Children[c.Start[n]:c.Start[n+1]]
			clear(iv)
			has, inf := true, true
			var dk []int64 // the smallest dev among the children
			for _, k := range kids {
				if !d.has[k] {
					has = false
					break
				}
				o := int(k) * p
				if !addVec(iv, iv, d.ins[o:o+p]) {
					d.big = true
				}
				if !d.inf[k] && (inf || cmpVec(d.dev[o:o+p], dk) < 0) {
					dk, inf = d.dev[o:o+p], false
				}
			}
			d.has[x] = has
			if !inf {
				copy(d.vec(d.dev, x), dk)
				d.inf[x] = false
			}
		case compile.OrNode:
			kids := c.NodeChildren(x)
			best := int32(-1)
			for _, k := range kids {
				if d.has[k] && (best < 0 || cmpVec(d.vec(d.ins, k), d.vec(d.ins, best)) < 0) {
					best = k
				}
			}
			if best < 0 {
				break
			}
			d.has[x], d.pick[x] = true, best
			copy(iv, d.vec(d.ins, best))
			for _, k := range kids {
				if d.has[k] && k != best {
					d.sub(delta, d.vec(d.ins, k), iv)
					d.lower(x, delta)
				}
			}
			if !d.inf[best] {
				d.lower(x, d.vec(d.dev, best))
			}
		}
	}
	return !d.big, nil
}

func (d *deviations) cost(s int32) []int64 { return d.scost[int(s)*d.p : int(s)*d.p+d.p] }

// less orders states by cost, then by index.
func (d *deviations) less(s, t int32) bool {
	if c := cmpVec(d.cost(s), d.cost(t)); c != 0 {
		return c < 0
	}
	return s < t
}

// best returns the states of the want cheapest models, cheapest first
// (fewer when there are fewer models). Models of equal cost come in an
// order of no meaning. It stops early when a cost does not fit in 64 bits
// (d.big).
func (d *deviations) best(want int) ([]int32, error) {
	d.scost, d.parent, d.srec, d.cOff, d.cLen = d.scost[:0], d.parent[:0], d.srec[:0], d.cOff[:0], d.cLen[:0]
	d.rx, d.ralt, d.rspan, d.rinc, d.candidates = d.rx[:0], d.ralt[:0], d.rspan[:0], d.rinc[:0], d.candidates[:0]
	d.queue, d.bound, d.want = d.queue[:0], d.bound[:0], want
	// the records of earlier calls were made under another bound
	d.gen++
	if d.gen == 0 {
		clear(d.memoGen)
		d.gen = 1
	}
	root := d.c.Root
	if want <= 0 || !d.has[root] {
		return nil, nil
	}
	d.newState(-1, -1, d.vec(d.ins, root))
	var out []int32
	for len(out) < want && len(d.queue) > 0 {
		s := d.popQueue()
		out = append(out, s)
		if len(out) == want {
			break
		}
		d.expand(s)
		if d.err != nil {
			return nil, d.err
		}
		if d.big {
			return nil, nil
		}
	}
	return out, nil
}

// newState queues the derivation of parent par with the sidetrack of
// record rec, at the given cost, and updates the bound.
func (d *deviations) newState(par, rec int32, cost []int64) int32 {
	s := int32(len(d.parent))
	d.scost = append(d.scost, cost...)
	d.parent = append(d.parent, par)
	d.srec = append(d.srec, rec)
	d.cOff = append(d.cOff, 0)
	d.cLen = append(d.cLen, 0)
	d.pushQueue(s)
	d.slackOK = false
	if len(d.bound) < d.want {
		d.pushBound(s)
	} else {
		d.bound[0] = s
		d.downBound(0)
	}
	return s
}

// full reports whether want states are known; then bound[0] is the most
// expensive of the want cheapest.
func (d *deviations) full() bool { return len(d.bound) >= d.want }

// beaten reports whether cost base+inc, base being the cost of the state
// being expanded, cannot be among the want cheapest. It compares inc with
// the slack, the most expensive of the want cheapest known minus base
// (lexicographic order is kept by translation), recomputed only when the
// bound moves.
func (d *deviations) beaten(inc []int64) bool {
	if !d.full() {
		return false
	}
	if !d.slackOK {
		d.sub(d.slack, d.cost(d.bound[0]), d.base)
		d.slackOK = true
	}
	return cmpVec(inc, d.slack) >= 0
}

// offer makes a child of state s from record r, unless the bound beats it;
// it reports whether it did.
func (d *deviations) offer(s, r int32) bool {
	inc := d.vec(d.rinc, r)
	if d.beaten(inc) {
		return false
	}
	sum := d.inc
	d.add(sum, d.base, inc)
	d.candidates = append(d.candidates, r)
	d.newState(s, r, sum)
	return true
}

// record appends a record for alternative alt of node x with increase inc.
func (d *deviations) record(x, alt int32, inc []int64) int32 {
	r := int32(len(d.rx))
	d.rx = append(d.rx, x)
	d.ralt = append(d.ralt, alt)
	d.rspan = append(d.rspan, 0)
	d.rinc = append(d.rinc, inc...)
	return r
}

// expand offers the children of state s and stores its candidates.
func (d *deviations) expand(s int32) {
	copy(d.base, d.cost(s))
	d.slackOK = false
	off := int32(len(d.candidates))
	if s == 0 {
		d.walk(s, d.c.Root)
	} else {
		par, r := d.parent[s], d.srec[s]
		x := d.rx[r]
		// candidates is appended to below; the parent's list stays put
		list := d.candidates[d.cOff[par] : d.cOff[par]+d.cLen[par]]
		for _, q := range list {
			if d.rx[q] >= x || q > r && q <= r+d.rspan[r] {
				continue
			}
			d.offer(s, q)
		}
		if d.c.Kind[x] != compile.FreeNode {
			d.walk(s, d.ralt[r])
		}
	}
	d.cOff[s], d.cLen[s] = off, int32(len(d.candidates))-off
}

// walk records the candidates in the best derivation of node y for state s
// and offers them.
func (d *deviations) walk(s, y int32) {
	c := d.c
	stk := append(d.stk[:0], y)
	for len(stk) > 0 {
		d.step++
		if d.step%checkEvery == 0 && d.ctx.Err() != nil {
			d.err = d.ctx.Err()
			return
		}
		x := stk[len(stk)-1]
		stk = stk[:len(stk)-1]
		if x < 0 {
			// leaving ^x: its own records span the rest of the walk of x
			x = ^x
			start, end := d.walkStart[x], int32(len(d.rx))
			for r := start; r < end && d.rx[r] == x; r++ {
				d.rspan[r] = end - r - 1
			}
			d.memoGen[x], d.memoS[x], d.memoE[x] = d.gen, start, end
			continue
		}
		if d.memoGen[x] == d.gen {
			// walked before: copy its records
			at := int32(len(d.rx))
			for r := d.memoS[x]; r < d.memoE[x]; r++ {
				q := d.record(d.rx[r], d.ralt[r], d.vec(d.rinc, r))
				d.rspan[q] = d.rspan[r]
				d.offer(s, q)
			}
			_ = at
			continue
		}
		if d.inf[x] || d.beaten(d.vec(d.dev, x)) {
			at := int32(len(d.rx))
			d.memoGen[x], d.memoS[x], d.memoE[x] = d.gen, at, at
			continue
		}
		d.walkStart[x] = int32(len(d.rx))
		switch c.Kind[x] {
		case compile.AndNode:
			stk = append(stk, ^x)
			kids := c.NodeChildren(x)
			if len(kids) <= d.wide {
				stk = append(stk, kids...)
				break
			}
			// the children that may deviate enough, pushed so that the
			// smallest bound comes out first and tightens the bound early
			sorted := d.sortedKids(x)
			n := 0
			for n < len(sorted) && !d.inf[sorted[n]] && !d.beaten(d.vec(d.dev, sorted[n])) {
				n++
			}
			for i := n - 1; i >= 0; i-- {
				stk = append(stk, sorted[i])
			}
		case compile.OrNode:
			iv := d.vec(d.ins, x)
			pick := d.pick[x]
			for _, k := range c.NodeChildren(x) {
				if k == pick || !d.has[k] {
					continue
				}
				d.sub(d.inc, d.vec(d.ins, k), iv)
				if !d.beaten(d.inc) {
					d.offer(s, d.record(x, k, d.inc))
				}
			}
			stk = append(stk, ^x, pick)
		case compile.FreeNode:
			stk = append(stk, ^x)
			l := compile.Lit(d.pick[x]).Not()
			if d.pins.allows(l) {
				lc := d.zero
				if !l.IsNeg() {
					lc = d.wt.vec(l.Var())
				}
				d.sub(d.inc, lc, d.vec(d.ins, x))
				if !d.beaten(d.inc) {
					d.offer(s, d.record(x, int32(l), d.inc))
				}
			}
		}
	}
	d.stk = stk
}

// wideAnd is the number of children above which walks visit the children
// of an AND node in the order of their bounds (common practice, no source:
// sorting pays only when most children can be skipped).
const wideAnd = 8

// sortedKids returns the children of AND node x sorted by dev (no
// alternative last), sorting them on first use in the query.
func (d *deviations) sortedKids(x int32) []int32 {
	kids := d.c.NodeChildren(x)
	if at := d.sortAt[x]; at > 0 {
		return d.sorted[at-1 : int(at-1)+len(kids)]
	}
	// sort copies of the first two entries, so that most comparisons read
	// consecutive memory
	keys := d.sortKeys[:0]
	for _, k := range kids {
		sk := sortKey{kid: k, inf: d.inf[k]}
		if !sk.inf && d.p > 0 {
			sk.first = d.dev[int(k)*d.p]
			if d.p > 1 {
				sk.second = d.dev[int(k)*d.p+1]
			}
		}
		keys = append(keys, sk)
	}
	slices.SortFunc(keys, func(a, b sortKey) int {
		switch {
		case a.inf != b.inf:
			return cmpBool(a.inf, b.inf)
		case a.first != b.first:
			if a.first < b.first {
				return -1
			}
			return 1
		case a.second != b.second:
			if a.second < b.second {
				return -1
			}
			return 1
		}
		if !a.inf && d.p > 2 {
			if c := cmpVec(d.vec(d.dev, a.kid), d.vec(d.dev, b.kid)); c != 0 {
				return c
			}
		}
		return int(a.kid - b.kid)
	})
	at := len(d.sorted)
	for _, sk := range keys {
		d.sorted = append(d.sorted, sk.kid)
	}
	d.sortKeys = keys
	out := d.sorted[at:]
	d.sortAt[x] = int32(at + 1)
	d.sortedIDs = append(d.sortedIDs, x)
	return out
}

// sortKey is a child of a wide AND node while sorting by dev.
type sortKey struct {
	first  int64 // the first entry of its dev
	second int64 // the second entry, if any
	kid    int32
	inf    bool
}

func cmpBool(a, b bool) int {
	switch {
	case a == b:
		return 0
	case a:
		return 1
	}
	return -1
}

// setOver marks the sidetracks of state s in d.over.
func (d *deviations) setOver(s int32) {
	for ; s > 0; s = d.parent[s] {
		r := d.srec[s]
		x := d.rx[r]
		if d.c.Kind[x] == compile.FreeNode {
			d.over[x] = d.ralt[r]
		} else {
			d.over[x] = d.ralt[r] + 1
		}
	}
}

func (d *deviations) clearOver(s int32) {
	for ; s > 0; s = d.parent[s] {
		d.over[d.rx[d.srec[s]]] = 0
	}
}

// choice returns the choice of node x in the derivation marked in d.over.
func (d *deviations) choice(x int32) int32 {
	o := d.over[x]
	switch {
	case o == 0:
		return d.pick[x]
	case d.c.Kind[x] == compile.FreeNode:
		return o
	}
	return o - 1
}

// decode writes the model of state s into assign (1 true, -1 false): the
// best model with the subtrees under its sidetracks decoded again, from the
// top one down (a sidetrack inside another's subtree is decoded twice, to
// the same values). An OR node's children mention the same variables, so
// the new subtree overwrites every variable of the old.
func (d *deviations) decode(s int32, assign []int8) {
	if !d.bestOK {
		d.bestModel = slices.Grow(d.bestModel[:0], d.c.NumVars+1)[:d.c.NumVars+1]
		clear(d.bestModel)
		d.bestGen++
		if d.bestGen == 0 {
			clear(d.inBest)
			d.bestGen = 1
		}
		d.low = -1
		d.decodeFrom(d.c.Root, d.bestModel)
		d.bestOK = true
	}
	copy(assign, d.bestModel)
	if s == 0 {
		return
	}
	d.setOver(s)
	var chain []int32
	for t := s; t > 0; t = d.parent[t] {
		chain = append(chain, d.srec[t])
	}
	// below the smallest sidetrack every node makes its best choice, and
	// the nodes of the best model already have their values in assign
	d.low = d.rx[chain[0]]
	for i := len(chain) - 1; i >= 0; i-- {
		r := chain[i]
		if d.c.Kind[d.rx[r]] == compile.FreeNode {
			if l := compile.Lit(d.ralt[r]); l.IsNeg() {
				assign[l.Var()] = -1
			} else {
				assign[l.Var()] = 1
			}
			continue
		}
		d.decodeFrom(d.ralt[r], assign)
	}
	d.clearOver(s)
}

// decodeFrom writes the model of the derivation marked in d.over below x.
// With d.low < 0 it decodes the best model and marks its nodes; otherwise
// it skips the marked nodes below d.low.
func (d *deviations) decodeFrom(x int32, assign []int8) {
	c := d.c
	stk := append(d.stk[:0], x)
	for len(stk) > 0 {
		x := stk[len(stk)-1]
		stk = stk[:len(stk)-1]
		if d.low < 0 {
			d.inBest[x] = d.bestGen
		} else if x < d.low && d.inBest[x] == d.bestGen {
			continue
		}
		switch c.Kind[x] {
		case compile.AndNode:
			stk = append(stk, c.NodeChildren(x)...)
		case compile.OrNode:
			stk = append(stk, d.choice(x))
		case compile.LitNode, compile.FreeNode:
			l := compile.Lit(c.Arg[x])
			if c.Kind[x] == compile.FreeNode {
				l = compile.Lit(d.choice(x))
			}
			if l.IsNeg() {
				assign[l.Var()] = -1
			} else {
				assign[l.Var()] = 1
			}
		}
	}
	d.stk = stk
}

func (d *deviations) pushQueue(s int32) {
	d.queue = append(d.queue, s)
	heapUp(d.queue, d.less)
}

func (d *deviations) popQueue() int32 {
	var top int32
	top, d.queue = heapPop(d.queue, d.less)
	return top
}

// pushBound and downBound keep bound a max-heap by (cost, index).
func (d *deviations) pushBound(s int32) {
	d.bound = append(d.bound, s)
	heapUp(d.bound, d.after)
}

func (d *deviations) downBound(i int) {
	heapDown(d.bound, i, d.after)
}

// after is the order of the max-heap bound: the reverse of less.
func (d *deviations) after(a, b int32) bool { return d.less(b, a) }
