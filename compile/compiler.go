package compile

import (
	"context"
	"errors"
	"fmt"
	"slices"
	"time"
)

// DefaultMaxNodes is the node limit Compile uses when Options.MaxNodes is 0.
// During compilation a node costs about 40 bytes plus 8 per edge, and the
// finished circuit about 20 bytes plus 4 per edge again; compiled circuits
// have about a dozen edges per node. With the component cache
// (DefaultMaxCacheBytes) the default keeps a compilation within about 16 GiB,
// leaving room on a 24 GiB machine.
const DefaultMaxNodes = 60_000_000

// ErrNodeLimit matches (with errors.Is) the error Compile returns when the
// circuit would exceed Options.MaxNodes.
var ErrNodeLimit = errors.New("circuit node limit reached")

// NodeLimitError is the error Compile returns when the circuit would exceed
// its node limit. It matches ErrNodeLimit.
type NodeLimitError struct {
	Limit int // the node limit that was reached
	Width int // the estimated width of the formula
}

// Error says which limit was reached and how to raise it.
func (e *NodeLimitError) Error() string {
	return fmt.Sprintf("compilation stopped: the circuit exceeds the node limit of %d nodes (estimated width %d); raise it with --max-nodes", e.Limit, e.Width)
}

// Is reports whether target is ErrNodeLimit.
func (e *NodeLimitError) Is(target error) bool { return target == ErrNodeLimit }

// Options controls Compile.
type Options struct {
	// MaxNodes bounds the number of circuit nodes built; 0 means
	// DefaultMaxNodes. Exceeding it is an error.
	MaxNodes int `json:"max_nodes"`
	// MaxLearned bounds the number of learned clauses kept at a time; 0
	// means a default that grows with the number of conflicts.
	MaxLearned int `json:"max_learned"`
	// MaxCacheBytes bounds the memory of the component cache keys; when it
	// is reached the cache is emptied and compilation goes on. 0 means
	// DefaultMaxCacheBytes.
	MaxCacheBytes int `json:"max_cache_bytes"`
}

// DefaultMaxCacheBytes is the cache key memory Compile uses when
// Options.MaxCacheBytes is 0.
const DefaultMaxCacheBytes = 2 << 30

// Report describes a compilation.
type Report struct {
	Vars      int           `json:"vars"`       // variables of the formula
	Clauses   int           `json:"clauses"`    // clauses of the formula
	Nodes     int           `json:"nodes"`      // nodes of the circuit
	Edges     int           `json:"edges"`      // parent-child edges of the circuit
	Width     int           `json:"width"`      // estimated width of the decomposition (min-fill elimination)
	Decisions int           `json:"decisions"`  // decisions of the search
	Conflicts int           `json:"conflicts"`  // conflicts, each giving a learned clause
	CacheHits int           `json:"cache_hits"` // components found in the cache
	Duration  time.Duration `json:"duration"`   // wall-clock time of Compile
}

// Compile compiles f into a smooth decision-DNNF circuit whose models over
// the variables 1..f.NumVars are exactly the models of f.
//
// The search is top-down (Darwiche 2004; Huang and Darwiche 2007): unit
// propagation with two watched literals, decomposition of the residual
// formula into independent components (AndNode), decisions (OrNode), a
// component cache, and clause learning on conflicts. Decisions prefer the
// variables near the root of a min-fill elimination tree of the primal graph,
// then the variables with the highest activity (after Korhonen and Järvisalo
// 2021). Compilation stops with an error when the circuit would exceed
// opts.MaxNodes nodes or when ctx is done.
func Compile(ctx context.Context, f *CNF, opts Options) (*Circuit, *Report, error) {
	start := time.Now()
	rep := &Report{Vars: f.NumVars, Clauses: f.NumClauses()}
	if f.NumVars < 0 || f.NumVars > 1<<29 {
		return nil, rep, fmt.Errorf("compile: cannot compile a formula with %d variables", f.NumVars)
	}
	for i, l := range f.Lits {
		if l == 0 || int(l.Var()) > f.NumVars {
			return nil, rep, fmt.Errorf("compile: literal %d (position %d) is outside the variables 1..%d", l, i, f.NumVars)
		}
	}
	c := newCompiler(ctx, f, opts)
	depth, width, err := dcDecompose(ctx, f)
	if err != nil {
		return nil, rep, fmt.Errorf("compilation %s while computing a tree decomposition: %w", dcStopped(err), err)
	}
	rep.Width = width
	c.width = width
	c.b.width = width
	c.depth = depth
	circuit, err := c.run()
	rep.Decisions = c.decisions
	rep.Conflicts = c.conflicts
	rep.CacheHits = c.hits
	rep.Duration = time.Since(start)
	if err != nil {
		return nil, rep, err
	}
	rep.Nodes = circuit.NumNodes()
	rep.Edges = circuit.NumEdges()
	return circuit, rep, nil
}

// dcBailout carries an error out of the recursive search.
type dcBailout struct{ err error }

// noClause marks a variable assigned without reason (a decision).
const noClause = -1

// watcher is an entry of a watch list: the clause and a literal of it that,
// when true, satisfies the clause without looking at it.
type watcher struct {
	clause  int32
	blocker uint32
}

// compiler holds the state of one compilation. Literals are numbered
// internally 2v (positive) and 2v+1 (negative).
type compiler struct {
	ctx      context.Context
	nvars    int
	numOrig  int // clauses [0, numOrig) are original
	maxNodes int
	width    int

	// Clause arena: clause i is lits[cstart[i] : cstart[i]+csize[i]]; the
	// watched literals of a clause of size ≥ 2 are its first two.
	lits    []uint32
	cstart  []int
	csize   []int32
	deleted []bool
	unsat   bool // an original clause is empty

	watches [][]watcher // clauses of three or more literals
	bins    [][]watcher // binary clauses: bins[l] holds (clause, other literal)

	value    []int8  // per literal: 1 true, -1 false, 0 unassigned
	level    []int32 // per variable
	reason   []int32 // per variable
	trail    []uint32
	trailLim []int
	qhead    int

	seen       []bool
	learnt     []uint32
	activity   []float64
	actInc     float64
	numLearned int
	maxLearned int
	nextReduce int

	depth []int32 // per variable: depth in the elimination tree

	varStamp  []uint32 // per variable: unassigned in the current branch
	uf        []int32  // per variable: union-find parent
	ufSize    []int32  // per variable: size of the set it roots
	rootStamp []uint32 // per variable: a set root with an open clause
	occStamp  []uint32 // per variable: in an open clause of the current branch
	rootComp  []int32  // per variable: component number of a root
	stamp     uint32
	scratch   []int32 // open clauses of the current branch
	compVars  []int32 // stack of component variable lists
	compCls   []int32 // stack of component clause lists
	compKey   []int32 // stack of component key clause lists
	comps     []dcRange
	kids      []int32 // stack of children under construction

	b     dcBuilder
	cache dcCache

	decisions, conflicts, hits int
	ticks                      int
}

// dcRange delimits a component in the compVars, compCls and compKey stacks.
type dcRange struct{ v0, v1, c0, c1, k0, k1 int }

func newCompiler(ctx context.Context, f *CNF, opts Options) *compiler {
	n := f.NumVars
	c := &compiler{
		ctx:       ctx,
		nvars:     n,
		maxNodes:  opts.MaxNodes,
		watches:   make([][]watcher, 2*n+2),
		bins:      make([][]watcher, 2*n+2),
		value:     make([]int8, 2*n+2),
		level:     make([]int32, n+1),
		reason:    make([]int32, n+1),
		seen:      make([]bool, n+1),
		activity:  make([]float64, n+1),
		actInc:    1,
		varStamp:  make([]uint32, n+1),
		uf:        make([]int32, n+1),
		ufSize:    make([]int32, n+1),
		rootStamp: make([]uint32, n+1),
		occStamp:  make([]uint32, n+1),
		rootComp:  make([]int32, n+1),
	}
	if c.maxNodes <= 0 {
		c.maxNodes = DefaultMaxNodes
	}
	c.maxLearned = opts.MaxLearned
	if c.maxLearned <= 0 {
		c.maxLearned = max(1000, f.NumClauses()/20)
	}
	c.nextReduce = c.maxLearned
	// Copy the clauses, dropping repeated literals and tautologies.
	mark := make([]int32, 2*n+2) // per literal: 1 + the clause that holds it
	var buf []uint32
	for i := 0; i < f.NumClauses(); i++ {
		buf = buf[:0]
		taut := false
		for _, l := range f.Clause(i) {
			il := dcLit(l)
			if mark[il^1] == int32(i+1) {
				taut = true
			}
			if mark[il] != int32(i+1) {
				mark[il] = int32(i + 1)
				buf = append(buf, il)
			}
		}
		if taut {
			continue
		}
		if len(buf) == 0 {
			c.unsat = true
		}
		c.addClause(buf)
	}
	c.numOrig = len(c.csize)
	c.deleted = make([]bool, c.numOrig)
	c.b.init(n, c.maxNodes)
	cacheBytes := opts.MaxCacheBytes
	if cacheBytes <= 0 {
		cacheBytes = DefaultMaxCacheBytes
	}
	c.cache.init(cacheBytes)
	return c
}

// dcLit converts a DIMACS literal to the internal numbering.
func dcLit(l Lit) uint32 {
	if l < 0 {
		return uint32(-l)<<1 | 1
	}
	return uint32(l) << 1
}

// addClause appends a clause to the arena and watches its first two literals.
func (c *compiler) addClause(lits []uint32) int32 {
	id := int32(len(c.csize))
	c.cstart = append(c.cstart, len(c.lits))
	c.csize = append(c.csize, int32(len(lits)))
	c.lits = append(c.lits, lits...)
	c.watch(id)
	return id
}

// watch adds clause id to the watch lists.
func (c *compiler) watch(id int32) {
	cl := c.clause(id)
	switch {
	case len(cl) == 2:
		c.bins[cl[0]] = append(c.bins[cl[0]], watcher{id, cl[1]})
		c.bins[cl[1]] = append(c.bins[cl[1]], watcher{id, cl[0]})
	case len(cl) > 2:
		c.watches[cl[0]] = append(c.watches[cl[0]], watcher{id, cl[1]})
		c.watches[cl[1]] = append(c.watches[cl[1]], watcher{id, cl[0]})
	}
}

func (c *compiler) clause(i int32) []uint32 {
	s := c.cstart[i]
	return c.lits[s : s+int(c.csize[i])]
}

func (c *compiler) assign(l uint32, reason int32) {
	c.value[l] = 1
	c.value[l^1] = -1
	v := l >> 1
	c.level[v] = int32(len(c.trailLim))
	c.reason[v] = reason
	c.trail = append(c.trail, l)
}

// propagate runs unit propagation and returns a conflicting clause or
// noClause.
func (c *compiler) propagate() int32 {
	for c.qhead < len(c.trail) {
		p := c.trail[c.qhead]
		c.qhead++
		falseLit := p ^ 1
		for _, w := range c.bins[falseLit] {
			switch c.value[w.blocker] {
			case 0:
				c.assign(w.blocker, w.clause)
			case -1:
				c.qhead = len(c.trail)
				return w.clause
			}
		}
		ws := c.watches[falseLit]
		i, j := 0, 0
		for i < len(ws) {
			w := ws[i]
			i++
			if c.value[w.blocker] == 1 {
				ws[j] = w
				j++
				continue
			}
			if c.deleted[w.clause] {
				continue
			}
			s := c.cstart[w.clause]
			cl := c.lits[s : s+int(c.csize[w.clause])]
			if cl[0] == falseLit {
				cl[0], cl[1] = cl[1], cl[0]
			}
			first := cl[0]
			if first != w.blocker && c.value[first] == 1 {
				ws[j] = watcher{w.clause, first}
				j++
				continue
			}
			found := false
			for k := 2; k < len(cl); k++ {
				if c.value[cl[k]] != -1 {
					cl[1], cl[k] = cl[k], cl[1]
					c.watches[cl[1]] = append(c.watches[cl[1]], watcher{w.clause, first})
					found = true
					break
				}
			}
			if found {
				continue
			}
			ws[j] = watcher{w.clause, first}
			j++
			if c.value[first] == -1 {
				for i < len(ws) {
					ws[j] = ws[i]
					i++
					j++
				}
				c.watches[falseLit] = ws[:j]
				c.qhead = len(c.trail)
				return w.clause
			}
			c.assign(first, w.clause)
		}
		c.watches[falseLit] = ws[:j]
	}
	return noClause
}

// cancelLevel undoes the assignments of the last decision level.
func (c *compiler) cancelLevel() {
	lim := c.trailLim[len(c.trailLim)-1]
	for i := len(c.trail) - 1; i >= lim; i-- {
		l := c.trail[i]
		c.value[l] = 0
		c.value[l^1] = 0
	}
	c.trail = c.trail[:lim]
	c.trailLim = c.trailLim[:len(c.trailLim)-1]
	c.qhead = lim
}

// analyze derives a first-UIP clause from the conflict into c.learnt, with
// the asserting literal first.
func (c *compiler) analyze(confl int32) {
	c.learnt = append(c.learnt[:0], 0)
	cur := int32(len(c.trailLim))
	pathC := 0
	p := uint32(0)
	idx := len(c.trail) - 1
	for {
		for _, q := range c.clause(confl) {
			if q == p {
				continue
			}
			v := q >> 1
			if c.seen[v] || c.level[v] == 0 {
				continue
			}
			c.seen[v] = true
			c.bump(v)
			if c.level[v] >= cur {
				pathC++
			} else {
				c.learnt = append(c.learnt, q)
			}
		}
		for !c.seen[c.trail[idx]>>1] {
			idx--
		}
		p = c.trail[idx]
		idx--
		c.seen[p>>1] = false
		pathC--
		if pathC <= 0 {
			break
		}
		confl = c.reason[p>>1]
	}
	c.learnt[0] = p ^ 1
	for _, q := range c.learnt[1:] {
		c.seen[q>>1] = false
	}
	c.actInc *= 1 / 0.95
	if c.actInc > 1e100 {
		for v := range c.activity {
			c.activity[v] *= 1e-100
		}
		c.actInc *= 1e-100
	}
}

func (c *compiler) bump(v uint32) {
	c.activity[v] += c.actInc
}

// learn adds c.learnt after its level was cancelled. The clause is implied by
// the original clauses, so it only prunes the search; it plays no part in
// finding components. Unit clauses are not kept.
func (c *compiler) learn() {
	if len(c.learnt) < 2 {
		return
	}
	// Watch the asserting literal and the literal assigned last.
	best := 1
	for k := 2; k < len(c.learnt); k++ {
		if c.level[c.learnt[k]>>1] > c.level[c.learnt[best]>>1] {
			best = k
		}
	}
	c.learnt[1], c.learnt[best] = c.learnt[best], c.learnt[1]
	c.addClause(c.learnt)
	c.deleted = append(c.deleted, false)
	c.numLearned++
	if c.numLearned >= c.nextReduce {
		c.reduceLearned()
	}
}

// reduceLearned deletes the longer half of the learned clauses that are not
// reasons, compacts the arena and rebuilds the watch lists.
func (c *compiler) reduceLearned() {
	type cand struct {
		id   int32
		size int32
	}
	var cands []cand
	locked := func(id int32) bool {
		v := c.lits[c.cstart[id]] >> 1
		return c.value[c.lits[c.cstart[id]]] == 1 && c.reason[v] == id
	}
	for id := int32(c.numOrig); id < int32(len(c.csize)); id++ {
		if c.csize[id] > 2 && !locked(id) {
			cands = append(cands, cand{id, c.csize[id]})
		}
	}
	slices.SortStableFunc(cands, func(a, b cand) int { return int(b.size - a.size) })
	for _, x := range cands[:len(cands)/2] {
		c.deleted[x.id] = true
	}
	// Compact.
	if c.numOrig == len(c.csize) {
		return
	}
	newID := make([]int32, len(c.csize))
	w := c.numOrig
	pos := c.cstart[c.numOrig]
	for id := c.numOrig; id < len(c.csize); id++ {
		if c.deleted[id] {
			newID[id] = noClause
			continue
		}
		s, n := c.cstart[id], int(c.csize[id])
		copy(c.lits[pos:], c.lits[s:s+n])
		c.cstart[w] = pos
		c.csize[w] = int32(n)
		newID[id] = int32(w)
		pos += n
		w++
	}
	c.lits = c.lits[:pos]
	c.cstart = c.cstart[:w]
	c.csize = c.csize[:w]
	c.deleted = c.deleted[:w]
	clear(c.deleted[c.numOrig:])
	for _, l := range c.trail {
		v := l >> 1
		if r := c.reason[v]; r >= int32(c.numOrig) {
			c.reason[v] = newID[r]
		}
	}
	for l := range c.watches {
		c.watches[l] = c.watches[l][:0]
		c.bins[l] = c.bins[l][:0]
	}
	for id := int32(0); id < int32(len(c.csize)); id++ {
		c.watch(id)
	}
	c.numLearned = w - c.numOrig
	c.maxLearned += c.maxLearned / 10
	c.nextReduce = c.numLearned + c.maxLearned/2
	if c.nextReduce < c.maxLearned {
		c.nextReduce = c.maxLearned
	}
}

// run compiles the formula and returns the circuit.
func (c *compiler) run() (circ *Circuit, err error) {
	defer func() {
		if r := recover(); r != nil {
			b, ok := r.(dcBailout)
			if !ok {
				panic(r)
			}
			circ, err = nil, b.err
		}
	}()
	root := int32(dcFalse)
	if !c.unsat && c.topUnits() {
		all := make([]int32, c.nvars)
		for i := range all {
			all[i] = int32(i + 1)
		}
		cls := make([]int32, c.numOrig)
		for i := range cls {
			cls[i] = int32(i)
		}
		root = c.branch(all, cls)
	}
	return c.b.circuit(c.nvars, root), nil
}

// topUnits assigns the unit clauses at level 0 and propagates them. It
// reports false if the formula is found unsatisfiable.
func (c *compiler) topUnits() bool {
	for i := int32(0); i < int32(c.numOrig); i++ {
		if c.csize[i] != 1 {
			continue
		}
		l := c.clause(i)[0]
		switch c.value[l] {
		case -1:
			return false
		case 0:
			c.assign(l, i)
		}
	}
	return c.propagate() == noClause
}

// tick counts work and checks the context now and then.
func (c *compiler) tick() {
	c.ticks++
	if c.ticks&255 != 0 {
		return
	}
	if err := c.ctx.Err(); err != nil {
		panic(dcBailout{fmt.Errorf("compilation %s after %d nodes; estimated width %d: %w",
			dcStopped(err), c.b.len(), c.width, err)})
	}
}

// dcStopped says why a context ended.
func dcStopped(err error) string {
	if errors.Is(err, context.DeadlineExceeded) {
		return "stopped at the time limit"
	}
	return "cancelled"
}

// branch builds the conjunction that the current assignment leaves of the
// component over vars with open clauses cls (both sorted): a LitNode per
// assigned variable, a FreeNode per variable no open clause mentions, and
// one compiled child per connected component of the open clauses.
func (c *compiler) branch(vars, cls []int32) int32 {
	kidsBase := len(c.kids)
	compsBase := len(c.comps)
	cvBase, ccBase, ckBase := len(c.compVars), len(c.compCls), len(c.compKey)
	c.stamp++
	if c.stamp == 0 { // wrapped around: reset the stamps
		clear(c.varStamp)
		clear(c.rootStamp)
		clear(c.occStamp)
		c.stamp = 1
	}
	st := c.stamp
	// Assigned variables become literals; the others start a set each.
	for _, v := range vars {
		switch c.value[2*v] {
		case 1:
			c.kids = append(c.kids, c.b.lit(uint32(2*v)))
		case -1:
			c.kids = append(c.kids, c.b.lit(uint32(2*v+1)))
		default:
			c.varStamp[v] = st
			c.uf[v] = v
			c.ufSize[v] = 1
		}
	}
	// Open clauses join the sets of their unassigned variables. A
	// satisfied clause joins nothing.
	open := c.scratch[:0]
	for _, cl := range cls {
		lits := c.clause(cl)
		sat := false
		free := 0
		for _, l := range lits {
			switch c.value[l] {
			case 1:
				sat = true
			case 0:
				free++
			}
			if sat {
				break
			}
		}
		if sat || free == 0 {
			continue
		}
		// Join the sets, keeping the root of the clause's set at hand.
		first := int32(-1)
		for _, l := range lits {
			if c.value[l] != 0 {
				continue
			}
			w := int32(l >> 1)
			c.occStamp[w] = st
			r := c.find(w)
			switch {
			case first < 0:
				first = r
			case r != first:
				if c.ufSize[first] < c.ufSize[r] {
					first, r = r, first
				}
				c.uf[r] = first
				c.ufSize[first] += c.ufSize[r]
			}
		}
		touched := int32(0)
		if free < len(lits) {
			touched = 1
		}
		open = append(open, cl, first, touched)
	}
	c.scratch = open
	// Find the roots of the sets with an open clause; a variable in no
	// open clause is free.
	roots := 0
	for i := 0; i < len(open); i += 3 {
		r := c.find(open[i+1])
		open[i+1] = r
		if c.rootStamp[r] != st {
			c.rootStamp[r] = st
			c.rootComp[r] = -1 // no number yet
			roots++
		}
	}
	if roots == 1 {
		// One component (the common case on long narrow formulas): no
		// need to look up the set of every variable.
		k := len(c.comps)
		c.comps = append(c.comps, dcRange{v0: cvBase, c0: ccBase, k0: ckBase})
		for _, v := range vars {
			if c.varStamp[v] != st || c.value[2*v] != 0 {
				continue
			}
			if c.occStamp[v] != st {
				c.kids = append(c.kids, c.b.free(v))
				continue
			}
			c.compVars = append(c.compVars, v)
		}
		for i := 0; i < len(open); i += 3 {
			c.compCls = append(c.compCls, open[i])
			if open[i+2] != 0 {
				c.compKey = append(c.compKey, open[i])
			}
		}
		c.comps[k].v1, c.comps[k].c1, c.comps[k].k1 = len(c.compVars), len(c.compCls), len(c.compKey)
	} else {
		c.layout(vars, open, st)
	}
	mark := c.cache.mark()
	result := int32(-1)
	for k := compsBase; k < len(c.comps); k++ {
		r := c.comps[k]
		n := c.component(c.compVars[r.v0:r.v1], c.compCls[r.c0:r.c1], c.compKey[r.k0:r.k1])
		if n == dcFalse {
			// The branch has no model. Results cached since the branch
			// began may have been pruned by learned clauses whose premises
			// fail only because this component has no model: drop them.
			c.cache.truncate(mark)
			result = dcFalse
			break
		}
		c.kids = append(c.kids, n)
	}
	if result < 0 {
		result = c.b.and(c.kids[kidsBase:])
	}
	c.kids = c.kids[:kidsBase]
	c.comps = c.comps[:compsBase]
	c.compVars = c.compVars[:cvBase]
	c.compCls = c.compCls[:ccBase]
	c.compKey = c.compKey[:ckBase]
	return result
}

// layout numbers the components of the open clauses of a branch (triples
// of clause, set root and touched flag) in the order of their first
// variable and lays them out in the compVars, compCls and compKey stacks,
// keeping the sorted orders; a variable of vars in no open clause becomes a
// FreeNode.
func (c *compiler) layout(vars []int32, open []int32, st uint32) {
	compsBase := len(c.comps)
	cvBase, ccBase, ckBase := len(c.compVars), len(c.compCls), len(c.compKey)
	for _, v := range vars {
		if c.varStamp[v] != st || c.value[2*v] != 0 {
			continue
		}
		if c.occStamp[v] != st {
			c.kids = append(c.kids, c.b.free(v))
			continue
		}
		r := c.find(v)
		k := c.rootComp[r]
		if k < 0 {
			k = int32(len(c.comps))
			c.rootComp[r] = k
			c.comps = append(c.comps, dcRange{})
		}
		c.comps[k].v1++
	}
	for i := 0; i < len(open); i += 3 {
		k := c.rootComp[open[i+1]]
		c.comps[k].c1++
		c.comps[k].k1 += int(open[i+2])
	}
	pv, pc, pk := cvBase, ccBase, ckBase
	for k := compsBase; k < len(c.comps); k++ {
		r := &c.comps[k]
		nv, nc, nk := r.v1, r.c1, r.k1
		r.v0, r.v1, r.c0, r.c1, r.k0, r.k1 = pv, pv, pc, pc, pk, pk
		pv, pc, pk = pv+nv, pc+nc, pk+nk
	}
	c.compVars = slices.Grow(c.compVars, pv-cvBase)[:pv]
	c.compCls = slices.Grow(c.compCls, pc-ccBase)[:pc]
	c.compKey = slices.Grow(c.compKey, pk-ckBase)[:pk]
	for _, v := range vars {
		if c.varStamp[v] != st || c.value[2*v] != 0 || c.occStamp[v] != st {
			continue
		}
		x := &c.comps[c.rootComp[c.find(v)]]
		c.compVars[x.v1] = v
		x.v1++
	}
	for i := 0; i < len(open); i += 3 {
		x := &c.comps[c.rootComp[open[i+1]]]
		c.compCls[x.c1] = open[i]
		x.c1++
		if open[i+2] != 0 {
			c.compKey[x.k1] = open[i]
			x.k1++
		}
	}
}

// find returns the representative of v's set.
func (c *compiler) find(v int32) int32 {
	for c.uf[v] != v {
		c.uf[v] = c.uf[c.uf[v]]
		v = c.uf[v]
	}
	return v
}

// component compiles a connected component given by its sorted variables
// and sorted open clauses; key lists the open clauses that have lost a
// literal (the others have all their variables in vars, so vars determines
// them).
func (c *compiler) component(vars, cls, key []int32) int32 {
	h := c.cache.encode(vars, key)
	if n, ok := c.cache.lookup(h); ok {
		c.hits++
		return n
	}
	x := c.pickVar(vars)
	kidsBase := len(c.kids)
	for _, l := range [2]uint32{uint32(2 * x), uint32(2*x + 1)} {
		c.decisions++
		c.tick()
		c.trailLim = append(c.trailLim, len(c.trail))
		c.assign(l, noClause)
		if confl := c.propagate(); confl != noClause {
			c.conflicts++
			c.analyze(confl)
			c.cancelLevel()
			c.learn()
			continue
		}
		n := c.branch(vars, cls)
		c.cancelLevel()
		if n != dcFalse {
			c.kids = append(c.kids, n)
		}
	}
	n := c.b.or(x, c.kids[kidsBase:])
	c.kids = c.kids[:kidsBase]
	// The key buffer was overwritten by the branches: encode again.
	h = c.cache.encode(vars, key)
	c.cache.store(h, n)
	return n
}

// pickVar chooses the decision variable of a component: the variable nearest
// the root of the elimination tree, ties broken by activity, then by number.
func (c *compiler) pickVar(vars []int32) int32 {
	best := vars[0]
	for _, v := range vars[1:] {
		if c.depth[v] < c.depth[best] || c.depth[v] == c.depth[best] && c.activity[v] > c.activity[best] {
			best = v
		}
	}
	return best
}
