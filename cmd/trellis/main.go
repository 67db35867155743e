// Command trellis finds the cheapest valid configurations of a rule model,
// proves them optimal, counts tied optima and all valid configurations,
// ranks the next best ones and answers what-if questions about pinned
// options, by compiling the model once into a circuit.
//
// Usage:
//
//	trellis solve [FILE]        best configurations (the built-in demo without FILE)
//	trellis count FILE          exact number of valid configurations
//	trellis check FILE          parse and ground only
//	trellis ground FILE         the ground program, for developers
//	trellis explain FILE        sizes and times of every stage
//	trellis fmt FILE            canonical formatting
//	trellis compile FILE -o M   write the compiled circuit to M
//	trellis query M             answer from a compiled circuit
//
// A FILE or M of "-" is read from standard input; positions in it are
// named <stdin>, and the files it includes are found relative to the
// current directory.
//
// Exit codes: 0 a valid configuration exists (or the command succeeded);
// 1 no valid configuration; 2 bad input; 3 a limit or the timeout was
// reached; 4 an internal error.
package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"time"

	"github.com/alecthomas/kong"
	"github.com/mattn/go-isatty"
)

// The exit codes of trellis.
const (
	exitOK       = 0 // a valid configuration exists, or the command succeeded
	exitNone     = 1 // no valid configuration
	exitInput    = 2 // bad input: usage, parse, grounding, damaged circuit file
	exitLimit    = 3 // a limit or the timeout was reached
	exitInternal = 4 // a bug in trellis
)

// panicEnv names an environment variable that makes trellis panic on
// purpose after parsing its arguments. Only the tests set it, to check that
// a panic ends in exit code 4 with a clear message.
const panicEnv = "TRELLIS_TEST_PANIC"

// globals are the flags every command accepts.
type globals struct {
	JSON      bool          `help:"Print one JSON object instead of text."`
	Timeout   time.Duration `help:"Stop after this long, for example 30s or 2m (0: no time limit)." default:"0s"`
	MaxRules  int           `help:"Stop grounding after this many ground rules (0: the built-in limit)." default:"0" placeholder:"N"`
	MaxNodes  int           `help:"Stop compiling after this many circuit nodes (0: the built-in limit)." default:"0" placeholder:"N"`
	MaxCopies int           `help:"Stop unfolding cycles when they need more than this many copies of atoms in all (0: the built-in limit)." default:"0" placeholder:"N"`
	NoTimes   bool          `help:"Leave run times out of the output, so that it is the same on every run."`
}

// cli is the command line of trellis.
type cli struct {
	globals

	Solve   solveCmd   `cmd:"" help:"Find the best valid configurations of a model (without FILE: the built-in demo)."`
	Count   countCmd   `cmd:"" help:"Count the valid configurations of a model exactly."`
	Check   checkCmd   `cmd:"" help:"Read and ground a model, and report its size or its errors."`
	Ground  groundCmd  `cmd:"" help:"Print the ground program of a model (for developers)."`
	Explain explainCmd `cmd:"" help:"Show the size and run time of every stage for a model."`
	Fmt     fmtCmd     `cmd:"" help:"Print a model in canonical form (-w: rewrite the file)."`
	Compile compileCmd `cmd:"" help:"Compile a model once into a circuit file for later queries."`
	Query   queryCmd   `cmd:"" help:"Answer from a circuit file, without reading the model again."`
}

// modelArgs are the model file and the parameter overrides of the
// commands that read a model.
type modelArgs struct {
	File  string   `arg:"" help:"Model file (.trl); - reads standard input."`
	Param repeated `help:"Override a parameter of the model, NAME=VALUE; may be repeated." sep:"none" placeholder:"NAME=VALUE"`
}

// answerFlags are the flags of the commands that print best configurations.
type answerFlags struct {
	Top    int      `help:"Show this many best configurations, best first (default ${default})." default:"3" placeholder:"K"`
	WhatIf bool     `name:"whatif" help:"For every shown option, the best cost with it and without it."`
	Pin    repeated `help:"Fix an option on (ATOM) or off (-ATOM); may be repeated." placeholder:"ATOM"`
}

// solveCmd is `trellis solve [FILE]`.
type solveCmd struct {
	File string `arg:"" optional:"" help:"Model file (.trl); - reads standard input."`
	answerFlags
	Param repeated `help:"Override a parameter of the model, NAME=VALUE; may be repeated." sep:"none" placeholder:"NAME=VALUE"`
}

// countCmd is `trellis count FILE`.
type countCmd struct{ modelArgs }

// checkCmd is `trellis check FILE`.
type checkCmd struct{ modelArgs }

// groundCmd is `trellis ground FILE`.
type groundCmd struct{ modelArgs }

// explainCmd is `trellis explain FILE`.
type explainCmd struct {
	modelArgs
	Dot string `help:"Also write the dependency graph, components coloured, for Graphviz to this file." placeholder:"FILE"`
	CNF string `name:"cnf" help:"Also write the formula in DIMACS form to this file." placeholder:"FILE"`
}

// fmtCmd is `trellis fmt FILE`.
type fmtCmd struct {
	File  string `arg:"" help:"Model file (.trl); - reads standard input."`
	Write bool   `short:"w" help:"Rewrite the file in place instead of printing it (not with -)."`
}

// compileCmd is `trellis compile FILE -o MODEL.trc`.
type compileCmd struct {
	modelArgs
	Output string `short:"o" required:"" help:"Circuit file to write." placeholder:"MODEL.trc"`
}

// queryCmd is `trellis query MODEL.trc`.
type queryCmd struct {
	Circuit string `arg:"" help:"Circuit file written by trellis compile; - reads standard input."`
	answerFlags
}

// repeated is a flag that may be given several times; each value is taken
// whole (atoms contain commas) and may start with a hyphen (-ATOM unpins).
type repeated []string

// Decode appends the flag's next value.
func (r *repeated) Decode(ctx *kong.DecodeContext) error {
	t, err := ctx.Scan.PopValue("flag")
	if err != nil {
		return err
	}
	if t.IsEOL() {
		return fmt.Errorf("missing value")
	}
	*r = append(*r, t.String())
	return nil
}

// exitRequest is what kong's exit hook panics with, so that --help and
// usage errors end run instead of the process.
type exitRequest struct{ code int }

// main runs trellis on the process's arguments and streams.
func main() {
	env := environment{
		getenv:     os.Getenv,
		stdin:      os.Stdin,
		stdinTerm:  isTerminal(os.Stdin),
		stdoutTerm: isTerminal(os.Stdout),
		stderrTerm: isTerminal(os.Stderr),
	}
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr, env))
}

// isTerminal reports whether f is a terminal.
func isTerminal(f *os.File) bool {
	return isatty.IsTerminal(f.Fd()) || isatty.IsCygwinTerminal(f.Fd())
}

// environment is what run needs to know about the world outside its
// arguments.
type environment struct {
	getenv     func(string) string
	stdin      io.Reader // standard input, read for a FILE of "-"; nil: none
	stdinTerm  bool      // standard input is a terminal
	stdoutTerm bool      // standard output is a terminal
	stderrTerm bool      // standard error is a terminal
}

// run runs trellis with the given arguments and returns the exit code.
func run(args []string, stdout, stderr io.Writer, env environment) (code int) {
	a := newApp(stdout, stderr, env)
	defer func() {
		r := recover()
		if r == nil {
			return
		}
		if e, ok := r.(exitRequest); ok {
			code = e.code
			return
		}
		fmt.Fprintf(stderr, "trellis: internal error (a bug in trellis; please report it with the model that caused it): %v\n", r)
		if env.getenv("TRELLIS_TRACE") != "" {
			stderr.Write(debug.Stack())
		}
		code = exitInternal
	}()

	var c cli
	parser, err := kong.New(&c,
		kong.Name("trellis"),
		kong.Description("trellis finds the cheapest valid configurations of a rule model, proves them optimal, counts ties, ranks alternatives and answers what-if questions."),
		kong.Writers(stdout, stderr),
		kong.Exit(func(code int) {
			if code != 0 {
				code = exitInput
			}
			panic(exitRequest{code})
		}),
		kong.WithHyphenPrefixedParameters(true),
		kong.ConfigureHelp(kong.HelpOptions{Compact: true}),
	)
	if err != nil {
		panic(err)
	}
	kctx, err := parser.Parse(args)
	if err != nil {
		a.usageError(err, args)
		return exitInput
	}
	a.globals = c.globals
	if env.getenv(panicEnv) != "" {
		panic("deliberate failure requested by " + panicEnv)
	}

	// An interrupt (Ctrl-C) cancels the work in progress; it ends like a
	// reached limit, with exit code 3.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	if c.Timeout < 0 {
		a.errorf("--timeout must not be negative")
		return exitInput
	}
	if c.Timeout > 0 {
		var cancel context.CancelFunc
		ctx, cancel = context.WithTimeout(ctx, c.Timeout)
		defer cancel()
	}
	if c.MaxRules < 0 || c.MaxNodes < 0 || c.MaxCopies < 0 {
		a.errorf("--max-rules, --max-copies and --max-nodes must not be negative")
		return exitInput
	}

	switch kctx.Command() {
	case "solve", "solve <file>":
		return a.solve(ctx, &c.Solve)
	case "count <file>":
		return a.count(ctx, &c.Count)
	case "check <file>":
		return a.check(ctx, &c.Check)
	case "ground <file>":
		return a.ground(ctx, &c.Ground)
	case "explain <file>":
		return a.explain(ctx, &c.Explain)
	case "fmt <file>":
		return a.format(ctx, &c.Fmt)
	case "compile <file>":
		return a.compile(ctx, &c.Compile)
	case "query <circuit>":
		return a.query(ctx, &c.Query)
	}
	panic("unhandled command " + kctx.Command())
}
