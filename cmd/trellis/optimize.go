package main

import (
	"context"
	"errors"
	"fmt"
	"math/big"

	"trellis/compile"
	"trellis/optimize"
)

// answerCircuit asks the optimize package the query about c and converts
// its result for printing. fromFile says whether c was read from a circuit
// file (a circuit the optimize package rejects is then damaged input, not a
// bug).
func answerCircuit(ctx context.Context, c *compile.Circuit, q query, fromFile bool) (*answer, error) {
	s, err := optimize.NewSolver(c)
	if err != nil {
		if fromFile {
			return nil, inputError{errors.New("the circuit file is damaged: " + err.Error())}
		}
		return nil, internalError{err}
	}
	pins, err := s.ResolvePins(q.pins)
	if err != nil {
		return nil, inputError{fmt.Errorf("--pin: %v", err)}
	}
	oq := optimize.Query{Top: q.top, WhatIf: q.whatIf, Pins: pins}
	ans := &answer{}
	for _, p := range pins {
		name := pinName(&c.Meta, p.Var)
		if !p.Value {
			name = "-" + name
		}
		ans.Pinned = append(ans.Pinned, name)
	}
	res, err := s.Solve(ctx, oq)
	if err != nil {
		switch {
		case errors.Is(err, context.DeadlineExceeded), errors.Is(err, context.Canceled):
			return nil, err
		case errors.Is(err, optimize.ErrOverflow):
			return nil, inputError{errors.New("the costs of this model do not fit in 64-bit integers; use smaller penalty weights")}
		}
		return nil, internalError{err}
	}
	ans.Found = res.Status == optimize.StatusOptimal
	ans.Cost = costOf(res.Cost)
	ans.Ties = orZero(res.Ties)
	ans.Total = orZero(res.Total)
	for _, r := range res.Top {
		ans.Top = append(ans.Top, ranked{Rank: r.Rank, Cost: costOf(r.Cost), Atoms: r.Atoms})
	}
	for _, e := range res.WhatIf {
		w := whatIf{Atom: e.Atom, Verdict: e.Verdict, WithTies: new(big.Int), WithoutTies: new(big.Int)}
		if e.With != nil {
			w.With = nonNil(costOf(e.With.Cost))
			w.WithTies = orZero(e.With.Ties)
		}
		if e.Without != nil {
			w.Without = nonNil(costOf(e.Without.Cost))
			w.WithoutTies = orZero(e.Without.Ties)
		}
		ans.WhatIf = append(ans.WhatIf, w)
	}
	return ans, nil
}

// pinName returns the display name of a pinned variable.
func pinName(meta *compile.Meta, v compile.Var) string {
	for _, a := range meta.Atoms {
		if a.Var == v {
			return a.Name
		}
	}
	return fmt.Sprintf("variable %d", v)
}

// costOf converts a cost of the optimize package.
func costOf(c []optimize.PriorityCost) costVec {
	out := make(costVec, len(c))
	for i, e := range c {
		out[i] = costEntry{Priority: e.Priority, Value: e.Value}
	}
	return out
}

// orZero returns x, or zero when x is nil.
func orZero(x *big.Int) *big.Int {
	if x == nil {
		return new(big.Int)
	}
	return x
}
