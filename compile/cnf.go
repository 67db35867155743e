package compile

import (
	"bufio"
	"fmt"
	"io"
)

// Var is a propositional variable, numbered from 1.
type Var int32

// Lit is a literal in DIMACS style: +v for variable v, -v for its negation.
type Lit int32

// Pos returns the positive literal of v.
func (v Var) Pos() Lit { return Lit(v) }

// Neg returns the negative literal of v.
func (v Var) Neg() Lit { return Lit(-v) }

// Var returns the variable of l.
func (l Lit) Var() Var {
	if l < 0 {
		return Var(-l)
	}
	return Var(l)
}

// IsNeg reports whether l is a negative literal.
func (l Lit) IsNeg() bool { return l < 0 }

// Not returns the negation of l.
func (l Lit) Not() Lit { return -l }

// CNF is a formula in conjunctive normal form over variables 1..NumVars.
// Clauses are stored flat: clause i is Lits[Start[i]:Start[i+1]].
type CNF struct {
	NumVars int
	Lits    []Lit
	Start   []int32 // len(Start) == NumClauses()+1 once a clause was added
}

// NewVar adds a variable and returns it.
func (f *CNF) NewVar() Var {
	f.NumVars++
	return Var(f.NumVars)
}

// AddClause appends the clause (l1 ∨ l2 ∨ ...). An empty clause makes the
// formula unsatisfiable.
func (f *CNF) AddClause(lits ...Lit) {
	if len(f.Start) == 0 {
		f.Start = append(f.Start, 0)
	}
	f.Lits = append(f.Lits, lits...)
	f.Start = append(f.Start, int32(len(f.Lits)))
}

// NumClauses returns the number of clauses.
func (f *CNF) NumClauses() int {
	if len(f.Start) == 0 {
		return 0
	}
	return len(f.Start) - 1
}

// Clause returns clause i. The caller must not modify it.
func (f *CNF) Clause(i int) []Lit { return f.Lits[f.Start[i]:f.Start[i+1]] }

// WriteDIMACS writes f in the DIMACS text form used for debugging, with one
// comment line per entry of comments.
func (f *CNF) WriteDIMACS(w io.Writer, comments ...string) error {
	bw := bufio.NewWriter(w)
	for _, c := range comments {
		fmt.Fprintf(bw, "c %s\n", c)
	}
	fmt.Fprintf(bw, "p cnf %d %d\n", f.NumVars, f.NumClauses())
	for i := 0; i < f.NumClauses(); i++ {
		for _, l := range f.Clause(i) {
			fmt.Fprintf(bw, "%d ", l)
		}
		bw.WriteString("0\n")
	}
	return bw.Flush()
}
