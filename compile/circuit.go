package compile

// NodeKind says what a circuit node is.
type NodeKind uint8

// The kinds of circuit nodes.
const (
	FalseNode NodeKind = iota // no model
	TrueNode                  // the empty conjunction
	LitNode                   // a literal, Arg[i]
	FreeNode                  // variable Arg[i] is unconstrained: (v ∨ ¬v)
	AndNode                   // conjunction of children over disjoint variables
	OrNode                    // deterministic disjunction; Arg[i] is its decision variable (0 if none)
)

// Circuit is a smooth decision-DNNF circuit in flat arrays. Node i has kind
// Kind[i], argument Arg[i] and children Children[Start[i]:Start[i+1]]; every
// child has a smaller index than its parent, so one pass in index order is a
// bottom-up pass. The circuit is
//   - decomposable: the children of an AndNode mention disjoint variables;
//   - deterministic: the children of an OrNode have no model in common;
//   - smooth: the children of an OrNode mention the same variables, and the
//     root mentions every variable 1..NumVars (unless the root is FalseNode).
//
// So the models of the root are exactly the models of the compiled formula,
// and every semiring evaluation is one pass over the arrays.
type Circuit struct {
	NumVars  int
	Kind     []NodeKind
	Arg      []int32
	Start    []int32 // len(Start) == len(Kind)+1
	Children []int32
	Root     int32

	// Meta relates variables to the atoms and weights of the source model.
	Meta Meta
}

// Meta is the part of a circuit file that relates variables to the model the
// circuit was compiled from. It carries no algorithm; queries read it.
type Meta struct {
	// Atoms lists the atoms of the source model that have a variable, with
	// their display names (`name(arg,arg)`), in term order.
	Atoms []NamedVar
	// Shown lists indices into Atoms of the atoms answers display.
	Shown []int32
	// Weights lists the weighted variables: a model in which Var is true pays
	// Weight at Priority. A variable may carry several weights.
	Weights []VarWeight
}

// NamedVar is a variable with the display name of its atom.
type NamedVar struct {
	Name string
	Var  Var
}

// VarWeight is a weight a variable carries when true.
type VarWeight struct {
	Var      Var
	Weight   int64
	Priority int64
}

// NumNodes returns the number of nodes.
func (c *Circuit) NumNodes() int { return len(c.Kind) }

// NumEdges returns the number of parent-child edges.
func (c *Circuit) NumEdges() int { return len(c.Children) }

// NodeChildren returns the children of node i. The caller must not modify
// the slice.
func (c *Circuit) NodeChildren(i int32) []int32 { return c.Children[c.Start[i]:c.Start[i+1]] }
