package optimize

import (
	"context"
	"fmt"
	"math/big"

	"trellis/compile"
)

// arith is the counting part of the (cost, count) semiring for the generic
// downward pass, which runs with exact integers when 64-bit counts (the
// specialised downPassU64) overflow.
type arith[C any] interface {
	zero() C
	one() C
	add(a, b C) C
	mul(a, b C) C
	isZero(a C) bool
	toBig(a C) *big.Int
}

// bigs counts with immutable *big.Int values; nil is zero.
type bigs struct{}

func (bigs) zero() *big.Int             { return nil }
func (bigs) one() *big.Int              { return big.NewInt(1) }
func (bigs) isZero(a *big.Int) bool     { return a == nil || a.Sign() == 0 }
func (bigs) toBig(a *big.Int) *big.Int  { return new(big.Int).Set(a) }
func (bigs) add(a, b *big.Int) *big.Int { return new(big.Int).Add(a, b) }
func (bigs) mul(a, b *big.Int) *big.Int { return new(big.Int).Mul(a, b) }

// marginals holds, for every variable, the best cost and tie count of the
// models with the variable true (with) and false (without). Counts are in
// wCnt and woCnt (0: no model), or, when they needed exact integers, in
// wBig and woBig (nil: no model).
type marginals struct {
	p           int
	withCost    []int64 // (NumVars+1)*p
	woCost      []int64
	wCnt, woCnt []uint64
	wBig, woBig []*big.Int
}

// count returns the tie count of variable v with the value with, or nil
// when no model gives v that value.
func (m *marginals) count(v compile.Var, with bool) *big.Int {
	if m.wBig != nil {
		x := m.woBig[v]
		if with {
			x = m.wBig[v]
		}
		if x == nil || x.Sign() == 0 {
			return nil
		}
		return new(big.Int).Set(x)
	}
	x := m.woCnt[v]
	if with {
		x = m.wCnt[v]
	}
	if x == 0 {
		return nil
	}
	return new(big.Int).SetUint64(x)
}

// downPass computes the circuit derivatives (Darwiche 2003) of the (cost,
// count) semiring: the outside value of every node, the best completion of
// the rest of the circuit, accumulated over all parents in one top-down
// pass, and from it, at the leaves, the marginals of every variable. in
// holds the inside counts of the upward pass (zero: no model).
func downPass[C any, A arith[C]](ctx context.Context, c *compile.Circuit, wt *weights, pins pinTable, cc *costCount, in []C, ar A) (*marginals, error) {
	p := wt.p
	nn := len(c.Kind)
	oc := make([]int64, nn*p)
	ocnt := make([]C, nn)
	for i := range ocnt {
		ocnt[i] = ar.zero()
	}
	nv := c.NumVars + 1
	wCost, woCost := make([]int64, nv*p), make([]int64, nv*p)
	wCnt, woCnt := make([]C, nv), make([]C, nv)
	for i := range wCnt {
		wCnt[i], woCnt[i] = ar.zero(), ar.zero()
	}
	var overflow int32 = -1
	tmp := make([]int64, p)
	// accumulate ⊕-adds (cost, cnt) into the value at dc, dn.
	accumulate := func(dc []int64, dn *C, cost []int64, cnt C) {
		if ar.isZero(*dn) {
			copy(dc, cost)
			*dn = cnt
			return
		}
		switch cmpVec(cost, dc) {
		case -1:
			copy(dc, cost)
			*dn = cnt
		case 0:
			*dn = ar.add(*dn, cnt)
		}
	}
	var prefix []C
	ocnt[c.Root] = ar.one()
	for n := c.Root; n >= 0; n-- {
		if (int(c.Root)-int(n))%checkEvery == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		if ar.isZero(ocnt[n]) || cc.cnt[n] == 0 {
			continue
		}
		on := oc[int(n)*p : int(n)*p+p]
		cn := ocnt[n]
		switch c.Kind[n] {
		case compile.LitNode:
			l := compile.Lit(c.Arg[n])
			v := int(l.Var())
			if !addVec(tmp, on, cc.cost[int(n)*p:int(n)*p+p]) {
				overflow = n
			}
			if l.IsNeg() {
				accumulate(woCost[v*p:v*p+p], &woCnt[v], tmp, ar.mul(cn, in[n]))
			} else {
				accumulate(wCost[v*p:v*p+p], &wCnt[v], tmp, ar.mul(cn, in[n]))
			}
		case compile.FreeNode:
			v := compile.Var(c.Arg[n])
			if pins.allows(v.Pos()) {
				if !addVec(tmp, on, wt.vec(v)) {
					overflow = n
				}
				accumulate(wCost[int(v)*p:int(v)*p+p], &wCnt[v], tmp, cn)
			}
			if pins.allows(v.Neg()) {
				accumulate(woCost[int(v)*p:int(v)*p+p], &woCnt[v], on, cn)
			}
		case compile.OrNode:
			for _, k := range c.Children[c.Start[n]:c.Start[n+1]] {
				if cc.cnt[k] != 0 {
					accumulate(oc[int(k)*p:int(k)*p+p], &ocnt[k], on, cn)
				}
			}
		case compile.AndNode:
			kids := c.Children[c.Start[n]:c.Start[n+1]]
			// prefix[i] = cn × in[kids[0]] × … × in[kids[i-1]]
			prefix = prefix[:0]
			acc := cn
			for _, k := range kids {
				prefix = append(prefix, acc)
				acc = ar.mul(acc, in[k])
			}
			suffix := ar.one()
			in := in
			nc := cc.cost[int(n)*p : int(n)*p+p]
			for i := len(kids) - 1; i >= 0; i-- {
				k := kids[i]
				kc := cc.cost[int(k)*p : int(k)*p+p]
				// cost of the rest: outside + inside(n) − inside(k); costs
				// form a group, so no prefix sums are needed.
				if !restCost(tmp, on, nc, kc) {
					overflow = n
				}
				accumulate(oc[int(k)*p:int(k)*p+p], &ocnt[k], tmp, ar.mul(prefix[i], suffix))
				suffix = ar.mul(suffix, in[k])
			}
		}
	}
	if overflow >= 0 {
		return nil, fmt.Errorf("optimize: a cost at circuit node %d: %w", overflow, ErrOverflow)
	}
	m := &marginals{p: p, withCost: wCost, woCost: woCost, wBig: make([]*big.Int, nv), woBig: make([]*big.Int, nv)}
	for v := 1; v < nv; v++ {
		if !ar.isZero(wCnt[v]) {
			m.wBig[v] = ar.toBig(wCnt[v])
		}
		if !ar.isZero(woCnt[v]) {
			m.woBig[v] = ar.toBig(woCnt[v])
		}
	}
	return m, nil
}

// evalMarginals runs the downward pass after an upward one, with 64-bit
// counts first and exact integers if they overflow.
// The marginals may share arrays with buf and are valid until its next use.
func evalMarginals(ctx context.Context, c *compile.Circuit, wt *weights, pins pinTable, o *optimum, buf *downBuf) (*marginals, error) {
	if !o.found {
		nv := c.NumVars + 1
		return &marginals{p: wt.p, withCost: make([]int64, nv*wt.p), woCost: make([]int64, nv*wt.p), wCnt: make([]uint64, nv), woCnt: make([]uint64, nv)}, nil
	}
	if o.big == nil {
		if buf == nil {
			buf = &downBuf{}
		}
		m, over, err := downPassU64(ctx, c, wt, pins, o.cc, buf)
		if err != nil || !over {
			return m, err
		}
	}
	in := make([]*big.Int, len(c.Kind))
	for i := range in {
		in[i] = o.count(int32(i))
	}
	return downPass(ctx, c, wt, pins, o.cc, in, bigs{})
}

// downPassU64 is downPass specialised to 64-bit counts, the common case,
// with no call per edge. It reports overflowed when a count did not fit;
// the caller then runs downPass with exact integers.
func downPassU64(ctx context.Context, c *compile.Circuit, wt *weights, pins pinTable, cc *costCount, buf *downBuf) (m *marginals, overflowed bool, err error) {
	p := wt.p
	nn := len(c.Kind)
	nv := c.NumVars + 1
	oc, ocnt := grow(&buf.oc, nn*p), grow(&buf.ocnt, nn)
	wCost, woCost := grow(&buf.wCost, nv*p), grow(&buf.woCost, nv*p)
	wCnt, woCnt := grow(&buf.wCnt, nv), grow(&buf.woCnt, nv)
	// costs are written before they are read (a zero count marks them
	// unset); counts must start at zero
	clear(ocnt)
	clear(wCnt)
	clear(woCnt)
	costOver := int32(-1)
	over := false
	tmp := make([]int64, p)
	var prefix []uint64
	ocnt[c.Root] = 1
	for n := c.Root; n >= 0; n-- {
		if (int(c.Root)-int(n))%checkEvery == 0 && ctx.Err() != nil {
			return nil, false, ctx.Err()
		}
		cn := ocnt[n]
		if cn == 0 || cc.cnt[n] == 0 {
			continue
		}
		on := oc[int(n)*p : int(n)*p+p]
		switch c.Kind[n] {
		case compile.LitNode:
			l := compile.Lit(c.Arg[n])
			v := int(l.Var())
			if !addVec(tmp, on, cc.cost[int(n)*p:int(n)*p+p]) {
				costOver = n
			}
			if l.IsNeg() {
				over = accumulateU64(woCost[v*p:v*p+p], &woCnt[v], tmp, cn) || over
			} else {
				over = accumulateU64(wCost[v*p:v*p+p], &wCnt[v], tmp, cn) || over
			}
		case compile.FreeNode:
			v := compile.Var(c.Arg[n])
			if pins.allows(v.Pos()) {
				if !addVec(tmp, on, wt.vec(v)) {
					costOver = n
				}
				over = accumulateU64(wCost[int(v)*p:int(v)*p+p], &wCnt[v], tmp, cn) || over
			}
			if pins.allows(v.Neg()) {
				over = accumulateU64(woCost[int(v)*p:int(v)*p+p], &woCnt[v], on, cn) || over
			}
		case compile.OrNode:
			for _, k := range c.Children[c.Start[n]:c.Start[n+1]] {
				if cc.cnt[k] != 0 {
					over = accumulateU64(oc[int(k)*p:int(k)*p+p], &ocnt[k], on, cn) || over
				}
			}
		case compile.AndNode:
			kids := c.Children[c.Start[n]:c.Start[n+1]]
			prefix = prefix[:0]
			acc := cn
			for _, k := range kids {
				prefix = append(prefix, acc)
				if ck := cc.cnt[k]; ck != 1 {
					var ok bool
					if acc, ok = mulCount(acc, ck); !ok {
						over = true
					}
				}
			}
			suffix := uint64(1)
			nc := cc.cost[int(n)*p : int(n)*p+p]
			for i := len(kids) - 1; i >= 0; i-- {
				k := kids[i]
				kc := cc.cost[int(k)*p : int(k)*p+p]
				if !restCost(tmp, on, nc, kc) {
					costOver = n
				}
				cnt := prefix[i]
				if suffix != 1 {
					var ok bool
					if cnt, ok = mulCount(cnt, suffix); !ok {
						over = true
					}
				}
				over = accumulateU64(oc[int(k)*p:int(k)*p+p], &ocnt[k], tmp, cnt) || over
				if ck := cc.cnt[k]; ck != 1 {
					var ok bool
					if suffix, ok = mulCount(suffix, ck); !ok {
						over = true
					}
				}
			}
		}
	}
	if costOver >= 0 {
		return nil, false, fmt.Errorf("optimize: a cost at circuit node %d: %w", costOver, ErrOverflow)
	}
	if over {
		return nil, true, nil
	}
	return &marginals{p: p, withCost: wCost, woCost: woCost, wCnt: wCnt, woCnt: woCnt}, false, nil
}

// downBuf keeps the arrays of downPassU64 from one query to the next.
type downBuf struct {
	oc, wCost, woCost []int64
	ocnt, wCnt, woCnt []uint64
}

// grow returns (*s)[:n], reallocating when the capacity is short.
func grow[T any](s *[]T, n int) []T {
	if cap(*s) < n {
		*s = make([]T, n)
	}
	*s = (*s)[:n]
	return *s
}

// accumulateU64 ⊕-adds (cost, cnt) into the value at dc, dn and reports a
// count overflow.
func accumulateU64(dc []int64, dn *uint64, cost []int64, cnt uint64) bool {
	if *dn == 0 {
		copy(dc, cost)
		*dn = cnt
		return false
	}
	switch cmpVec(cost, dc) {
	case -1:
		copy(dc, cost)
		*dn = cnt
	case 0:
		s, ok := addCount(*dn, cnt)
		*dn = s
		return !ok
	}
	return false
}

// restCost sets rest to outside + node − child, the cost of everything but
// the child under a product node, and reports whether it fit in 64 bits.
func restCost(rest, outside, node, child []int64) bool {
	ok := true
	for j := range rest {
		a, ok1 := addInt(outside[j], node[j])
		b, ok2 := addInt(a, -child[j])
		if !ok1 || !ok2 || child[j] == -child[j] && child[j] != 0 {
			ok = false
		}
		rest[j] = b
	}
	return ok
}
