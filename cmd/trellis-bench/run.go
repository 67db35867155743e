package main

import (
	"context"
	"errors"
	"fmt"
	"math/big"
	"runtime"
	"runtime/metrics"
	"strings"
	"sync"
	"syscall"
	"time"

	"trellis/compile"
	"trellis/ground"
	"trellis/optimize"
	"trellis/unfold"
)

// Stage names, in pipeline order.
const (
	stGround = iota
	stUnfold
	stCNF
	stCompile
	stSolve
	numStages
)

var stageNames = [numStages]string{"ground", "unfold", "cnf", "compile", "solve"}

// result is what one run of the pipeline on an instance measured.
type result struct {
	// Status is "ok", "over the limit" (the context deadline passed) or an
	// error message; Stage names the stage that did not finish.
	Status string
	Stage  string

	Atoms, Rules            int // ground program
	Components              int // cyclic components
	MaxCopies, TotalCopies  int
	WidthBefore, WidthAfter int  // -1 when not known
	naive                   bool // unfolded along the naive sequence
	Vars, Clauses           int  // CNF
	Nodes, Edges            int  // circuit

	// Times are wall-clock times per stage, CPU the process's CPU time
	// (user + system) per stage; Total and TotalCPU cover the whole run.
	Times    [numStages]time.Duration
	CPU      [numStages]time.Duration
	Total    time.Duration
	TotalCPU time.Duration
	PeakHeap uint64 // bytes

	Optimum string   // cost, one value per priority, highest first
	Ties    *big.Int // nil when not known
	Count   *big.Int // nil when not known

	// Kept for the baselines and the width estimates: the ground program,
	// the unfolded one and the encoding.
	prog, unfolded *ground.Program
	enc            *compile.Encoding
}

// ok reports whether every stage finished.
func (r *result) ok() bool { return r.Status == statusOK }

const (
	statusOK   = "ok"
	statusOver = "over the limit"
	// statusOverWall is a run stopped by the wall-clock bound, when the
	// machine was too busy for the run to reach its CPU time limit.
	statusOverWall = "over the wall-clock limit"
	// statusSkipped is an instance not run because a smaller one of its
	// family was over the limit.
	statusSkipped = "not run: over the limit at a smaller size"
)

// overStatus tells how a run stopped by ctx ended.
func overStatus(ctx context.Context) string {
	if errors.Is(context.Cause(ctx), errCPULimit) {
		return statusOver
	}
	return statusOverWall
}

// over reports whether status is one of the over-the-limit statuses.
func over(status string) bool {
	return status == statusOver || status == statusOverWall || status == statusSkipped
}

// runPipeline runs grammar → ground → unfold → compile → optimize on src
// within limit. With naive set, unfolding uses the naive sequence; keep
// retains the ground program and the encoding for the baselines.
func runPipeline(parent context.Context, name string, src []byte, limit time.Duration, naive, keep bool) *result {
	mem := startHeapSampler()
	ctx, cancel := withLimit(parent, limit)
	defer cancel()
	res := &result{WidthBefore: -1, WidthAfter: -1, naive: naive}
	start, startCPU := time.Now(), cpuTime()
	err := pipeline(ctx, name, src, naive, res)
	res.Total, res.TotalCPU = time.Since(start), cpuTime()-startCPU
	res.PeakHeap = mem.stop()
	switch {
	case err == nil:
		res.Status = statusOK
	case ctx.Err() != nil:
		res.Status = overStatus(ctx)
	default:
		res.Status = oneLine(err.Error())
	}
	if !keep {
		res.prog, res.unfolded, res.enc = nil, nil, nil
	}
	return res
}

// pipeline runs the stages, filling in res as they finish.
func pipeline(ctx context.Context, name string, src []byte, naive bool, res *result) error {
	stage := func(i int, f func() error) error {
		res.Stage = stageNames[i]
		if err := ctx.Err(); err != nil {
			return err
		}
		t, c := time.Now(), cpuTime()
		err := f()
		res.Times[i], res.CPU[i] = time.Since(t), cpuTime()-c
		if err == nil && ctx.Err() != nil {
			// A stage that does not look at the context may finish
			// after the deadline; it is still over the limit.
			err = ctx.Err()
		}
		return err
	}
	var p, q *ground.Program
	err := stage(stGround, func() error {
		var rep *ground.Report
		var err error
		p, rep, err = ground.Ground(ctx, name, src, ground.Options{})
		if err == nil {
			res.Atoms, res.Rules = rep.Atoms, rep.Rules
		}
		return err
	})
	if err != nil {
		return err
	}
	res.prog = p
	err = stage(stUnfold, func() error {
		var rep *unfold.Report
		var err error
		q, rep, err = unfold.Unfold(ctx, p, unfold.Options{Naive: naive, NoWidth: true})
		if err == nil {
			res.Components = len(rep.Components)
			res.MaxCopies, res.TotalCopies = rep.MaxCopies, rep.TotalCopies
		}
		return err
	})
	if err != nil {
		return err
	}
	res.unfolded = q
	var enc *compile.Encoding
	err = stage(stCNF, func() error {
		var err error
		enc, err = compile.Complete(q)
		if err == nil {
			res.Vars, res.Clauses = enc.Report.Vars, enc.Report.Clauses
		}
		return err
	})
	if err != nil {
		return err
	}
	res.enc = enc
	var c *compile.Circuit
	err = stage(stCompile, func() error {
		var err error
		c, _, err = compile.Compile(ctx, &enc.CNF, compile.Options{})
		if err == nil {
			c.Meta = enc.Meta
			res.Nodes, res.Edges = c.NumNodes(), c.NumEdges()
		}
		return err
	})
	if err != nil {
		return err
	}
	return stage(stSolve, func() error {
		a, err := optimize.Solve(ctx, c, optimize.Query{})
		if err != nil {
			return err
		}
		res.Count = a.Total
		if a.Status != optimize.StatusOptimal {
			res.Optimum = "none"
			res.Ties = new(big.Int)
			return nil
		}
		res.Ties = a.Ties
		res.Optimum = costText(a.Cost)
		return nil
	})
}

// costText writes a cost vector highest priority first, "0" when there are
// no weights.
func costText(c []optimize.PriorityCost) string {
	if len(c) == 0 {
		return "0"
	}
	parts := make([]string, len(c))
	for i, pc := range c {
		parts[i] = fmt.Sprint(pc.Value)
		if len(c) > 1 {
			parts[i] = fmt.Sprintf("%d@%d", pc.Value, pc.Priority)
		}
	}
	return strings.Join(parts, " ")
}

// widthAtomLimit is the largest program whose treewidth is estimated.
const widthAtomLimit = 100000

// minFillLimit is the program size above which the width estimate uses
// min-degree instead of min-fill elimination (the unfold package's default).
const minFillLimit = 20000

// estimateWidths fills in the treewidth estimates of the ground program and
// of the unfolded one, outside the timed stages (the pipeline itself runs
// without them, as their only use is this report).
func (r *result) estimateWidths() {
	if r.prog == nil || r.unfolded == nil || len(r.unfolded.Atoms) > widthAtomLimit {
		return
	}
	// The unfolding again, with its report's widths: the width after is
	// the better of the heuristic and the input's order lifted to the
	// copies, which needs the unfolding's own view of the copies.
	_, rep, err := unfold.Unfold(context.Background(), r.prog, unfold.Options{Naive: r.naive, WidthLimit: minFillLimit})
	if err != nil {
		r.WidthBefore, _ = unfold.Width(r.prog, nil, minFillLimit)
		r.WidthAfter, _ = unfold.Width(r.unfolded, nil, minFillLimit)
		return
	}
	r.WidthBefore, r.WidthAfter = rep.WidthBefore, rep.WidthAfter
}

// oneLine keeps the first line of an error message.
func oneLine(s string) string {
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		s = s[:i]
	}
	return s
}

// wallFactor bounds the wall-clock time of a run to this many times its CPU
// time limit, in case the machine is so busy that the CPU limit is not
// reached in reasonable time.
const wallFactor = 10

// errCPULimit is the cause of a context cancelled by withLimit.
var errCPULimit = errors.New("over the CPU time limit")

// withLimit returns a context that is cancelled when the process has used
// limit of CPU time since the call (the process runs one measurement at a
// time, so this is the measured work's time), or after wallFactor·limit of
// wall-clock time. A CPU-time limit does not cut a run short when other
// programs share the machine.
func withLimit(parent context.Context, limit time.Duration) (context.Context, context.CancelFunc) {
	wall, cancelWall := context.WithTimeout(parent, wallFactor*limit)
	ctx, cancel := context.WithCancelCause(wall)
	start := cpuTime()
	done := make(chan struct{})
	go func() {
		t := time.NewTicker(5 * time.Millisecond)
		defer t.Stop()
		for {
			select {
			case <-done:
				return
			case <-ctx.Done():
				return
			case <-t.C:
				if cpuTime()-start > limit {
					cancel(errCPULimit)
					return
				}
			}
		}
	}()
	return ctx, func() {
		close(done)
		cancel(nil)
		cancelWall()
	}
}

// cpuTime returns the CPU time (user and system) the process used so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// heapSampler records the high-water mark of the heap in use (the Go
// runtime's HeapInuse: spans holding objects, read with runtime/metrics as
// heap objects plus unused heap bytes), sampled every few milliseconds.
type heapSampler struct {
	done chan struct{}
	wg   sync.WaitGroup
	peak uint64
}

// samplePeriod is the interval between heap samples.
const samplePeriod = 2 * time.Millisecond

// heapMetrics are the runtime/metrics whose sum is the heap in use.
var heapMetrics = [...]string{"/memory/classes/heap/objects:bytes", "/memory/classes/heap/unused:bytes"}

// startHeapSampler collects garbage, so that earlier runs do not count,
// and starts sampling.
func startHeapSampler() *heapSampler {
	runtime.GC()
	h := &heapSampler{done: make(chan struct{})}
	samples := make([]metrics.Sample, len(heapMetrics))
	for i, n := range heapMetrics {
		samples[i].Name = n
	}
	read := func() {
		metrics.Read(samples)
		var v uint64
		for _, s := range samples {
			if s.Value.Kind() == metrics.KindUint64 {
				v += s.Value.Uint64()
			}
		}
		h.peak = max(h.peak, v)
	}
	read()
	h.wg.Add(1)
	go func() {
		defer h.wg.Done()
		t := time.NewTicker(samplePeriod)
		defer t.Stop()
		for {
			select {
			case <-h.done:
				read()
				return
			case <-t.C:
				read()
			}
		}
	}()
	return h
}

// stop ends sampling and returns the peak in bytes.
func (h *heapSampler) stop() uint64 {
	close(h.done)
	h.wg.Wait()
	return h.peak
}
