package ground

import (
	"bytes"
	"context"
	"fmt"
	"math"
)

// checkProgram checks the invariants every ground program keeps: atom
// references in range, choice elements distinct, aggregate weights within
// 64 bits in total, auxiliary atoms named with '#', and Shown in term order
// without auxiliary atoms.
func checkProgram(p *Program) error {
	n := Atom(len(p.Atoms))
	ok := func(a Atom) bool { return a >= 0 && a < n }
	for i, r := range p.Rules {
		if r.Head != NoAtom && !ok(r.Head) {
			return fmt.Errorf("rule %d: head %d out of range", i, r.Head)
		}
		for _, a := range append(append([]Atom(nil), r.Pos...), r.Neg...) {
			if !ok(a) {
				return fmt.Errorf("rule %d: body atom %d out of range", i, a)
			}
		}
	}
	for i, c := range p.Choices {
		seen := map[Atom]bool{}
		for _, a := range c.Elements {
			if !ok(a) || seen[a] {
				return fmt.Errorf("choice %d: bad or repeated element %d", i, a)
			}
			seen[a] = true
		}
	}
	for i, g := range p.Aggregates {
		if !ok(g.Atom) {
			return fmt.Errorf("aggregate %d: atom out of range", i)
		}
		var total uint64
		for _, e := range g.Elements {
			if !ok(e.Atom) {
				return fmt.Errorf("aggregate %d: element out of range", i)
			}
			w := uint64(e.Weight)
			if e.Weight < 0 {
				w = uint64(-e.Weight)
			}
			total += w
			if total > math.MaxInt64 {
				return fmt.Errorf("aggregate %d: weights overflow", i)
			}
		}
	}
	for i, pen := range p.Penalties {
		if !ok(pen.Atom) {
			return fmt.Errorf("penalty %d: atom out of range", i)
		}
	}
	for a, info := range p.Atoms {
		if info.Aux != (len(info.Pred) > 0 && info.Pred[0] == '#') {
			return fmt.Errorf("atom %d (%s): Aux does not match its name", a, info.Pred)
		}
	}
	for i, a := range p.Shown {
		if !ok(a) || p.Atoms[a].Aux {
			return fmt.Errorf("shown atom %d is out of range or auxiliary", a)
		}
		if i > 0 && p.CompareAtoms(p.Shown[i-1], a) >= 0 {
			return fmt.Errorf("shown atoms out of order at %d", i)
		}
	}
	return nil
}

// groundTwice grounds src twice and checks that both dumps are equal.
func groundTwice(filename string, src []byte, opts Options) error {
	var dumps [2]bytes.Buffer
	for i := range dumps {
		p, _, err := Ground(context.Background(), filename, src, opts)
		if err != nil {
			return err
		}
		if err := checkProgram(p); err != nil {
			return err
		}
		p.Dump(&dumps[i])
	}
	if !bytes.Equal(dumps[0].Bytes(), dumps[1].Bytes()) {
		return fmt.Errorf("two runs give different dumps")
	}
	return nil
}
