package compile

import (
	"fmt"
	"slices"
)

// Verify checks that c is well formed and a smooth decision-DNNF: node
// arrays of matching lengths, kinds and arguments in range, children before
// parents, decomposable AndNodes, smooth OrNodes (all children mention the
// same variables) and a root that mentions every variable unless it is
// FalseNode, and deterministic OrNodes (a child implies its decision
// variable and another its negation; without a decision variable, children
// of at most 20 variables are compared by enumeration). It takes time
// quadratic in the size of c and is meant for tests and small circuits.
func Verify(c *Circuit) error {
	if err := verifyShape(c); err != nil {
		return err
	}
	n := len(c.Kind)
	vars := make([][]int32, n)
	for i := 0; i < n; i++ {
		kids := c.NodeChildren(int32(i))
		switch c.Kind[i] {
		case LitNode:
			vars[i] = []int32{int32(Lit(c.Arg[i]).Var())}
		case FreeNode:
			vars[i] = []int32{c.Arg[i]}
		case AndNode:
			var vs []int32
			for _, k := range kids {
				vs = append(vs, vars[k]...)
			}
			slices.Sort(vs)
			for j := 1; j < len(vs); j++ {
				if vs[j] == vs[j-1] {
					return fmt.Errorf("node %d: AndNode is not decomposable: variable %d occurs in two children", i, vs[j])
				}
			}
			vars[i] = vs
		case OrNode:
			for _, k := range kids {
				if !slices.Equal(vars[k], vars[kids[0]]) {
					return fmt.Errorf("node %d: OrNode is not smooth: children %d and %d mention different variables", i, kids[0], k)
				}
			}
			if len(kids) > 0 {
				vars[i] = vars[kids[0]]
			}
			if err := verifyDeterministic(c, int32(i), vars[i]); err != nil {
				return err
			}
		}
	}
	if c.Kind[c.Root] != FalseNode && len(vars[c.Root]) != c.NumVars {
		return fmt.Errorf("root mentions %d of the %d variables", len(vars[c.Root]), c.NumVars)
	}
	return nil
}

// verifyShape checks array lengths, kinds, arguments and child order.
func verifyShape(c *Circuit) error {
	n := len(c.Kind)
	if n == 0 {
		return fmt.Errorf("circuit has no nodes")
	}
	if len(c.Arg) != n || len(c.Start) != n+1 || c.Start[0] != 0 || int(c.Start[n]) != len(c.Children) {
		return fmt.Errorf("node arrays have inconsistent lengths")
	}
	if c.Root < 0 || int(c.Root) >= n {
		return fmt.Errorf("root %d is not a node", c.Root)
	}
	for i := 0; i < n; i++ {
		if c.Start[i] > c.Start[i+1] {
			return fmt.Errorf("node %d: children out of range", i)
		}
		kids := c.NodeChildren(int32(i))
		for _, k := range kids {
			if k < 0 || int(k) >= i {
				return fmt.Errorf("node %d: child %d does not come before its parent", i, k)
			}
		}
		arg := c.Arg[i]
		switch c.Kind[i] {
		case FalseNode, TrueNode, LitNode, FreeNode:
			if len(kids) != 0 {
				return fmt.Errorf("node %d: a leaf has children", i)
			}
		}
		switch c.Kind[i] {
		case FalseNode, TrueNode, AndNode:
			if arg != 0 {
				return fmt.Errorf("node %d: unexpected argument %d", i, arg)
			}
		case LitNode:
			if arg == 0 || arg < -int32(c.NumVars) || arg > int32(c.NumVars) {
				return fmt.Errorf("node %d: literal %d is outside the variables 1..%d", i, arg, c.NumVars)
			}
		case FreeNode:
			if arg < 1 || arg > int32(c.NumVars) {
				return fmt.Errorf("node %d: variable %d is outside 1..%d", i, arg, c.NumVars)
			}
		case OrNode:
			if arg < 0 || arg > int32(c.NumVars) {
				return fmt.Errorf("node %d: decision variable %d is outside 1..%d", i, arg, c.NumVars)
			}
		default:
			return fmt.Errorf("node %d: unknown kind %d", i, c.Kind[i])
		}
	}
	return nil
}

// verifyDeterministic checks that the children of OrNode i have no model in
// common.
func verifyDeterministic(c *Circuit, i int32, vars []int32) error {
	kids := c.NodeChildren(i)
	if x := c.Arg[i]; x != 0 {
		// Every child must imply x or ¬x, and no two the same literal.
		var pos, neg int
		for _, k := range kids {
			switch {
			case !verifySat(c, k, Lit(-x)):
				pos++
			case !verifySat(c, k, Lit(x)):
				neg++
			default:
				return fmt.Errorf("node %d: OrNode is not deterministic: child %d does not decide variable %d", i, k, x)
			}
		}
		if pos > 1 || neg > 1 {
			return fmt.Errorf("node %d: OrNode is not deterministic: two children agree on variable %d", i, x)
		}
		return nil
	}
	if len(vars) > 20 {
		return fmt.Errorf("node %d: cannot check an OrNode without decision variable over %d variables", i, len(vars))
	}
	val := make(map[Var]bool)
	for m := 0; m < 1<<len(vars); m++ {
		for b, v := range vars {
			val[Var(v)] = m>>b&1 != 0
		}
		sat := 0
		for _, k := range kids {
			if Eval(c, k, func(v Var) bool { return val[v] }) {
				sat++
			}
		}
		if sat > 1 {
			return fmt.Errorf("node %d: OrNode is not deterministic: children share a model", i)
		}
	}
	return nil
}

// verifySat reports whether node i has a model in which literal l is true.
// In a decomposable circuit satisfiability is one bottom-up pass, with
// every literal leaf true except the negation of l.
func verifySat(c *Circuit, i int32, l Lit) bool {
	return evalLeaves(c, i, func(leaf Lit) bool { return leaf != l.Not() })
}

// Eval reports whether the assignment value satisfies node i of c.
func Eval(c *Circuit, i int32, value func(Var) bool) bool {
	return evalLeaves(c, i, func(leaf Lit) bool { return value(leaf.Var()) != leaf.IsNeg() })
}

// evalLeaves evaluates node i of c bottom up, each literal leaf taking the
// value leaf gives it, true and free leaves true.
func evalLeaves(c *Circuit, i int32, leaf func(Lit) bool) bool {
	val := make([]bool, i+1)
	for j := int32(0); j <= i; j++ {
		kids := c.NodeChildren(j)
		switch c.Kind[j] {
		case TrueNode, FreeNode:
			val[j] = true
		case LitNode:
			val[j] = leaf(Lit(c.Arg[j]))
		case AndNode:
			val[j] = true
			for _, k := range kids {
				val[j] = val[j] && val[k]
			}
		case OrNode:
			for _, k := range kids {
				val[j] = val[j] || val[k]
			}
		}
	}
	return val[i]
}

// verifyWidths checks, in one pass, a consequence of decomposability and
// smoothness: counting the variables a node mentions as the sum over the
// children of an AndNode and the common number of an OrNode's children, no
// node mentions more variables than the leaves of the circuit hold. This
// bounds every count by 2 to the number of leaf variables, so a crafted file
// cannot make counting blow up.
func verifyWidths(c *Circuit) error {
	var leaves []int32
	for i, k := range c.Kind {
		switch k {
		case LitNode:
			leaves = append(leaves, int32(Lit(c.Arg[i]).Var()))
		case FreeNode:
			leaves = append(leaves, c.Arg[i])
		}
	}
	slices.Sort(leaves)
	limit := int64(len(slices.Compact(leaves)))
	width := make([]int64, len(c.Kind))
	for i, k := range c.Kind {
		kids := c.NodeChildren(int32(i))
		switch k {
		case LitNode, FreeNode:
			width[i] = 1
		case AndNode:
			for _, x := range kids {
				width[i] += width[x]
			}
			if width[i] > limit {
				return fmt.Errorf("node %d: AndNode mentions more than the %d variables of the circuit", i, limit)
			}
		case OrNode:
			for _, x := range kids {
				if width[x] != width[kids[0]] {
					return fmt.Errorf("node %d: OrNode is not smooth", i)
				}
			}
			if len(kids) > 0 {
				width[i] = width[kids[0]]
			}
		}
	}
	return nil
}
