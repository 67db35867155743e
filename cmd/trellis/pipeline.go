package main

import (
	"context"
	"fmt"
	"time"

	"trellis/compile"
	"trellis/grammar"
	"trellis/ground"
)

// pipeline runs the stages grammar → ground → unfold → compile with one
// context, and collects what each stage reports for the explain command and
// the JSON report.
type pipeline struct {
	a        *app
	ctx      context.Context
	params   map[string]string
	progress *progress
	report   report
	warnings grammar.ErrorList // the grounder's warnings, shown on standard error
}

// report is the list of the stages that ran, in order.
type report struct {
	Stages []stageReport
}

// stageReport is the size of a stage's result and the time it took.
type stageReport struct {
	Name  string
	Time  time.Duration
	Sizes []size // in the order the stage lists them
	// Components describes the cyclic components the unfold stage found.
	Components []componentReport
}

// componentReport describes how one cyclic component of the dependency
// graph was unfolded.
type componentReport struct {
	Index        int    `json:"index"`
	Atoms        int    `json:"atoms"`
	Entries      int    `json:"entries"` // atoms derivable from outside the component
	Edges        int    `json:"edges"`
	First        string `json:"first"`        // its first atom, to recognise it
	Construction string `json:"construction"` // how the unfolding sequence was built
	Copies       int    `json:"copies"`       // copies made: the length of the sequence
	MaxCopies    int    `json:"max_copies"`   // most copies of one atom
	WidthBefore  int    `json:"width_before"` // -1 when not computed
	WidthAfter   int    `json:"width_after"`
}

// size is one named number a stage reports. Name is a lowercase
// identifier with underscores (the JSON key); text output shows it with
// spaces.
type size struct {
	Name  string
	Value int64
}

// newPipeline returns a pipeline running under ctx with the parameter
// overrides given as NAME=VALUE.
func (a *app) newPipeline(ctx context.Context, params []string) (*pipeline, error) {
	m, err := parseParams(params)
	if err != nil {
		return nil, err
	}
	return &pipeline{
		a:        a,
		ctx:      ctx,
		params:   m,
		progress: &progress{w: a.stderr, on: a.env.stderrTerm},
	}, nil
}

// parseParams turns NAME=VALUE flags into a map, rejecting malformed ones.
func parseParams(params []string) (map[string]string, error) {
	if len(params) == 0 {
		return nil, nil
	}
	m := make(map[string]string, len(params))
	for _, p := range params {
		name, value, ok := cutParam(p)
		if !ok {
			return nil, inputError{fmt.Errorf("--param %q: write NAME=VALUE, for example --param budget=300", p)}
		}
		if _, dup := m[name]; dup {
			return nil, inputError{fmt.Errorf("--param %s is given twice", name)}
		}
		m[name] = value
	}
	return m, nil
}

// cutParam splits NAME=VALUE; NAME must be a lowercase name of the rule
// language.
func cutParam(p string) (name, value string, ok bool) {
	for i := 0; i < len(p); i++ {
		c := p[i]
		if c == '=' {
			if i == 0 || i+1 == len(p) {
				return "", "", false
			}
			return p[:i], p[i+1:], true
		}
		if !(c >= 'a' && c <= 'z' || i > 0 && (c >= 'A' && c <= 'Z' || c >= '0' && c <= '9' || c == '_')) {
			return "", "", false
		}
	}
	return "", "", false
}

// stageTitle returns the words progress shows for a stage.
func stageTitle(stage string) string {
	switch stage {
	case "ground":
		return "grounding the model"
	case "unfold":
		return "unfolding the cycles"
	case "cnf":
		return "writing the formula"
	case "circuit":
		return "compiling the circuit"
	case "answer":
		return "answering"
	case "count":
		return "counting"
	case "load":
		return "reading the circuit file"
	case "save":
		return "writing the circuit file"
	}
	return stage
}

// stage runs f as the named stage, timing it and showing progress when it
// runs long.
func (pl *pipeline) stage(name string, f func() ([]size, error)) error {
	if err := pl.ctx.Err(); err != nil {
		return err
	}
	pl.progress.begin(stageTitle(name))
	start := time.Now()
	sizes, err := f()
	elapsed := time.Since(start)
	pl.progress.end(err == nil)
	pl.report.Stages = append(pl.report.Stages, stageReport{Name: name, Time: elapsed, Sizes: sizes})
	return err
}

// ground grounds the model src read from filename.
func (pl *pipeline) ground(filename string, src []byte) (*ground.Program, error) {
	var p *ground.Program
	var warnings grammar.ErrorList
	err := pl.stage("ground", func() ([]size, error) {
		var sizes []size
		var err error
		p, sizes, warnings, err = groundModel(pl.ctx, filename, src, pl.params, pl.a.globals.MaxRules, pl.a.readInclude)
		return sizes, err
	})
	pl.a.renderWarnings(warnings)
	pl.warnings = append(pl.warnings, warnings...)
	return p, err
}

// unfold makes the ground program acyclic.
func (pl *pipeline) unfold(p *ground.Program) (*ground.Program, error) {
	var q *ground.Program
	var comps []componentReport
	err := pl.stage("unfold", func() ([]size, error) {
		var sizes []size
		var err error
		q, sizes, comps, err = unfoldProgram(pl.ctx, p, pl.a.globals.MaxCopies)
		return sizes, err
	})
	if n := len(pl.report.Stages); n > 0 {
		pl.report.Stages[n-1].Components = comps
	}
	return q, err
}

// compile turns an acyclic program into a circuit, through its CNF.
func (pl *pipeline) compile(p *ground.Program) (*compile.Circuit, error) {
	var enc *compile.Encoding
	err := pl.stage("cnf", func() ([]size, error) {
		var err error
		enc, err = compile.Complete(p)
		if err != nil {
			return nil, internalError{err}
		}
		r := enc.Report
		return []size{
			{"variables", int64(r.Vars)},
			{"clauses", int64(r.Clauses)},
			{"literals", int64(r.Literals)},
			{"aux_variables", int64(r.AuxVars)},
		}, nil
	})
	if err != nil {
		return nil, err
	}
	var c *compile.Circuit
	err = pl.stage("circuit", func() ([]size, error) {
		var rep *compile.Report
		var err error
		c, rep, err = compile.Compile(pl.ctx, &enc.CNF, compile.Options{MaxNodes: pl.a.globals.MaxNodes})
		if err != nil {
			return nil, classifyCompileError(err)
		}
		c.Meta = enc.Meta
		return []size{
			{"nodes", int64(rep.Nodes)},
			{"edges", int64(rep.Edges)},
			{"width", int64(rep.Width)},
			{"decisions", int64(rep.Decisions)},
			{"conflicts", int64(rep.Conflicts)},
		}, nil
	})
	return c, err
}

// build runs every stage from the model to the circuit.
func (pl *pipeline) build(filename string, src []byte) (*compile.Circuit, error) {
	p, err := pl.ground(filename, src)
	if err != nil {
		return nil, err
	}
	q, err := pl.unfold(p)
	if err != nil {
		return nil, err
	}
	return pl.compile(q)
}
