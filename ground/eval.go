package ground

import (
	"fmt"
	"math"

	"trellis/grammar"
)

// noTerm marks an unbound variable slot.
const noTerm Term = -1

// ctKind is the kind of a compiled (possibly non-ground) term.
type ctKind uint8

const (
	ctGround   ctKind = iota // a ground term, already interned
	ctVar                    // a variable slot
	ctCompound               // functor(args...) with a variable inside
	ctBinary                 // arithmetic with a variable inside
	ctNeg                    // unary minus with a variable inside
	ctInterval               // L..U (heads only)
)

// cterm is a term compiled against a statement's variable slots. Ground
// subterms are folded into a single ctGround node when the statement is
// compiled.
type cterm struct {
	kind  ctKind
	val   Term             // ctGround
	slot  int              // ctVar
	name  string           // ctCompound: functor; ctVar: variable name
	op    grammar.BinaryOp // ctBinary
	args  []*cterm         // ctCompound: arguments; ctBinary, ctInterval: left, right; ctNeg: operand
	pos   grammar.Pos
	anon  bool // ctVar: an anonymous variable
	arith bool // contains arithmetic over a variable (cannot be matched)
}

// evalError is a positioned error found while evaluating a term.
type evalError struct {
	pos grammar.Pos
	msg string
}

func (e *evalError) Error() string { return e.pos.String() + ": " + e.msg }

func evalErrorf(pos grammar.Pos, format string, args ...any) *evalError {
	return &evalError{pos: pos, msg: fmt.Sprintf(format, args...)}
}

// arith applies a binary arithmetic operator with overflow checks.
func arith(op grammar.BinaryOp, a, b int64, pos grammar.Pos) (int64, *evalError) {
	switch op {
	case grammar.Add:
		s := a + b
		if (s > a) != (b > 0) {
			return 0, evalErrorf(pos, "integer overflow: %d + %d does not fit in 64 bits", a, b)
		}
		return s, nil
	case grammar.Subtract:
		s := a - b
		if (s < a) != (b > 0) {
			return 0, evalErrorf(pos, "integer overflow: %d - %d does not fit in 64 bits", a, b)
		}
		return s, nil
	case grammar.Multiply:
		if a == 0 || b == 0 {
			return 0, nil
		}
		p := a * b
		if p/b != a || (a == -1 && b == math.MinInt64) || (b == -1 && a == math.MinInt64) {
			return 0, evalErrorf(pos, "integer overflow: %d * %d does not fit in 64 bits", a, b)
		}
		return p, nil
	case grammar.Divide, grammar.Modulo:
		if b == 0 {
			return 0, evalErrorf(pos, "division by zero: %d %s 0", a, op)
		}
		if a == math.MinInt64 && b == -1 {
			if op == grammar.Modulo {
				return 0, nil
			}
			return 0, evalErrorf(pos, "integer overflow: %d / -1 does not fit in 64 bits", a)
		}
		if op == grammar.Divide {
			return a / b, nil // Go truncates toward zero
		}
		return a % b, nil // Go's % takes the sign of the dividend
	}
	return 0, evalErrorf(pos, "operator %s is not allowed here", op)
}

// negate returns -a with an overflow check.
func negate(a int64, pos grammar.Pos) (int64, *evalError) {
	if a == math.MinInt64 {
		return 0, evalErrorf(pos, "integer overflow: -(%d) does not fit in 64 bits", a)
	}
	return -a, nil
}

// MaxTermDepth bounds how deeply the grounder nests function terms; a rule
// such as `p(f(X)) if p(X).` would otherwise build ever deeper terms.
const MaxTermDepth = 1000

// evaluator evaluates compiled terms against a binding of variable slots.
type evaluator struct {
	terms  *TermTable
	args   []Term   // scratch for compound arguments
	depths []uint16 // nesting depth of compound terms built so far, by Term
}

// depth returns the nesting depth of term t (1 for a constant).
func (e *evaluator) depth(t Term) int {
	if int(t) < len(e.depths) && e.depths[t] != 0 {
		return int(e.depths[t])
	}
	d := 1
	for _, a := range e.terms.Args(t) {
		d = max(d, 1+e.depth(a))
	}
	if d > MaxTermDepth {
		d = MaxTermDepth + 1
	}
	for int(t) >= len(e.depths) {
		e.depths = append(e.depths, 0)
	}
	e.depths[t] = uint16(d)
	return d
}

// scratch returns a reusable slice of n terms.
func (e *evaluator) scratch(n int) []Term {
	if cap(e.args) < n {
		e.args = make([]Term, n)
	}
	return e.args[:n]
}

// eval returns the ground value of t under binding b. Every variable of t
// must be bound; intervals are not allowed (see expand).
func (e *evaluator) eval(t *cterm, b []Term) (Term, *evalError) {
	switch t.kind {
	case ctGround:
		return t.val, nil
	case ctVar:
		if b[t.slot] == noTerm {
			return noTerm, evalErrorf(t.pos, "variable %s is not bound here", t.name)
		}
		return b[t.slot], nil
	case ctCompound:
		args := make([]Term, len(t.args))
		for i, a := range t.args {
			v, err := e.eval(a, b)
			if err != nil {
				return noTerm, err
			}
			args[i] = v
		}
		v := e.terms.Compound(t.name, args...)
		if e.depth(v) > MaxTermDepth {
			return noTerm, evalErrorf(t.pos, "a term nested more than %d levels deep (MaxTermDepth): does a rule build ever deeper terms?", MaxTermDepth)
		}
		return v, nil
	case ctBinary:
		x, err := e.evalInt(t.args[0], b, t.op)
		if err != nil {
			return noTerm, err
		}
		y, err := e.evalInt(t.args[1], b, t.op)
		if err != nil {
			return noTerm, err
		}
		v, err := arith(t.op, x, y, t.pos)
		if err != nil {
			return noTerm, err
		}
		return e.terms.Int(v), nil
	case ctNeg:
		x, err := e.evalInt(t.args[0], b, grammar.Subtract)
		if err != nil {
			return noTerm, err
		}
		v, err := negate(x, t.pos)
		if err != nil {
			return noTerm, err
		}
		return e.terms.Int(v), nil
	}
	return noTerm, evalErrorf(t.pos, "an interval L..U may only be an argument of a fact, a rule head or a choice element")
}

// evalInt evaluates an operand of arithmetic, which must be an integer.
func (e *evaluator) evalInt(t *cterm, b []Term, op grammar.BinaryOp) (int64, *evalError) {
	v, err := e.eval(t, b)
	if err != nil {
		return 0, err
	}
	n, ok := e.terms.IntValue(v)
	if !ok {
		return 0, evalErrorf(t.pos, "operand of %s is not an integer: %s", op, e.terms.TermString(v))
	}
	return n, nil
}

// maxInterval bounds the number of values one interval may expand to.
const maxInterval = 10_000_000

// expand evaluates t, which may contain intervals, and calls f with each of
// its values (the cross product of the intervals it contains).
func (e *evaluator) expand(t *cterm, b []Term, f func(Term) *evalError) *evalError {
	switch t.kind {
	case ctInterval:
		lo, err := e.evalInt(t.args[0], b, grammar.Interval)
		if err != nil {
			return err
		}
		hi, err := e.evalInt(t.args[1], b, grammar.Interval)
		if err != nil {
			return err
		}
		if hi >= lo && uint64(hi-lo) >= maxInterval {
			return evalErrorf(t.pos, "interval %d..%d has more than %d values (the interval limit)", lo, hi, maxInterval)
		}
		for v := lo; v <= hi; v++ {
			if err := f(e.terms.Int(v)); err != nil {
				return err
			}
			if v == math.MaxInt64 {
				break
			}
		}
		return nil
	case ctCompound:
		if !hasInterval(t) {
			break
		}
		args := make([]Term, len(t.args))
		var rec func(i int) *evalError
		rec = func(i int) *evalError {
			if i == len(t.args) {
				return f(e.terms.Compound(t.name, args...))
			}
			return e.expand(t.args[i], b, func(v Term) *evalError {
				args[i] = v
				return rec(i + 1)
			})
		}
		return rec(0)
	case ctBinary, ctNeg:
		if hasInterval(t) {
			return evalErrorf(t.pos, "an interval may not be an operand of arithmetic")
		}
	}
	v, err := e.eval(t, b)
	if err != nil {
		return err
	}
	return f(v)
}

// hasInterval reports whether t contains an interval.
func hasInterval(t *cterm) bool {
	if t.kind == ctInterval {
		return true
	}
	for _, a := range t.args {
		if hasInterval(a) {
			return true
		}
	}
	return false
}

// match matches t against the ground term v, binding unbound variables of t
// in b and recording their slots in trail. It reports whether they match.
// Parts of t with arithmetic must have their variables bound already.
func (e *evaluator) match(t *cterm, v Term, b []Term, trail *[]int) bool {
	switch t.kind {
	case ctGround:
		return t.val == v
	case ctVar:
		if b[t.slot] == noTerm {
			b[t.slot] = v
			*trail = append(*trail, t.slot)
			return true
		}
		return b[t.slot] == v
	case ctCompound:
		if e.terms.Kind(v) != CompoundTerm || e.terms.Text(v) != t.name {
			return false
		}
		args := e.terms.Args(v)
		if len(args) != len(t.args) {
			return false
		}
		for i, a := range t.args {
			if !e.match(a, args[i], b, trail) {
				return false
			}
		}
		return true
	}
	w, err := e.eval(t, b)
	if err != nil {
		// Arithmetic on a term that is not an integer (or an overflow)
		// while matching: the atom simply does not match.
		return false
	}
	return w == v
}

// varsOf appends the slots of the variables in t to dst.
func varsOf(t *cterm, dst []int) []int {
	if t.kind == ctVar {
		return append(dst, t.slot)
	}
	for _, a := range t.args {
		dst = varsOf(a, dst)
	}
	return dst
}

// firstVar returns the first variable node of t whose slot is unbound in
// bound, or nil.
func firstUnbound(t *cterm, bound []bool) *cterm {
	if t.kind == ctVar {
		if !bound[t.slot] {
			return t
		}
		return nil
	}
	for _, a := range t.args {
		if v := firstUnbound(a, bound); v != nil {
			return v
		}
	}
	return nil
}

// allBound reports whether every variable of t is bound.
func allBound(t *cterm, bound []bool) bool { return firstUnbound(t, bound) == nil }

// matchable reports whether t can be matched against a ground value given
// the bound variables: variables and compound terms can, arithmetic only
// when all its variables are bound.
func matchable(t *cterm, bound []bool) bool {
	switch t.kind {
	case ctGround, ctVar:
		return true
	case ctCompound:
		for _, a := range t.args {
			if !matchable(a, bound) {
				return false
			}
		}
		return true
	case ctInterval:
		return false
	}
	return allBound(t, bound)
}

// bindAll marks the variables of t as bound.
func bindAll(t *cterm, bound []bool) {
	if t.kind == ctVar {
		bound[t.slot] = true
	}
	for _, a := range t.args {
		bindAll(a, bound)
	}
}
