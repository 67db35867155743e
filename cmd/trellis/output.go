package main

import (
	"encoding/json"
	"fmt"
	"math/big"
	"strconv"
	"strings"
	"text/tabwriter"
)

// The JSON output of every command. Field names are a contract that
// scripts and tests rely on; add fields, never rename them.

// solveJSON is the output of solve and query.
type solveJSON struct {
	Status string       `json:"status"` // "optimal" or "none"
	Cost   costVec      `json:"cost"`
	Ties   string       `json:"ties"`
	Total  string       `json:"total"`
	Pinned []string     `json:"pinned,omitempty"`
	Top    []rankedJSON `json:"top"`
	WhatIf []whatIfJSON `json:"whatif,omitempty"`
	Report *reportJSON  `json:"report"`
}

// rankedJSON is one of the best configurations in solveJSON.
type rankedJSON struct {
	Rank  int      `json:"rank"`
	Cost  costVec  `json:"cost"`
	Gap   costVec  `json:"gap"` // cost minus the optimum, per priority
	Atoms []string `json:"atoms"`
}

// whatIfJSON is one row of the what-if table in solveJSON.
type whatIfJSON struct {
	Atom        string  `json:"atom"`
	With        costVec `json:"with"`    // null: impossible with the option
	Without     costVec `json:"without"` // null: impossible without it
	WithTies    string  `json:"with_ties"`
	WithoutTies string  `json:"without_ties"`
	Verdict     string  `json:"verdict"`
}

// countJSON is the output of count.
type countJSON struct {
	Status string      `json:"status"` // "valid" or "none"
	Total  string      `json:"total"`
	Report *reportJSON `json:"report"`
}

// checkJSON is the output of check.
type checkJSON struct {
	Status   string      `json:"status"`   // "ok"
	Warnings []string    `json:"warnings"` // "file:line:column: message"
	Report   *reportJSON `json:"report"`
}

// groundJSON is the output of ground.
type groundJSON struct {
	Program string      `json:"program"`
	Report  *reportJSON `json:"report"`
}

// fmtJSON is the output of fmt.
type fmtJSON struct {
	Status  string `json:"status"`           // "formatted" or "unchanged"
	Changed bool   `json:"changed"`          // the canonical form differs from the file
	Written bool   `json:"written"`          // -w rewrote the file
	Source  string `json:"source,omitempty"` // the canonical form, without -w
}

// explainJSON is the output of explain.
type explainJSON struct {
	Total  string      `json:"total"`
	Report *reportJSON `json:"report"`
}

// compileJSON is the output of compile.
type compileJSON struct {
	Status string      `json:"status"` // "written"
	Output string      `json:"output"`
	Report *reportJSON `json:"report"`
}

// reportJSON is the report every command includes.
type reportJSON struct {
	Stages []stageJSON `json:"stages"`
}

// stageJSON is one stage of reportJSON.
type stageJSON struct {
	Stage      string            `json:"stage"`
	Seconds    *float64          `json:"seconds,omitempty"`
	Sizes      map[string]int64  `json:"sizes,omitempty"`
	Components []componentReport `json:"components,omitempty"`
}

// reportJSON converts a report for JSON output, leaving times out with
// --no-times.
func (a *app) reportJSON(r *report) *reportJSON {
	out := &reportJSON{Stages: []stageJSON{}}
	for _, s := range r.Stages {
		st := stageJSON{Stage: s.Name, Seconds: a.seconds(s.Time), Components: s.Components}
		if len(s.Sizes) > 0 {
			st.Sizes = make(map[string]int64, len(s.Sizes))
			for _, z := range s.Sizes {
				st.Sizes[z.Name] = z.Value
			}
		}
		out.Stages = append(out.Stages, st)
	}
	return out
}

// solveJSONOf converts an answer for JSON output.
func solveJSONOf(ans *answer, rep *reportJSON) solveJSON {
	out := solveJSON{
		Status: "none",
		Cost:   costVec{},
		Ties:   "0",
		Total:  ans.Total.String(),
		Pinned: ans.Pinned,
		Top:    []rankedJSON{},
		Report: rep,
	}
	if ans.Found {
		out.Status = "optimal"
		out.Cost = nonNil(ans.Cost)
		out.Ties = ans.Ties.String()
	}
	for _, r := range ans.Top {
		atoms := r.Atoms
		if atoms == nil {
			atoms = []string{}
		}
		out.Top = append(out.Top, rankedJSON{Rank: r.Rank, Cost: nonNil(r.Cost), Gap: nonNil(gap(ans.Cost, r.Cost)), Atoms: atoms})
	}
	for i := range ans.WhatIf {
		w := &ans.WhatIf[i]
		out.WhatIf = append(out.WhatIf, whatIfJSON{
			Atom:        w.Atom,
			With:        w.With,
			Without:     w.Without,
			WithTies:    w.WithTies.String(),
			WithoutTies: w.WithoutTies.String(),
			Verdict:     w.Verdict,
		})
	}
	return out
}

// nonNil returns c, or an empty cost when c is nil, so that JSON shows [].
func nonNil(c costVec) costVec {
	if c == nil {
		return costVec{}
	}
	return c
}

// writeJSON prints v as indented JSON on standard output.
func (a *app) writeJSON(v any) {
	data, err := json.MarshalIndent(v, "", "  ")
	if err != nil {
		panic(err)
	}
	a.stdout.Write(append(data, '\n'))
}

// groupDigits writes n in full, in groups of three digits separated by a
// thin space when it has five digits or more (text output only).
func groupDigits(n *big.Int) string {
	s := n.String()
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	if len(s) < 5 {
		if neg {
			return "-" + s
		}
		return s
	}
	var b strings.Builder
	if neg {
		b.WriteByte('-')
	}
	for i, c := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteString("\u2009")
		}
		b.WriteRune(c)
	}
	return b.String()
}

// plural returns "1 thing" or "n things", n grouped.
func plural(n *big.Int, one, many string) string {
	if n.IsInt64() && n.Int64() == 1 {
		return "1 " + one
	}
	return groupDigits(n) + " " + many
}

// costText writes a cost compactly: the values by priority, highest first,
// separated by " / ". No priorities is "0".
func costText(c costVec) string {
	if len(c) == 0 {
		return "0"
	}
	parts := make([]string, len(c))
	for i, e := range c {
		parts[i] = strconv.FormatInt(e.Value, 10)
	}
	return strings.Join(parts, " / ")
}

// prioritiesText names the priorities of a cost: "priority 1 / priority 0".
func prioritiesText(c costVec) string {
	parts := make([]string, len(c))
	for i, e := range c {
		parts[i] = strconv.FormatInt(e.Priority, 10)
	}
	if len(parts) == 1 {
		return "priority " + parts[0]
	}
	return "priorities " + strings.Join(parts, " / ")
}

// gapText says how much worse cost c is than the optimum, naming every
// priority where they differ.
func gapText(opt, c costVec) string {
	var parts []string
	for _, g := range gap(opt, c) {
		if g.Value != 0 {
			sign := "+"
			if g.Value < 0 {
				sign = "−"
				g.Value = -g.Value
			}
			parts = append(parts, fmt.Sprintf("%s%d at priority %d", sign, g.Value, g.Priority))
		}
	}
	if len(parts) == 0 {
		return "optimal"
	}
	return strings.Join(parts, ", ")
}

// printAnswer prints the answer of solve and query for people.
func (a *app) printAnswer(ans *answer) {
	w := a.stdout
	if len(ans.Pinned) > 0 {
		fmt.Fprintf(w, "Pinned: %s\n", strings.Join(ans.Pinned, " "))
	}
	if !ans.Found {
		if len(ans.Pinned) > 0 {
			fmt.Fprintln(w, a.bad.Sprint("No valid configuration: the rules cannot all be met with these pins."))
		} else {
			fmt.Fprintln(w, a.bad.Sprint("No valid configuration: the rules cannot all be met."))
		}
		return
	}
	if len(ans.Cost) == 0 {
		fmt.Fprintf(w, "%s\n", a.good.Sprint("A valid configuration exists; the model has no penalties, so every one is optimal."))
	} else {
		fmt.Fprintf(w, "%s cost %s (%s), proved optimal.\n", a.good.Sprint("Best configuration:"), a.bold.Sprint(costText(ans.Cost)), prioritiesText(ans.Cost))
	}
	all := "Valid in all"
	if len(ans.Pinned) > 0 {
		all = "Valid with these pins"
	}
	fmt.Fprintf(w, "Tied for best: %s. %s: %s.\n", plural(ans.Ties, "configuration", "configurations"), all, plural(ans.Total, "configuration", "configurations"))

	if len(ans.Top) > 0 {
		fmt.Fprintln(w)
		for _, r := range ans.Top {
			fmt.Fprintf(w, "%s  cost %s  %s\n", a.bold.Sprintf("#%d", r.Rank), costText(r.Cost), a.dim.Sprint("("+gapText(ans.Cost, r.Cost)+")"))
			writeAtoms(w, r.Atoms, "    ", 80)
		}
	}

	if len(ans.WhatIf) > 0 {
		fmt.Fprintln(w)
		fmt.Fprintln(w, "What if: the best cost with each option and without it (tied configurations in brackets).")
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  option\twith\twithout\tverdict")
		for i := range ans.WhatIf {
			x := &ans.WhatIf[i]
			fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\n", x.Atom, whatIfCost(x.With, x.WithTies), whatIfCost(x.Without, x.WithoutTies), x.Verdict)
		}
		tw.Flush()
	}
}

// whatIfCost writes one side of a what-if row: the cost and the tie count,
// or "impossible".
func whatIfCost(c costVec, ties *big.Int) string {
	if c == nil {
		return "impossible"
	}
	return fmt.Sprintf("%s [%s]", costText(c), groupDigits(ties))
}

// writeAtoms prints atoms separated by two spaces, wrapped at width
// columns, each line indented; "(nothing shown)" when there are none.
func writeAtoms(w interface{ Write([]byte) (int, error) }, atoms []string, indent string, width int) {
	if len(atoms) == 0 {
		fmt.Fprintf(w, "%s(no shown option is on)\n", indent)
		return
	}
	line := indent
	for _, at := range atoms {
		if len(line) > len(indent) && len(line)+2+len(at) > width {
			fmt.Fprintln(w, line)
			line = indent
		}
		if len(line) > len(indent) {
			line += "  "
		}
		line += at
	}
	fmt.Fprintln(w, line)
}

// printCount prints the number of valid configurations.
func (a *app) printCount(total *big.Int) {
	if total.Sign() == 0 {
		fmt.Fprintln(a.stdout, a.bad.Sprint("No valid configuration: the rules cannot all be met."))
		return
	}
	fmt.Fprintf(a.stdout, "%s\n", plural(total, "valid configuration", "valid configurations"))
}

// sizesText lists sizes as "atoms 12, rules 30".
func sizesText(sizes []size) string {
	parts := make([]string, 0, len(sizes))
	for _, s := range sizes {
		parts = append(parts, strings.ReplaceAll(s.Name, "_", " ")+" "+groupDigits(big.NewInt(s.Value)))
	}
	return strings.Join(parts, ", ")
}

// printExplain prints the size and time of every stage.
func (a *app) printExplain(r *report, total *big.Int) {
	tw := tabwriter.NewWriter(a.stdout, 0, 0, 2, ' ', 0)
	if a.globals.NoTimes {
		fmt.Fprintln(tw, "stage\tsizes")
	} else {
		fmt.Fprintln(tw, "stage\ttime\tsizes")
	}
	for _, s := range r.Stages {
		if a.globals.NoTimes {
			fmt.Fprintf(tw, "%s\t%s\n", s.Name, sizesText(s.Sizes))
		} else {
			fmt.Fprintf(tw, "%s\t%s\t%s\n", s.Name, roundDuration(s.Time), sizesText(s.Sizes))
		}
	}
	tw.Flush()
	for _, s := range r.Stages {
		if len(s.Components) == 0 {
			continue
		}
		fmt.Fprintln(a.stdout, "cyclic components (atoms that depend on each other through positive cycles):")
		for _, c := range s.Components {
			fmt.Fprintf(a.stdout, "  #%d  %d atoms (%s) and %d edges, first %s: %s sequence of %s, at most %d of one atom; width %s → %s\n",
				c.Index, c.Atoms, plural(big.NewInt(int64(c.Entries)), "entry", "entries"), c.Edges, c.First, c.Construction,
				plural(big.NewInt(int64(c.Copies)), "copy", "copies"), c.MaxCopies, widthText(c.WidthBefore), widthText(c.WidthAfter))
		}
	}
	fmt.Fprintf(a.stdout, "%s\n", plural(total, "valid configuration", "valid configurations"))
}

// widthText writes an estimated width, "?" when it was not computed.
func widthText(w int) string {
	if w < 0 {
		return "?"
	}
	return strconv.Itoa(w)
}
