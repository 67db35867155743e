// Package brute is the test oracle of trellis: a deliberately simple,
// exponential enumerator of the stable models of a ground program, written
// straight from the definitions (Gelfond and Lifschitz 1988: a model M is
// stable when it is the least model of the reduct of the program by M;
// choice rules and weight conditions as in Simons, Niemelä and Soininen
// 2002). It shares no code with the pipeline it checks. Use it only on small
// programs, in tests.
package brute

import (
	"fmt"
	"math/big"
	"sort"

	"trellis/ground"
)

// MaxGuess is the largest number of guessed atoms StableModels accepts.
const MaxGuess = 22

// StableModels returns every stable model of p, each as a slice of truth
// values indexed by atom, in a deterministic order. It panics when p needs
// more than MaxGuess guessed atoms.
//
// The enumeration guesses the truth of every atom whose value the reduct
// depends on (atoms under negation, aggregate elements, choice elements),
// computes the least model of the reduct under that guess, and keeps it when
// it agrees with the guess and satisfies the constraints and choice bounds.
// Each stable model is found exactly once, from its own restriction to the
// guessed atoms.
func StableModels(p *ground.Program) [][]bool {
	n := len(p.Atoms)
	guessed := make([]bool, n)
	for _, r := range p.Rules {
		for _, a := range r.Neg {
			guessed[a] = true
		}
	}
	for _, c := range p.Choices {
		for _, a := range c.Neg {
			guessed[a] = true
		}
		for _, a := range c.Elements {
			guessed[a] = true
		}
	}
	for _, g := range p.Aggregates {
		for _, e := range g.Elements {
			guessed[e.Atom] = true
		}
	}
	var guess []ground.Atom
	for a := 0; a < n; a++ {
		if guessed[a] {
			guess = append(guess, ground.Atom(a))
		}
	}
	if len(guess) > MaxGuess {
		panic(fmt.Sprintf("brute: %d guessed atoms, more than %d", len(guess), MaxGuess))
	}
	var models [][]bool
	g := make([]bool, n)
	for mask := 0; mask < 1<<len(guess); mask++ {
		for i := range g {
			g[i] = false
		}
		for i, a := range guess {
			g[a] = mask&(1<<i) != 0
		}
		m := leastModelOfReduct(p, g)
		ok := true
		for _, a := range guess {
			if m[a] != g[a] {
				ok = false
				break
			}
		}
		if ok && satisfiesConstraints(p, m) {
			models = append(models, m)
		}
	}
	return models
}

// leastModelOfReduct computes the least model of the reduct of p by the
// interpretation g (which fixes negative literals, aggregate conditions and
// the chosen choice elements), by naive fixpoint iteration.
func leastModelOfReduct(p *ground.Program, g []bool) []bool {
	m := make([]bool, len(p.Atoms))
	isG := func(a ground.Atom) bool { return g[a] }
	all := func(pos []ground.Atom) bool {
		for _, a := range pos {
			if !m[a] {
				return false
			}
		}
		return true
	}
	none := func(neg []ground.Atom) bool {
		for _, a := range neg {
			if g[a] {
				return false
			}
		}
		return true
	}
	for changed := true; changed; {
		changed = false
		set := func(a ground.Atom) {
			if !m[a] {
				m[a] = true
				changed = true
			}
		}
		for _, r := range p.Rules {
			if r.Head != ground.NoAtom && none(r.Neg) && all(r.Pos) {
				set(r.Head)
			}
		}
		for _, c := range p.Choices {
			if !none(c.Neg) || !all(c.Pos) {
				continue
			}
			for _, a := range c.Elements {
				if g[a] {
					set(a)
				}
			}
		}
		for i := range p.Aggregates {
			ag := &p.Aggregates[i]
			if ag.Holds(isG) {
				set(ag.Atom)
			}
		}
	}
	return m
}

// satisfiesConstraints checks constraints and choice bounds in model m.
func satisfiesConstraints(p *ground.Program, m []bool) bool {
	holds := func(pos, neg []ground.Atom) bool {
		for _, a := range pos {
			if !m[a] {
				return false
			}
		}
		for _, a := range neg {
			if m[a] {
				return false
			}
		}
		return true
	}
	for _, r := range p.Rules {
		if r.Head == ground.NoAtom && holds(r.Pos, r.Neg) {
			return false
		}
	}
	for _, c := range p.Choices {
		if !holds(c.Pos, c.Neg) {
			continue
		}
		var k int64
		for _, a := range c.Elements {
			if m[a] {
				k++
			}
		}
		if k < c.Lower || k > c.Upper {
			return false
		}
	}
	return true
}

// Priorities returns the distinct priorities of p's penalties, highest first.
func Priorities(p *ground.Program) []int64 {
	seen := map[int64]bool{}
	var ps []int64
	for _, pen := range p.Penalties {
		if !seen[pen.Priority] {
			seen[pen.Priority] = true
			ps = append(ps, pen.Priority)
		}
	}
	sort.Slice(ps, func(i, j int) bool { return ps[i] > ps[j] })
	return ps
}

// Cost returns the cost of model m at each priority of Priorities(p), in
// that order. Sums are exact (big integers) and must fit in 64 bits; Cost
// panics otherwise.
func Cost(p *ground.Program, m []bool) []int64 {
	ps := Priorities(p)
	sums := make([]*big.Int, len(ps))
	for i := range sums {
		sums[i] = new(big.Int)
	}
	for _, pen := range p.Penalties {
		if !m[pen.Atom] {
			continue
		}
		for i, pr := range ps {
			if pr == pen.Priority {
				sums[i].Add(sums[i], big.NewInt(pen.Weight))
			}
		}
	}
	out := make([]int64, len(ps))
	for i, s := range sums {
		if !s.IsInt64() {
			panic("brute: cost overflows 64 bits")
		}
		out[i] = s.Int64()
	}
	return out
}

// Less reports whether cost vector a is better (lexicographically smaller,
// highest priority first) than b; both come from Cost on the same program.
func Less(a, b []int64) bool {
	for i := range a {
		if a[i] != b[i] {
			return a[i] < b[i]
		}
	}
	return false
}

// Summary is what the queries of trellis report, computed by enumeration.
type Summary struct {
	Models  [][]bool  // every stable model
	Costs   [][]int64 // cost of each model, aligned with Models
	Optimum []int64   // the least cost (nil when there is no model)
	Ties    int       // how many models reach Optimum
}

// Summarize enumerates the stable models of p and their costs.
func Summarize(p *ground.Program) Summary {
	s := Summary{Models: StableModels(p)}
	for i, m := range s.Models {
		c := Cost(p, m)
		s.Costs = append(s.Costs, c)
		switch {
		case i == 0 || Less(c, s.Optimum):
			s.Optimum, s.Ties = c, 1
		case !Less(s.Optimum, c):
			s.Ties++
		}
	}
	return s
}

// Restrict returns the models restricted to the first n atoms, as strings
// of '0' and '1', sorted; tests compare such lists to check that two
// programs have the same stable models one to one.
func Restrict(models [][]bool, n int) []string {
	out := make([]string, len(models))
	for i, m := range models {
		b := make([]byte, n)
		for a := 0; a < n; a++ {
			b[a] = '0'
			if m[a] {
				b[a] = '1'
			}
		}
		out[i] = string(b)
	}
	sort.Strings(out)
	return out
}
