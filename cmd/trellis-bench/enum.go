package main

import (
	"context"
	"fmt"
	"slices"
	"strings"
	"time"

	"trellis/compile"
)

// enumResult is what the enumeration baseline measured.
type enumResult struct {
	Status  string        // statusOK, statusOver or a note
	Time    time.Duration // search time only, wall clock
	CPU     time.Duration // search time only, CPU
	Models  uint64        // models found (all of them when Status is ok)
	Optimum string        // like result.Optimum
	Ties    uint64
}

// enumerate lists the models of the completion enc one at a time with a
// plain DPLL search (unit propagation with two watched literals, decisions
// in variable order, false first, chronological backtracking; flipping the
// last unflipped decision after a model is the blocking clause of the
// decisions) and keeps the best cost and its ties. Every auxiliary variable
// of a completion is defined, so the models of the CNF are the stable
// models, one to one.
func enumerate(ctx context.Context, enc *compile.Encoding, limit time.Duration) *enumResult {
	ctx, cancel := withLimit(ctx, limit)
	defer cancel()
	start, startCPU := time.Now(), cpuTime()
	d := newDPLL(&enc.CNF)
	w := newCostTable(enc.Meta.Weights)
	res := &enumResult{Status: statusOK}
	best := make([]int64, len(w.prio))
	found := false
	cost := make([]int64, len(w.prio))
	err := d.each(ctx, func(val []int8) {
		res.Models++
		w.cost(val, cost)
		switch c := slices.Compare(cost, best); {
		case !found || c < 0:
			found = true
			copy(best, cost)
			res.Ties = 1
		case c == 0:
			res.Ties++
		}
	})
	res.Time, res.CPU = time.Since(start), cpuTime()-startCPU
	if err != nil {
		res.Status = overStatus(ctx)
	}
	switch {
	case !found:
		res.Optimum = "none"
	case len(best) == 0:
		res.Optimum = "0"
	default:
		parts := make([]string, len(best))
		for i, v := range best {
			parts[i] = fmt.Sprint(v)
			if len(best) > 1 {
				parts[i] = fmt.Sprintf("%d@%d", v, w.prio[i])
			}
		}
		res.Optimum = strings.Join(parts, " ")
	}
	return res
}

// costTable sums weights of true variables per priority.
type costTable struct {
	prio []int64 // distinct priorities, highest first
	ws   []compile.VarWeight
	slot []int // index into prio of each entry of ws
}

func newCostTable(ws []compile.VarWeight) *costTable {
	t := &costTable{ws: ws}
	for _, w := range ws {
		if !slices.Contains(t.prio, w.Priority) {
			t.prio = append(t.prio, w.Priority)
		}
	}
	slices.Sort(t.prio)
	slices.Reverse(t.prio)
	for _, w := range ws {
		t.slot = append(t.slot, slices.Index(t.prio, w.Priority))
	}
	return t
}

// cost writes the cost of the assignment val into out.
func (t *costTable) cost(val []int8, out []int64) {
	clear(out)
	for i, w := range t.ws {
		if val[w.Var] > 0 {
			out[t.slot[i]] += w.Weight
		}
	}
}

// dpll is a plain model enumerator over a CNF.
type dpll struct {
	n       int
	lits    []compile.Lit // clause literals, the two watched ones first
	start   []int32
	watches [][]int32 // clauses watching each literal, by litIndex
	units   []compile.Lit
	empty   bool // some clause is empty

	val   []int8 // per variable: 0 unassigned, 1 true, -1 false
	trail []compile.Lit
	qhead int
}

// litIndex maps a literal to its slot in watches.
func litIndex(l compile.Lit) int {
	if l < 0 {
		return int(-l)*2 + 1
	}
	return int(l) * 2
}

func newDPLL(f *compile.CNF) *dpll {
	d := &dpll{n: f.NumVars, val: make([]int8, f.NumVars+1), watches: make([][]int32, 2*f.NumVars+2)}
	d.start = append(d.start, 0)
	for i := 0; i < f.NumClauses(); i++ {
		c := f.Clause(i)
		switch len(c) {
		case 0:
			d.empty = true
			continue
		case 1:
			d.units = append(d.units, c[0])
			continue
		}
		k := int32(len(d.start) - 1)
		d.lits = append(d.lits, c...)
		d.start = append(d.start, int32(len(d.lits)))
		d.watches[litIndex(c[0].Not())] = append(d.watches[litIndex(c[0].Not())], k)
		d.watches[litIndex(c[1].Not())] = append(d.watches[litIndex(c[1].Not())], k)
	}
	return d
}

func (d *dpll) value(l compile.Lit) int8 {
	if l < 0 {
		return -d.val[-l]
	}
	return d.val[l]
}

// assign makes l true; it returns false when l is already false.
func (d *dpll) assign(l compile.Lit) bool {
	switch d.value(l) {
	case 1:
		return true
	case -1:
		return false
	}
	if l < 0 {
		d.val[-l] = -1
	} else {
		d.val[l] = 1
	}
	d.trail = append(d.trail, l)
	return true
}

// propagate runs unit propagation; it returns false on a conflict.
func (d *dpll) propagate() bool {
	for d.qhead < len(d.trail) {
		l := d.trail[d.qhead] // true now; clauses holding ¬l watch it
		d.qhead++
		ws := d.watches[litIndex(l)]
		j := 0
		conflict := false
		for i := 0; i < len(ws); i++ {
			k := ws[i]
			if conflict {
				ws[j] = k
				j++
				continue
			}
			c := d.lits[d.start[k]:d.start[k+1]]
			if c[0] == l.Not() {
				c[0], c[1] = c[1], c[0]
			}
			// c[1] is the false literal ¬l.
			if d.value(c[0]) == 1 {
				ws[j] = k
				j++
				continue
			}
			moved := false
			for m := 2; m < len(c); m++ {
				if d.value(c[m]) != -1 {
					c[1], c[m] = c[m], c[1]
					x := litIndex(c[1].Not())
					d.watches[x] = append(d.watches[x], k)
					moved = true
					break
				}
			}
			if moved {
				continue
			}
			ws[j] = k
			j++
			if !d.assign(c[0]) {
				conflict = true
			}
		}
		d.watches[litIndex(l)] = ws[:j]
		if conflict {
			return false
		}
	}
	return true
}

// undo unassigns the trail back to length n.
func (d *dpll) undo(n int) {
	for _, l := range d.trail[n:] {
		d.val[l.Var()] = 0
	}
	d.trail = d.trail[:n]
	d.qhead = n
}

// each calls found with the assignment of every model in turn. It stops
// with the context's error when ctx is done.
func (d *dpll) each(ctx context.Context, found func(val []int8)) error {
	if d.empty {
		return nil
	}
	for _, u := range d.units {
		if !d.assign(u) {
			return nil
		}
	}
	type decision struct {
		lit     compile.Lit
		at      int // trail length before it
		flipped bool
	}
	var stack []decision
	// backtrack flips the deepest unflipped decision; false when none is
	// left.
	backtrack := func() bool {
		for len(stack) > 0 && stack[len(stack)-1].flipped {
			stack = stack[:len(stack)-1]
		}
		if len(stack) == 0 {
			return false
		}
		top := &stack[len(stack)-1]
		d.undo(top.at)
		top.lit, top.flipped = top.lit.Not(), true
		d.assign(top.lit)
		return true
	}
	next := compile.Var(1)
	steps := 0
	for {
		steps++
		if steps&1023 == 0 && ctx.Err() != nil {
			return ctx.Err()
		}
		if !d.propagate() {
			if !backtrack() {
				return nil
			}
			next = min(next, stack[len(stack)-1].lit.Var())
			continue
		}
		for int(next) <= d.n && d.val[next] != 0 {
			next++
		}
		if int(next) > d.n {
			found(d.val)
			if !backtrack() {
				return nil
			}
			next = stack[len(stack)-1].lit.Var()
			continue
		}
		stack = append(stack, decision{lit: next.Neg(), at: len(d.trail)})
		d.assign(next.Neg())
	}
}
