package compile

import (
	"context"

	"trellis/ground"
)

// Program compiles the stable models of the tight ground program p into a
// circuit: it completes p into a CNF (Complete) and compiles the CNF
// (Compile), then sets the circuit's Meta from the encoding. The circuit's
// models are the stable models of p, one to one. A program with a positive
// cycle is refused with an error that names the cycle; unfold it first.
// The Report is nil when completion fails.
func Program(ctx context.Context, p *ground.Program, opts Options) (*Circuit, *Report, error) {
	enc, err := Complete(p)
	if err != nil {
		return nil, nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, nil, err
	}
	c, rep, err := Compile(ctx, &enc.CNF, opts)
	if err != nil {
		return nil, rep, err
	}
	c.Meta = enc.Meta
	return c, rep, nil
}
