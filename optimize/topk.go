package optimize

import (
	"context"
	"math/big"
	"sort"

	"trellis/compile"
)

// Models are ranked by cost, then by the tie-break: the sorted list of the
// positions (in Meta.Atoms, which is term order) of the true shown atoms,
// compared lexicographically, a proper prefix coming first; then the same for
// all atoms; then for all variables by number. The three lists are the key
// levels below. Two atoms that share a variable count as one, at the first
// position.
const numLevels = 3

// model is a decoded model.
type model struct {
	assign []int8 // per variable: 1 true, -1 false
	cost   []int64
	lists  [numLevels][]int32 // per level: ranks of the true key variables, ascending
	listed uint8              // bit l: lists[l] is computed (only ties need them)
}

// ranker computes top-k lists.
type ranker struct {
	c      *compile.Circuit
	wt     *weights
	kb     *kbest
	kbEnd  *kbest                   // for the ends of the walk, see walker.queryEnd
	levels [numLevels][]compile.Var // key variables in rank order
	ranks  [numLevels][]int32       // per variable: its rank in the level, or noKey
	noRank []int32
	stack  []int32
	// noRetry skips the second, larger k-best list, so that tests reach
	// the walk on small circuits.
	noRetry bool
	// lists makes topK work as before the deviations, the incremental
	// resets and kbEnd: by the per-node lazy lists alone, each query a full
	// pass (tests and benchmarks compare the two).
	lists bool
	dv    *deviations
}

func newRanker(c *compile.Circuit, wt *weights) *ranker {
	r := &ranker{c: c, wt: wt, kb: newKbest(c, wt)}
	shown := make([]bool, len(c.Meta.Atoms))
	for _, i := range c.Meta.Shown {
		if i >= 0 && int(i) < len(shown) {
			shown[i] = true
		}
	}
	seen := make([][]bool, numLevels)
	for l := range seen {
		seen[l] = make([]bool, c.NumVars+1)
	}
	add := func(l int, v compile.Var) {
		if v >= 1 && int(v) <= c.NumVars && !seen[l][v] {
			seen[l][v] = true
			r.levels[l] = append(r.levels[l], v)
		}
	}
	for i, a := range c.Meta.Atoms {
		if shown[i] {
			add(0, a.Var)
		}
	}
	for _, a := range c.Meta.Atoms {
		add(1, a.Var)
	}
	for v := 1; v <= c.NumVars; v++ {
		add(2, compile.Var(v))
	}
	r.noRank = make([]int32, c.NumVars+1)
	for i := range r.noRank {
		r.noRank[i] = noKey
	}
	for l := range r.levels {
		r.ranks[l] = make([]int32, c.NumVars+1)
		copy(r.ranks[l], r.noRank)
		for k, v := range r.levels[l] {
			r.ranks[l][v] = int32(k)
		}
	}
	return r
}

// decode turns arena entry e of the last query into a model.
func (r *ranker) decode(e int32) model { return r.decodeWith(r.kb, e) }

// decodeWith turns arena entry e of the last query of kb into a model.
func (r *ranker) decodeWith(kb *kbest, e int32) model {
	m := model{assign: make([]int8, r.c.NumVars+1), cost: append([]int64(nil), kb.vec(e)...)}
	r.stack = kb.decode(e, m.assign, r.stack)
	return m
}

// list returns the ranks of the true key variables of level l in m.
func (r *ranker) list(m *model, l int) []int32 {
	if m.listed&(1<<l) == 0 {
		m.listed |= 1 << l
		for k, v := range r.levels[l] {
			if m.assign[v] == 1 {
				m.lists[l] = append(m.lists[l], int32(k))
			}
		}
	}
	return m.lists[l]
}

// cmpLists compares sorted lists lexicographically, a proper prefix first.
func cmpLists(a, b []int32) int {
	for i := 0; i < len(a) && i < len(b); i++ {
		if a[i] != b[i] {
			if a[i] < b[i] {
				return -1
			}
			return 1
		}
	}
	switch {
	case len(a) < len(b):
		return -1
	case len(a) > len(b):
		return 1
	}
	return 0
}

// cmpModels orders models by cost, then by the tie-break.
func (r *ranker) cmpModels(a, b *model) int {
	if c := cmpVec(a.cost, b.cost); c != 0 {
		return c
	}
	for l := range a.lists {
		if c := cmpLists(r.list(a, l), r.list(b, l)); c != 0 {
			return c
		}
	}
	return 0
}

func (r *ranker) sortModels(ms []model) {
	sort.SliceStable(ms, func(i, j int) bool { return r.cmpModels(&ms[i], &ms[j]) < 0 })
}

// topK returns the k best models under pins, in (cost, tie-break) order.
//
// The lazy k-best lists order by cost alone, so they fix the costs of the k
// best models but not which of several models of equal cost come first.
// Asking for K > k models by cost settles it when the K-th cost is above
// the k-th: every model of each cost up to the k-th is then at hand, and
// sorting them suffices. This is tried with K = k+1 and once more with a
// larger K. Otherwise the models of the k-th cost are enumerated in
// tie-break order by walk.
//
// best and ties, when known (best not nil), are the optimum and the number of
// models reaching it: when the k-th cost is the optimum and more models tie
// than the larger list would hold, the larger list is skipped.
//
// The models are listed by cost as deviations from the best derivation
// (deviations); when a cost does not fit in 64 bits there, the per-node
// lazy lists of kbest list them instead and report the overflow where they
// meet it. The walk always uses kbest, whose order includes the keys.
func (r *ranker) topK(ctx context.Context, pins pinTable, k int, best []int64, ties *big.Int) ([]model, error) {
	if k <= 0 {
		return nil, nil
	}
	if !r.lists {
		ms, ok, err := r.topKDeviations(ctx, pins, k, best, ties)
		if err != nil || ok {
			return ms, err
		}
	} else {
		r.kb.noUpdate = true
	}
	return r.topKLists(ctx, pins, k, best, ties)
}

// topKDeviations is topK listing models by cost with deviations. It reports
// false when a cost did not fit in 64 bits.
func (r *ranker) topKDeviations(ctx context.Context, pins pinTable, k int, best []int64, ties *big.Int) ([]model, bool, error) {
	if r.dv == nil {
		r.dv = newDeviations(r.c, r.wt)
	}
	dv := r.dv
	if ok, err := dv.reset(ctx, pins); err != nil || !ok {
		return nil, false, err
	}
	sizes := []int{k + 1, 4*k + 32}
	if r.noRetry {
		sizes = sizes[:1]
	}
	var es []int32
	for si, size := range sizes {
		if si > 0 && best != nil && cmpVec(dv.cost(es[k-1]), best) == 0 && ties.Cmp(big.NewInt(int64(size))) > 0 {
			break
		}
		var err error
		if es, err = dv.best(size); err != nil {
			return nil, false, err
		}
		if dv.big {
			return nil, false, nil
		}
		if len(es) <= k {
			ms := r.decodeStates(es)
			r.sortModels(ms)
			return ms, true, nil
		}
		last := dv.cost(es[k-1])
		if len(es) < size || cmpVec(dv.cost(es[len(es)-1]), last) > 0 {
			n := len(es)
			for cmpVec(dv.cost(es[n-1]), last) > 0 {
				n--
			}
			ms := r.decodeStates(es[:n])
			r.sortModels(ms)
			return ms[:k], true, nil
		}
	}
	// The k-th cost level has more models than were listed: keep the models
	// of lower costs, all of which are listed, and walk the level.
	last := append([]int64(nil), dv.cost(es[k-1])...)
	below := 0
	for below < k && cmpVec(dv.cost(es[below]), last) < 0 {
		below++
	}
	out := r.decodeStates(es[:below])
	r.sortModels(out)
	w := &walker{r: r, ctx: ctx, below: out, cost: last, want: k, out: out[:below:below]}
	w.pins = pins.clone()
	if err := w.level(0, -1); err != nil {
		return nil, false, err
	}
	return w.out, true, nil
}

func (r *ranker) decodeStates(es []int32) []model {
	ms := make([]model, len(es))
	for i, s := range es {
		ms[i] = model{assign: make([]int8, r.c.NumVars+1), cost: append([]int64(nil), r.dv.cost(s)...)}
		r.dv.decode(s, ms[i].assign)
	}
	return ms
}

// topKLists is topK listing models by cost with the lazy lists of kbest.
func (r *ranker) topKLists(ctx context.Context, pins pinTable, k int, best []int64, ties *big.Int) ([]model, error) {
	kb := r.kb
	if err := kb.reset(ctx, pins, r.noRank, noKey); err != nil {
		return nil, err
	}
	sizes := []int{k + 1, 4*k + 32}
	if r.noRetry {
		sizes = sizes[:1]
	}
	var es []int32
	for si, size := range sizes {
		if si > 0 && best != nil && cmpVec(kb.vec(es[k-1]), best) == 0 && ties.Cmp(big.NewInt(int64(size))) > 0 {
			break
		}
		// the lists are lazy: a larger size continues where the last stopped
		for i := len(es); i < size; i++ {
			e := kb.get(r.c.Root, i)
			if e < 0 {
				break
			}
			es = append(es, e)
		}
		if kb.err != nil {
			return nil, kb.err
		}
		if len(es) <= k {
			ms := r.decodeAll(es)
			r.sortModels(ms)
			return ms, nil
		}
		last := kb.vec(es[k-1])
		if len(es) < size || cmpVec(kb.vec(es[len(es)-1]), last) > 0 {
			n := len(es)
			for cmpVec(kb.vec(es[n-1]), last) > 0 {
				n--
			}
			ms := r.decodeAll(es[:n])
			r.sortModels(ms)
			return ms[:k], nil
		}
	}
	var costs [][]int64
	for _, e := range es[:k] {
		costs = append(costs, append([]int64(nil), kb.vec(e)...))
	}
	// The k-th cost level has more models than were listed: keep the models
	// of lower costs, all of which are listed, and walk the level.
	last := costs[k-1]
	below := 0
	for below < k && cmpVec(costs[below], last) < 0 {
		below++
	}
	var out []model
	if below > 0 {
		if err := kb.reset(ctx, pins, r.noRank, noKey); err != nil {
			return nil, err
		}
		for i := 0; i < below; i++ {
			out = append(out, r.decode(kb.get(r.c.Root, i)))
		}
		if kb.err != nil {
			return nil, kb.err
		}
		r.sortModels(out)
	}
	w := &walker{r: r, ctx: ctx, below: out, cost: last, want: k, out: out[:below:below]}
	w.pins = pins.clone()
	if err := w.level(0, -1); err != nil {
		return nil, err
	}
	return w.out, nil
}

func (r *ranker) decodeAll(es []int32) []model {
	ms := make([]model, len(es))
	for i, e := range es {
		ms[i] = r.decode(e)
	}
	return ms
}

func (t pinTable) clone() pinTable { return append(pinTable(nil), t...) }

// set pins v to val, recording a contradiction with an earlier pin as 2.
func (t pinTable) set(v compile.Var, val bool) {
	want := int8(-1)
	if val {
		want = 1
	}
	switch t[v] {
	case 0:
		t[v] = want
	case want:
	default:
		t[v] = 2
	}
}

// walker enumerates the models of one cost in tie-break order: a preorder
// walk of the trie of the sorted key lists, level by level. Each step is a
// k-best query under pins: the models of cost below the level's are known
// (below), so the one after those that satisfy the pins is the best model of
// the level's cost under the pins, with the smallest key above the
// threshold.
type walker struct {
	r     *ranker
	ctx   context.Context
	below []model
	cost  []int64
	want  int
	out   []model
	pins  pinTable  // the pins of the trie node at hand
	undo  []pinUndo // how to restore pins
}

func (w *walker) done() bool { return len(w.out) >= w.want }

// query returns the arena entries of up to n models of the walker's cost
// under pins, in the order of cost and then the key of level l above thr,
// from the first. They are valid until the next query.
func (w *walker) query(pins pinTable, l int, thr int32, n int) ([]int32, error) {
	j := 0
	for i := range w.below {
		if consistent(w.below[i].assign, pins) {
			j++
		}
	}
	kb := w.r.kb
	if err := kb.reset(w.ctx, pins, w.r.ranks[l], thr); err != nil {
		return nil, err
	}
	var out []int32
	for i := 0; i < n; i++ {
		e := kb.get(w.r.c.Root, j+i)
		if kb.err != nil {
			return nil, kb.err
		}
		if e < 0 || cmpVec(kb.vec(e), w.cost) != 0 {
			break
		}
		out = append(out, e)
	}
	return out, nil
}

// queryEnd returns the arena entries of up to n models of the walker's cost
// under pins whose key variables of level l above t are all false. They are
// valid until the next queryEnd. It asks kbEnd, whose order puts those
// models first among the models of a cost, so that the pins need not force
// the keys false and its incremental resets see small changes.
func (w *walker) queryEnd(pins pinTable, l int, t int32, n int) ([]int32, error) {
	j := 0
	for i := range w.below {
		if consistent(w.below[i].assign, pins) {
			j++
		}
	}
	r := w.r
	if r.kbEnd == nil {
		r.kbEnd = newKbest(r.c, r.wt)
		r.kbEnd.endMode = true
		r.kbEnd.noUpdate = r.kb.noUpdate
	}
	kb := r.kbEnd
	if err := kb.reset(w.ctx, pins, r.ranks[l], t); err != nil {
		return nil, err
	}
	var out []int32
	for i := 0; i < n; i++ {
		e := kb.get(r.c.Root, j+i)
		if kb.err != nil {
			return nil, kb.err
		}
		if e < 0 || cmpVec(kb.vec(e), w.cost) != 0 || kb.key[e] != noKey {
			break
		}
		out = append(out, e)
	}
	return out, nil
}

func consistent(assign []int8, pins pinTable) bool {
	for v, p := range pins {
		if p != 0 && p != assign[v] {
			return false
		}
	}
	return true
}

// level visits the trie node of level l whose key variables up to rank t
// are fixed by the walker's pins; some model of the walker's cost satisfies
// them. Keys that pins fix need no query: a key above t pinned true rules
// out the end here, and when the first key above t not pinned false is
// pinned true, it is the only child. The pins are as before when it
// returns.
func (w *walker) level(l int, t int32) error {
	keys := w.r.levels[l]
	open := int32(-1) // the first key above t not pinned false
	anyTrue := false  // some key above t is pinned true
	for k := int(t) + 1; k < len(keys) && !anyTrue; k++ {
		switch w.pins[keys[k]] {
		case -1:
			continue
		case 1:
			anyTrue = true
		}
		if open < 0 {
			open = int32(k)
		}
	}
	forced := int32(-1)
	if open >= 0 && w.pins[keys[open]] == 1 {
		forced = open
	}
	if !anyTrue {
		if err := w.end(l, t); err != nil || w.done() {
			return err
		}
	}
	defer w.undoTo(len(w.undo))
	for first := true; ; first = false {
		a := forced
		if !first || forced < 0 {
			es, err := w.query(w.pins, l, t, 1)
			if err != nil || len(es) == 0 {
				return err
			}
			if a = w.r.kb.key[es[0]]; a == noKey {
				return nil
			}
		}
		// the child: keys up to a fixed, a true
		mark := len(w.undo)
		for k := t + 1; k < a; k++ {
			w.set(keys[k], false)
		}
		w.set(keys[a], true)
		err := w.level(l, a)
		w.undoTo(mark)
		if err != nil || w.done() {
			return err
		}
		// the later children: keys up to a false
		for k := t + 1; k <= a; k++ {
			if w.pins[keys[k]] == 1 {
				return nil // every later model needs this key true
			}
			w.set(keys[k], false)
		}
	}
}

// end visits the end of the trie node of level l: the models whose key
// variables above t are all false.
func (w *walker) end(l int, t int32) error {
	keys := w.r.levels[l]
	n := 2 // a second model means the next level must decide
	if l == numLevels-1 {
		n = 1
	}
	var es []int32
	var err error
	kb := w.r.kb
	if w.r.lists {
		// the earlier way: pins force the keys false
		end := w.pins.clone()
		for k := int(t) + 1; k < len(keys); k++ {
			end.set(keys[k], false)
		}
		es, err = w.query(end, l, noKey, n)
	} else {
		es, err = w.queryEnd(w.pins, l, t, n)
		kb = w.r.kbEnd
	}
	if err != nil || len(es) == 0 {
		return err
	}
	if len(es) == 1 {
		w.out = append(w.out, w.r.decodeWith(kb, es[0]))
		return nil
	}
	defer w.undoTo(len(w.undo))
	for k := int(t) + 1; k < len(keys); k++ {
		w.set(keys[k], false)
	}
	return w.level(l+1, -1)
}

// set pins v to val in the walker's pins, logging the old value.
func (w *walker) set(v compile.Var, val bool) {
	w.undo = append(w.undo, pinUndo{v, w.pins[v]})
	w.pins.set(v, val)
}

// undoTo restores the pins to what they were when the log had n entries.
func (w *walker) undoTo(n int) {
	for i := len(w.undo) - 1; i >= n; i-- {
		w.pins[w.undo[i].v] = w.undo[i].old
	}
	w.undo = w.undo[:n]
}

// pinUndo is an entry of the walker's undo log.
type pinUndo struct {
	v   compile.Var
	old int8
}
