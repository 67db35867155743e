package main

import (
	"context"
	"errors"
	"io"
	"strings"

	"trellis/compile"
	"trellis/grammar"

	"trellis/ground"
)

// errNotYet is returned by the stages whose packages are not written yet.
var errNotYet = errors.New("not available yet: this stage of trellis is still being written")

func groundModel(ctx context.Context, filename string, src []byte, params map[string]string, maxRules int, readFile func(string) ([]byte, error)) (*ground.Program, []size, error) {
	if _, err := grammar.ParseFile(filename, src); err != nil {
		return nil, nil, err
	}
	return nil, nil, internalError{errNotYet}
}

func unfoldProgram(ctx context.Context, p *ground.Program) (*ground.Program, []size, error) {
	return nil, nil, internalError{errNotYet}
}

// classifyCompileError marks the compiler's node-limit error as a limit.
func classifyCompileError(err error) error {
	if errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) {
		return err
	}
	if strings.Contains(err.Error(), "node limit") {
		return limitError{err}
	}
	return internalError{err}
}

func dumpProgram(w io.Writer, p *ground.Program) error { return errNotYet }

func writeDot(w io.Writer, p *ground.Program) error { return errNotYet }

func saveCircuit(path string, c *compile.Circuit) error { return internalError{errNotYet} }

func loadCircuit(path string) (*compile.Circuit, error) { return nil, internalError{errNotYet} }

func answerCircuit(ctx context.Context, c *compile.Circuit, q query) (*answer, error) {
	return nil, internalError{errNotYet}
}
