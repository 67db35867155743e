package unfold

import (
	"context"
	"errors"
	"slices"
	"strconv"
	"strings"
)

// Construction names the way a sequence was built.
type Construction string

// The constructions of the sequence search.
const (
	// Single is the sequence of a component of one atom with a self-loop.
	Single Construction = "single"
	// FeedbackSet is T·π·T·…·π·T around a set X, π listing X, T covering
	// the components of the rest in topological order: X a feedback vertex
	// set, or a set that leaves trees of two-way edges (trees.go).
	FeedbackSet Construction = "feedback-set"
	// Repetition repeats one order of the component as many rounds as the
	// longest simple path can need.
	Repetition Construction = "repetition"
	// Sweeps alternates forward and backward sweeps over the layers of a
	// path decomposition of the component's undirected graph.
	Sweeps Construction = "sweeps"
	// Bisection halves a thin layering of the component recursively,
	// with one or two passes per level (bisect.go).
	Bisection Construction = "bisection"
	// Exact is a shortest sequence found by exhaustive search.
	Exact Construction = "exact"
	// Naive repeats the sorted atoms of the component once per atom.
	Naive Construction = "naive"
	// TooLarge means that every construction tried needs more copies than
	// the limit allows; the sequence is then nil.
	TooLarge Construction = "too-large"
)

// Options control the sequence search and the unfolding.
type Options struct {
	// ExactLimit is the largest component that gets an exhaustive search
	// (0: 7 atoms; negative: never).
	ExactLimit int
	// CheckLimit is the largest component on which sequences whose
	// validity is not proved are tried and checked with the validity
	// checker (0: 14 atoms; negative: never).
	CheckLimit int
	// Naive uses the naive sequence (the atoms repeated once per atom)
	// everywhere; it serves as a baseline.
	Naive bool
	// WidthLimit is the number of atoms above which the width estimate
	// uses min-degree instead of min-fill elimination (0: 20000).
	WidthLimit int
	// NoWidth skips the width estimates.
	NoWidth bool
	// MaxCopies bounds the number of copies Unfold makes in all
	// (0: 2,000,000; negative: no limit); beyond it Unfold fails with an
	// error saying so.
	MaxCopies int
}

// ErrCopyLimit is wrapped by the error Unfold returns when the unfolding
// would need more copies than Options.MaxCopies allows.
var ErrCopyLimit = errors.New("unfold: copy limit reached")

// DefaultMaxCopies is the copy limit of Unfold when Options.MaxCopies is 0.
const DefaultMaxCopies = 2000000

func (o Options) maxCopies() int {
	if o.MaxCopies == 0 {
		return DefaultMaxCopies
	}
	return o.MaxCopies
}

func (o Options) exactLimit() int {
	if o.ExactLimit == 0 {
		return 7
	}
	return o.ExactLimit
}

func (o Options) checkLimit() int {
	if o.CheckLimit == 0 {
		return 14
	}
	return o.CheckLimit
}

// checkBudget bounds the steps of one validity check made by the search,
// and checkTotalBudget those of all the checks of one unfolding; when the
// total runs out, constructions that need the checker are left out.
const (
	checkBudget      = 200000
	checkTotalBudget = 10000000
)

// treeTotalBudget bounds the work of the local searches for tree-leaving
// sets (trees.go) of one unfolding.
const treeTotalBudget = 200000000

// check reports whether the validity checker accepts seq for d within the
// budgets.
func (s *searcher) check(d *digraph, seq []int32) bool {
	budget := min(checkBudget, s.checkLeft)
	if budget <= 0 {
		return false
	}
	if s.memo == nil {
		s.memo = make(map[uint64]int32)
	}
	ok, decided, steps := d.validFrom(seq, budget, s.entries(d), s.memo)
	s.checkLeft -= steps
	return ok && decided
}

// Sequence returns a sequence over the atoms of component comp of g (as
// returned by g.Component) that holds every simple path of the component,
// with few copies: the search minimises the largest number of occurrences of
// one atom first, then the length. It also names the construction used at
// the top level. A component that is not cyclic gets its single atom.
// Constructions longer than the copy limit of opts are not built; when no
// construction fits, Sequence returns nil and TooLarge.
func Sequence(ctx context.Context, g *Graph, comp []int32, opts Options) ([]int32, Construction) {
	return newSearcher(ctx, opts).sequence(g, comp)
}

// newSearcher returns a searcher with fresh shared budgets and cache.
func newSearcher(ctx context.Context, opts Options) *searcher {
	return &searcher{ctx: ctx, opts: opts, exactLeft: exactTotalBudget, checkLeft: checkTotalBudget, treeLeft: treeTotalBudget, pieceLeft: pieceTotalWork,
		cache: make(map[string]cached)}
}

// sequence is Sequence on a searcher whose budgets and cache are shared by
// the components of one program: components with the same graph (up to the
// order of their atoms) share one search.
func (s *searcher) sequence(g *Graph, comp []int32) ([]int32, Construction) {
	vs := slices.Clone(comp)
	slices.Sort(vs)
	d := g.local(vs)
	var entry []bool
	for _, v := range vs {
		if !g.Entry(v) {
			entry = make([]bool, len(vs))
			for j, w := range vs {
				entry[j] = g.Entry(w)
			}
			break
		}
	}
	s.top, s.topEntry = d, entry
	defer func() { s.top, s.topEntry = nil, nil }()
	var seq []int32
	var how Construction
	key := d.key()
	if entry != nil {
		var b strings.Builder
		b.WriteString(key)
		b.WriteString(";entries")
		for j, e := range entry {
			if e {
				b.WriteString(" " + strconv.Itoa(j))
			}
		}
		key = b.String()
	}
	if c, ok := s.cache[key]; ok && s.fits(len(c.seq)) {
		seq, how = c.seq, c.how
	} else if s.opts.Naive {
		seq, how = nil, TooLarge
		if s.fits(d.n * d.n) {
			seq, how = naive(d), Naive
		}
	} else {
		seq, how = s.cover(d, 0)
	}
	if seq == nil {
		return nil, TooLarge
	}
	if s.ctx.Err() == nil && len(s.cache) < maxCache && d.n <= maxCachedSize {
		s.cache[key] = cached{seq, how}
	}
	out := make([]int32, len(seq))
	for i, v := range seq {
		out[i] = vs[v]
	}
	return out, how
}

// cached is a sequence found for a component graph.
type cached struct {
	seq []int32
	how Construction
}

// The cache keeps at most maxCache sequences, for components of at most
// maxCachedSize atoms.
const (
	maxCache      = 100000
	maxCachedSize = 64
)

// naive returns the vertices of d in order, repeated d.n times: every simple
// path has at most d.n vertices and each round embeds at least one more.
func naive(d *digraph) []int32 {
	seq := make([]int32, 0, d.n*d.n)
	for r := 0; r < d.n; r++ {
		for v := 0; v < d.n; v++ {
			seq = append(seq, int32(v))
		}
	}
	return seq
}

// searcher holds the state of one sequence search.
type searcher struct {
	ctx  context.Context
	opts Options
	// exactLeft is the work the exhaustive search may still do, shared
	// by all components.
	exactLeft int
	checkLeft int // steps the validity checker may still take
	cache     map[string]cached
	// top is the digraph of the component being searched and topEntry
	// marks its entries (nil: all vertices). Checks of top itself need
	// only the simple paths from its entries; parts of it (layers,
	// components of what is left) can be entered anywhere.
	top      *digraph
	topEntry []bool
	// treeLeft is the work the local search for tree-leaving sets may
	// still do, shared by all components; pieceLeft the same for sets
	// leaving pieces.
	treeLeft, pieceLeft int
	// memo is the validity checker's memo table, kept between checks so
	// that its storage is reused (pruning runs hundreds of checks).
	memo map[uint64]int32
}

// entries returns the vertices of d at which the simple paths to hold
// start: the component's entries for the component itself, nil (every
// vertex) for any other digraph.
func (s *searcher) entries(d *digraph) []bool {
	if d == s.top {
		return s.topEntry
	}
	return nil
}

// fits reports whether a sequence of the given length is within the copy
// limit.
func (s *searcher) fits(length int) bool {
	limit := s.opts.maxCopies()
	return limit <= 0 || length <= limit
}

// maxDepth bounds the nesting of constructions that recurse on parts of a
// component.
const maxDepth = 4

// better reports whether sequence a over n vertices beats b: fewer largest
// copies, then shorter.
func better(n int, a, b []int32) bool {
	if b == nil {
		return true
	}
	ca, cb := copies(n, a), copies(n, b)
	if ca != cb {
		return ca < cb
	}
	return len(a) < len(b)
}

// cover returns a sequence holding every simple path of the arbitrary
// digraph d: the sequences of its strongly connected components in
// topological order (a simple path visits components in that order and
// stays inside each for one stretch, which is a simple path there).
func (s *searcher) cover(d *digraph, depth int) ([]int32, Construction) {
	comps, cyclic := d.sccs()
	if len(comps) == 1 && cyclic[0] {
		return s.best(d, depth)
	}
	var seq []int32
	var how Construction
	for c, vs := range comps {
		if !cyclic[c] {
			seq = append(seq, vs[0])
			continue
		}
		part, h := s.best(d.induce(vs), depth)
		if part == nil {
			return nil, TooLarge
		}
		if how == "" {
			how = h
		}
		for _, v := range part {
			seq = append(seq, vs[v])
		}
	}
	if how == "" {
		how = Single
	}
	return seq, how
}

// best returns the best sequence found for the strongly connected, cyclic
// digraph d.
func (s *searcher) best(d *digraph, depth int) ([]int32, Construction) {
	if d.n == 1 {
		return []int32{0}, Single
	}
	x := s.fvs(d)
	type candidate struct {
		seq []int32
		how Construction
	}
	var cands []candidate
	add := func(seq []int32, how Construction) {
		if seq != nil {
			cands = append(cands, candidate{seq, how})
		}
	}
	add(s.feedbackSet(d, x), FeedbackSet)
	add(s.repetition(d, x), Repetition)
	// Every candidate of a small component is pruned (below), and the
	// best start does not always prune to the best result, so small
	// components get every variant of bisection.
	small := d.n <= s.opts.checkLimit() && s.ctx.Err() == nil
	if depth < maxDepth && s.ctx.Err() == nil {
		add(s.sweeps(d, depth), Sweeps)
		if small {
			for _, seq := range s.bisections(d, depth) {
				add(seq, Bisection)
			}
		} else {
			add(s.bisection(d, depth), Bisection)
		}
	}
	// A set leaving trees of two-way edges (treeConstruction): worth
	// looking for only when a sequence as long as d has atoms fits in the
	// copy limit and the exhaustive search will not run.
	if s.fits(d.n) && d.n > s.opts.exactLimit() && s.ctx.Err() == nil {
		most := d.n
		for _, c := range cands {
			most = min(most, copies(d.n, c.seq))
		}
		seq, greedy, set := s.treeConstruction(d, len(x), most)
		add(seq, FeedbackSet)
		// Pieces save a round or two of the tree construction: worth
		// looking for only when that brings it near the best, and only
		// for the component itself (not for parts of it that other
		// constructions recurse on). They are kept only when they lower
		// the largest copies: a shorter sequence alone, less regular
		// than the trees', compiled slower on sparse networks (128
		// rooms: 2,583 copies instead of 2,633, and over 20 s instead of
		// 5 s).
		if seq != nil && depth == 0 && copies(d.n, seq)-4 < most {
			add(s.pieceConstruction(d, greedy, set, copies(d.n, seq)), FeedbackSet)
		}
	}
	// Small components: every candidate pruned (pruning is greedy, so
	// the best start does not always give the best result). Pruning stops
	// there: on larger ones the pruned sequence, though shorter, lost the
	// regular structure of the construction and compiled much slower (3×7
	// grid networks: from seconds to minutes).
	small = small && s.ctx.Err() == nil
	var seq []int32
	var how Construction
	for _, c := range cands {
		if small {
			c.seq = s.prune(d, c.seq)
		}
		if better(d.n, c.seq, seq) {
			seq, how = c.seq, c.how
		}
	}
	if seq == nil {
		return nil, TooLarge
	}
	if s.ctx.Err() != nil {
		return seq, how
	}
	if d.n <= s.opts.exactLimit() {
		if cand := s.exact(d, seq); cand != nil && better(d.n, cand, seq) {
			seq, how = cand, Exact
		}
	}
	return seq, how
}

// prune drops occurrences from seq, latest first, while the validity
// checker still accepts the result. One sweep is enough: an occurrence that
// could not be dropped cannot be dropped later either, since a later
// sequence is a subsequence of the one that failed, and a path missing from
// a sequence is missing from its subsequences.
func (s *searcher) prune(d *digraph, seq []int32) []int32 {
	seq = slices.Clone(seq)
	for i := len(seq) - 1; i >= 0; i-- {
		if s.ctx.Err() != nil {
			return seq
		}
		cand := slices.Delete(slices.Clone(seq), i, i+1)
		if s.check(d, cand) {
			seq = cand
		}
	}
	return seq
}
