package main

import (
	"bytes"
	"context"
	"fmt"
	"io"
	"math/big"
	"os"
	"path/filepath"
	"time"

	"trellis/compile"
	"trellis/grammar"
	"trellis/scenarios"
)

// demoFilename is the name positions use for the built-in demo model.
const demoFilename = "demo.trl"

// model returns the name and source of the model to read: the file (or
// standard input for "-"), or the built-in demo when file is empty.
func (a *app) model(ctx context.Context, file string) (string, []byte, error) {
	if file == "" {
		fmt.Fprintf(a.stderr, "trellis: no model file given, so solving the built-in demo (the %s scenario: rooms wired to an uplink)\n", scenarios.DemoName)
		src := scenarios.Demo()
		a.sources[demoFilename] = src
		return demoFilename, src, nil
	}
	return a.readModel(ctx, file)
}

// open reads the model file (standard input for "-") and starts a
// pipeline with the parameter overrides params. It returns the name
// positions in the model carry.
func (a *app) open(ctx context.Context, file string, params []string) (string, []byte, *pipeline, error) {
	name, src, err := a.readModel(ctx, file)
	if err != nil {
		return "", nil, nil, err
	}
	pl, err := a.newPipeline(ctx, params)
	if err != nil {
		return "", nil, nil, err
	}
	return name, src, pl, nil
}

// solve runs every stage on the model (or the demo) and prints the answer.
func (a *app) solve(ctx context.Context, c *solveCmd) int {
	if err := checkAnswerFlags(&c.answerFlags); err != nil {
		return a.fail(err)
	}
	name, src, err := a.model(ctx, c.File)
	if err != nil {
		return a.fail(err)
	}
	pl, err := a.newPipeline(ctx, c.Param)
	if err != nil {
		return a.fail(err)
	}
	circuit, err := pl.build(name, src)
	if err != nil {
		return a.fail(err)
	}
	return a.answer(pl, circuit, &c.answerFlags, false)
}

// query answers from a circuit file.
func (a *app) query(ctx context.Context, c *queryCmd) int {
	if err := checkAnswerFlags(&c.answerFlags); err != nil {
		return a.fail(err)
	}
	pl, err := a.newPipeline(ctx, nil)
	if err != nil {
		return a.fail(err)
	}
	var circuit *compile.Circuit
	err = pl.stage("load", func() ([]size, error) {
		var err error
		circuit, err = a.loadCircuit(pl.ctx, c.Circuit)
		if err != nil {
			return nil, err
		}
		return []size{{"nodes", int64(circuit.NumNodes())}, {"edges", int64(circuit.NumEdges())}, {"variables", int64(circuit.NumVars)}}, nil
	})
	if err != nil {
		return a.fail(err)
	}
	return a.answer(pl, circuit, &c.answerFlags, true)
}

// checkAnswerFlags rejects flag values kong cannot rule out.
func checkAnswerFlags(f *answerFlags) error {
	if f.Top < 0 {
		return inputError{fmt.Errorf("--top must not be negative")}
	}
	return nil
}

// answer evaluates the circuit for the flags and prints the answer.
func (a *app) answer(pl *pipeline, circuit *compile.Circuit, f *answerFlags, fromFile bool) int {
	var ans *answer
	err := pl.stage("answer", func() ([]size, error) {
		var err error
		ans, err = answerCircuit(pl.ctx, circuit, query{top: f.Top, whatIf: f.WhatIf, pins: f.Pin}, fromFile)
		return nil, err
	})
	if err != nil {
		return a.fail(err)
	}
	if a.globals.JSON {
		a.writeJSON(solveJSONOf(ans, a.reportJSON(&pl.report)))
	} else {
		a.printAnswer(ans)
	}
	if !ans.Found {
		return exitNone
	}
	return exitOK
}

// count prints the exact number of valid configurations.
func (a *app) count(ctx context.Context, c *countCmd) int {
	name, src, pl, err := a.open(ctx, c.File, c.Param)
	if err != nil {
		return a.fail(err)
	}
	circuit, err := pl.build(name, src)
	if err != nil {
		return a.fail(err)
	}
	var total *big.Int
	_ = pl.stage("count", func() ([]size, error) {
		total = compile.Count(circuit)
		return nil, nil
	})
	if a.globals.JSON {
		status := "none"
		if total.Sign() > 0 {
			status = "valid"
		}
		a.writeJSON(countJSON{Status: status, Total: total.String(), Report: a.reportJSON(&pl.report)})
	} else {
		a.printCount(total)
	}
	if total.Sign() == 0 {
		return exitNone
	}
	return exitOK
}

// check reads and grounds the model and prints a one-line summary.
func (a *app) check(ctx context.Context, c *checkCmd) int {
	name, src, pl, err := a.open(ctx, c.File, c.Param)
	if err != nil {
		return a.fail(err)
	}
	if _, err := pl.ground(name, src); err != nil {
		return a.fail(err)
	}
	st := pl.report.Stages[len(pl.report.Stages)-1]
	if a.globals.JSON {
		warnings := []string{}
		for _, w := range pl.warnings {
			warnings = append(warnings, w.Error())
		}
		a.writeJSON(checkJSON{Status: "ok", Warnings: warnings, Report: a.reportJSON(&pl.report)})
	} else {
		fmt.Fprintf(a.stdout, "%s: no errors; ground program: %s\n", name, sizesText(st.Sizes))
	}
	return exitOK
}

// ground prints the ground program.
func (a *app) ground(ctx context.Context, c *groundCmd) int {
	name, src, pl, err := a.open(ctx, c.File, c.Param)
	if err != nil {
		return a.fail(err)
	}
	p, err := pl.ground(name, src)
	if err != nil {
		return a.fail(err)
	}
	var buf bytes.Buffer
	if err := dumpProgram(&buf, p); err != nil {
		return a.fail(internalError{err})
	}
	if a.globals.JSON {
		a.writeJSON(groundJSON{Program: buf.String(), Report: a.reportJSON(&pl.report)})
	} else {
		a.stdout.Write(buf.Bytes())
	}
	return exitOK
}

// explain runs every stage and prints what each did, optionally writing
// the dependency graph and the CNF to files.
func (a *app) explain(ctx context.Context, c *explainCmd) int {
	name, src, pl, err := a.open(ctx, c.File, c.Param)
	if err != nil {
		return a.fail(err)
	}
	p, err := pl.ground(name, src)
	if err != nil {
		return a.fail(err)
	}
	if c.Dot != "" {
		if err := writeRendered(c.Dot, func(w io.Writer) error { return writeDot(w, p) }); err != nil {
			return a.fail(err)
		}
	}
	q, err := pl.unfold(p)
	if err != nil {
		return a.fail(err)
	}
	if c.CNF != "" {
		enc, err := compile.Complete(q)
		if err != nil {
			return a.fail(internalError{err})
		}
		err = writeRendered(c.CNF, func(w io.Writer) error {
			return enc.CNF.WriteDIMACS(w, "written by trellis explain from "+filepath.Base(name))
		})
		if err != nil {
			return a.fail(err)
		}
	}
	circuit, err := pl.compile(q)
	if err != nil {
		return a.fail(err)
	}
	total := compile.Count(circuit)
	if a.globals.JSON {
		a.writeJSON(explainJSON{Total: total.String(), Report: a.reportJSON(&pl.report)})
	} else {
		a.printExplain(&pl.report, total)
	}
	return exitOK
}

// format prints the model in canonical form or rewrites the file. A model
// on standard input is printed; it cannot be rewritten.
func (a *app) format(ctx context.Context, c *fmtCmd) int {
	if c.Write && c.File == stdinArg {
		a.errorf("fmt -w rewrites a file in place, and standard input (-) is not one; leave out -w to print the formatted model")
		fmt.Fprintf(a.stderr, "Run 'trellis fmt --help' for usage.\n")
		return exitInput
	}
	name, src, err := a.readModel(ctx, c.File)
	if err != nil {
		return a.fail(err)
	}
	f, err := grammar.ParseFile(name, src)
	if err != nil {
		return a.fail(err)
	}
	out := grammar.Format(f)
	changed := !bytes.Equal(out, src)
	if c.Write && changed {
		if err := writeFileAtomic(c.File, out); err != nil {
			return a.fail(err)
		}
	}
	switch {
	case a.globals.JSON:
		j := fmtJSON{Status: "unchanged", Changed: changed}
		if changed {
			j.Status = "formatted"
		}
		if c.Write {
			j.Written = changed
		} else {
			j.Source = string(out)
		}
		a.writeJSON(j)
	case !c.Write:
		a.stdout.Write(out)
	}
	return exitOK
}

// compile runs every stage and writes the circuit file.
func (a *app) compile(ctx context.Context, c *compileCmd) int {
	name, src, pl, err := a.open(ctx, c.File, c.Param)
	if err != nil {
		return a.fail(err)
	}
	circuit, err := pl.build(name, src)
	if err != nil {
		return a.fail(err)
	}
	err = pl.stage("save", func() ([]size, error) {
		return nil, saveCircuit(c.Output, circuit)
	})
	if err != nil {
		return a.fail(err)
	}
	if a.globals.JSON {
		a.writeJSON(compileJSON{Status: "written", Output: c.Output, Report: a.reportJSON(&pl.report)})
	} else {
		fmt.Fprintf(a.stdout, "wrote %s: a circuit of %s nodes over %s variables; ask it questions with: trellis query %s\n",
			c.Output, groupDigits(big.NewInt(int64(circuit.NumNodes()))), groupDigits(big.NewInt(int64(circuit.NumVars))), c.Output)
	}
	return exitOK
}

// writeRendered renders into memory and writes the result to path with
// writeFileAtomic; a failure to render is an internal error.
func writeRendered(path string, render func(io.Writer) error) error {
	var buf bytes.Buffer
	if err := render(&buf); err != nil {
		return internalError{err}
	}
	return writeFileAtomic(path, buf.Bytes())
}

// writeFileAtomic writes data to path through a temporary file in the same
// directory and a rename, so that path holds either its old or its new
// content, never a part. It keeps the permissions of an existing file.
func writeFileAtomic(path string, data []byte) error {
	mode := os.FileMode(0o644)
	if st, err := os.Stat(path); err == nil {
		mode = st.Mode().Perm()
	}
	f, err := os.CreateTemp(filepath.Dir(path), "."+filepath.Base(path)+".tmp*")
	if err != nil {
		return inputError{fmt.Errorf("cannot write %s: %v", path, reason(err))}
	}
	tmp := f.Name()
	_, err = f.Write(data)
	if err == nil {
		err = f.Chmod(mode)
	}
	if err == nil {
		err = f.Sync()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return inputError{fmt.Errorf("cannot write %s: %v", path, reason(err))}
	}
	return nil
}

// seconds returns d in seconds, or nil when times are left out.
func (a *app) seconds(d time.Duration) *float64 {
	if a.globals.NoTimes {
		return nil
	}
	s := d.Seconds()
	return &s
}
