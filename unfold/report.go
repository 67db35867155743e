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
	// WidthMethod names the elimination heuristic used for the widths.
	WidthMethod string  `json:"width_method,omitempty"`
	Seconds     float64 `json:"seconds"` // time spent
}

// ComponentReport describes the unfolding of one cyclic component.
type ComponentReport struct {
	Index        int          `json:"index"`        // position among the cyclic components
	Size         int          `json:"size"`         // atoms
	Edges        int          `json:"edges"`        // edges inside the component
	First        string       `json:"first"`        // its first atom, to recognise it
	Construction Construction `json:"construction"` // how the sequence was built
	MaxCopies    int          `json:"max_copies"`   // largest number of copies of one atom
	TotalCopies  int          `json:"total_copies"` // length of the sequence
	// WidthBefore and WidthAfter estimate the treewidth of the primal graph
	// restricted to the component's atoms, and to those and their copies.
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
	r.WidthBefore, r.WidthMethod = Width(p, nil, limit)
	var m2 string
	r.WidthAfter, m2 = Width(q, nil, limit)
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
	before, _ := primal(p, nil)
	after, _ := primal(q, nil)
	for k := range r.Components {
		c := &r.Components[k]
		c.WidthBefore = inducedWidth(before, c.atoms, limit)
		c.WidthAfter = inducedWidth(after, members[k], limit)
	}
}

// inducedWidth estimates the treewidth of the subgraph of the graph adj
// (sorted neighbour lists) induced by the sorted vertex list vs.
func inducedWidth(adj [][]int32, vs []int32, limit int) int {
	local := make([][]int32, len(vs))
	for i, v := range vs {
		for _, w := range adj[v] {
			if j, ok := slices.BinarySearch(vs, w); ok {
				local[i] = append(local[i], int32(j))
			}
		}
	}
	w, _ := eliminate(local, len(vs) <= limit)
	return w
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
		fmt.Fprintf(&b, "%5s %7s %8s %-13s %7s %7s %6s %6s  %s\n",
			"comp", "atoms", "edges", "construction", "copies", "total", "width", "after", "first atom")
		for _, c := range r.Components {
			fmt.Fprintf(&b, "%5d %7d %8d %-13s %7d %7d %6s %6s  %s\n",
				c.Index, c.Size, c.Edges, c.Construction, c.MaxCopies, c.TotalCopies,
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
