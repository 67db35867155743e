package main

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"path/filepath"
	"strings"

	"trellis/compile"
	"trellis/grammar"
	"trellis/ground"
	"trellis/unfold"
)

// groundModel runs the grounder and lists the sizes it reports.
// It returns the grounder's warnings apart.
func groundModel(ctx context.Context, filename string, src []byte, params map[string]string, maxRules int, readFile func(string) ([]byte, error)) (*ground.Program, []size, grammar.ErrorList, error) {
	p, rep, err := ground.Ground(ctx, filename, src, ground.Options{Params: params, MaxRules: maxRules, ReadFile: readFile})
	if err != nil {
		return nil, nil, nil, classifyGroundError(err)
	}
	return p, []size{
		{"atoms", int64(rep.Atoms)},
		{"rules", int64(rep.Rules)},
		{"choices", int64(rep.Choices)},
		{"aggregates", int64(rep.Aggregates)},
		{"penalties", int64(rep.Penalties)},
	}, rep.Warnings, nil
}

// classifyGroundError marks the grounder's size-limit error as a limit;
// every other grounding error is bad input.
func classifyGroundError(err error) error {
	if errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) {
		return err
	}
	if errors.Is(err, ground.ErrLimit) {
		return limitError{err}
	}
	return err
}

// unfoldProgram makes p acyclic, within maxCopies copies (0: the default
// limit), and lists the sizes and the components the
// unfolding reports.
func unfoldProgram(ctx context.Context, p *ground.Program, maxCopies int) (*ground.Program, []size, []componentReport, error) {
	q, rep, err := unfold.Unfold(ctx, p, unfold.Options{MaxCopies: maxCopies})
	if err != nil {
		if errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) {
			return nil, nil, nil, err
		}
		if errors.Is(err, unfold.ErrCopyLimit) {
			return nil, nil, nil, limitError{err}
		}
		return nil, nil, nil, internalError{err}
	}
	var comps []componentReport
	for _, c := range rep.Components {
		comps = append(comps, componentReport{
			Index:        c.Index,
			Atoms:        c.Size,
			Entries:      c.Entries,
			Edges:        c.Edges,
			First:        c.First,
			Construction: string(c.Construction),
			Copies:       c.TotalCopies,
			MaxCopies:    c.MaxCopies,
			WidthBefore:  c.WidthBefore,
			WidthAfter:   c.WidthAfter,
		})
	}
	return q, []size{
		{"cyclic_components", int64(len(rep.Components))},
		{"copies", int64(rep.TotalCopies)},
		{"max_copies", int64(rep.MaxCopies)},
		{"atoms_after", int64(rep.AtomsAfter)},
		{"rules_after", int64(rep.RulesAfter)},
		{"width_before", int64(rep.WidthBefore)},
		{"width_after", int64(rep.WidthAfter)},
	}, comps, nil
}

// dumpProgram writes the ground program for developers.
func dumpProgram(w io.Writer, p *ground.Program) error {
	return p.Dump(w)
}

// writeDot writes the positive dependency graph of p, cyclic components
// coloured, for Graphviz.
func writeDot(w io.Writer, p *ground.Program) error {
	return unfold.WriteDot(w, p, unfold.NewGraph(p))
}

// classifyCompileError marks the compiler's node-limit error as a limit.
func classifyCompileError(err error) error {
	if errors.Is(err, context.DeadlineExceeded) || errors.Is(err, context.Canceled) {
		return err
	}
	if errors.Is(err, compile.ErrNodeLimit) {
		return limitError{err}
	}
	return internalError{err}
}

// saveCircuit writes the circuit file atomically.
func saveCircuit(path string, c *compile.Circuit) error {
	if err := compile.Save(path, c); err != nil {
		return inputError{fmt.Errorf("cannot write the circuit file %s: %v", path, reason(err))}
	}
	return nil
}

// loadCircuit reads a circuit file, or standard input for "-". A file
// that cannot be read, is not a circuit file or is damaged is bad input.
func (a *app) loadCircuit(ctx context.Context, path string) (*compile.Circuit, error) {
	var c *compile.Circuit
	var err error
	if path == stdinArg {
		var data []byte
		data, err = a.readStdin(ctx, "circuit file")
		if err != nil {
			return nil, err
		}
		c, err = compile.Decode(bytes.NewReader(data))
		if err != nil {
			err = fmt.Errorf("%s: %w", stdinFilename, err)
		}
	} else {
		c, err = compile.Load(path)
	}
	switch {
	case err == nil:
		return c, nil
	case errors.Is(err, compile.ErrNotCircuit):
		if path == stdinArg {
			return nil, inputError{fmt.Errorf("standard input is not a circuit file; for a model on standard input use: trellis solve -")}
		}
		if strings.HasSuffix(path, ".trl") {
			return nil, inputError{fmt.Errorf("%s is a model, not a circuit file; compile it first: trellis compile %s -o %s", path, path, strings.TrimSuffix(filepath.Base(path), ".trl")+".trc")}
		}
		return nil, inputError{fmt.Errorf("%s is not a circuit file; write one with: trellis compile MODEL.trl -o FILE.trc", path)}
	case errors.Is(err, compile.ErrDamaged):
		return nil, inputError{fmt.Errorf("the circuit file is damaged (%v); compile the model again", err)}
	}
	return nil, inputError{fmt.Errorf("cannot read the circuit file: %v", unwrapPath(err))}
}
