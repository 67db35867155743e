package ground

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"time"

	"trellis/grammar"
)

// DefaultMaxRules is the ground-size limit when Options.MaxRules is 0. A
// ground rule takes roughly 100 to 200 bytes while grounding, so twenty
// million fit comfortably in a machine with 24 GiB of memory (common
// practice, no source).
const DefaultMaxRules = 20_000_000

// maxErrors is the number of errors after which grounding stops.
const maxErrors = 20

// Options controls Ground.
type Options struct {
	// Params overrides parameters of the model: name -> source text of a
	// term, which may use other parameters.
	Params map[string]string
	// MaxRules bounds the number of ground rule instances; 0 means
	// DefaultMaxRules.
	MaxRules int
	// ReadFile reads included files; nil means os.ReadFile.
	ReadFile func(path string) ([]byte, error)
}

// Report describes a grounding run.
type Report struct {
	Atoms      int // atoms of the ground program
	Rules      int // rules (facts and constraints included)
	Choices    int // ground choices
	Aggregates int // aggregates left undecided by grounding
	Penalties  int // penalty entries
	// Instances is the number of ground instances of statements before
	// simplification.
	Instances int
	// Largest is the position of the statement with the most ground
	// instances, and LargestInstances their number.
	Largest          grammar.Pos
	LargestInstances int
	// Rounds is the number of semi-naive rounds.
	Rounds int
	// Files lists the model files read, the main file first.
	Files []string
	// Duration is the wall-clock time Ground took.
	Duration time.Duration
	// Warnings are positioned messages that do not stop grounding, sorted
	// by position.
	Warnings grammar.ErrorList
}

// ErrLimit matches (with errors.Is) the error Ground returns when the
// ground program would exceed Options.MaxRules.
var ErrLimit = errors.New("ground-size limit reached")

// LimitError is the error Ground returns when the ground program would
// exceed its size limit: a positioned message at the statement that produced
// the most ground rules. It matches ErrLimit, and errors.As finds its
// grammar.ErrorList.
type LimitError struct {
	List grammar.ErrorList
}

// Error returns the positioned message.
func (e *LimitError) Error() string { return e.List.Error() }

// Unwrap returns the positioned message as an error list.
func (e *LimitError) Unwrap() error { return e.List }

// Is reports whether target is ErrLimit.
func (e *LimitError) Is(target error) bool { return target == ErrLimit }

// abort stops grounding from deep inside the evaluation.
type abort struct{ err error }

// aggInst is one ground instance of an aggregate literal: the literal with
// its global variables bound.
type aggInst struct {
	lit      *aggLit
	binding  []Term // values of lit.globals
	bound    int64
	atom     int32 // the internal #agg atom
	elems    []WeightedAtom
	decision int8 // 0 unknown, 1 true, -1 false
}

// choiceInst is one ground instance of a choice (its body with the body's
// variables bound).
type choiceInst struct {
	info     *choiceInfo
	low, up  int64
	atom     int32 // internal atom standing for "the body holds"
	live     bool  // the body instance was recorded and survives simplification
	pos, neg []Atom
	elems    []int32 // internal atoms of the elements whose `for` condition holds
}

// penVal holds the evaluated terms of one penalty instance.
type penVal struct {
	weight, priority int64
	per              []Term
}

// grounder holds the state of one Ground call.
type grounder struct {
	ctx   context.Context
	opts  Options
	prog  *Program
	terms *TermTable
	ev    evaluator

	errs     grammar.ErrorList
	errSeen  map[string]bool
	warnings grammar.ErrorList

	files   []string
	loaded  map[string]bool
	stmts   []grammar.Statement
	stmtPos []grammar.Pos
	params  map[string]*paramInfo

	preds     []*predicate
	predIndex map[string]int32
	atoms     atomTable
	rules     []*irule
	nproj     int
	nserial   int64
	dryRun    bool // planning only to check safety: make no indexes

	aggLits   []*aggLit
	aggInsts  []aggInst
	aggIndex  map[string]int32
	choices   []choiceInst
	choiceKey map[string]int32
	penVals   []penVal

	// stream holds the ground instances: a header [rule, head, counts,
	// extra] followed by the positive, negative and aggregate references.
	stream   stream
	perStmt  []int
	total    int
	maxRules int
	rounds   int

	matched []int32
	trail   []int
	steps   uint64 // join steps, to check for cancellation now and then
	key     []byte
	heads   []int32
}

// paramInfo is a declared parameter.
type paramInfo struct {
	pos      grammar.Pos
	value    grammar.Term
	override bool
	state    uint8 // 0 not evaluated, 1 evaluating, 2 done
	val      Term
}

// Ground reads the model in src (and the files it includes), grounds it and
// returns the ground program. filename names src in positions and is the
// base for relative includes. Errors are a grammar.ErrorList sorted by
// position; cancelling ctx stops grounding with ctx's error.
func Ground(ctx context.Context, filename string, src []byte, opts Options) (prog *Program, rep *Report, err error) {
	start := time.Now()
	g := newGrounder(ctx, opts)
	rep = &Report{}
	defer func() {
		if r := recover(); r != nil {
			a, ok := r.(abort)
			if !ok {
				panic(r)
			}
			prog, err = nil, a.err
		}
		rep.Duration = time.Since(start)
		rep.Files = g.files
		g.warnings.Sort()
		rep.Warnings = g.warnings
	}()
	// The phases, each group ending where errors are looked at.
	phases := [][]func(){
		{func() { g.load(filepath.Clean(filename), filename, src, nil) }},
		{g.collectParams, g.checkArities, g.checkAggregateCycles},
		{g.compile},
		{g.fixpoint},
		{g.groundAggregates},
		{g.settle, g.build},
	}
	for _, group := range phases {
		for _, phase := range group {
			phase()
		}
		if err := g.failed(); err != nil {
			return nil, rep, err
		}
	}
	p := g.prog
	rep.Atoms, rep.Rules, rep.Choices = len(p.Atoms), len(p.Rules), len(p.Choices)
	rep.Aggregates, rep.Penalties = len(p.Aggregates), len(p.Penalties)
	rep.Instances, rep.Rounds = g.total, g.rounds
	for i, n := range g.perStmt {
		if n > rep.LargestInstances {
			rep.Largest, rep.LargestInstances = g.stmtPos[i], n
		}
	}
	return p, rep, nil
}

func newGrounder(ctx context.Context, opts Options) *grounder {
	g := &grounder{
		ctx:       ctx,
		opts:      opts,
		prog:      &Program{},
		errSeen:   make(map[string]bool),
		loaded:    make(map[string]bool),
		params:    make(map[string]*paramInfo),
		predIndex: make(map[string]int32),
		aggIndex:  make(map[string]int32),
		choiceKey: make(map[string]int32),
		maxRules:  opts.MaxRules,
	}
	if g.maxRules <= 0 {
		g.maxRules = DefaultMaxRules
	}
	g.terms = &g.prog.Terms
	g.ev.terms = g.terms
	return g
}

// failed returns the errors so far, sorted, or nil.
func (g *grounder) failed() error {
	if len(g.errs) == 0 {
		return nil
	}
	g.errs.Sort()
	if len(g.errs) > maxErrors {
		g.errs = g.errs[:maxErrors]
	}
	return g.errs
}

// fail records an evaluation error (once per position and message) and
// stops grounding when there are too many.
func (g *grounder) fail(e *evalError) {
	k := e.Error()
	if g.errSeen[k] {
		return
	}
	g.errSeen[k] = true
	g.errs.Add(e.pos, e.msg)
	if len(g.errs) >= maxErrors {
		panic(abort{g.failed()})
	}
}

// ---------------------------------------------------------------------------
// Loading, includes and parameters

func (g *grounder) load(path, filename string, src []byte, stack []string) {
	g.loaded[path] = true
	g.files = append(g.files, filename)
	stack = append(stack, path)
	f, err := grammar.ParseFile(filename, src)
	if err != nil {
		var list grammar.ErrorList
		if errors.As(err, &list) {
			g.errs = append(g.errs, list...)
		} else {
			g.errs.Add(grammar.Pos{Filename: filename}, err.Error())
		}
	}
	if f == nil {
		return
	}
	read := g.opts.ReadFile
	if read == nil {
		read = os.ReadFile
	}
	for _, st := range f.Statements {
		inc, ok := st.(*grammar.Include)
		if !ok {
			g.stmts = append(g.stmts, st)
			g.stmtPos = append(g.stmtPos, st.Position())
			continue
		}
		name := inc.Path
		if !filepath.IsAbs(name) {
			name = filepath.Join(filepath.Dir(filename), name)
		}
		clean := filepath.Clean(name)
		for i, s := range stack {
			if s == clean {
				cycle := append(append([]string(nil), stack[i:]...), clean)
				g.errorf(inc.Pos, "include cycle: %s", strings.Join(cycle, " -> "))
				clean = ""
				break
			}
		}
		if clean == "" || g.loaded[clean] {
			continue // included already: its statements count once
		}
		data, err := read(name)
		if err != nil {
			g.errorf(inc.Pos, "cannot read included file %q: %v", inc.Path, err)
			continue
		}
		g.load(clean, name, data, stack)
	}
}

func (g *grounder) collectParams() {
	for _, st := range g.stmts {
		p, ok := st.(*grammar.Param)
		if !ok {
			continue
		}
		if old, ok := g.params[p.Name]; ok {
			g.errorf(p.Pos, "parameter %s is defined twice (first at %s)", p.Name, old.pos)
			continue
		}
		g.params[p.Name] = &paramInfo{pos: p.Pos, value: p.Value}
	}
	names := make([]string, 0, len(g.opts.Params))
	for n := range g.opts.Params {
		names = append(names, n)
	}
	sort.Strings(names)
	for _, n := range names {
		text := g.opts.Params[n]
		// The command line recognises the "parameter NAME" file name and
		// renders it as --param NAME.
		where := grammar.Pos{Filename: "parameter " + n}
		p, ok := g.params[n]
		if !ok {
			g.errorf(where, "unknown parameter %s: the model declares no `param %s = ...`", n, n)
			continue
		}
		f, err := grammar.ParseFile("parameter "+n, []byte("param "+n+" = "+text+"."))
		var v grammar.Term
		if err == nil && len(f.Statements) == 1 {
			if q, ok := f.Statements[0].(*grammar.Param); ok && q.Name == n {
				v = q.Value
			}
		}
		if v == nil {
			g.errorf(where, "the value %q given for parameter %s is not a term", text, n)
			continue
		}
		p.value, p.override = v, true
	}
}

// paramValue returns the value of parameter name, evaluating it on first
// use; ok is false when name is no parameter.
func (g *grounder) paramValue(name string, use grammar.Pos) (Term, bool) {
	p, ok := g.params[name]
	if !ok {
		return noTerm, false
	}
	switch p.state {
	case 1:
		g.errorf(use, "parameter %s is defined in terms of itself", name)
		return g.terms.Int(0), true
	case 2:
		return p.val, true
	}
	p.state = 1
	c := g.compileTerm(p.value, newScope(), false)
	p.state = 2
	if c.kind != ctGround {
		g.errorf(p.value.Position(), "the value of parameter %s must be a ground term (without variables)", name)
		p.val = g.terms.Int(0)
		return p.val, true
	}
	p.val = c.val
	return p.val, true
}

// compile compiles every statement into internal rules.
func (g *grounder) compile() {
	for i, st := range g.stmts {
		switch st := st.(type) {
		case *grammar.Fact:
			g.compileRule(irRule, i, &st.Head, nil)
		case *grammar.Rule:
			g.compileRule(irRule, i, &st.Head, st.Body)
		case *grammar.Constraint:
			g.compileRule(irConstraint, i, nil, st.Body)
		case *grammar.Choice:
			g.compileChoice(st, i)
		case *grammar.Penalty:
			g.compilePenalty(st, i)
		}
	}
	for _, r := range g.rules {
		if len(r.lits) > 1000 {
			g.errorf(g.stmtPos[r.stmt], "a statement may have at most 1000 body literals")
		}
	}
	g.perStmt = make([]int, len(g.stmts))
}

// ---------------------------------------------------------------------------
// The fixpoint

// fixpoint runs semi-naive evaluation until no new atom is derived.
func (g *grounder) fixpoint() {
	for _, r := range g.rules {
		if len(r.posLits) == 0 {
			g.run(r, r.plans[0])
		}
	}
	for {
		more := false
		for _, p := range g.preds {
			if p.rel.advance() {
				more = true
			}
		}
		if !more {
			return
		}
		g.rounds++
		if err := g.ctx.Err(); err != nil {
			panic(abort{err})
		}
		for _, r := range g.rules {
			for i, li := range r.posLits {
				rel := &g.preds[r.lits[li].atom.pred].rel
				if rel.deltaStart < rel.deltaEnd {
					g.run(r, r.plans[i])
				}
			}
		}
	}
}

// run evaluates one plan of r and records every instance it finds.
func (g *grounder) run(r *irule, plan []step) {
	b := make([]Term, r.nvars)
	for i := range b {
		b[i] = noTerm
	}
	if cap(g.matched) < len(r.lits) {
		g.matched = make([]int32, len(r.lits))
	}
	matched := g.matched[:len(r.lits)]
	g.join(r.lits, plan, 0, b, matched, func() { g.emit(r, b, matched) })
}

// join evaluates plan from step k under binding b and calls emit for each
// complete match. matched receives, per literal, the matched atom (or
// aggregate instance).
func (g *grounder) join(lits []*clit, plan []step, k int, b []Term, matched []int32, emit func()) {
	if k == len(plan) {
		emit()
		return
	}
	if g.steps++; g.steps&0xFFFF == 0 {
		if err := g.ctx.Err(); err != nil {
			panic(abort{err})
		}
	}
	st := &plan[k]
	l := lits[st.lit]
	switch st.kind {
	case stepScan:
		rel := &g.preds[l.atom.pred].rel
		lo, hi := rel.bounds(st.rk)
		if lo >= hi {
			return
		}
		for _, p := range st.bound {
			v, err := g.ev.eval(l.atom.args[p], b)
			if err != nil {
				g.fail(err)
				return
			}
			st.vals[p] = v
		}
		arity := len(l.atom.args)
		try := func(pos int32) {
			a := rel.atoms[pos]
			args := g.atoms.argsOf(a, arity)
			for _, p := range st.bound {
				if args[p] != st.vals[p] {
					return
				}
			}
			mark := len(g.trail)
			ok := true
			for _, p := range st.free {
				if !g.ev.match(l.atom.args[p], args[p], b, &g.trail) {
					ok = false
					break
				}
			}
			if ok {
				matched[st.lit] = a
				g.join(lits, plan, k+1, b, matched, emit)
			}
			for _, s := range g.trail[mark:] {
				b[s] = noTerm
			}
			g.trail = g.trail[:mark]
		}
		if st.ix != nil {
			list := from(st.ix.m[hashPositions(st.vals, st.ix.positions)], lo)
			for _, pos := range list {
				if int(pos) >= hi {
					break
				}
				try(pos)
			}
			return
		}
		for pos := lo; pos < hi; pos++ {
			try(int32(pos))
		}
	case stepLookup:
		rel := &g.preds[l.atom.pred].rel
		lo, hi := rel.bounds(st.rk)
		if lo >= hi {
			return
		}
		for p, t := range l.atom.args {
			v, err := g.ev.eval(t, b)
			if err != nil {
				g.fail(err)
				return
			}
			st.vals[p] = v
		}
		a, ok := g.atoms.lookup(l.atom.pred, st.vals)
		if !ok {
			return
		}
		if rp := int(g.atoms.relPos[a]); rp < lo || rp >= hi {
			return
		}
		matched[st.lit] = a
		g.join(lits, plan, k+1, b, matched, emit)
	case stepNeg:
		for p, t := range l.atom.args {
			v, err := g.ev.eval(t, b)
			if err != nil {
				g.fail(err)
				return
			}
			st.vals[p] = v
		}
		matched[st.lit] = g.atoms.intern(l.atom.pred, st.vals)
		g.join(lits, plan, k+1, b, matched, emit)
	case stepTest:
		x, err := g.ev.eval(l.l, b)
		if err != nil {
			g.fail(err)
			return
		}
		y, err := g.ev.eval(l.r, b)
		if err != nil {
			g.fail(err)
			return
		}
		if g.compare(l.op, x, y) {
			g.join(lits, plan, k+1, b, matched, emit)
		}
	case stepMatch:
		pat, val := l.r, l.l
		if st.left {
			pat, val = l.l, l.r
		}
		v, err := g.ev.eval(val, b)
		if err != nil {
			g.fail(err)
			return
		}
		mark := len(g.trail)
		if g.ev.match(pat, v, b, &g.trail) {
			g.join(lits, plan, k+1, b, matched, emit)
		}
		for _, s := range g.trail[mark:] {
			b[s] = noTerm
		}
		g.trail = g.trail[:mark]
	case stepAgg:
		ai, ok := g.aggInstance(l.agg, b)
		if !ok {
			return
		}
		matched[st.lit] = ai
		g.join(lits, plan, k+1, b, matched, emit)
	}
}

// compare evaluates a comparison between ground terms in term order.
func (g *grounder) compare(op CmpOp, x, y Term) bool {
	switch op {
	case Eq:
		return x == y
	case Ne:
		return x != y
	}
	return op.Holds(int64(g.terms.Compare(x, y)), 0)
}

// aggInstance returns the instance of aggregate a for the global values in
// b, creating it.
func (g *grounder) aggInstance(a *aggLit, b []Term) (int32, bool) {
	k := g.key[:0]
	k = strconv.AppendInt(k, int64(a.id), 10)
	for _, v := range a.globals {
		k = append(k, ',')
		k = strconv.AppendInt(k, int64(b[v]), 10)
	}
	g.key = k
	if id, ok := g.aggIndex[string(k)]; ok {
		return id, true
	}
	bv, err := g.ev.eval(a.bound, b)
	if err != nil {
		g.fail(err)
		return 0, false
	}
	n, isInt := g.terms.IntValue(bv)
	if !isInt {
		g.fail(evalErrorf(a.bound.pos, "the bound of an aggregate must be an integer, not %s", g.terms.TermString(bv)))
		return 0, false
	}
	id := int32(len(g.aggInsts))
	inst := aggInst{lit: a, bound: n, atom: g.serialAtom("#agg")}
	for _, v := range a.globals {
		inst.binding = append(inst.binding, b[v])
	}
	g.aggInsts = append(g.aggInsts, inst)
	g.aggIndex[string(k)] = id
	return id, true
}

// serialAtom returns a fresh internal auxiliary atom #kind(n); the output
// renumbers n to the atom's index in the program, as Program.NewAux does.
func (g *grounder) serialAtom(kind string) int32 {
	g.nserial++
	return g.atoms.intern(g.predID(kind, 1), []Term{g.terms.Int(g.nserial)})
}

// derive marks atom a possible and adds it to its relation.
func (g *grounder) derive(a int32) {
	if g.atoms.state[a]&stPossible != 0 {
		return
	}
	g.atoms.state[a] |= stPossible
	p := g.preds[g.atoms.pred[a]]
	g.atoms.relPos[a] = p.rel.add(a, g.atoms.argsOf(a, p.arity))
}

// headAtoms returns the atoms of head h under b (several when its
// arguments contain intervals).
func (g *grounder) headAtoms(h *catom, b []Term) []int32 {
	heads := g.heads[:0]
	if !h.interval {
		vals := g.ev.scratch(len(h.args))
		for i, t := range h.args {
			v, err := g.ev.eval(t, b)
			if err != nil {
				g.fail(err)
				return nil
			}
			vals[i] = v
		}
		g.heads = append(heads, g.atoms.intern(h.pred, vals))
		return g.heads
	}
	g.heads = g.expandHead(h, b, heads)
	return g.heads
}

// expandHead appends the atoms of a head with intervals to heads.
func (g *grounder) expandHead(h *catom, b []Term, heads []int32) []int32 {
	vals := make([]Term, len(h.args))
	var rec func(i int) *evalError
	rec = func(i int) *evalError {
		if i == len(h.args) {
			if g.total+len(heads) >= g.maxRules {
				g.tooBig()
			}
			heads = append(heads, g.atoms.intern(h.pred, vals))
			return nil
		}
		if h.args[i].kind != ctInterval && h.args[i].kind != ctCompound {
			v, err := g.ev.eval(h.args[i], b)
			if err != nil {
				return err
			}
			vals[i] = v
			return rec(i + 1)
		}
		return g.ev.expand(h.args[i], b, func(v Term) *evalError {
			vals[i] = v
			return rec(i + 1)
		})
	}
	if err := rec(0); err != nil {
		g.fail(err)
		heads = heads[:0]
	}
	return heads
}

// emit records the ground instance of r under binding b.
func (g *grounder) emit(r *irule, b []Term, matched []int32) {
	extra := int32(-1)
	head := int32(-1)
	switch r.kind {
	case irChoiceBody, irChoiceElem:
		ci, ok := g.choiceInstance(r, b)
		if !ok {
			return
		}
		extra = ci
	case irPenalty:
		pv, ok := g.penaltyValues(r.pen, b)
		if !ok {
			return
		}
		extra = int32(len(g.penVals))
		g.penVals = append(g.penVals, pv)
	}
	if r.kind == irChoiceBody {
		head = g.choices[extra].atom
	}
	if r.head == nil {
		g.record(r, head, extra, matched)
		return
	}
	for _, h := range g.headAtoms(r.head, b) {
		g.record(r, h, extra, matched)
		g.derive(h)
	}
}

// record appends one instance to the stream.
func (g *grounder) record(r *irule, head, extra int32, matched []int32) {
	g.total++
	g.perStmt[r.stmt]++
	if g.total > g.maxRules {
		g.tooBig()
	}
	if g.total&4095 == 0 {
		if err := g.ctx.Err(); err != nil {
			panic(abort{err})
		}
	}
	first := 0
	if r.kind == irChoiceElem {
		first = r.nBody
	}
	var npos, nneg, nagg int32
	for _, l := range r.lits[first:] {
		switch l.kind {
		case litPos:
			npos++
		case litNeg:
			nneg++
		case litAgg:
			nagg++
		}
	}
	c, _ := g.stream.tail(4 + len(r.lits))
	*c = append(*c, int32(r.index), head, npos|nneg<<10|nagg<<20, extra)
	for _, kind := range [...]litKind{litPos, litNeg, litAgg} {
		for i, l := range r.lits[first:] {
			if l.kind == kind {
				*c = append(*c, matched[first+i])
			}
		}
	}
}

func (g *grounder) tooBig() {
	worst := 0
	for i, n := range g.perStmt {
		if n > g.perStmt[worst] {
			worst = i
		}
	}
	panic(abort{&LimitError{List: grammar.ErrorList{{Pos: g.stmtPos[worst], Msg: fmt.Sprintf(
		"grounding exceeds the limit of %d ground rules; this statement produced the most (%d); raise the limit with --max-rules",
		g.maxRules, g.perStmt[worst])}}}})
}

// choiceInstance returns the choice instance of r's choice for the values
// of the body variables in b, creating it.
func (g *grounder) choiceInstance(r *irule, b []Term) (int32, bool) {
	ci := r.choice
	k := g.key[:0]
	k = strconv.AppendInt(k, int64(ci.id), 10)
	for _, v := range ci.bodyVars {
		k = append(k, ',')
		k = strconv.AppendInt(k, int64(b[v]), 10)
	}
	g.key = k
	id, ok := g.choiceKey[string(k)]
	if !ok {
		id = int32(len(g.choices))
		g.choices = append(g.choices, choiceInst{info: ci, up: NoUpper, atom: g.serialAtom("#choice")})
		g.choiceKey[string(k)] = id
	}
	if r.kind == irChoiceBody {
		c := &g.choices[id]
		if ci.low != nil {
			v, ok := g.intTerm(ci.low, b, "a choice bound")
			if !ok {
				return 0, false
			}
			c.low = v
		}
		if ci.high != nil {
			v, ok := g.intTerm(ci.high, b, "a choice bound")
			if !ok {
				return 0, false
			}
			c.up = v
		}
	}
	return id, true
}

// intTerm evaluates t, which must be an integer.
func (g *grounder) intTerm(t *cterm, b []Term, what string) (int64, bool) {
	v, err := g.ev.eval(t, b)
	if err != nil {
		g.fail(err)
		return 0, false
	}
	n, ok := g.terms.IntValue(v)
	if !ok {
		g.fail(evalErrorf(t.pos, "%s must be an integer, not %s", what, g.terms.TermString(v)))
		return 0, false
	}
	return n, true
}

func (g *grounder) penaltyValues(p *penInfo, b []Term) (penVal, bool) {
	var pv penVal
	var ok bool
	if pv.weight, ok = g.intTerm(p.weight, b, "a penalty weight"); !ok {
		return pv, false
	}
	if p.priority != nil {
		if pv.priority, ok = g.intTerm(p.priority, b, "a penalty priority"); !ok {
			return pv, false
		}
	}
	for _, t := range p.per {
		v, err := g.ev.eval(t, b)
		if err != nil {
			g.fail(err)
			return pv, false
		}
		pv.per = append(pv.per, v)
	}
	return pv, true
}
