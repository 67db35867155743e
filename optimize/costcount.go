package optimize

import (
	"context"
	"fmt"
	"math/big"

	"trellis/compile"
)

// costCount is the (cost, count) semiring: a value is the best cost vector
// of a node's models and the number of models reaching it. ⊕ keeps the
// lexicographically smaller cost and adds the counts on a tie; ⊗ adds costs
// and multiplies counts. A count of zero is the semiring's zero (no model).
// Costs live flat in cost (nodes × priorities), counts in cnt. Counts
// saturate; overflow records that some count did not fit in 64 bits, after
// which bigCounts recounts exactly. With no priorities (p == 0) every model
// ties, so the counts are plain model counts.
type costCount struct {
	wt       *weights
	pins     pinTable
	p        int
	cost     []int64
	cnt      []uint64
	tot      []uint64 // number of all models of each node, saturating
	overflow bool     // a count did not fit in 64 bits
	totOver  bool     // a total did not fit in 64 bits
	costErr  int32    // node+1 of the first node whose cost overflowed, or 0
}

// newCostCount prepares a pass, reusing the arrays of old when it is not
// nil (every value is written before it is read, so no clearing is needed).
func newCostCount(c *compile.Circuit, wt *weights, pins pinTable, old *costCount) *costCount {
	n := len(c.Kind)
	s := &costCount{wt: wt, pins: pins, p: wt.p}
	if old != nil && cap(old.cnt) >= n && cap(old.cost) >= n*wt.p {
		s.cost, s.cnt, s.tot = old.cost[:n*wt.p], old.cnt[:n], old.tot[:n]
	} else {
		s.cost, s.cnt, s.tot = make([]int64, n*wt.p), make([]uint64, n), make([]uint64, n)
	}
	return s
}

func (s *costCount) vec(n int32) []int64 { return s.cost[int(n)*s.p : int(n)*s.p+s.p] }

func (s *costCount) falseNode(n int32) { s.cnt[n], s.tot[n] = 0, 0 }

func (s *costCount) trueNode(n int32) {
	clear(s.vec(n))
	s.cnt[n], s.tot[n] = 1, 1
}

func (s *costCount) lit(n int32, l compile.Lit) {
	if !s.pins.allows(l) {
		s.cnt[n], s.tot[n] = 0, 0
		return
	}
	s.cnt[n], s.tot[n] = 1, 1
	if l.IsNeg() {
		clear(s.vec(n))
	} else {
		copy(s.vec(n), s.wt.vec(l.Var()))
	}
}

func (s *costCount) free(n int32, v compile.Var) {
	pos, neg := s.pins.allows(v.Pos()), s.pins.allows(v.Neg())
	dst := s.vec(n)
	s.tot[n] = 0
	if pos {
		s.tot[n]++
	}
	if neg {
		s.tot[n]++
	}
	switch {
	case pos && neg:
		w := s.wt.vec(v)
		switch c := cmpZero(w); {
		case c == 0:
			clear(dst)
			s.cnt[n] = 2
		case c < 0:
			copy(dst, w)
			s.cnt[n] = 1
		default:
			clear(dst)
			s.cnt[n] = 1
		}
	case pos:
		copy(dst, s.wt.vec(v))
		s.cnt[n] = 1
	case neg:
		clear(dst)
		s.cnt[n] = 1
	default:
		s.cnt[n] = 0
	}
}

// cmpZero compares a cost vector with the zero vector.
func cmpZero(a []int64) int {
	for _, x := range a {
		if x != 0 {
			if x < 0 {
				return -1
			}
			return 1
		}
	}
	return 0
}

func (s *costCount) and(n int32, kids []int32) {
	p := s.p
	dst := s.cost[int(n)*p : int(n)*p+p]
	clear(dst)
	cnt, tot := uint64(1), uint64(1)
	var ov int64 // negative when some addition overflowed
	for _, k := range kids {
		ck := s.cnt[k]
		if ck == 0 {
			s.cnt[n], s.tot[n] = 0, 0
			return
		}
		if cnt != 1 || ck != 1 {
			var ok bool
			if cnt, ok = mulCount(cnt, ck); !ok {
				s.overflow = true
			}
		}
		if tk := s.tot[k]; tk != 1 {
			var ok bool
			if tot, ok = mulCount(tot, tk); !ok {
				s.totOver = true
			}
		}
		if p == 1 {
			a, x := dst[0], s.cost[k]
			r := a + x
			ov |= (a ^ r) & (x ^ r)
			dst[0] = r
			continue
		}
		src := s.cost[int(k)*p : int(k)*p+p]
		for j, x := range src {
			a := dst[j]
			r := a + x
			ov |= (a ^ r) & (x ^ r) // the sum's sign differs from both operands'
			dst[j] = r
		}
	}
	if ov < 0 && s.costErr == 0 {
		s.costErr = n + 1
	}
	s.cnt[n], s.tot[n] = cnt, tot
}

func (s *costCount) or(n int32, kids []int32) {
	p := s.p
	best := int32(-1)
	var cnt, tot uint64
	for _, k := range kids {
		ck := s.cnt[k]
		if ck == 0 {
			continue
		}
		var ok bool
		if tot, ok = addCount(tot, s.tot[k]); !ok {
			s.totOver = true
		}
		if best < 0 {
			best, cnt = k, ck
			continue
		}
		switch cmpVec(s.cost[int(k)*p:int(k)*p+p], s.cost[int(best)*p:int(best)*p+p]) {
		case -1:
			best, cnt = k, ck
		case 0:
			var ok bool
			if cnt, ok = addCount(cnt, ck); !ok {
				s.overflow = true
			}
		}
	}
	if best < 0 {
		s.cnt[n], s.tot[n] = 0, 0
		return
	}
	copy(s.cost[int(n)*p:int(n)*p+p], s.cost[int(best)*p:int(best)*p+p])
	s.cnt[n], s.tot[n] = cnt, tot
}

// err reports a cost overflow found by the pass.
func (s *costCount) err() error {
	if s.costErr != 0 {
		return fmt.Errorf("optimize: the cost at circuit node %d: %w", s.costErr-1, ErrOverflow)
	}
	return nil
}

// bigCounts recounts the models reaching the best cost of every node with
// exact integers, given the costs and the feasibility (nonzero counts) that a
// costCount pass computed.
// With all set it counts every model instead (the totals).
type bigCounts struct {
	cc  *costCount
	all bool
	cnt []big.Int
}

func (s *bigCounts) falseNode(n int32)           { s.cnt[n].SetInt64(0) }
func (s *bigCounts) trueNode(n int32)            { s.cnt[n].SetInt64(1) }
func (s *bigCounts) lit(n int32, l compile.Lit)  { s.leaf(n) }
func (s *bigCounts) free(n int32, v compile.Var) { s.leaf(n) }
func (s *bigCounts) leaf(n int32) {
	if s.all {
		s.cnt[n].SetUint64(s.cc.tot[n])
	} else {
		s.cnt[n].SetUint64(s.cc.cnt[n])
	}
}

func (s *bigCounts) and(n int32, kids []int32) {
	if s.cc.cnt[n] == 0 {
		s.cnt[n].SetInt64(0)
		return
	}
	s.cnt[n].SetInt64(1)
	for _, k := range kids {
		if s.cnt[k].IsUint64() && s.cnt[k].Uint64() == 1 {
			continue
		}
		s.cnt[n].Mul(&s.cnt[n], &s.cnt[k])
	}
}

func (s *bigCounts) or(n int32, kids []int32) {
	s.cnt[n].SetInt64(0)
	if s.cc.cnt[n] == 0 {
		return
	}
	p := s.cc.p
	for _, k := range kids {
		if s.cc.cnt[k] != 0 && (s.all || cmpVec(s.cc.cost[int(k)*p:int(k)*p+p], s.cc.cost[int(n)*p:int(n)*p+p]) == 0) {
			s.cnt[n].Add(&s.cnt[n], &s.cnt[k])
		}
	}
}

// optimum is the (cost, count) value of a circuit's root under pins.
type optimum struct {
	cc    *costCount
	big   []big.Int // exact counts when cc.overflow, else nil
	root  int32
	found bool
}

// total returns the exact number of models of the root, recounting with
// exact integers when the 64-bit totals overflowed.
func (o *optimum) total(ctx context.Context, c *compile.Circuit) (*big.Int, error) {
	if !o.found {
		return new(big.Int), nil
	}
	if !o.cc.totOver {
		return new(big.Int).SetUint64(o.cc.tot[o.root]), nil
	}
	bc := &bigCounts{cc: o.cc, all: true, cnt: make([]big.Int, len(c.Kind))}
	if err := evalUp(ctx, c, bc); err != nil {
		return nil, err
	}
	return new(big.Int).Set(&bc.cnt[o.root]), nil
}

// count returns the exact count of node n.
func (o *optimum) count(n int32) *big.Int {
	if o.big != nil {
		return new(big.Int).Set(&o.big[n])
	}
	return new(big.Int).SetUint64(o.cc.cnt[n])
}

// evalOptimum runs the (cost, count) semiring over c, recounting exactly if
// a count does not fit in 64 bits. It reuses the arrays of old (which must
// not be used afterwards) when old is not nil. The circuit must have passed
// checkCircuit.
func evalOptimum(ctx context.Context, c *compile.Circuit, wt *weights, pins pinTable, old *costCount) (*optimum, error) {
	cc := newCostCount(c, wt, pins, old)
	if err := evalUp(ctx, c, cc); err != nil {
		return nil, err
	}
	if err := cc.err(); err != nil {
		return nil, err
	}
	o := &optimum{cc: cc, root: c.Root, found: cc.cnt[c.Root] != 0}
	if cc.overflow {
		bc := &bigCounts{cc: cc, cnt: make([]big.Int, len(c.Kind))}
		if err := evalUp(ctx, c, bc); err != nil {
			return nil, err
		}
		o.big = bc.cnt
	}
	return o, nil
}

// checkCircuit checks the invariants of the flat arrays that the passes
// rely on, so that a damaged circuit gives an error instead of a crash.
func checkCircuit(c *compile.Circuit) error {
	n := len(c.Kind)
	if n == 0 {
		return fmt.Errorf("optimize: the circuit has no nodes")
	}
	if len(c.Arg) != n || len(c.Start) != n+1 {
		return fmt.Errorf("optimize: the circuit arrays have inconsistent lengths")
	}
	if c.Root < 0 || int(c.Root) >= n {
		return fmt.Errorf("optimize: the circuit root %d is not a node", c.Root)
	}
	if c.Start[0] != 0 || int(c.Start[n]) != len(c.Children) {
		return fmt.Errorf("optimize: the circuit child index is inconsistent")
	}
	for i := 0; i < n; i++ {
		if c.Start[i] > c.Start[i+1] {
			return fmt.Errorf("optimize: the children of node %d are out of range", i)
		}
		switch c.Kind[i] {
		case compile.LitNode, compile.FreeNode:
			a := c.Arg[i]
			if a < 0 && c.Kind[i] == compile.LitNode {
				a = -a
			}
			if a < 1 || int(a) > c.NumVars {
				return fmt.Errorf("optimize: node %d names variable %d outside 1..%d", i, c.Arg[i], c.NumVars)
			}
		}
		for _, k := range c.Children[c.Start[i]:c.Start[i+1]] {
			if k < 0 || int(k) >= i {
				return fmt.Errorf("optimize: node %d has child %d, which does not come before it", i, k)
			}
		}
	}
	return nil
}
