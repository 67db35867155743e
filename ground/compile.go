package ground

import (
	"fmt"
	"sort"
	"strconv"

	"trellis/grammar"
)

// This file compiles statements into internal rules (irule): literals with
// terms compiled against variable slots, and join plans that say in which
// order the body literals are evaluated and which indexes they use.

// irKind says what an internal rule produces when its body holds.
type irKind uint8

const (
	irRule       irKind = iota // a rule or fact: derives its head
	irConstraint               // a constraint
	irChoiceBody               // the `if` body of a choice: makes a choice instance
	irChoiceElem               // a choice element: the body plus the element's `for` literals
	irPenalty                  // a penalty
	irProject                  // #notN(...) if p(...): the projection behind `not p(X, _)`
	irAggCond                  // one way an aggregate tuple holds (added after the fixpoint)
)

// catom is a compiled atom.
type catom struct {
	pred     int32
	args     []*cterm
	pos      grammar.Pos
	interval bool // an argument contains an interval
}

// litKind is the kind of a compiled literal.
type litKind uint8

const (
	litPos litKind = iota
	litNeg
	litCmp
	litAgg
)

// clit is a compiled body literal.
type clit struct {
	kind litKind
	atom catom   // litPos, litNeg
	op   CmpOp   // litCmp
	l, r *cterm  // litCmp
	agg  *aggLit // litAgg
	pos  grammar.Pos
}

// aggLit is a compiled aggregate literal.
type aggLit struct {
	id      int
	pos     grammar.Pos
	kind    AggregateKind
	tuple   []*cterm
	cond    []*clit
	op      CmpOp
	bound   *cterm
	globals []int  // slots of variables shared with the rest of the statement
	nvars   int    // slots of the statement (locals included)
	plan    []step // the condition's join plan with the globals bound
	single  bool   // the condition is exactly one positive atom
	stmt    int
}

// choiceInfo is a compiled choice statement.
type choiceInfo struct {
	id       int // the statement index
	pos      grammar.Pos
	bound    grammar.ChoiceBound
	low      *cterm // nil: 0
	high     *cterm // nil: no upper bound
	bodyVars []int  // slots of the variables of the `if` body
}

// penInfo is a compiled penalty statement.
type penInfo struct {
	weight, priority *cterm // priority nil: 0
	per              []*cterm
}

// irule is a compiled internal rule.
type irule struct {
	kind    irKind
	stmt    int // index into grounder.stmtPos
	head    *catom
	lits    []*clit
	nBody   int // irChoiceElem: lits[:nBody] are the choice's `if` body
	nvars   int
	posLits []int    // indices of positive atom literals
	plans   [][]step // plans[i]: plan with posLits[i] read from the delta; plans[0] when there is no positive literal
	choice  *choiceInfo
	elem    int
	pen     *penInfo
	index   int // position in grounder.rules
}

// stepKind is the kind of a join step.
type stepKind uint8

const (
	stepScan   stepKind = iota // match a positive literal against a relation range
	stepLookup                 // a positive literal whose arguments are all bound
	stepTest                   // a comparison with both sides bound
	stepMatch                  // `pattern = value`: match one side against the other
	stepNeg                    // a negative literal (recorded, not checked during the fixpoint)
	stepAgg                    // an aggregate (recorded, evaluated after the fixpoint)
)

// step is one step of a join plan.
type step struct {
	kind  stepKind
	lit   int
	rk    rangeKind
	ix    *index
	bound []int  // argument positions evaluated before the step
	free  []int  // argument positions matched by the step
	vals  []Term // scratch: the values of the bound arguments
	left  bool   // stepMatch: match the left side against the right side's value
}

// scope is the variable scope of one statement during compilation.
type scope struct {
	slots    map[string]int
	names    []string
	firstPos []grammar.Pos
}

func newScope() *scope { return &scope{slots: make(map[string]int)} }

func (s *scope) slot(v *grammar.Variable) int {
	if !v.Anonymous {
		if i, ok := s.slots[v.Name]; ok {
			return i
		}
	}
	i := len(s.names)
	s.names = append(s.names, v.Name)
	s.firstPos = append(s.firstPos, v.Pos)
	if !v.Anonymous {
		s.slots[v.Name] = i
	}
	return i
}

// compileTerm compiles t in scope s. Intervals are allowed when interval is
// set. Ground subterms are evaluated now.
func (g *grounder) compileTerm(t grammar.Term, s *scope, interval bool) *cterm {
	switch t := t.(type) {
	case *grammar.Name:
		if v, ok := g.paramValue(t.Name, t.Pos); ok {
			return &cterm{kind: ctGround, val: v, pos: t.Pos}
		}
		return &cterm{kind: ctGround, val: g.terms.Name(t.Name), pos: t.Pos}
	case *grammar.Variable:
		return &cterm{kind: ctVar, slot: s.slot(t), name: t.Name, pos: t.Pos, anon: t.Anonymous}
	case *grammar.Integer:
		return &cterm{kind: ctGround, val: g.terms.Int(t.Value), pos: t.Pos}
	case *grammar.String:
		return &cterm{kind: ctGround, val: g.terms.String(t.Value), pos: t.Pos}
	case *grammar.Compound:
		c := &cterm{kind: ctCompound, name: t.Name, pos: t.Pos}
		for _, a := range t.Args {
			c.args = append(c.args, g.compileTerm(a, s, interval))
		}
		return g.fold(c)
	case *grammar.Binary:
		if t.Op == grammar.Interval {
			l := g.compileTerm(t.Left, s, false)
			r := g.compileTerm(t.Right, s, false)
			if !interval {
				g.errorf(t.Pos, "an interval L..U may only be an argument of a fact, a rule head or a choice element")
			}
			return &cterm{kind: ctInterval, args: []*cterm{l, r}, pos: t.Pos, arith: true}
		}
		c := &cterm{kind: ctBinary, op: t.Op, pos: t.Pos, arith: true}
		c.args = []*cterm{g.compileTerm(t.Left, s, false), g.compileTerm(t.Right, s, false)}
		return g.fold(c)
	case *grammar.Unary:
		c := &cterm{kind: ctNeg, pos: t.Pos, arith: true}
		c.args = []*cterm{g.compileTerm(t.Operand, s, false)}
		return g.fold(c)
	}
	g.errorf(t.Position(), "unexpected term")
	return &cterm{kind: ctGround, val: g.terms.Int(0)}
}

// fold evaluates c now when it has no variables.
func (g *grounder) fold(c *cterm) *cterm {
	for _, a := range c.args {
		if a.kind != ctGround {
			for _, b := range c.args {
				if b.arith {
					c.arith = true
				}
			}
			return c
		}
	}
	v, err := g.ev.eval(c, nil)
	if err != nil {
		g.errs.Add(err.pos, err.msg)
		return &cterm{kind: ctGround, val: g.terms.Int(0), pos: c.pos}
	}
	return &cterm{kind: ctGround, val: v, pos: c.pos}
}

// predID returns the id of predicate name/arity.
func (g *grounder) predID(name string, arity int) int32 {
	k := name + "/" + strconv.Itoa(arity)
	if id, ok := g.predIndex[k]; ok {
		return id
	}
	id := int32(len(g.preds))
	g.preds = append(g.preds, &predicate{name: name, arity: arity, aux: len(name) > 0 && name[0] == '#'})
	g.predIndex[k] = id
	return id
}

func (g *grounder) compileAtom(a *grammar.Atom, s *scope, interval bool) catom {
	c := catom{pred: g.predID(a.Predicate, len(a.Args)), pos: a.Pos}
	for _, t := range a.Args {
		a := g.compileTerm(t, s, interval)
		c.args = append(c.args, a)
		c.interval = c.interval || hasInterval(a)
	}
	return c
}

var cmpOps = map[grammar.CompareOp]CmpOp{
	grammar.Equal: Eq, grammar.NotEqual: Ne, grammar.Less: Lt,
	grammar.LessEqual: Le, grammar.Greater: Gt, grammar.GreaterEqual: Ge,
}

var aggKinds = map[grammar.AggregateFunc]AggregateKind{
	grammar.Count: Count, grammar.Sum: Sum, grammar.Min: Min, grammar.Max: Max,
}

// compileLits compiles body literals. Negative literals with anonymous
// variables become negative literals over a fresh projection predicate
// defined by an extra internal rule.
func (g *grounder) compileLits(lits []grammar.Literal, s *scope, stmt int, inAgg bool) []*clit {
	var out []*clit
	for _, l := range lits {
		switch l := l.(type) {
		case *grammar.AtomLiteral:
			if l.Negated && hasAnonymous(&l.Atom) {
				out = append(out, &clit{kind: litNeg, atom: g.project(&l.Atom, s, stmt), pos: l.Pos})
				continue
			}
			k := litPos
			if l.Negated {
				k = litNeg
			}
			out = append(out, &clit{kind: k, atom: g.compileAtom(&l.Atom, s, false), pos: l.Pos})
		case *grammar.Comparison:
			out = append(out, &clit{kind: litCmp, op: cmpOps[l.Op], l: g.compileTerm(l.Left, s, false), r: g.compileTerm(l.Right, s, false), pos: l.Pos})
		case *grammar.Aggregate:
			if inAgg {
				g.errorf(l.Pos, "aggregates may not be nested")
				continue
			}
			a := &aggLit{id: len(g.aggLits), pos: l.Pos, kind: aggKinds[l.Func], op: cmpOps[l.Op], stmt: stmt}
			for _, t := range l.Tuple {
				a.tuple = append(a.tuple, g.compileTerm(t, s, false))
			}
			if len(l.Condition) > 1000 {
				g.errorf(l.Pos, "an aggregate condition may have at most 1000 literals")
			}
			a.cond = g.compileLits(l.Condition, s, stmt, true)
			a.bound = g.compileTerm(l.Bound, s, false)
			a.single = len(l.Condition) == 1
			if a.single {
				al, ok := l.Condition[0].(*grammar.AtomLiteral)
				a.single = ok && !al.Negated
			}
			g.aggLits = append(g.aggLits, a)
			out = append(out, &clit{kind: litAgg, agg: a, pos: l.Pos})
		}
	}
	return out
}

func hasAnonymous(a *grammar.Atom) bool {
	for _, t := range a.Args {
		if termHasAnonymous(t) {
			return true
		}
	}
	return false
}

func termHasAnonymous(t grammar.Term) bool {
	switch t := t.(type) {
	case *grammar.Variable:
		return t.Anonymous
	case *grammar.Compound:
		for _, a := range t.Args {
			if termHasAnonymous(a) {
				return true
			}
		}
	case *grammar.Binary:
		return termHasAnonymous(t.Left) || termHasAnonymous(t.Right)
	case *grammar.Unary:
		return termHasAnonymous(t.Operand)
	}
	return false
}

func namedVars(t grammar.Term, dst []*grammar.Variable) []*grammar.Variable {
	switch t := t.(type) {
	case *grammar.Variable:
		if !t.Anonymous {
			for _, v := range dst {
				if v.Name == t.Name {
					return dst
				}
			}
			dst = append(dst, t)
		}
	case *grammar.Compound:
		for _, a := range t.Args {
			dst = namedVars(a, dst)
		}
	case *grammar.Binary:
		dst = namedVars(t.Left, dst)
		dst = namedVars(t.Right, dst)
	case *grammar.Unary:
		dst = namedVars(t.Operand, dst)
	}
	return dst
}

// project rewrites the atom of `not p(t..., _)` into `#notN(u...)`, where
// #notN is defined by the internal rule `#notN(v...) if p(t'...)`: every
// argument without an anonymous variable is passed through a fresh variable,
// and every argument with one passes its named variables.
func (g *grounder) project(a *grammar.Atom, s *scope, stmt int) catom {
	g.nproj++
	name := "#not" + strconv.Itoa(g.nproj)
	var headArgs, outerArgs, bodyArgs []grammar.Term
	for i, t := range a.Args {
		if !termHasAnonymous(t) {
			v := &grammar.Variable{Pos: t.Position(), Name: "#P" + strconv.Itoa(i)}
			headArgs = append(headArgs, v)
			bodyArgs = append(bodyArgs, v)
			outerArgs = append(outerArgs, t)
			continue
		}
		bodyArgs = append(bodyArgs, t)
		for _, v := range namedVars(t, nil) {
			headArgs = append(headArgs, v)
			outerArgs = append(outerArgs, v)
		}
	}
	rule := &grammar.Rule{
		Pos:  a.Pos,
		Head: grammar.Atom{Pos: a.Pos, Predicate: name, Args: headArgs},
		Body: []grammar.Literal{&grammar.AtomLiteral{Pos: a.Pos, Atom: grammar.Atom{Pos: a.Pos, Predicate: a.Predicate, Args: bodyArgs}}},
	}
	g.compileRule(irProject, stmt, &rule.Head, rule.Body)
	return g.compileAtom(&grammar.Atom{Pos: a.Pos, Predicate: name, Args: outerArgs}, s, false)
}

// compileRule compiles a rule, fact or projection rule (head != nil) or a
// constraint (head == nil).
func (g *grounder) compileRule(kind irKind, stmt int, head *grammar.Atom, body []grammar.Literal) {
	s := newScope()
	r := &irule{kind: kind, stmt: stmt}
	r.lits = g.compileLits(body, s, stmt, false)
	if head != nil {
		h := g.compileAtom(head, s, true)
		r.head = &h
	}
	g.finish(r, s, nil)
}

// finish computes globals of aggregates, the join plans and the safety of
// r; extra lists terms outside the body that must be bound.
func (g *grounder) finish(r *irule, s *scope, extra []*cterm) {
	r.nvars = len(s.names)
	for i, l := range r.lits {
		if l.kind == litPos {
			r.posLits = append(r.posLits, i)
		}
	}
	// Globals of aggregates: variables that occur elsewhere in the rule.
	var outside []*cterm
	if r.head != nil {
		outside = append(outside, r.head.args...)
	}
	outside = append(outside, extra...)
	for _, l := range r.lits {
		if l.kind == litAgg {
			g.aggGlobals(l.agg, r, outside, s)
		}
	}
	// Safety: plan without a delta literal and check every variable (this
	// plan is not run, so it makes no indexes).
	bound := make([]bool, r.nvars)
	g.dryRun = true
	_, unbound := g.plan(r.lits, bound, -1, r)
	g.dryRun = false
	var need []*cterm
	if r.head != nil {
		need = append(need, r.head.args...)
	}
	need = append(need, extra...)
	for _, t := range need {
		if v := firstUnbound(t, bound); v != nil {
			unbound = append(unbound, v)
		}
	}
	if len(unbound) > 0 {
		g.reportUnsafe(unbound, s)
		return
	}
	if len(r.posLits) == 0 {
		p, _ := g.plan(r.lits, make([]bool, r.nvars), -1, r)
		r.plans = [][]step{p}
	} else {
		for _, i := range r.posLits {
			p, _ := g.plan(r.lits, make([]bool, r.nvars), i, r)
			r.plans = append(r.plans, p)
		}
	}
	r.index = len(g.rules)
	g.rules = append(g.rules, r)
}

func (g *grounder) reportUnsafe(unbound []*cterm, s *scope) {
	seen := make(map[int]bool)
	for _, v := range unbound {
		if seen[v.slot] {
			continue
		}
		seen[v.slot] = true
		name := v.name
		pos := s.firstPos[v.slot]
		if v.anon {
			pos = v.pos
		}
		if v.anon {
			g.errorf(pos, "unsafe anonymous variable _: only an argument of an atom may be _")
			continue
		}
		g.errorf(pos, "unsafe variable %s: no positive body literal binds it (bind it with an atom of the body or with %s = term)", name, name)
	}
}

// aggGlobals computes the global variables of aggregate a (those that occur
// in r outside a) and its condition's plan.
func (g *grounder) aggGlobals(a *aggLit, r *irule, outside []*cterm, s *scope) {
	a.nvars = len(s.names)
	in := make([]bool, a.nvars)
	for _, t := range a.tuple {
		for _, v := range varsOf(t, nil) {
			in[v] = true
		}
	}
	for _, l := range a.cond {
		for _, t := range litTerms(l) {
			for _, v := range varsOf(t, nil) {
				in[v] = true
			}
		}
	}
	for _, v := range varsOf(a.bound, nil) {
		in[v] = true
	}
	out := make([]bool, a.nvars)
	for _, t := range outside {
		for _, v := range varsOf(t, nil) {
			out[v] = true
		}
	}
	for _, l := range r.lits {
		if l.kind == litAgg && l.agg == a {
			continue
		}
		for _, t := range litTerms(l) {
			for _, v := range varsOf(t, nil) {
				out[v] = true
			}
		}
	}
	a.globals = a.globals[:0]
	for v := range in {
		if in[v] && out[v] {
			a.globals = append(a.globals, v)
		}
	}
	// The bound's variables must be global.
	bound := make([]bool, a.nvars)
	for _, v := range a.globals {
		bound[v] = true
	}
	var unbound []*cterm
	if v := firstUnbound(a.bound, bound); v != nil {
		unbound = append(unbound, v)
	}
	p, ub := g.plan(a.cond, bound, -1, nil)
	unbound = append(unbound, ub...)
	for _, t := range a.tuple {
		if v := firstUnbound(t, bound); v != nil {
			unbound = append(unbound, v)
		}
	}
	if len(unbound) > 0 {
		g.reportUnsafe(unbound, s)
	}
	for i := range p {
		if p[i].kind == stepScan || p[i].kind == stepLookup {
			p[i].rk = rangeAll
		}
	}
	a.plan = p
}

// litTerms returns the terms of a literal (for aggregates: the terms of the
// tuple, the condition and the bound).
func litTerms(l *clit) []*cterm {
	switch l.kind {
	case litPos, litNeg:
		return l.atom.args
	case litCmp:
		return []*cterm{l.l, l.r}
	}
	var ts []*cterm
	ts = append(ts, l.agg.tuple...)
	for _, c := range l.agg.cond {
		ts = append(ts, litTerms(c)...)
	}
	return append(ts, l.agg.bound)
}

// plan orders the literals of a body into join steps. bound holds the
// variables bound on entry and is updated. first is the literal read from
// the delta (-1: none). Positive literals before first read old atoms,
// after it old and delta atoms. It returns the steps and the variables that
// no literal binds (unsafe).
func (g *grounder) plan(lits []*clit, bound []bool, first int, r *irule) ([]step, []*cterm) {
	var steps []step
	done := make([]bool, len(lits))
	scan := func(i int, rk rangeKind) {
		l := lits[i]
		st := step{kind: stepScan, lit: i, rk: rk}
		for j, t := range l.atom.args {
			if allBound(t, bound) {
				st.bound = append(st.bound, j)
			} else {
				st.free = append(st.free, j)
			}
		}
		st.vals = make([]Term, len(l.atom.args))
		if len(st.free) == 0 {
			st.kind = stepLookup
		} else if len(st.bound) > 0 && !g.dryRun {
			st.ix = g.preds[l.atom.pred].rel.getIndex(st.bound)
		}
		for _, t := range l.atom.args {
			bindAll(t, bound)
		}
		steps = append(steps, st)
		done[i] = true
	}
	if first >= 0 {
		scan(first, rangeDelta)
	}
	// place adds every literal other than a positive atom that is ready.
	// Negative literals and aggregates filter nothing while grounding (they
	// are recorded and decided later), so they come last, once every
	// positive literal is matched.
	place := func(late bool) {
		for progress := true; progress; {
			progress = false
			for i, l := range lits {
				if done[i] || l.kind == litPos || (!late && l.kind != litCmp) {
					continue
				}
				switch l.kind {
				case litCmp:
					lb, rb := allBound(l.l, bound), allBound(l.r, bound)
					switch {
					case lb && rb:
						steps = append(steps, step{kind: stepTest, lit: i})
					case l.op == Eq && rb && matchable(l.l, bound):
						steps = append(steps, step{kind: stepMatch, lit: i, left: true})
						bindAll(l.l, bound)
					case l.op == Eq && lb && matchable(l.r, bound):
						steps = append(steps, step{kind: stepMatch, lit: i})
						bindAll(l.r, bound)
					default:
						continue
					}
				case litNeg:
					ok := true
					for _, t := range l.atom.args {
						ok = ok && allBound(t, bound)
					}
					if !ok {
						continue
					}
					steps = append(steps, step{kind: stepNeg, lit: i, vals: make([]Term, len(l.atom.args))})
				case litAgg:
					ok := true
					for _, v := range l.agg.globals {
						ok = ok && bound[v]
					}
					if !ok {
						continue
					}
					steps = append(steps, step{kind: stepAgg, lit: i})
				}
				done[i] = true
				progress = true
			}
		}
	}
	for {
		place(false)
		// The positive literal with the most bound arguments goes next;
		// one with all its arguments bound goes first.
		best, bestScore := -1, -1
		for i, l := range lits {
			if done[i] || l.kind != litPos {
				continue
			}
			score := 0
			ok := true
			for _, t := range l.atom.args {
				if allBound(t, bound) {
					score++
				} else if !matchable(t, bound) {
					ok = false
				}
			}
			if score == len(l.atom.args) {
				score = 1 << 20 // a mere lookup filters without fanning out
			}
			if ok && score > bestScore {
				best, bestScore = i, score
			}
		}
		if best < 0 {
			break
		}
		rk := rangeAll
		if first >= 0 {
			rk = rangeNew
			if best < first {
				rk = rangeOld
			}
		} else if r != nil {
			rk = rangeNew
		}
		scan(best, rk)
	}
	place(true)
	var unbound []*cterm
	for i, l := range lits {
		if done[i] {
			continue
		}
		var ts []*cterm
		if l.kind == litAgg {
			for _, v := range l.agg.globals {
				if !bound[v] {
					ts = append(ts, &cterm{kind: ctVar, slot: v})
				}
			}
			if len(ts) == 0 {
				ts = append(ts, l.agg.bound)
			}
		} else {
			ts = litTerms(l)
		}
		for _, t := range ts {
			if v := firstUnbound(t, bound); v != nil {
				unbound = append(unbound, v)
			}
		}
	}
	return steps, unbound
}

// compileChoice compiles a choice statement into one internal rule for its
// body and one per element.
func (g *grounder) compileChoice(c *grammar.Choice, stmt int) {
	s := newScope()
	body := g.compileLits(c.Body, s, stmt, false)
	ci := &choiceInfo{id: stmt, pos: c.Pos, bound: c.Bound}
	if c.Bound.Low != nil {
		ci.low = g.compileTerm(c.Bound.Low, s, false)
	}
	if c.Bound.High != nil {
		ci.high = g.compileTerm(c.Bound.High, s, false)
	}
	var bounds []*cterm
	if ci.low != nil {
		bounds = append(bounds, ci.low)
	}
	if ci.high != nil {
		bounds = append(bounds, ci.high)
	}
	n := len(g.errs)
	g.finish(&irule{kind: irChoiceBody, stmt: stmt, lits: body, choice: ci}, s, bounds)
	if len(g.errs) > n {
		return
	}
	// The body's variables (not those local to its aggregates) identify
	// a choice instance.
	seen := make([]bool, len(s.names))
	mark := func(v int) {
		if !seen[v] {
			seen[v] = true
			ci.bodyVars = append(ci.bodyVars, v)
		}
	}
	for _, l := range body {
		if l.kind == litAgg {
			for _, v := range l.agg.globals {
				mark(v)
			}
			continue
		}
		for _, t := range litTerms(l) {
			for _, v := range varsOf(t, nil) {
				mark(v)
			}
		}
	}
	sort.Ints(ci.bodyVars)
	for i := range c.Elements {
		e := &c.Elements[i]
		// An element's rule reads the body's positive literals and
		// comparisons (negative literals and aggregates never block the
		// over-approximation; the body's own rule records them) and then
		// the element's `for` literals. Elements share the statement's
		// scope: each element rule has its own binding.
		var lits []*clit
		for _, l := range body {
			if l.kind == litPos || l.kind == litCmp {
				lits = append(lits, l)
			}
		}
		nb := len(lits)
		forLits := g.compileLits(e.For, s, stmt, false)
		for _, l := range forLits {
			if l.kind == litAgg {
				g.errorf(l.pos, "an aggregate may not appear in the for condition of a choice element")
			}
		}
		lits = append(lits, forLits...)
		h := g.compileAtom(&e.Atom, s, true)
		g.finish(&irule{kind: irChoiceElem, stmt: stmt, head: &h, lits: lits, nBody: nb, choice: ci, elem: i}, s, nil)
	}
}

// compilePenalty compiles a penalty statement.
func (g *grounder) compilePenalty(p *grammar.Penalty, stmt int) {
	s := newScope()
	body := g.compileLits(p.Body, s, stmt, false)
	pi := &penInfo{weight: g.compileTerm(p.Weight, s, false)}
	extra := []*cterm{pi.weight}
	if p.Priority != nil {
		pi.priority = g.compileTerm(p.Priority, s, false)
		extra = append(extra, pi.priority)
	}
	for _, t := range p.Per {
		c := g.compileTerm(t, s, false)
		pi.per = append(pi.per, c)
		extra = append(extra, c)
	}
	g.finish(&irule{kind: irPenalty, stmt: stmt, lits: body, pen: pi}, s, extra)
}

func (g *grounder) errorf(pos grammar.Pos, format string, args ...any) {
	g.errs.Add(pos, fmt.Sprintf(format, args...))
}
