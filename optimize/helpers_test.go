package optimize

import (
	"fmt"
	"math/big"
	"sort"
	"strings"

	"pgregory.net/rapid"

	"trellis/compile"
)

// builder assembles a circuit node by node, sharing equal nodes.
type builder struct {
	c    *compile.Circuit
	memo map[string]int32
}

func newBuilder(numVars int) *builder {
	return &builder{
		c:    &compile.Circuit{NumVars: numVars, Start: []int32{0}},
		memo: map[string]int32{},
	}
}

func (b *builder) node(kind compile.NodeKind, arg int32, kids ...int32) int32 {
	key := fmt.Sprint(kind, arg, kids)
	if n, ok := b.memo[key]; ok {
		return n
	}
	c := b.c
	n := int32(len(c.Kind))
	c.Kind = append(c.Kind, kind)
	c.Arg = append(c.Arg, arg)
	c.Children = append(c.Children, kids...)
	c.Start = append(c.Start, int32(len(c.Children)))
	b.memo[key] = n
	return n
}

// shannon builds a smooth decision-DNNF for the Boolean function table over
// vars: table[i] is its value where vars[j] is bit j of i. It returns -1 for
// the constant false function. The flags vary the shapes it produces:
// single-child ORs, free variables where both branches agree.
func (b *builder) shannon(vars []compile.Var, table []bool, wrapOr, useFree bool) int32 {
	all, none := true, true
	for _, t := range table {
		all = all && t
		none = none && !t
	}
	if none {
		return -1
	}
	if len(vars) == 0 {
		return b.node(compile.TrueNode, 0)
	}
	v := vars[0]
	if all {
		var kids []int32
		for _, w := range vars {
			kids = append(kids, b.node(compile.FreeNode, int32(w)))
		}
		if len(kids) == 1 {
			return kids[0]
		}
		return b.node(compile.AndNode, 0, kids...)
	}
	half := len(table) / 2
	hi, lo := make([]bool, half), make([]bool, half)
	same := true
	for i := 0; i < half; i++ {
		lo[i], hi[i] = table[2*i], table[2*i+1]
		same = same && lo[i] == hi[i]
	}
	if same && useFree {
		rest := b.shannon(vars[1:], lo, wrapOr, useFree)
		return b.node(compile.AndNode, 0, b.node(compile.FreeNode, int32(v)), rest)
	}
	var kids []int32
	for _, br := range []struct {
		lit compile.Lit
		t   []bool
	}{{v.Pos(), hi}, {v.Neg(), lo}} {
		sub := b.shannon(vars[1:], br.t, wrapOr, useFree)
		if sub < 0 {
			continue
		}
		kids = append(kids, b.node(compile.AndNode, 0, b.node(compile.LitNode, int32(br.lit)), sub))
	}
	if len(kids) == 1 && !wrapOr {
		return kids[0]
	}
	return b.node(compile.OrNode, int32(v), kids...)
}

// problem is a random circuit with its truth table, for brute force.
type problem struct {
	c      *compile.Circuit
	blocks [][]compile.Var
	tables [][]bool
}

// isModel reports whether the assignment (bit v-1 of x is variable v)
// satisfies the circuit.
func (p *problem) isModel(x uint64) bool {
	for b, vars := range p.blocks {
		i := 0
		for j, v := range vars {
			if x>>(v-1)&1 == 1 {
				i |= 1 << j
			}
		}
		if !p.tables[b][i] {
			return false
		}
	}
	return true
}

// genProblem draws a circuit over 1..n variables: the conjunction of random
// functions over disjoint blocks, each compiled by Shannon expansion, with
// random atoms, shown atoms and weights.
func genProblem(t *rapid.T, maxVars int) *problem {
	n := rapid.IntRange(0, maxVars).Draw(t, "vars")
	perm := rapid.Permutation(seq(n)).Draw(t, "order")
	nb := 1
	if n > 1 {
		nb = rapid.IntRange(1, min(n, 3)).Draw(t, "blocks")
	}
	p := &problem{}
	b := newBuilder(n)
	var roots []int32
	for k := 0; k < nb; k++ {
		lo, hi := k*n/nb, (k+1)*n/nb
		vars := append([]compile.Var(nil), perm[lo:hi]...)
		density := rapid.IntRange(0, 10).Draw(t, "density")
		table := make([]bool, 1<<len(vars))
		for i := range table {
			table[i] = rapid.IntRange(0, 9).Draw(t, "cell") < density
		}
		p.blocks = append(p.blocks, vars)
		p.tables = append(p.tables, table)
		r := b.shannon(vars, table, rapid.Bool().Draw(t, "wrapOr"), rapid.Bool().Draw(t, "free"))
		if r < 0 {
			r = b.node(compile.FalseNode, 0)
		}
		roots = append(roots, r)
	}
	switch {
	case len(roots) == 1 && rapid.Bool().Draw(t, "bare"):
		b.c.Root = roots[0]
	default:
		b.c.Root = b.node(compile.AndNode, 0, roots...)
	}
	p.c = b.c
	// atoms: a random subset of the variables in a random order
	for _, v := range rapid.Permutation(seq(n)).Draw(t, "atomOrder") {
		if rapid.IntRange(0, 3).Draw(t, "isAtom") > 0 {
			p.c.Meta.Atoms = append(p.c.Meta.Atoms, compile.NamedVar{Name: fmt.Sprintf("a(%d)", v), Var: v})
		}
	}
	for i := range p.c.Meta.Atoms {
		if rapid.IntRange(0, 3).Draw(t, "isShown") > 0 {
			p.c.Meta.Shown = append(p.c.Meta.Shown, int32(i))
		}
	}
	if n > 0 {
		nw := rapid.IntRange(0, 2*n).Draw(t, "weights")
		for i := 0; i < nw; i++ {
			p.c.Meta.Weights = append(p.c.Meta.Weights, compile.VarWeight{
				Var:      compile.Var(rapid.IntRange(1, n).Draw(t, "wvar")),
				Weight:   int64(rapid.IntRange(-3, 5).Draw(t, "w")),
				Priority: int64(rapid.IntRange(0, 2).Draw(t, "prio")),
			})
		}
	}
	return p
}

func seq(n int) []compile.Var {
	s := make([]compile.Var, n)
	for i := range s {
		s[i] = compile.Var(i + 1)
	}
	return s
}

// bruteModel is a model found by enumeration.
type bruteModel struct {
	x     uint64
	cost  []int64
	shown []string
}

// bruteAll enumerates the models of the circuit under pins, computing their
// costs over the priorities prio (highest first) and sorting them by cost,
// then by the tie-break written out independently: the positions of the
// true shown atoms, then of all atoms, then the true variables, each list
// compared lexicographically with a proper prefix first.
func bruteAll(p *problem, prio []int64, pins []Pin) []bruteModel {
	c := p.c
	meta := c.Meta
	firstPos := map[compile.Var]int{}
	for i, a := range meta.Atoms {
		if _, ok := firstPos[a.Var]; !ok {
			firstPos[a.Var] = i
		}
	}
	shownVar := map[compile.Var]bool{}
	for _, i := range meta.Shown {
		shownVar[meta.Atoms[i].Var] = true
	}
	type keyed struct {
		m    bruteModel
		keys [3][]int
	}
	var all []keyed
	for x := uint64(0); x < 1<<c.NumVars; x++ {
		if !p.isModel(x) {
			continue
		}
		ok := true
		for _, pin := range pins {
			if (x>>(pin.Var-1)&1 == 1) != pin.Value {
				ok = false
			}
		}
		if !ok {
			continue
		}
		m := bruteModel{x: x, cost: make([]int64, len(prio))}
		for _, w := range meta.Weights {
			if x>>(w.Var-1)&1 == 1 {
				for j, q := range prio {
					if q == w.Priority {
						m.cost[j] += w.Weight
					}
				}
			}
		}
		var k keyed
		seenShown := map[int]bool{}
		for _, i := range sortedInts(meta.Shown) {
			a := meta.Atoms[i]
			if x>>(a.Var-1)&1 == 1 {
				m.shown = append(m.shown, a.Name)
				pos := firstPos[a.Var]
				if !seenShown[pos] {
					seenShown[pos] = true
					k.keys[0] = append(k.keys[0], pos)
				}
			}
		}
		for v := compile.Var(1); int(v) <= c.NumVars; v++ {
			if x>>(v-1)&1 == 1 {
				if pos, ok := firstPos[v]; ok {
					k.keys[1] = append(k.keys[1], pos)
				}
				k.keys[2] = append(k.keys[2], int(v))
			}
		}
		sort.Ints(k.keys[0])
		sort.Ints(k.keys[1])
		k.m = m
		all = append(all, k)
	}
	lex := func(a, b []int) int {
		for i := 0; i < len(a) && i < len(b); i++ {
			if a[i] != b[i] {
				if a[i] < b[i] {
					return -1
				}
				return 1
			}
		}
		return len(a) - len(b)
	}
	sort.SliceStable(all, func(i, j int) bool {
		for q := range all[i].m.cost {
			if all[i].m.cost[q] != all[j].m.cost[q] {
				return all[i].m.cost[q] < all[j].m.cost[q]
			}
		}
		for l := 0; l < 3; l++ {
			if d := lex(all[i].keys[l], all[j].keys[l]); d != 0 {
				return d < 0
			}
		}
		return false
	})
	out := make([]bruteModel, len(all))
	for i := range all {
		out[i] = all[i].m
	}
	return out
}

func sortedInts(s []int32) []int32 {
	out := append([]int32(nil), s...)
	sort.Slice(out, func(i, j int) bool { return out[i] < out[j] })
	var dedup []int32
	for i, x := range out {
		if i == 0 || x != out[i-1] {
			dedup = append(dedup, x)
		}
	}
	return dedup
}

func priorities(c *compile.Circuit) []int64 {
	seen := map[int64]bool{}
	var out []int64
	for _, w := range c.Meta.Weights {
		if !seen[w.Priority] {
			seen[w.Priority] = true
			out = append(out, w.Priority)
		}
	}
	sort.Slice(out, func(i, j int) bool { return out[i] > out[j] })
	return out
}

func costString(c []PriorityCost) string {
	var parts []string
	for _, x := range c {
		parts = append(parts, fmt.Sprintf("%d@%d", x.Value, x.Priority))
	}
	return "[" + strings.Join(parts, " ") + "]"
}

func vecString(prio, v []int64) string {
	var parts []string
	for j := range v {
		parts = append(parts, fmt.Sprintf("%d@%d", v[j], prio[j]))
	}
	return "[" + strings.Join(parts, " ") + "]"
}

func bigOf(n int) *big.Int { return big.NewInt(int64(n)) }
