package main

import (
	"fmt"
	"math/big"
	"strings"

	"trellis/compile"
)

// costEntry is the cost of a configuration at one priority.
type costEntry struct {
	Priority int64 `json:"priority"`
	Value    int64 `json:"value"`
}

// costVec is a cost by priority, highest priority first.
type costVec []costEntry

// answer is what solve and query print.
type answer struct {
	Found  bool     // some valid configuration exists (under the pins)
	Cost   costVec  // the optimum
	Ties   *big.Int // configurations with the optimum cost
	Total  *big.Int // valid configurations (under the pins)
	Top    []ranked // best configurations, best first
	WhatIf []whatIf // per shown option, when asked
	Pinned []string // the pins, as given, normalised
}

// ranked is one of the best configurations.
type ranked struct {
	Rank  int
	Cost  costVec
	Atoms []string // shown atoms that are true, in term order
}

// whatIf is the best cost with and without one option.
type whatIf struct {
	Atom        string
	With        costVec // nil: no valid configuration has the option
	Without     costVec // nil: every valid configuration has the option
	WithTies    *big.Int
	WithoutTies *big.Int
	// Verdict is "forced" (on in every valid configuration), "impossible"
	// (on in none), "in every optimum", "in no optimum" or "in some optima".
	Verdict string
}

// gap returns b − a per priority (b a cost, a the optimum).
func gap(opt, b costVec) costVec {
	out := make(costVec, len(b))
	for i := range b {
		out[i] = costEntry{Priority: b[i].Priority, Value: b[i].Value}
		if i < len(opt) {
			out[i].Value -= opt[i].Value
		}
	}
	return out
}

// query is what the user asks of a circuit.
type query struct {
	top    int
	whatIf bool
	pins   []string
}

// pinVar is a pin resolved to a circuit variable.
type pinVar struct {
	name string // display name of the atom
	v    compile.Var
	on   bool
}

// resolvePins finds the variables of the pinned atoms by their display
// names. An unknown name is bad input; the message suggests similar names.
func resolvePins(meta *compile.Meta, pins []string) ([]pinVar, error) {
	if len(pins) == 0 {
		return nil, nil
	}
	byName := make(map[string]compile.Var, len(meta.Atoms))
	for _, a := range meta.Atoms {
		byName[a.Name] = a.Var
	}
	out := make([]pinVar, 0, len(pins))
	for _, p := range pins {
		on := true
		name := strings.TrimSpace(p)
		if strings.HasPrefix(name, "-") {
			on = false
			name = strings.TrimSpace(name[1:])
		}
		name = normalizeAtom(name)
		v, ok := byName[name]
		if !ok {
			msg := fmt.Sprintf("--pin %s: the model has no option %s", p, name)
			if near := similarAtoms(meta, name, 3); len(near) > 0 {
				msg += "; did you mean " + strings.Join(near, " or ") + "?"
			}
			return nil, inputError{fmt.Errorf("%s", msg)}
		}
		out = append(out, pinVar{name: name, v: v, on: on})
	}
	return out, nil
}

// normalizeAtom removes the blanks outside strings, so that `buy(a, b)`
// matches the display name `buy(a,b)`.
func normalizeAtom(s string) string {
	var b strings.Builder
	inString, escaped := false, false
	for _, r := range s {
		switch {
		case inString:
			b.WriteRune(r)
			switch {
			case escaped:
				escaped = false
			case r == '\\':
				escaped = true
			case r == '"':
				inString = false
			}
		case r == '"':
			inString = true
			b.WriteRune(r)
		case r == ' ' || r == '\t' || r == '\n' || r == '\r':
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// similarAtoms returns up to n atom names with the same predicate as name,
// or else sharing its first letters, in term order.
func similarAtoms(meta *compile.Meta, name string, n int) []string {
	pred, _, _ := strings.Cut(name, "(")
	var out []string
	for _, a := range meta.Atoms {
		p, _, _ := strings.Cut(a.Name, "(")
		if p == pred && len(out) < n {
			out = append(out, a.Name)
		}
	}
	return out
}
