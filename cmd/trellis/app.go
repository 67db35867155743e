package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"strings"

	"github.com/fatih/color"

	"trellis/grammar"
)

// app holds what every command needs: the output streams, the global
// flags, the colours, and the sources of the files read so far (to print
// the source line under a positioned error).
type app struct {
	stdout, stderr io.Writer
	env            environment
	globals        globals

	// sources maps a file name to its content, for error rendering.
	sources map[string][]byte

	// Colours for standard output and standard error; each is disabled
	// when its stream is not a terminal or NO_COLOR is set.
	bold, dim, good, bad *color.Color // standard output
	errBold, errBad      *color.Color // standard error
}

// newApp returns an app writing to stdout and stderr, with colour where
// env allows it.
func newApp(stdout, stderr io.Writer, env environment) *app {
	a := &app{stdout: stdout, stderr: stderr, env: env, sources: map[string][]byte{}}
	// NO_COLOR asks for no colour when it is set to anything but "".
	noColor := env.getenv("NO_COLOR") != ""
	outColor := env.stdoutTerm && !noColor
	errColor := env.stderrTerm && !noColor
	mk := func(on bool, attrs ...color.Attribute) *color.Color {
		c := color.New(attrs...)
		if on {
			c.EnableColor()
		} else {
			c.DisableColor()
		}
		return c
	}
	a.bold = mk(outColor, color.Bold)
	a.dim = mk(outColor, color.Faint)
	a.good = mk(outColor, color.FgGreen)
	a.bad = mk(outColor, color.FgRed)
	a.errBold = mk(errColor, color.Bold)
	a.errBad = mk(errColor, color.FgRed, color.Bold)
	return a
}

// errorf prints a message that has no position to standard error.
func (a *app) errorf(format string, args ...any) {
	fmt.Fprintf(a.stderr, "%s %s\n", a.errBad.Sprint("trellis:"), fmt.Sprintf(format, args...))
}

// usageError reports a command-line error and how to get help for the
// command the arguments name, if any.
func (a *app) usageError(err error, args []string) {
	a.errorf("%v", err)
	cmd := ""
	for _, arg := range args {
		switch arg {
		case "solve", "count", "check", "ground", "explain", "fmt", "compile", "query":
			cmd = " " + arg
		}
		if cmd != "" {
			break
		}
	}
	fmt.Fprintf(a.stderr, "Run 'trellis%s --help' for usage.\n", cmd)
}

// stdinArg is the file name that stands for standard input, and
// stdinFilename the name positions in it carry. With filepath.Dir of
// stdinFilename being ".", the files a model on standard input includes
// are found relative to the current directory.
const (
	stdinArg      = "-"
	stdinFilename = "<stdin>"
)

// readModel reads a model file, or standard input for "-", and remembers
// its content for error rendering under the name it returns, which
// positions in it carry. A model that cannot be read is bad input.
func (a *app) readModel(ctx context.Context, file string) (string, []byte, error) {
	if file == stdinArg {
		src, err := a.readStdin(ctx, "model")
		if err != nil {
			return "", nil, err
		}
		a.sources[stdinFilename] = src
		return stdinFilename, src, nil
	}
	src, err := os.ReadFile(file)
	if err != nil {
		return "", nil, inputError{fmt.Errorf("cannot read the model: %w", unwrapPath(err))}
	}
	a.sources[file] = src
	return file, src, nil
}

// readStdin reads standard input to its end; what names what it holds,
// for the messages. It gives up as soon as ctx is done (the timeout or an
// interrupt), returning ctx's error; the read left waiting ends with the
// process. A read that fails is bad input.
func (a *app) readStdin(ctx context.Context, what string) ([]byte, error) {
	if a.env.stdin == nil {
		return nil, inputError{fmt.Errorf("cannot read the %s from standard input: there is none", what)}
	}
	if a.env.stdinTerm {
		end := "Ctrl-D"
		if runtime.GOOS == "windows" {
			end = "Ctrl-Z and Enter"
		}
		fmt.Fprintf(a.stderr, "trellis: reading the %s from standard input; end it with %s\n", what, end)
	}
	type read struct {
		data []byte
		err  error
	}
	done := make(chan read, 1)
	go func() {
		data, err := io.ReadAll(a.env.stdin)
		done <- read{data, err}
	}()
	select {
	case r := <-done:
		if r.err != nil {
			return nil, inputError{fmt.Errorf("cannot read the %s from standard input: %v", what, reason(r.err))}
		}
		return r.data, nil
	case <-ctx.Done():
		return nil, ctx.Err()
	}
}

// readInclude reads an included file for the grounder, remembering its
// content for error rendering.
func (a *app) readInclude(name string) ([]byte, error) {
	src, err := os.ReadFile(name)
	if err == nil {
		a.sources[name] = src
	}
	return src, err
}

// unwrapPath keeps the operating system's message of a path error, which
// names the file and the reason.
func unwrapPath(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return fmt.Errorf("%s: %v", pe.Path, pe.Err)
	}
	return err
}

// reason returns the operating system's reason for a failed file
// operation, without the file name (which may be a temporary file's).
func reason(err error) error {
	var pe *os.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	return err
}

// source returns the content of a file named in an error position, reading
// it if it was not read before; nil if it cannot be read.
func (a *app) source(name string) []byte {
	if src, ok := a.sources[name]; ok {
		return src
	}
	src, err := os.ReadFile(name)
	if err != nil {
		return nil
	}
	a.sources[name] = src
	return src
}

// inputError marks an error caused by the input (exit code 2).
type inputError struct{ err error }

// Error returns the message of the wrapped error.
func (e inputError) Error() string { return e.err.Error() }

// Unwrap returns the wrapped error.
func (e inputError) Unwrap() error { return e.err }

// limitError marks an error that reports a limit that was reached (exit
// code 3). Its message names the limit and how to raise it.
type limitError struct{ err error }

// Error returns the message of the wrapped error.
func (e limitError) Error() string { return e.err.Error() }

// Unwrap returns the wrapped error.
func (e limitError) Unwrap() error { return e.err }

// internalError marks an error that can only come from a bug (exit code 4).
type internalError struct{ err error }

// Error returns the message of the wrapped error.
func (e internalError) Error() string { return e.err.Error() }

// Unwrap returns the wrapped error.
func (e internalError) Unwrap() error { return e.err }

// fail prints err on standard error in the form its kind calls for and
// returns the exit code for it.
func (a *app) fail(err error) int {
	var list grammar.ErrorList
	var one *grammar.Error
	var lim limitError
	var bug internalError
	switch {
	case errors.Is(err, context.DeadlineExceeded):
		a.errorf("the time limit was reached (%v); raise it with --timeout, or use --timeout 0 for none", a.globals.Timeout)
		return exitLimit
	case errors.Is(err, context.Canceled):
		a.errorf("stopped: interrupted before the answer was complete")
		return exitLimit
	case errors.As(err, &lim):
		if errors.As(lim.err, &list) {
			a.renderErrors(list)
		} else {
			a.errorf("%v", lim.err)
		}
		return exitLimit
	case errors.As(err, &list):
		a.renderErrors(list)
		return exitInput
	case errors.As(err, &one):
		a.renderErrors(grammar.ErrorList{one})
		return exitInput
	case errors.As(err, &bug):
		a.errorf("internal error (a bug in trellis; please report it with the model that caused it): %v", bug.err)
		return exitInternal
	}
	a.errorf("%v", err)
	return exitInput
}

// renderErrors prints every positioned error with its source line and a
// caret under the column.
func (a *app) renderErrors(list grammar.ErrorList) {
	a.renderList(list, "")
	if len(list) > 1 {
		fmt.Fprintf(a.stderr, "%d errors\n", len(list))
	}
}

// renderWarnings prints positioned warnings like errors, with "warning: "
// before the message.
func (a *app) renderWarnings(list grammar.ErrorList) {
	a.renderList(list, "warning: ")
}

// renderList prints positioned messages, each with prefix before its
// message, its source line and a caret.
func (a *app) renderList(list grammar.ErrorList, prefix string) {
	for _, e := range list {
		if !e.Pos.IsValid() {
			// No line to show, for example a message about a --param
			// override: print the place as the error names it.
			where := e.Pos.Filename
			if where != "" {
				where += ": "
			}
			a.errorf("%s%s%s", where, prefix, e.Msg)
			continue
		}
		text := grammar.RenderError(&grammar.Error{Pos: e.Pos, Msg: prefix + e.Msg}, a.source(e.Pos.Filename))
		head, rest, _ := strings.Cut(text, "\n")
		fmt.Fprintf(a.stderr, "%s\n%s", a.errBold.Sprint(head), rest)
	}
}
