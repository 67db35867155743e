package unfold

import (
	"encoding/json"
	"fmt"
	"io"
	"slices"
	"strings"

	"trellis/ground"
)

// Report describes an unfolding: the program's size, and for every cyclic
// component its size, the construction of its sequence, the copies made and
// the estimated treewidth before and after.
type Report struct {
	Atoms      int               `json:"atoms"`      // atoms of the input
	Rules      int               `json:"rules"`      // rules of the input
	Edges      int               `json:"edges"`      // edges of the input's positive dependency graph
	Components []ComponentReport `json:"components"` // the cyclic components, in topological order
	// AtomsAfter and RulesAfter count the atoms and rules of the output.
	AtomsAfter int `json:"atoms_after"`
	RulesAfter int `json:"rules_after"`
	// MaxCopies is the largest number of copies of one atom; TotalCopies
	// the number of copies made.
	MaxCopies   int `json:"max_copies"`
	TotalCopies int `json:"total_copies"`
	// WidthBefore and WidthAfter estimate the treewidth of the primal
	// graph (atoms sharing a rule, choice or aggregate are adjacent) of
	// the input and of the output; -1 when not computed.
	WidthBefore int `json:"width_before"`
	WidthAfter  int `json:"width_after"`
	// WidthMethod names the elimination heuristic used for the widths:
	// "min-fill" or "min-degree" (marked "cut short" when it ran out of
	// budget), followed by "/" and the method of the width after when that
	// differs: another heuristic, "lifted" when the input's elimination
	// order lifted to the output (each atom's copies, then the atom,
	// together; see liftOrder) did better than the heuristic, "windowed"
	// when min-degree elimination kept within a few atoms of that order
	// did better still (see windowedWidth), or "layered" when min-degree
	// elimination kept to the layers of a thin layering of the input did
	// (see layeredWidth).
	WidthMethod string  `json:"width_method,omitempty"`
	Seconds     float64 `json:"seconds"` // time spent

	// afterOrder is the elimination order of the output's primal graph
	// whose width WidthAfter is: equal to it when afterExact, else an upper
	// bound on it (an elimination cut short, or the lifted order bounded
	// group by group).
	afterOrder []int32
	afterExact bool
}

// ComponentReport describes the unfolding of one cyclic component.
type ComponentReport struct {
	Index        int          `json:"index"`        // position among the cyclic components
	Size         int          `json:"size"`         // atoms
	Edges        int          `json:"edges"`        // edges inside the component
	First        string       `json:"first"`        // its first atom, to recognise it
	Construction Construction `json:"construction"` // how the sequence was built
	MaxCopies    int          `json:"max_copies"`   // largest number of copies of one atom
	TotalCopies  int          `json:"total_copies"` // copies made: the length of the sequence
	// Entries counts the atoms derivable from outside the component (see
	// Graph.Entry); the sequence needs the simple paths from them only.
	Entries int `json:"entries"`
	// WidthBefore and WidthAfter estimate the treewidth of the primal graph
	// restricted to the component's atoms, and to those and their copies:
	// after is the best of the heuristic, the lifted order, the windowed
	// one (see windowedWidth) and the layered one (see layeredWidth).
	WidthBefore int     `json:"width_before"`
	WidthAfter  int     `json:"width_after"`
	Seconds     float64 `json:"seconds"` // time spent on the sequence

	atoms []int32
}

// finish fills in the totals and widths.
func (r *Report) finish(p, q *ground.Program, g *Graph, opts Options) {
	r.AtomsAfter, r.RulesAfter = len(q.Atoms), len(q.Rules)
	for _, c := range r.Components {
		r.MaxCopies = max(r.MaxCopies, c.MaxCopies)
		r.TotalCopies += c.TotalCopies
	}
	r.WidthBefore, r.WidthAfter = -1, -1
	if opts.NoWidth {
		for i := range r.Components {
			r.Components[i].WidthBefore, r.Components[i].WidthAfter = -1, -1
		}
		return
	}
	limit := opts.WidthLimit
	if limit == 0 {
		limit = defaultWidthLimit
	}
	before, nBefore := primal(p, nil)
	after, nAfter := primal(q, nil)
	copyStart, copies, extra := copyLists(len(p.Atoms), q)

	// Program-wide: the heuristic on each program, and for the output also
	// the input's order lifted to it, whichever is smaller. Both are widths
	// of elimination orders, so both bound the treewidth from above.
	var order []int32
	var done bool
	r.WidthBefore, order, done = eliminateOrder(slices.Clone(before), nBefore <= limit)
	r.WidthMethod = heuristicName(nBefore <= limit, done)
	var heuristic int
	heuristic, r.afterOrder, done = eliminateOrder(slices.Clone(after), nAfter <= limit)
	r.afterExact = done
	m2 := heuristicName(nAfter <= limit, done)
	gs, gorder := liftOrder(order, copyStart, copies, extra)
	lifted, m3 := liftedWidth(after, gs, gorder)
	r.WidthAfter = heuristic
	if lifted < heuristic {
		r.WidthAfter, m2 = lifted, m3
		r.afterOrder, r.afterExact = gs.lift(gorder), m3 == "lifted"
	}
	if w, ord := windowedWidth(after, gs, gorder, r.WidthBefore, r.WidthAfter); ord != nil {
		r.WidthAfter, m2 = w, "windowed"
		r.afterOrder, r.afterExact = ord, true
	}
	if w, ord := layeredWidth(before, after, gs, r.WidthBefore, r.WidthAfter); ord != nil {
		r.WidthAfter, m2 = w, "layered"
		r.afterOrder, r.afterExact = ord, true
	}
	if m2 != r.WidthMethod {
		r.WidthMethod += "/" + m2
	}

	// Per component: the atoms of the component, then also their copies,
	// from one primal graph of each program.
	owner := make([]int32, len(q.Atoms))
	for i := range owner {
		owner[i] = -1
	}
	for k, c := range r.Components {
		for _, v := range c.atoms {
			owner[v] = int32(k)
		}
	}
	members := make([][]int32, len(r.Components))
	for a := range q.Atoms {
		k := owner[a]
		if cp := q.Atoms[a].Copy; k < 0 && a >= len(p.Atoms) && cp != ground.NoAtom {
			k = owner[cp]
		}
		if k >= 0 {
			members[k] = append(members[k], int32(a))
		}
	}
	for k := range r.Components {
		c := &r.Components[k]
		local := induced(before, c.atoms)
		c.WidthBefore, order, _ = eliminateOrder(local, len(c.atoms) <= limit)
		local = induced(after, members[k])
		c.WidthAfter, _ = eliminate(slices.Clone(local), len(members[k]) <= limit)
		// The component's order lifted, in positions among the members:
		// group j holds the copies of the atom at position j, then the
		// atom.
		gs := &grouping{start: make([]int32, 1, len(c.atoms)+1), of: make([]int32, len(members[k]))}
		for j, v := range c.atoms {
			for _, x := range append(copies[copyStart[v]:copyStart[v+1]:copyStart[v+1]], v) {
				if i, ok := slices.BinarySearch(members[k], x); ok {
					gs.list = append(gs.list, int32(i))
					gs.of[i] = int32(j)
				}
			}
			gs.start = append(gs.start, int32(len(gs.list)))
		}
		if len(gs.list) == len(members[k]) {
			w, _ := liftedWidth(local, gs, order)
			c.WidthAfter = min(c.WidthAfter, w)
			c.WidthAfter, _ = windowedWidth(local, gs, order, c.WidthBefore, c.WidthAfter)
			c.WidthAfter, _ = layeredWidth(induced(before, c.atoms), local, gs, c.WidthBefore, c.WidthAfter)
		}
	}
}

// windowedWidth returns the width and order of greedy min-degree
// elimination of the graph adj kept to the lifted order (the groups of gs in
// the order gorder): only the atoms of the first w unfinished groups are
// candidates (greedyOrder), for w the width before. It returns its width
// and order when below best, else best and a nil order, also when the
// elimination ran out of budget or is not tried: when the graph's vertices
// times best squared (about the work of eliminating with neighbourhoods of
// size best) exceed half the elimination budget.
//
// On the 3×20 grid it finds 54 where the lifted order has 69 (largest
// copies 18, width 3 before). Windows of 0 to 8 groups and min-fill instead
// of min-degree were tried on the grids, cycles, complete and random
// digraphs of BenchmarkLiftedWidth: w+1 helped only the 2×20 grid (11,
// which min-fill finds too), min-fill never beat min-degree by more than 1
// and costs several times more.
func windowedWidth(adj [][]int32, gs *grouping, gorder []int32, before, best int) (int, []int32) {
	if int64(len(adj))*int64(best)*int64(best) > eliminationBudget/2 {
		return best, nil
	}
	pos := make([]int32, len(gorder))
	for i, g := range gorder {
		pos[g] = int32(i)
	}
	rank := make([]int32, len(adj))
	for x := range rank {
		rank[x] = pos[gs.of[x]]
	}
	width, order, done := greedyOrder(slices.Clone(adj), false, rank, max(before, 1))
	if !done || width >= best {
		return best, nil
	}
	return width, order
}

// layeredWidth returns the width and order of greedy min-degree
// elimination of the output's primal graph after kept to the layers of a
// thin layering of the input's primal graph before (the thinnest that
// layerings finds): only the atoms of the first unfinished layer, with
// their copies, are candidates (greedyOrder with a window of one group).
// Group v of gs must hold vertex v of before and its copies, as liftOrder
// makes them; the other groups (atoms of the output that are copies of no
// input atom) go with the lowest layer among their neighbours. Long thin
// inputs, such as grids of a few rows, have layers of about their width,
// and an atom with c copies adds about c to a layer, so the width after
// stays near the largest copies times the width before. It returns its width and order when below best,
// else best and a nil order, also when the elimination ran out of its
// budget (layeredBudget) or is not tried: when the output's atoms times
// best squared exceed half that budget (as in windowedWidth), or when the
// thinnest layering has a layer of more than width+1 atoms, for width the
// width before.
//
// On the 3×100 grid of BenchmarkUnfold (largest copies 23, width 3 before)
// it finds 66 where the windowed order, on twenty times its budget, finds
// 82; on the 3×20 grid 51 (windowed: 52).
func layeredWidth(before, after [][]int32, gs *grouping, width, best int) (int, []int32) {
	if int64(len(after))*int64(best)*int64(best) > layeredBudget/2 {
		return best, nil
	}
	var from, to []int32
	for v, nb := range before {
		for _, w := range nb {
			from, to = append(from, int32(v)), append(to, w)
		}
	}
	u := newDigraph(len(before), from, to)
	var layers [][]int32
	thickness := func(ls [][]int32) int {
		m := 0
		for _, l := range ls {
			m = max(m, len(l))
		}
		return m
	}
	for _, ls := range layerings(u) {
		if layers == nil || thickness(ls) < thickness(layers) {
			layers = ls
		}
	}
	if layers == nil || thickness(layers) > width+1 {
		return best, nil
	}
	groups := len(gs.start) - 1
	rank := make([]int32, groups)
	for g := range rank {
		rank[g] = -1
	}
	for i, l := range layers {
		for _, v := range l {
			rank[v] = int32(i)
		}
	}
	for g := range rank {
		if rank[g] >= 0 {
			continue
		}
		low := int32(-1)
		for _, x := range gs.list[gs.start[g]:gs.start[g+1]] {
			for _, y := range after[x] {
				if k := rank[gs.of[y]]; k >= 0 && (low < 0 || k < low) {
					low = k
				}
			}
		}
		rank[g] = max(low, 0)
	}
	of := make([]int32, len(after))
	for x := range of {
		of[x] = rank[gs.of[x]]
	}
	w, order, done := greedyOrderWithin(slices.Clone(after), false, of, 1, layeredBudget)
	if !done || w >= best {
		return best, nil
	}
	return w, order
}

// layeredBudget bounds the work of layeredWidth's elimination: ten times
// eliminationBudget, about 0.2 s (common practice, no source; the 3×100
// grid of BenchmarkUnfold needs about half of it).
const layeredBudget = 10 * eliminationBudget

// heuristicName names the elimination heuristic eliminate uses with or
// without fill, and whether it was cut short.
func heuristicName(fill, done bool) string {
	name := "min-fill"
	if !fill {
		name = "min-degree"
	}
	if !done {
		name += " (cut short)"
	}
	return name
}

// copyLists returns the copies q made of each of the first n atoms (those
// of the program it unfolds), in increasing index, as copies[start[a]:
// start[a+1]] for atom a, and the atoms q adds that are copies of none of
// them, in increasing index.
func copyLists(n int, q *ground.Program) (start, copies, extra []int32) {
	// root returns the atom of the input that a is a copy of, following
	// copies of copies, or a itself.
	root := func(a ground.Atom) ground.Atom {
		for steps := 0; q.Atoms[a].Copy != ground.NoAtom && steps < len(q.Atoms); steps++ {
			a = q.Atoms[a].Copy
		}
		return a
	}
	start = make([]int32, n+1)
	for a := n; a < len(q.Atoms); a++ {
		if o := root(ground.Atom(a)); int(o) < n {
			start[o+1]++
		}
	}
	for a := 0; a < n; a++ {
		start[a+1] += start[a]
	}
	copies = make([]int32, start[n])
	next := slices.Clone(start[:n])
	for a := n; a < len(q.Atoms); a++ {
		if o := root(ground.Atom(a)); int(o) < n {
			copies[next[o]] = int32(a)
			next[o]++
		} else {
			extra = append(extra, int32(a))
		}
	}
	return start, copies, extra
}

// liftOrder groups the unfolded program's atoms for lifting an elimination
// order of the input's atoms to it, and returns the grouping and that
// order lifted, as an order of the groups: group a, for each input atom a,
// holds its copies, then a itself; each added atom that is no copy has a
// group of its own after those.
//
// Eliminating all of an atom's copies together keeps the width within
// (largest copies + 1) × (width of the input's order + 1) − 1: every rule
// of the output mentions copies of the atoms of one input rule (and
// `a if last copy of a` those of one atom), so replacing each atom by
// itself and its copies in every bag of the tree decomposition the input's
// order defines gives a tree decomposition of the output, which the lifted
// order follows.
//
// The added atoms that are no copies (guesses and bound atoms of rewritten
// choices) go first. Each one's neighbours are copies of the atoms of one
// input choice (an element and the body, or all elements and the body), so
// they lie in one lifted bag: eliminating it first makes no fill outside
// that bag, and its neighbourhood is at most that bag, which may exceed
// the bound above by one. Placing it right before its first neighbour
// would do no better, and first is simpler.
func liftOrder(order, start, copies, extra []int32) (*grouping, []int32) {
	n := len(start) - 1
	gs := &grouping{
		start: make([]int32, 0, n+len(extra)+1),
		list:  make([]int32, 0, n+len(copies)+len(extra)),
		of:    make([]int32, n+len(copies)+len(extra)),
	}
	gs.start = append(gs.start, 0)
	for v := 0; v < n; v++ {
		for _, x := range copies[start[v]:start[v+1]] {
			gs.list = append(gs.list, x)
			gs.of[x] = int32(v)
		}
		gs.list = append(gs.list, int32(v))
		gs.of[v] = int32(v)
		gs.start = append(gs.start, int32(len(gs.list)))
	}
	gorder := make([]int32, 0, n+len(extra))
	for i, x := range extra {
		gs.list = append(gs.list, x)
		gs.of[x] = int32(n + i)
		gs.start = append(gs.start, int32(len(gs.list)))
		gorder = append(gorder, int32(n+i))
	}
	return gs, append(gorder, order...)
}

// induced returns the subgraph of the graph adj (sorted neighbour lists)
// induced by the sorted vertex list vs, its vertices numbered by their
// positions in vs.
func induced(adj [][]int32, vs []int32) [][]int32 {
	local := make([][]int32, len(vs))
	for i, v := range vs {
		for _, w := range adj[v] {
			if j, ok := slices.BinarySearch(vs, w); ok {
				local[i] = append(local[i], int32(j))
			}
		}
	}
	return local
}

// WriteText writes the report as a table for people.
func (r *Report) WriteText(w io.Writer) error {
	var b strings.Builder
	plural := "s"
	if len(r.Components) == 1 {
		plural = ""
	}
	fmt.Fprintf(&b, "positive dependency graph: %d atoms, %d rules, %d edges, %d cyclic component%s\n",
		r.Atoms, r.Rules, r.Edges, len(r.Components), plural)
	if len(r.Components) > 0 {
		fmt.Fprintf(&b, "%5s %7s %7s %8s %-13s %7s %7s %6s %6s  %s\n",
			"comp", "atoms", "entries", "edges", "construction", "copies", "total", "width", "after", "first atom")
		for _, c := range r.Components {
			fmt.Fprintf(&b, "%5d %7d %7d %8d %-13s %7d %7d %6s %6s  %s\n",
				c.Index, c.Size, c.Entries, c.Edges, c.Construction, c.MaxCopies, c.TotalCopies,
				widthText(c.WidthBefore), widthText(c.WidthAfter), c.First)
		}
	}
	fmt.Fprintf(&b, "unfolded: %d atoms, %d rules; largest copies %d, total copies %d\n",
		r.AtomsAfter, r.RulesAfter, r.MaxCopies, r.TotalCopies)
	if r.WidthBefore >= 0 {
		fmt.Fprintf(&b, "estimated treewidth (%s): %d before, %d after\n", r.WidthMethod, r.WidthBefore, r.WidthAfter)
	}
	fmt.Fprintf(&b, "time: %.3fs\n", r.Seconds)
	_, err := io.WriteString(w, b.String())
	return err
}

func widthText(w int) string {
	if w < 0 {
		return "-"
	}
	return fmt.Sprint(w)
}

// WriteJSON writes the report as indented JSON.
func (r *Report) WriteJSON(w io.Writer) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	return enc.Encode(r)
}

// dotColors are the fill colours of cyclic components in WriteDot, used in
// turn.
var dotColors = [...]string{"#fbb4ae", "#b3cde3", "#ccebc5", "#decbe4", "#fed9a6", "#ffffcc", "#e5d8bd", "#fddaec"}

// WriteDot writes the positive dependency graph g of p in the Graphviz dot
// language, one node per atom labelled with the atom, edges from body to
// head, the atoms of each cyclic component filled with one colour and
// grouped in a cluster.
func WriteDot(w io.Writer, p *ground.Program, g *Graph) error {
	var b strings.Builder
	b.WriteString("digraph dependencies {\n  node [shape=box, style=rounded];\n")
	color := 0
	for i := 0; i < g.NumComponents(); i++ {
		if !g.Cyclic(i) {
			continue
		}
		fmt.Fprintf(&b, "  subgraph cluster_%d {\n    label=\"component %d\";\n", i, color)
		for _, v := range g.Component(i) {
			fmt.Fprintf(&b, "    a%d [label=%q, style=\"rounded,filled\", fillcolor=%q];\n",
				v, p.AtomString(ground.Atom(v)), dotColors[color%len(dotColors)])
		}
		b.WriteString("  }\n")
		color++
	}
	for i := 0; i < g.NumComponents(); i++ {
		if g.Cyclic(i) {
			continue
		}
		for _, v := range g.Component(i) {
			fmt.Fprintf(&b, "  a%d [label=%q];\n", v, p.AtomString(ground.Atom(v)))
		}
	}
	for v := 0; v < g.Len(); v++ {
		for _, x := range g.Succ(int32(v)) {
			fmt.Fprintf(&b, "  a%d -> a%d;\n", v, x)
		}
	}
	b.WriteString("}\n")
	_, err := io.WriteString(w, b.String())
	return err
}
