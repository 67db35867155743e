package optimize

import (
	"context"

	"trellis/compile"
)

// deviations lists the best models of a circuit by cost as deviations from
// its best derivation, in the manner of Lawler's and Eppstein's k shortest
// paths carried over to derivation trees.
//
// One bottom-up pass gives every node its best cost (inside), its best
// choice (the child of an OR node, the literal of a free variable) and
// the smallest increase that any other choice below it can cause. A
// derivation is then the best derivation with a few choices changed
// (sidetracks); a change at node n to child c costs inside(c) − inside(n)
// more. Every derivation other than the best has a parent: the same
// derivation with the sidetrack of smallest node index put back to its best
// choice. Nothing below that sidetrack deviates (a descendant has a smaller
// index), so the parent is cheaper or equal, and a derivation's children in
// this tree are its derivation plus one sidetrack at a node of index below
// its own smallest. The derivations are popped from one global priority
// queue by cost; a popped derivation walks its own derivation tree to offer
// its children, skipping every subtree whose smallest possible increase
// cannot beat the k-th best cost known so far. So each further model costs
// one walk over the part of its derivation that can still deviate, not a
// new list entry at every node above its deviation.
//
// A state stores only its parent, its sidetrack and its cost: the choices
// of its derivation are the best ones overridden along the parent chain.
type deviations struct {
	c  *compile.Circuit
	wt *weights
	p  int
	nn int

	pins pinTable
	has  []bool  // per node: it has a model under the pins
	ins  []int64 // per node, p entries: the best cost of its models
	pick []int32 // per OR node: its best child; per free variable: its best literal
	devT []int64 // per node, p entries: the smallest increase of a choice in its best derivation
	devA []int64 // per node, p entries: the smallest increase of any choice below it
	infT []bool  // per node: no choice in its best derivation has an alternative
	infA []bool  // per node: no choice below it has an alternative
	over []int32 // per node, scratch: the overriding choice of the derivation at hand (child+1 or literal), 0 when none
	tmp  []int64 // scratch vector
	zero []int64 // the zero vector
	stk  []int32 // scratch stack
	big  bool    // some cost did not fit in 64 bits: the caller falls back
	ctx  context.Context
	err  error
	step int

	// states: index 0 is the best derivation
	scost  []int64 // p entries per state
	parent []int32
	side   []int32 // the sidetrack's node (nn for the best derivation)
	alt    []int32 // the sidetrack's choice: child node or literal
	queue  []int32 // min-heap of states by (cost, index)
	bound  []int32 // max-heap of the want cheapest states known
	want   int
}

func newDeviations(c *compile.Circuit, wt *weights) *deviations {
	n := len(c.Kind)
	p := wt.p
	return &deviations{
		c: c, wt: wt, p: p, nn: n,
		has: make([]bool, n), ins: make([]int64, n*p), pick: make([]int32, n),
		devT: make([]int64, n*p), devA: make([]int64, n*p),
		infT: make([]bool, n), infA: make([]bool, n),
		over: make([]int32, n), tmp: make([]int64, p), zero: make([]int64, p),
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

// lower sets the increase bound of x at slot (devT or devA) to the smaller
// of itself and v.
func (d *deviations) lower(dev []int64, inf []bool, x int32, v []int64) {
	if inf[x] || cmpVec(v, d.vec(dev, x)) < 0 {
		copy(d.vec(dev, x), v)
		inf[x] = false
	}
}

// reset runs the bottom-up pass under pins. It reports false when a cost
// did not fit in 64 bits.
func (d *deviations) reset(ctx context.Context, pins pinTable) (bool, error) {
	d.pins, d.ctx, d.big, d.err = pins, ctx, false, nil
	c := d.c
	delta := make([]int64, d.p)
	for n := 0; n < d.nn; n++ {
		if n%checkEvery == 0 && ctx.Err() != nil {
			return false, ctx.Err()
		}
		x := int32(n)
		d.has[x], d.infT[x], d.infA[x] = false, true, true
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
				d.lower(d.devT, d.infT, x, delta)
				d.lower(d.devA, d.infA, x, delta)
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
			kids := c.NodeChildren(x)
			d.has[x] = true
			clear(iv)
			for _, k := range kids {
				if !d.has[k] {
					d.has[x] = false
					break
				}
				d.add(iv, iv, d.vec(d.ins, k))
				if !d.infT[k] {
					d.lower(d.devT, d.infT, x, d.vec(d.devT, k))
				}
				if !d.infA[k] {
					d.lower(d.devA, d.infA, x, d.vec(d.devA, k))
				}
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
				if !d.has[k] {
					continue
				}
				if k != best {
					d.sub(delta, d.vec(d.ins, k), iv)
					d.lower(d.devT, d.infT, x, delta)
					d.lower(d.devA, d.infA, x, delta)
				}
				if !d.infA[k] {
					d.lower(d.devA, d.infA, x, d.vec(d.devA, k))
				}
			}
			if !d.infT[best] {
				d.lower(d.devT, d.infT, x, d.vec(d.devT, best))
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
	d.scost, d.parent, d.side, d.alt = d.scost[:0], d.parent[:0], d.side[:0], d.alt[:0]
	d.queue, d.bound, d.want = d.queue[:0], d.bound[:0], want
	root := d.c.Root
	if want <= 0 || !d.has[root] {
		return nil, nil
	}
	d.newState(-1, int32(d.nn), -1, d.vec(d.ins, root))
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

func (d *deviations) newState(par, side, alt int32, cost []int64) int32 {
	s := int32(len(d.parent))
	d.scost = append(d.scost, cost...)
	d.parent = append(d.parent, par)
	d.side = append(d.side, side)
	d.alt = append(d.alt, alt)
	d.pushQueue(s)
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

// beaten reports whether cost base+inc cannot be among the want cheapest.
func (d *deviations) beaten(base, inc []int64) bool {
	if !d.full() {
		return false
	}
	d.add(d.tmp, base, inc)
	return cmpVec(d.tmp, d.cost(d.bound[0])) >= 0
}

// setOver marks the sidetracks of state s in d.over.
func (d *deviations) setOver(s int32) {
	for ; s > 0; s = d.parent[s] {
		x := d.side[s]
		if d.c.Kind[x] == compile.FreeNode {
			d.over[x] = d.alt[s]
		} else {
			d.over[x] = d.alt[s] + 1
		}
	}
}

func (d *deviations) clearOver(s int32) {
	for ; s > 0; s = d.parent[s] {
		d.over[d.side[s]] = 0
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

// expand offers the children of state s: its derivation with one more
// sidetrack at a node of index below its smallest sidetrack.
func (d *deviations) expand(s int32) {
	d.setOver(s)
	defer d.clearOver(s)
	c := d.c
	low := d.side[s]
	base := append([]int64(nil), d.cost(s)...)
	inc := make([]int64, d.p)
	sum := make([]int64, d.p)
	stk := append(d.stk[:0], c.Root)
	for len(stk) > 0 {
		d.step++
		if d.step%checkEvery == 0 && d.ctx.Err() != nil {
			d.err = d.ctx.Err()
			return
		}
		x := stk[len(stk)-1]
		stk = stk[:len(stk)-1]
		if x < low {
			if d.infT[x] || d.beaten(base, d.vec(d.devT, x)) {
				continue
			}
		} else if d.infA[x] || d.beaten(base, d.vec(d.devA, x)) {
			continue
		}
		switch c.Kind[x] {
		case compile.AndNode:
			stk = append(stk, c.NodeChildren(x)...)
		case compile.OrNode:
			ch := d.choice(x)
			if x < low {
				iv := d.vec(d.ins, x)
				for _, k := range c.NodeChildren(x) {
					if k == ch || !d.has[k] {
						continue
					}
					d.sub(inc, d.vec(d.ins, k), iv)
					if !d.beaten(base, inc) {
						d.add(sum, base, inc)
						d.newState(s, x, k, sum)
					}
				}
			}
			stk = append(stk, ch)
		case compile.FreeNode:
			if x < low {
				l := compile.Lit(d.pick[x]).Not()
				if d.pins.allows(l) {
					lc := d.zero
					if !l.IsNeg() {
						lc = d.wt.vec(l.Var())
					}
					d.sub(inc, lc, d.vec(d.ins, x))
					if !d.beaten(base, inc) {
						d.add(sum, base, inc)
						d.newState(s, x, int32(l), sum)
					}
				}
			}
		}
	}
	d.stk = stk
}

// decode writes the model of state s into assign (1 true, -1 false).
func (d *deviations) decode(s int32, assign []int8) {
	d.setOver(s)
	c := d.c
	stk := append(d.stk[:0], c.Root)
	for len(stk) > 0 {
		x := stk[len(stk)-1]
		stk = stk[:len(stk)-1]
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
	d.clearOver(s)
}

func (d *deviations) pushQueue(s int32) {
	h := append(d.queue, s)
	i := len(h) - 1
	for i > 0 {
		p := (i - 1) / 2
		if !d.less(h[i], h[p]) {
			break
		}
		h[i], h[p] = h[p], h[i]
		i = p
	}
	d.queue = h
}

func (d *deviations) popQueue() int32 {
	h := d.queue
	top := h[0]
	last := len(h) - 1
	h[0] = h[last]
	h = h[:last]
	i := 0
	for {
		l := 2*i + 1
		if l >= len(h) {
			break
		}
		m := l
		if r := l + 1; r < len(h) && d.less(h[r], h[l]) {
			m = r
		}
		if !d.less(h[m], h[i]) {
			break
		}
		h[i], h[m] = h[m], h[i]
		i = m
	}
	d.queue = h
	return top
}

// pushBound and downBound keep bound a max-heap by (cost, index).
func (d *deviations) pushBound(s int32) {
	h := append(d.bound, s)
	i := len(h) - 1
	for i > 0 {
		p := (i - 1) / 2
		if !d.less(h[p], h[i]) {
			break
		}
		h[i], h[p] = h[p], h[i]
		i = p
	}
	d.bound = h
}

func (d *deviations) downBound(i int) {
	h := d.bound
	for {
		l := 2*i + 1
		if l >= len(h) {
			break
		}
		m := l
		if r := l + 1; r < len(h) && d.less(h[l], h[r]) {
			m = r
		}
		if !d.less(h[i], h[m]) {
			break
		}
		h[i], h[m] = h[m], h[i]
		i = m
	}
}
