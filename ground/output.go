package ground

import (
	"math"
	"slices"
	"sort"
	"strconv"

	"trellis/grammar"
)

// This file runs after the fixpoint: it grounds aggregate conditions,
// computes the certainly true atoms, and builds the simplified Program.

// unpack splits the counts field of a record header (its third integer)
// into the numbers of positive, negative and aggregate references that
// follow the four-integer header [rule, head, counts, extra].
func unpack(c int32) (npos, nneg, nagg int) {
	return int(c & 1023), int(c >> 10 & 1023), int(c >> 20 & 1023)
}

// aggCond marks stream instances that define an aggregate element.
const aggCond = -1

// groundAggregates grounds the condition of every aggregate instance over
// the possible atoms and creates its elements.
func (g *grounder) groundAggregates() {
	type way struct{ pos, neg []int32 }
	for ai := range g.aggInsts {
		inst := &g.aggInsts[ai]
		a := inst.lit
		b := make([]Term, a.nvars)
		for i := range b {
			b[i] = noTerm
		}
		for i, v := range a.globals {
			b[v] = inst.binding[i]
		}
		var tuples [][]way
		var weights []int64
		index := make(map[string]int)
		matched := make([]int32, len(a.cond))
		var key []byte
		g.join(a.cond, a.plan, 0, b, matched, func() {
			key = key[:0]
			var first Term
			for i, t := range a.tuple {
				v, err := g.ev.eval(t, b)
				if err != nil {
					g.fail(err)
					return
				}
				if i == 0 {
					first = v
				}
				key = strconv.AppendInt(key, int64(v), 10)
				key = append(key, ',')
			}
			w := int64(1)
			if a.kind != Count {
				n, ok := g.terms.IntValue(first)
				if !ok {
					g.fail(evalErrorf(a.tuple[0].pos, "the first element of a %s tuple must be an integer, not %s", a.kind, g.terms.TermString(first)))
					return
				}
				w = n
			}
			var wy way
			for i, l := range a.cond {
				switch l.kind {
				case litPos:
					wy.pos = append(wy.pos, matched[i])
				case litNeg:
					wy.neg = append(wy.neg, matched[i])
				}
			}
			t, ok := index[string(key)]
			if !ok {
				t = len(tuples)
				index[string(key)] = t
				tuples = append(tuples, nil)
				weights = append(weights, w)
			}
			tuples[t] = append(tuples[t], wy)
		})
		var total uint64
		for t, ways := range tuples {
			w := weights[t]
			mag := uint64(w)
			if w < 0 {
				mag = uint64(-w) // -MinInt64 wraps to 1<<63, as wanted
			}
			total += mag
			if total > math.MaxInt64 || mag > math.MaxInt64 {
				g.fail(evalErrorf(a.pos, "the weights of this %s aggregate add up to more than 64 bits allow", a.kind))
				break
			}
			var atom int32
			if len(ways) == 1 && len(ways[0].pos) == 1 && len(ways[0].neg) == 0 {
				atom = ways[0].pos[0]
			} else {
				atom = g.serialAtom("#elem")
				g.atoms.state[atom] |= stPossible
				for _, wy := range ways {
					c, _ := g.stream.tail(4 + len(wy.pos) + len(wy.neg))
					*c = append(*c, aggCond, atom, int32(len(wy.pos)|len(wy.neg)<<10), int32(ai))
					*c = append(*c, wy.pos...)
					*c = append(*c, wy.neg...)
				}
			}
			inst.elems = append(inst.elems, WeightedAtom{Atom: Atom(atom), Weight: w})
		}
		g.atoms.state[inst.atom] |= stPossible
	}
}

// certain reports whether atom a is certainly true; possible whether it may be.
func (g *grounder) certain(a int32) bool  { return g.atoms.state[a]&stCertain != 0 }
func (g *grounder) possible(a int32) bool { return g.atoms.state[a]&stPossible != 0 }
func (g *grounder) setCertain(a int32) bool {
	if g.atoms.state[a]&stCertain != 0 {
		return false
	}
	g.atoms.state[a] |= stCertain
	return true
}

// decide evaluates aggregate instance ai under the certain and possible
// atoms: +1 certainly true, -1 certainly false, 0 undecided.
func (g *grounder) decide(ai int) int8 {
	inst := &g.aggInsts[ai]
	var unknown bool
	for _, e := range inst.elems {
		if !g.certain(int32(e.Atom)) && g.possible(int32(e.Atom)) {
			unknown = true
		}
	}
	op, bound := inst.lit.op, inst.bound
	switch inst.lit.kind {
	case Count, Sum:
		var lo, hi int64
		for _, e := range inst.elems {
			switch {
			case !g.possible(int32(e.Atom)):
			case g.certain(int32(e.Atom)):
				lo += e.Weight
				hi += e.Weight
			case e.Weight < 0:
				lo += e.Weight
			default:
				hi += e.Weight
			}
		}
		return rangeDecision(op, lo, hi, bound)
	}
	if unknown {
		return 0
	}
	agg := Aggregate{Kind: inst.lit.kind, Elements: inst.elems, Op: op, Bound: bound}
	if agg.Holds(func(a Atom) bool { return g.certain(int32(a)) }) {
		return 1
	}
	return -1
}

// rangeDecision decides `v op bound` for every v in [lo, hi].
func rangeDecision(op CmpOp, lo, hi, bound int64) int8 {
	all, none := false, false
	switch op {
	case Eq:
		all = lo == bound && hi == bound
		none = bound < lo || bound > hi
	case Ne:
		all = bound < lo || bound > hi
		none = lo == bound && hi == bound
	case Lt:
		all, none = hi < bound, lo >= bound
	case Le:
		all, none = hi <= bound, lo > bound
	case Gt:
		all, none = lo > bound, hi <= bound
	case Ge:
		all, none = lo >= bound, hi < bound
	}
	switch {
	case all:
		return 1
	case none:
		return -1
	}
	return 0
}

// horn runs unit propagation over Horn clauses: every candidate instance
// (stream offset) sets bit on its head once each of its conditions (atoms)
// has bit set. cond appends the conditions of an instance to buf; seed
// atoms have bit set from the start; recheck, when not nil, is called for
// each atom that gets the bit and may set it on more atoms through set.
func (g *grounder) horn(bit uint8, cands []int32, cond func(off int32, buf []int32) []int32, seed []int32, recheck func(a int32, set func(int32))) {
	n := len(g.atoms.pred)
	start := make([]int32, n+1)
	need := make([]int32, len(cands))
	var buf []int32
	for c, off := range cands {
		buf = cond(off, buf[:0])
		for _, a := range buf {
			if g.atoms.state[a]&bit == 0 {
				start[a+1]++
				need[c]++
			}
		}
	}
	for a := 0; a < n; a++ {
		start[a+1] += start[a]
	}
	watch := make([]int32, start[n])
	fill := append([]int32(nil), start[:n]...)
	for c, off := range cands {
		buf = cond(off, buf[:0])
		for _, a := range buf {
			if g.atoms.state[a]&bit == 0 {
				watch[fill[a]] = int32(c)
				fill[a]++
			}
		}
	}
	fill = nil
	var queue []int32
	set := func(a int32) {
		if g.atoms.state[a]&bit == 0 {
			g.atoms.state[a] |= bit
			queue = append(queue, a)
		}
	}
	for _, a := range seed {
		set(a)
	}
	for c, off := range cands {
		if need[c] == 0 {
			set(g.stream.at(off)[1])
		}
	}
	for len(queue) > 0 {
		a := queue[len(queue)-1]
		queue = queue[:len(queue)-1]
		if int(a) < n {
			for _, c := range watch[start[a]:start[a+1]] {
				need[c]--
				if need[c] == 0 {
					set(g.stream.at(cands[c])[1])
				}
			}
		}
		if recheck != nil {
			recheck(a, set)
		}
	}
}

// instances calls f with the offset and parts of every stream instance.
func (g *grounder) instances(f func(off int32, kind irKind, head int32, pos, neg, aggs []int32)) {
	g.stream.each(func(off int32, rec []int32) {
		r, head := rec[0], rec[1]
		npos, nneg, _ := unpack(rec[2])
		body := rec[4:]
		kind := irAggCond
		if r >= 0 {
			kind = g.rules[r].kind
		}
		f(off, kind, head, body[:npos], body[npos:npos+nneg], body[npos+nneg:])
	})
}

// propagateCertain computes the atoms that are true in every stable model:
// heads of rules whose positive atoms are certain, whose negative atoms are
// impossible and whose aggregates are certainly true.
func (g *grounder) propagateCertain() {
	for i := range g.atoms.state {
		g.atoms.state[i] &^= stCertain
	}
	var cands []int32
	g.instances(func(off int32, kind irKind, head int32, pos, neg, aggs []int32) {
		if head < 0 || kind == irChoiceElem || kind == irChoiceBody {
			return
		}
		for _, a := range neg {
			if g.possible(a) {
				return
			}
		}
		cands = append(cands, off)
	})
	// An atom that heads no candidate (such as a choice element) can never
	// become certain, and neither can an instance that needs it.
	heads := make([]bool, len(g.atoms.pred))
	for _, off := range cands {
		heads[g.stream.at(off)[1]] = true
	}
	for ai := range g.aggInsts {
		heads[g.aggInsts[ai].atom] = true
	}
	kept := cands[:0]
	for _, off := range cands {
		rec := g.stream.at(off)
		npos, _, _ := unpack(rec[2])
		ok := true
		for _, a := range rec[4 : 4+npos] {
			if !heads[a] {
				ok = false
				break
			}
		}
		if ok {
			kept = append(kept, off)
		}
	}
	cands = kept
	heads = nil
	cond := func(off int32, buf []int32) []int32 {
		rec := g.stream.at(off)
		npos, nneg, nagg := unpack(rec[2])
		body := rec[4:]
		buf = append(buf, body[:npos]...)
		for _, ai := range body[npos+nneg : npos+nneg+nagg] {
			buf = append(buf, g.aggInsts[ai].atom)
		}
		return buf
	}
	aggWatch := make(map[int32][]int32)
	var seed []int32
	for ai := range g.aggInsts {
		for _, e := range g.aggInsts[ai].elems {
			aggWatch[int32(e.Atom)] = append(aggWatch[int32(e.Atom)], int32(ai))
		}
		if g.decide(ai) == 1 {
			seed = append(seed, g.aggInsts[ai].atom)
		}
	}
	g.horn(stCertain, cands, cond, seed, func(a int32, set func(int32)) {
		for _, ai := range aggWatch[a] {
			if !g.certain(g.aggInsts[ai].atom) && g.decide(int(ai)) == 1 {
				set(g.aggInsts[ai].atom)
			}
		}
	})
	for ai := range g.aggInsts {
		g.aggInsts[ai].decision = g.decide(ai)
	}
}

// propagatePossible recomputes the possible atoms from the instances that
// can still hold given the certain atoms and the aggregate decisions, and
// reports whether fewer atoms are possible than before.
func (g *grounder) propagatePossible() bool {
	const stNew = 1 << 7
	var cands []int32
	blocked := false
	g.instances(func(off int32, kind irKind, head int32, pos, neg, aggs []int32) {
		if head < 0 {
			return
		}
		for _, a := range neg {
			if g.certain(a) {
				blocked = true
				return
			}
		}
		for _, ai := range aggs {
			if g.aggInsts[ai].decision < 0 {
				blocked = true
				return
			}
		}
		cands = append(cands, off)
	})
	if !blocked {
		// Every instance can still hold, so the possible atoms are those of
		// the last fixpoint.
		return false
	}
	cond := func(off int32, buf []int32) []int32 {
		rec := g.stream.at(off)
		npos, _, _ := unpack(rec[2])
		buf = append(buf, rec[4:4+npos]...)
		if r := rec[0]; r >= 0 && g.rules[r].kind == irChoiceElem {
			buf = append(buf, g.choices[rec[3]].atom)
		}
		return buf
	}
	var seed []int32
	for ai := range g.aggInsts {
		if g.aggInsts[ai].decision >= 0 {
			seed = append(seed, g.aggInsts[ai].atom)
		}
	}
	g.horn(stNew, cands, cond, seed, nil)
	changed := false
	for i, st := range g.atoms.state {
		if st&stPossible != 0 && st&stNew == 0 {
			changed = true
			st &^= stPossible
		}
		g.atoms.state[i] = st &^ stNew
	}
	return changed
}

// settle alternates the computation of certain and possible atoms until
// the possible atoms no longer shrink (at most a few rounds).
func (g *grounder) settle() {
	for i := 0; i < 8; i++ {
		g.propagateCertain()
		if !g.propagatePossible() {
			return
		}
		if err := g.ctx.Err(); err != nil {
			panic(abort{err})
		}
	}
	g.propagateCertain()
}

// builder assembles the output program.
type builder struct {
	g     *grounder
	p     *Program
	id    []Atom // internal atom -> program atom, or NoAtom
	arena []Atom
	seen  map[uint64][]int32 // hash of a simplified rule -> its indices in Program.Rules

	repeat      []int8 // by rule index: 0 unknown, 1 instances may repeat, -1 not
	predCertain []bool // by predicate: some atom is certain
}

// ensure returns the program atom of internal atom a, adding it.
func (bd *builder) ensure(a int32) Atom {
	for int(a) >= len(bd.id) {
		bd.id = append(bd.id, NoAtom)
	}
	if id := bd.id[a]; id != NoAtom {
		return id
	}
	g := bd.g
	pr := g.preds[g.atoms.pred[a]]
	id := Atom(len(bd.p.Atoms))
	info := AtomInfo{Pred: pr.name, Aux: pr.aux, Copy: NoAtom}
	if pr.aux && pr.arity == 1 && isSerial(pr.name) {
		info.Args = []Term{g.terms.Int(int64(id))}
	} else {
		o := g.atoms.off[a]
		info.Args = g.atoms.args[o : o+int32(pr.arity) : o+int32(pr.arity)]
	}
	bd.p.Atoms = append(bd.p.Atoms, info)
	bd.id[a] = id
	return id
}

func isSerial(name string) bool {
	switch name {
	case "#agg", "#elem", "#body", "#per":
		return true
	}
	return false
}

// body simplifies the body of the instance at offset off: certain positive
// atoms and impossible negative atoms are dropped; ok is false when the body
// can never hold.
func (bd *builder) body(off int32) (pos, neg []Atom, ok bool) {
	g := bd.g
	rec := g.stream.at(off)
	npos, nneg, nagg := unpack(rec[2])
	body := rec[4 : 4+npos+nneg+nagg]
	for _, a := range body[npos : npos+nneg] {
		if g.certain(a) {
			return nil, nil, false
		}
	}
	for _, a := range body[:npos] {
		if !g.possible(a) {
			return nil, nil, false
		}
	}
	for _, ai := range body[npos+nneg:] {
		if g.aggInsts[ai].decision < 0 {
			return nil, nil, false
		}
	}
	mark := len(bd.arena)
	for _, a := range body[:npos] {
		if !g.certain(a) {
			bd.arena = append(bd.arena, bd.ensure(a))
		}
	}
	for _, ai := range body[npos+nneg:] {
		if inst := &g.aggInsts[ai]; inst.decision == 0 {
			bd.arena = append(bd.arena, bd.ensure(inst.atom))
		}
	}
	mid := len(bd.arena)
	for _, a := range body[npos : npos+nneg] {
		if g.possible(a) {
			bd.arena = append(bd.arena, bd.ensure(a))
		}
	}
	end := len(bd.arena)
	if mid > mark {
		pos = bd.arena[mark:mid:mid]
	}
	if end > mid {
		neg = bd.arena[mid:end:end]
	}
	return pos, neg, true
}

// build creates the simplified program.
func (bd *builder) build() {
	g := bd.g
	p := bd.p
	// Every possible atom of the source gets its index first, in the order
	// of derivation.
	for a := range g.atoms.pred {
		if g.possible(int32(a)) && !g.preds[g.atoms.pred[a]].aux {
			bd.ensure(int32(a))
		}
	}
	type perGroup struct {
		atom    Atom
		certain bool
	}
	perIndex := make(map[string]int)
	var groups []perGroup
	var forErrs = make(map[grammar.Pos]bool)
	condOffs := make(map[int32][]int32)
	var projOffs []int32 // rules of #not atoms, kept when an atom is used
	g.stream.each(func(off int32, rec []int32) {
		r, head, extra := rec[0], rec[1], rec[3]
		kind := irAggCond
		var ir *irule
		if r >= 0 {
			ir = g.rules[r]
			kind = ir.kind
		}
		switch kind {
		case irAggCond:
			condOffs[extra] = append(condOffs[extra], off)
		case irProject:
			projOffs = append(projOffs, off)
		case irRule:
			if g.certain(head) {
				break
			}
			if pos, neg, ok := bd.body(off); ok {
				bd.addRule(Rule{Head: bd.ensure(head), Pos: pos, Neg: neg}, len(pos)+len(neg) < len(rec)-4 && bd.mayRepeat(ir))
			}
		case irConstraint:
			if pos, neg, ok := bd.body(off); ok {
				bd.addRule(Rule{Head: NoAtom, Pos: pos, Neg: neg}, len(pos)+len(neg) < len(rec)-4 && bd.mayRepeat(ir))
			}
		case irChoiceBody:
			if pos, neg, ok := bd.body(off); ok {
				c := &g.choices[extra]
				c.live, c.pos, c.neg = true, pos, neg
			}
		case irChoiceElem:
			if bd.forHolds(off, ir, forErrs) {
				c := &g.choices[extra]
				c.elems = append(c.elems, head)
			}
		case irPenalty:
			pos, neg, ok := bd.body(off)
			pv := &g.penVals[extra]
			if !ok || pv.weight == 0 {
				break
			}
			if ir.pen.per == nil {
				var atom Atom
				switch {
				case len(pos) == 1 && len(neg) == 0:
					atom = pos[0]
				case len(pos) == 0 && len(neg) == 0:
					atom = bd.ensure(g.serialAtom("#body"))
					p.Rules = append(p.Rules, Rule{Head: atom})
				default:
					atom = bd.ensure(g.serialAtom("#body"))
					p.Rules = append(p.Rules, Rule{Head: atom, Pos: pos, Neg: neg})
				}
				p.Penalties = append(p.Penalties, Penalty{Atom: atom, Weight: pv.weight, Priority: pv.priority})
				break
			}
			k := strconv.FormatInt(pv.weight, 10) + "," + strconv.FormatInt(pv.priority, 10)
			for _, t := range pv.per {
				k += "," + strconv.Itoa(int(t))
			}
			gi, found := perIndex[k]
			if !found {
				gi = len(groups)
				perIndex[k] = gi
				atom := bd.ensure(g.serialAtom("#per"))
				groups = append(groups, perGroup{atom: atom})
				p.Penalties = append(p.Penalties, Penalty{Atom: atom, Weight: pv.weight, Priority: pv.priority})
			}
			if len(pos) == 0 && len(neg) == 0 {
				if !groups[gi].certain {
					groups[gi].certain = true
					p.Rules = append(p.Rules, Rule{Head: groups[gi].atom})
				}
			} else {
				p.Rules = append(p.Rules, Rule{Head: groups[gi].atom, Pos: pos, Neg: neg})
			}
		}
	})
	for i := range g.choices {
		c := &g.choices[i]
		if !c.live {
			continue
		}
		elems := make([]Atom, 0, len(c.elems))
		for _, a := range c.elems {
			elems = append(elems, bd.ensure(a))
		}
		sort.Slice(elems, func(i, j int) bool { return elems[i] < elems[j] })
		elems = compact(elems)
		low := c.low
		if low < 0 {
			low = 0
		}
		p.Choices = append(p.Choices, Choice{Elements: elems, Lower: low, Upper: c.up, Pos: c.pos, Neg: c.neg})
	}
	for ai := range g.aggInsts {
		inst := &g.aggInsts[ai]
		if inst.decision != 0 || int(inst.atom) >= len(bd.id) || bd.id[inst.atom] == NoAtom {
			continue
		}
		p.Aggregates = append(p.Aggregates, bd.aggregate(inst, condOffs[int32(ai)]))
	}
	for _, off := range projOffs {
		head := g.stream.at(off)[1]
		if g.certain(head) || int(head) >= len(bd.id) || bd.id[head] == NoAtom {
			continue
		}
		if pos, neg, ok := bd.body(off); ok {
			p.Rules = append(p.Rules, Rule{Head: bd.id[head], Pos: pos, Neg: neg})
		}
	}
	// Facts: every certain atom of the program.
	for a := range g.atoms.pred {
		if g.certain(int32(a)) && a < len(bd.id) && bd.id[a] != NoAtom {
			p.Rules = append(p.Rules, Rule{Head: bd.id[a]})
		}
	}
	bd.shown()
}

// mayRepeat reports whether two instances of ir can simplify to the same
// rule: when a variable outside the head occurs only in literals that
// simplification may drop (positive literals of predicates with certain
// atoms, negative literals, aggregates, comparisons).
func (bd *builder) mayRepeat(ir *irule) bool {
	if bd.repeat == nil {
		g := bd.g
		bd.repeat = make([]int8, len(g.rules))
		bd.predCertain = make([]bool, len(g.preds))
		for a, st := range g.atoms.state {
			if st&stCertain != 0 {
				bd.predCertain[g.atoms.pred[a]] = true
			}
		}
	}
	if v := bd.repeat[ir.index]; v != 0 {
		return v > 0
	}
	kept := make([]bool, ir.nvars) // occurs in the head or in a kept literal
	if ir.head != nil {
		for _, t := range ir.head.args {
			for _, v := range varsOf(t, nil) {
				kept[v] = true
			}
		}
	}
	for _, l := range ir.lits {
		if l.kind == litPos && !bd.predCertain[l.atom.pred] {
			for _, t := range l.atom.args {
				for _, v := range varsOf(t, nil) {
					kept[v] = true
				}
			}
		}
	}
	repeat := false
	for _, l := range ir.lits {
		for _, t := range litTerms(l) {
			for _, v := range varsOf(t, nil) {
				if v < len(kept) && !kept[v] {
					repeat = true
				}
			}
		}
	}
	bd.repeat[ir.index] = -1
	if repeat {
		bd.repeat[ir.index] = 1
	}
	return repeat
}

// addRule adds r to the program. A rule whose body lost literals to
// simplification may repeat another such rule (instances that differ only
// in certain atoms); repeats are left out.
func (bd *builder) addRule(r Rule, shrunk bool) {
	p := bd.p
	if !shrunk {
		p.Rules = append(p.Rules, r)
		return
	}
	if bd.seen == nil {
		bd.seen = make(map[uint64][]int32)
	}
	h := uint64(uint32(r.Head)) * 0x9E3779B97F4A7C15
	for _, a := range r.Pos {
		h = (h ^ uint64(uint32(a))) * 0xBF58476D1CE4E5B9
	}
	h ^= 0x5555
	for _, a := range r.Neg {
		h = (h ^ uint64(uint32(a))) * 0xBF58476D1CE4E5B9
	}
	for _, i := range bd.seen[h] {
		q := &p.Rules[i]
		if q.Head == r.Head && slices.Equal(q.Pos, r.Pos) && slices.Equal(q.Neg, r.Neg) {
			return
		}
	}
	bd.seen[h] = append(bd.seen[h], int32(len(p.Rules)))
	p.Rules = append(p.Rules, r)
}

// aggregate builds the Aggregate of an undecided instance whose atom the
// program uses. offs are the stream offsets of the ways its elements hold.
// An element that holds in one way, through a single positive atom, is
// that atom; an element that holds in no way is left out.
func (bd *builder) aggregate(inst *aggInst, offs []int32) Aggregate {
	g, p := bd.g, bd.p
	type way struct{ pos, neg []Atom }
	ways := make(map[int32][]way)
	for _, off := range offs {
		if pos, neg, ok := bd.body(off); ok {
			h := g.stream.at(off)[1]
			ways[h] = append(ways[h], way{pos, neg})
		}
	}
	var elems []WeightedAtom
	for _, e := range inst.elems {
		a := int32(e.Atom)
		var atom Atom
		switch w := ways[a]; {
		case !g.possible(a):
			continue
		case !g.preds[g.atoms.pred[a]].aux:
			atom = bd.ensure(a)
		case g.certain(a):
			atom = bd.ensure(a) // gets a fact
		case len(w) == 0:
			continue
		case len(w) == 1 && len(w[0].pos) == 1 && len(w[0].neg) == 0:
			atom = w[0].pos[0]
		default:
			atom = bd.ensure(a)
			for _, x := range w {
				p.Rules = append(p.Rules, Rule{Head: atom, Pos: x.pos, Neg: x.neg})
			}
		}
		elems = append(elems, WeightedAtom{Atom: atom, Weight: e.Weight})
	}
	return Aggregate{Atom: bd.id[inst.atom], Kind: inst.lit.kind, Elements: elems, Op: inst.lit.op, Bound: inst.bound}
}

func compact(s []Atom) []Atom {
	out := s[:0]
	for i, a := range s {
		if i == 0 || a != s[i-1] {
			out = append(out, a)
		}
	}
	return out
}

// forHolds decides the `for` condition of a choice element instance,
// reporting an error when it is not decided at grounding time.
func (bd *builder) forHolds(off int32, ir *irule, reported map[grammar.Pos]bool) bool {
	g := bd.g
	rec := g.stream.at(off)
	npos, nneg, _ := unpack(rec[2])
	body := rec[4 : 4+npos+nneg]
	holds := true
	undecided, which := int32(-1), 0
	for i, a := range body {
		isNeg := i >= npos
		switch {
		case g.certain(a):
			if isNeg {
				holds = false
			}
		case !g.possible(a):
			if !isNeg {
				holds = false
			}
		default:
			if undecided < 0 {
				undecided, which = a, i
			}
		}
	}
	if undecided >= 0 && holds {
		// The which-th atom is the which-th positive `for` literal, or
		// the (which-npos)-th negative one.
		kind, k := litPos, which
		if which >= npos {
			kind, k = litNeg, which-npos
		}
		pos := ir.lits[ir.nBody].pos
		for _, l := range ir.lits[ir.nBody:] {
			if l.kind == kind {
				if k == 0 {
					pos = l.pos
					break
				}
				k--
			}
		}
		if !reported[pos] {
			reported[pos] = true
			g.errorf(pos, "the for condition of a choice element must be decided when grounding (by facts and rules over facts), but it depends on %s, which is not", g.atomString(undecided))
		}
		return false
	}
	return holds
}

// atomString renders an internal atom.
func (g *grounder) atomString(a int32) string {
	pr := g.preds[g.atoms.pred[a]]
	b := []byte(pr.name)
	if pr.arity > 0 {
		b = append(b, '(')
		for i, t := range g.atoms.argsOf(a, pr.arity) {
			if i > 0 {
				b = append(b, ',')
			}
			b = g.terms.Format(b, t)
		}
		b = append(b, ')')
	}
	return string(b)
}

// shown fills Program.Shown.
func (bd *builder) shown() {
	g, p := bd.g, bd.p
	display := make(map[string]bool)
	for _, st := range g.stmts {
		if d, ok := st.(*grammar.Display); ok {
			for _, r := range d.Predicates {
				display[r.Name+"/"+strconv.Itoa(r.Arity)] = true
			}
		}
	}
	for a := range g.atoms.pred {
		if a >= len(bd.id) {
			break
		}
		id := bd.id[a]
		if id == NoAtom || p.Atoms[id].Aux {
			continue
		}
		pr := g.preds[g.atoms.pred[a]]
		if len(display) > 0 {
			if display[pr.name+"/"+strconv.Itoa(pr.arity)] {
				p.Shown = append(p.Shown, id)
			}
		} else if !g.certain(int32(a)) {
			p.Shown = append(p.Shown, id)
		}
	}
	bd.sortAtoms(p.Shown)
}

// sortAtoms sorts program atoms in the order of Program.SortAtoms (arity,
// predicate name, arguments in term order), comparing precomputed ranks of
// the terms and predicates instead of the terms themselves.
func (bd *builder) sortAtoms(atoms []Atom) {
	p := bd.p
	terms := make([]Term, p.Terms.Len())
	for i := range terms {
		terms[i] = Term(i)
	}
	slices.SortFunc(terms, p.Terms.Compare)
	rank := make([]int32, len(terms))
	for i, t := range terms {
		rank[t] = int32(i)
	}
	names := make(map[string]int32)
	for _, a := range atoms {
		names[p.Atoms[a].Pred] = 0
	}
	sorted := make([]string, 0, len(names))
	for n := range names {
		sorted = append(sorted, n)
	}
	slices.Sort(sorted)
	for i, n := range sorted {
		names[n] = int32(i)
	}
	if len(sorted) >= 1<<20 {
		p.SortAtoms(atoms)
		return
	}
	// The primary key packs the arity, the predicate's rank and the rank of
	// the first argument; ties compare the remaining arguments.
	type key struct {
		k    uint64
		atom Atom
	}
	keys := make([]key, len(atoms))
	for i, a := range atoms {
		info := &p.Atoms[a]
		if len(info.Args) >= 256 {
			p.SortAtoms(atoms)
			return
		}
		k := uint64(len(info.Args))<<56 | uint64(names[info.Pred])<<36
		if len(info.Args) > 0 {
			k |= uint64(rank[info.Args[0]])
		}
		keys[i] = key{k, a}
	}
	slices.SortFunc(keys, func(x, y key) int {
		if x.k != y.k {
			if x.k < y.k {
				return -1
			}
			return 1
		}
		xa, ya := p.Atoms[x.atom].Args, p.Atoms[y.atom].Args
		for i := 1; i < len(xa); i++ {
			if rx, ry := rank[xa[i]], rank[ya[i]]; rx != ry {
				return int(rx - ry)
			}
		}
		return 0
	})
	for i, k := range keys {
		atoms[i] = k.atom
	}
}

// build runs the builder.
func (g *grounder) build() {
	bd := &builder{g: g, p: g.prog, id: make([]Atom, len(g.atoms.pred), len(g.atoms.pred)+16)}
	for i := range bd.id {
		bd.id[i] = NoAtom
	}
	bd.p.Rules = make([]Rule, 0, g.total)
	possible := 0
	for _, st := range g.atoms.state {
		if st&stPossible != 0 {
			possible++
		}
	}
	bd.p.Atoms = make([]AtomInfo, 0, possible+16)
	n := 0
	g.stream.each(func(off int32, rec []int32) { n += len(rec) - 4 })
	bd.arena = make([]Atom, 0, n)
	bd.build()
}
