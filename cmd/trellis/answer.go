package main

import "math/big"

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
