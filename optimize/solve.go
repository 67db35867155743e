package optimize

import (
	"context"
	"encoding/json"
	"fmt"
	"math/big"
	"sort"

	"trellis/compile"
)

// Query says what to compute about a circuit.
type Query struct {
	// Pins fix variables for this query.
	Pins []Pin
	// PinNames fix atoms by name, as printed (`name(arg,arg)`, whitespace
	// does not matter): "atom" pins it true, "not atom" or "-atom" false.
	PinNames []string
	// Top asks for the Top best models (none when 0).
	Top int
	// WhatIf asks for the what-if table of every shown atom.
	WhatIf bool
	// SkipTotal leaves Result.Total nil. Counting all models needs exact
	// integers of the size of the model count, which on large circuits
	// costs more than the rest of a query.
	SkipTotal bool
}

// Status values of a Result.
const (
	StatusOptimal = "optimal" // a model exists; Cost is the optimum
	StatusNone    = "none"    // no model satisfies the circuit and the pins
)

// PriorityCost is the cost at one priority.
type PriorityCost struct {
	Priority int64 `json:"priority"`
	Value    int64 `json:"value"`
}

// Result is the answer to a Query.
type Result struct {
	// Status is StatusOptimal or StatusNone.
	Status string `json:"status"`
	// Cost is the optimum, one entry per priority of the circuit's weights,
	// highest first, zeros included; empty when there are no weights.
	Cost []PriorityCost `json:"cost"`
	// Ties is the number of models with the optimum cost.
	Ties *big.Int `json:"ties"`
	// Total is the number of models (nil when the query skipped it).
	Total *big.Int `json:"total"`
	// Top lists the best models, best first.
	Top []Ranked `json:"top,omitempty"`
	// WhatIf has one entry per shown atom, in term order.
	WhatIf []WhatIfEntry `json:"whatif,omitempty"`
}

// Ranked is one of the best models.
type Ranked struct {
	// Rank is the position in the list, from 1.
	Rank int `json:"rank"`
	// Cost is the model's cost, like Result.Cost.
	Cost []PriorityCost `json:"cost"`
	// Gap is Cost minus the optimum, priority by priority.
	Gap []PriorityCost `json:"gap"`
	// Atoms are the shown atoms true in the model, in term order.
	Atoms []string `json:"atoms"`
}

// Outcome is the best cost and tie count among the models that give an atom
// one value.
type Outcome struct {
	Cost []PriorityCost `json:"cost"`
	Ties *big.Int       `json:"ties"`
}

// Verdicts of a what-if entry.
const (
	VerdictImpossible = "impossible"       // the atom is false in every model
	VerdictForced     = "forced"           // the atom is true in every model
	VerdictEvery      = "in every optimum" // true in every optimal model
	VerdictNone       = "in no optimum"    // false in every optimal model
	VerdictSome       = "in some optima"   // true in some optimal models and false in others
)

// WhatIfEntry tells for one shown atom the best outcome with it true and
// with it false.
type WhatIfEntry struct {
	Atom    string
	With    *Outcome // nil when the atom cannot be true
	Without *Outcome // nil when the atom cannot be false
	Verdict string
}

// MarshalJSON writes the entry as {"atom", "with", "with_ties", "without",
// "without_ties", "verdict"}, where with and without are cost lists or null
// when impossible and the tie counts are decimal strings ("0" when
// impossible).
func (e WhatIfEntry) MarshalJSON() ([]byte, error) {
	type side struct {
		cost []PriorityCost
		ties *big.Int
	}
	get := func(o *Outcome) side {
		if o == nil {
			return side{nil, new(big.Int)}
		}
		return side{o.Cost, o.Ties}
	}
	w, wo := get(e.With), get(e.Without)
	return json.Marshal(struct {
		Atom        string         `json:"atom"`
		With        []PriorityCost `json:"with"`
		WithTies    string         `json:"with_ties"`
		Without     []PriorityCost `json:"without"`
		WithoutTies string         `json:"without_ties"`
		Verdict     string         `json:"verdict"`
	}{e.Atom, nonNilCost(w.cost, e.With != nil), w.ties.String(), nonNilCost(wo.cost, e.Without != nil), wo.ties.String(), e.Verdict})
}

// nonNilCost keeps a possible outcome's empty cost list from turning into
// null.
func nonNilCost(c []PriorityCost, possible bool) []PriorityCost {
	if possible && c == nil {
		return []PriorityCost{}
	}
	return c
}

// MarshalJSON writes tie and total counts as decimal strings (total null
// when skipped).
func (r *Result) MarshalJSON() ([]byte, error) {
	type plain Result
	cost := r.Cost
	if cost == nil {
		cost = []PriorityCost{}
	}
	var total *string
	if r.Total != nil {
		t := r.Total.String()
		total = &t
	}
	return json.Marshal(struct {
		*plain
		Cost  []PriorityCost `json:"cost"`
		Ties  string         `json:"ties"`
		Total *string        `json:"total"`
	}{(*plain)(r), cost, bigString(r.Ties), total})
}

// MarshalJSON writes the tie count as a decimal string.
func (o *Outcome) MarshalJSON() ([]byte, error) {
	cost := o.Cost
	if cost == nil {
		cost = []PriorityCost{}
	}
	return json.Marshal(struct {
		Cost []PriorityCost `json:"cost"`
		Ties string         `json:"ties"`
	}{cost, bigString(o.Ties)})
}

// MarshalJSON keeps empty cost and atom lists as [] rather than null.
func (r Ranked) MarshalJSON() ([]byte, error) {
	type plain Ranked
	p := plain(r)
	if p.Cost == nil {
		p.Cost = []PriorityCost{}
	}
	if p.Gap == nil {
		p.Gap = []PriorityCost{}
	}
	if p.Atoms == nil {
		p.Atoms = []string{}
	}
	return json.Marshal(p)
}

func bigString(x *big.Int) string {
	if x == nil {
		return "0"
	}
	return x.String()
}

// Solver answers queries about one circuit. It keeps the tables derived from
// the circuit's weights and names, so that repeated queries (pin and
// requery) pay only for the passes. A Solver is not safe for concurrent use.
type Solver struct {
	c     *compile.Circuit
	wt    *weights
	names *nameIndex
	rk    *ranker
	last  *costCount // arrays of the last query, reused by the next
	down  downBuf
	// noRetry is passed to the ranker (tests only).
	noRetry bool
}

// NewSolver checks c and prepares it for queries.
func NewSolver(c *compile.Circuit) (*Solver, error) {
	if c == nil {
		return nil, fmt.Errorf("optimize: no circuit")
	}
	if err := checkCircuit(c); err != nil {
		return nil, err
	}
	wt, err := newWeights(c)
	if err != nil {
		return nil, err
	}
	for _, a := range c.Meta.Atoms {
		if a.Var < 1 || int(a.Var) > c.NumVars {
			return nil, fmt.Errorf("optimize: atom %s has variable %d outside 1..%d", a.Name, a.Var, c.NumVars)
		}
	}
	for _, i := range c.Meta.Shown {
		if i < 0 || int(i) >= len(c.Meta.Atoms) {
			return nil, fmt.Errorf("optimize: shown atom index %d outside the %d atoms", i, len(c.Meta.Atoms))
		}
	}
	return &Solver{c: c, wt: wt, names: newNameIndex(c.Meta.Atoms)}, nil
}

// Solve answers q about c. It is NewSolver followed by Solver.Solve.
func Solve(ctx context.Context, c *compile.Circuit, q Query) (*Result, error) {
	s, err := NewSolver(c)
	if err != nil {
		return nil, err
	}
	return s.Solve(ctx, q)
}

// Priorities returns the priorities of the circuit's weights, highest first.
func (s *Solver) Priorities() []int64 { return append([]int64(nil), s.wt.prio...) }

// ResolvePins turns pin names into pins, see Query.PinNames.
func (s *Solver) ResolvePins(names []string) ([]Pin, error) {
	var pins []Pin
	for _, name := range names {
		p, err := s.names.pin(name)
		if err != nil {
			return nil, err
		}
		pins = append(pins, p)
	}
	return pins, nil
}

// Solve answers q.
func (s *Solver) Solve(ctx context.Context, q Query) (*Result, error) {
	c := s.c
	named, err := s.ResolvePins(q.PinNames)
	if err != nil {
		return nil, err
	}
	pins, err := newPinTable(c.NumVars, append(append([]Pin(nil), q.Pins...), named...))
	if err != nil {
		return nil, err
	}
	o, err := evalOptimum(ctx, c, s.wt, pins, s.last)
	if err != nil {
		return nil, err
	}
	s.last = o.cc
	res := &Result{Status: StatusNone, Ties: new(big.Int)}
	if !q.SkipTotal {
		if res.Total, err = o.total(ctx, c); err != nil {
			return nil, err
		}
	}
	if !o.found {
		return res, nil
	}
	res.Status = StatusOptimal
	best := o.cc.vec(c.Root)
	res.Cost = s.costList(best)
	res.Ties = o.count(c.Root)
	if q.Top > 0 {
		if s.rk == nil {
			s.rk = newRanker(c, s.wt)
			s.rk.noRetry = s.noRetry
		}
		ms, err := s.rk.topK(ctx, pins, q.Top, best, res.Ties)
		if err != nil {
			return nil, err
		}
		gap := make([]int64, s.wt.p)
		for i := range ms {
			for j := range gap {
				g, ok := addInt(ms[i].cost[j], -best[j])
				if !ok || best[j] == -best[j] && best[j] != 0 {
					return nil, fmt.Errorf("optimize: the gap of the model ranked %d: %w", i+1, ErrOverflow)
				}
				gap[j] = g
			}
			res.Top = append(res.Top, Ranked{Rank: i + 1, Cost: s.costList(ms[i].cost), Gap: s.costList(gap), Atoms: s.shownTrue(ms[i].assign)})
		}
	}
	if q.WhatIf {
		m, err := evalMarginals(ctx, c, s.wt, pins, o, &s.down)
		if err != nil {
			return nil, err
		}
		res.WhatIf = s.whatIf(m, best)
	}
	return res, nil
}

func (s *Solver) costList(v []int64) []PriorityCost {
	out := make([]PriorityCost, len(v))
	for j, x := range v {
		out[j] = PriorityCost{Priority: s.wt.prio[j], Value: x}
	}
	return out
}

// shownIndices returns the shown atoms in term order.
func (s *Solver) shownIndices() []int32 {
	idx := append([]int32(nil), s.c.Meta.Shown...)
	sort.Slice(idx, func(i, j int) bool { return idx[i] < idx[j] })
	out := idx[:0]
	for i, x := range idx {
		if i == 0 || x != idx[i-1] {
			out = append(out, x)
		}
	}
	return out
}

func (s *Solver) shownTrue(assign []int8) []string {
	var out []string
	for _, i := range s.shownIndices() {
		a := s.c.Meta.Atoms[i]
		if assign[a.Var] == 1 {
			out = append(out, a.Name)
		}
	}
	return out
}

func (s *Solver) whatIf(m *marginals, best []int64) []WhatIfEntry {
	p := s.wt.p
	var out []WhatIfEntry
	for _, i := range s.shownIndices() {
		a := s.c.Meta.Atoms[i]
		v := int(a.Var)
		e := WhatIfEntry{Atom: a.Name}
		var wc, woc []int64
		if n := m.count(a.Var, true); n != nil {
			wc = m.withCost[v*p : v*p+p]
			e.With = &Outcome{Cost: s.costList(wc), Ties: n}
		}
		if n := m.count(a.Var, false); n != nil {
			woc = m.woCost[v*p : v*p+p]
			e.Without = &Outcome{Cost: s.costList(woc), Ties: n}
		}
		switch {
		case e.With == nil:
			e.Verdict = VerdictImpossible
		case e.Without == nil:
			e.Verdict = VerdictForced
		default:
			switch cmpVec(wc, woc) {
			case -1:
				e.Verdict = VerdictEvery
			case 1:
				e.Verdict = VerdictNone
			default:
				e.Verdict = VerdictSome
			}
		}
		out = append(out, e)
	}
	return out
}
