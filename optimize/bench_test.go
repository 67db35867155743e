package optimize

import (
	"context"
	"fmt"
	"math/rand/v2"
	"slices"
	"sync"
	"syscall"
	"testing"
	"time"

	"trellis/compile"
)

// chainCircuit builds a smooth decision-DNNF with shared subcircuits: a
// chain of blocks, each deciding a variable d and then one of two
// subcircuits over the block's m payload variables, both branches sharing
// the rest of the chain. With weighted set, every variable has a random
// nonzero weight at one of two priorities, so that few models tie; every
// decision variable and every second payload variable is a shown atom.
func chainCircuit(blocks, m int, seed uint64, weighted bool) *compile.Circuit {
	return blockCircuit(blocks, m, seed, weighted, false)
}

// blockCircuit builds the blocks of chainCircuit; with wide set they are not
// chained but joined by one AND node at the root, which gives a shallow
// circuit of the same size.
func blockCircuit(blocks, m int, seed uint64, weighted, wide bool) *compile.Circuit {
	r := rand.New(rand.NewPCG(seed, 7))
	nv := blocks * (m + 1)
	b := &builder{c: &compile.Circuit{NumVars: nv, Start: []int32{0}}, memo: map[string]int32{}}
	add := func(kind compile.NodeKind, arg int32, kids ...int32) int32 {
		c := b.c
		n := int32(len(c.Kind))
		c.Kind = append(c.Kind, kind)
		c.Arg = append(c.Arg, arg)
		c.Children = append(c.Children, kids...)
		c.Start = append(c.Start, int32(len(c.Children)))
		return n
	}
	next := add(compile.TrueNode, 0)
	var roots []int32
	for blk := blocks - 1; blk >= 0; blk-- {
		if wide {
			next = add(compile.TrueNode, 0)
		}
		d := int32(blk*(m+1) + 1)
		q := func(i int) int32 { return d + 1 + int32(i) }
		var free []int32
		for i := 0; i < m; i++ {
			free = append(free, add(compile.FreeNode, q(i)))
		}
		sub1 := add(compile.AndNode, 0, free...)
		var lits []int32
		for i := 1; i < m; i++ {
			lits = append(lits, add(compile.LitNode, q(i)*int32(1-2*(i%2))))
		}
		x := add(compile.AndNode, 0, lits...)
		hi := add(compile.AndNode, 0, append([]int32{add(compile.LitNode, q(0))}, free[1:]...)...)
		lo := add(compile.AndNode, 0, add(compile.LitNode, -q(0)), x)
		sub2 := add(compile.OrNode, q(0), hi, lo)
		next = add(compile.OrNode, d,
			add(compile.AndNode, 0, add(compile.LitNode, d), sub1, next),
			add(compile.AndNode, 0, add(compile.LitNode, -d), sub2, next))
		roots = append(roots, next)
	}
	c := b.c
	c.Root = next
	if wide {
		c.Root = add(compile.AndNode, 0, roots...)
	}
	for v := 1; v <= nv; v++ {
		c.Meta.Atoms = append(c.Meta.Atoms, compile.NamedVar{Name: fmt.Sprintf("x(%d)", v), Var: compile.Var(v)})
		if (v-1)%(m+1) == 0 || v%2 == 0 {
			c.Meta.Shown = append(c.Meta.Shown, int32(v-1))
		}
		if weighted {
			w := int64(1 + r.IntN(1_000_000))
			if r.IntN(4) == 0 {
				w = -w
			}
			c.Meta.Weights = append(c.Meta.Weights, compile.VarWeight{Var: compile.Var(v), Weight: w, Priority: int64(r.IntN(2))})
		}
	}
	return c
}

var (
	benchOnce    sync.Once
	benchCircuit *compile.Circuit
)

// bigCircuit is a chain circuit with more than 10^6 edges.
func bigCircuit(b *testing.B) *compile.Circuit {
	benchOnce.Do(func() { benchCircuit = chainCircuit(30000, 8, 1, true) })
	if e := benchCircuit.NumEdges(); e < 1_000_000 {
		b.Fatalf("benchmark circuit has %d edges", e)
	}
	return benchCircuit
}

// reportEdges reports edges per second of wall time and of CPU time since
// cpu0 (the machine may be shared, which inflates wall time).
func reportEdges(b *testing.B, c *compile.Circuit, cpu0 time.Duration) {
	b.ReportMetric(float64(c.NumEdges())*float64(b.N)/b.Elapsed().Seconds(), "edges/s")
	b.ReportMetric(float64(c.NumEdges())*float64(b.N)/(cpuTime()-cpu0).Seconds(), "cpu-edges/s")
}

// cpuTime is the CPU time used by the process so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

// BenchmarkCostCount measures one (cost, count) pass.
func BenchmarkCostCount(b *testing.B) {
	c := bigCircuit(b)
	wt, err := newWeights(c)
	if err != nil {
		b.Fatal(err)
	}
	pins, _ := newPinTable(c.NumVars, nil)
	ctx := context.Background()
	var last *costCount
	b.ResetTimer()
	cpu0 := cpuTime()
	for b.Loop() {
		o, err := evalOptimum(ctx, c, wt, pins, last)
		if err != nil {
			b.Fatal(err)
		}
		last = o.cc
	}
	reportEdges(b, c, cpu0)
}

// BenchmarkTopK measures a top-10 query with the exact tie-break on the deep
// chain circuit, against the per-node lazy lists in the same iterations.
func BenchmarkTopK(b *testing.B) {
	benchTopK(b, bigCircuit(b))
}

// benchTopK times a top-10 query listing models by deviations and by the
// per-node lazy lists, alternately in the same iterations, and checks that
// both agree. It reports the edges per second of each (wall time; the
// machine may be shared) and the ratio of their times.
func benchTopK(b *testing.B, c *compile.Circuit) {
	wt, err := newWeights(c)
	if err != nil {
		b.Fatal(err)
	}
	pins, _ := newPinTable(c.NumVars, nil)
	ctx := context.Background()
	r := newRanker(c, wt)
	old := newRanker(c, wt)
	old.lists = true
	var tNew, tOld time.Duration
	var cNew, cOld time.Duration
	b.ResetTimer()
	for b.Loop() {
		t0, c0 := time.Now(), cpuTime()
		ms, err := r.topK(ctx, pins, 10, nil, nil)
		if err != nil || len(ms) != 10 {
			b.Fatal(len(ms), err)
		}
		t1, c1 := time.Now(), cpuTime()
		want, err := old.topK(ctx, pins, 10, nil, nil)
		if err != nil || len(want) != 10 {
			b.Fatal(len(want), err)
		}
		tNew += t1.Sub(t0)
		tOld += time.Since(t1)
		cNew += c1 - c0
		cOld += cpuTime() - c1
		for i := range ms {
			if cmpVec(ms[i].cost, want[i].cost) != 0 || !slices.Equal(ms[i].assign, want[i].assign) {
				b.Fatalf("model %d differs from the lazy lists", i)
			}
		}
	}
	e := float64(c.NumEdges()) * float64(b.N)
	b.ReportMetric(e/tNew.Seconds(), "edges/s")
	b.ReportMetric(e/cNew.Seconds(), "cpu-edges/s")
	b.ReportMetric(e/tOld.Seconds(), "old-edges/s")
	b.ReportMetric(e/cOld.Seconds(), "old-cpu-edges/s")
	b.ReportMetric(tOld.Seconds()/tNew.Seconds(), "x-old")
	b.ReportMetric(float64(tNew.Milliseconds())/float64(b.N), "ms/query")
}

// BenchmarkWhatIf measures the what-if table of every variable (one upward
// and one downward pass) and reports its time as a ratio to the upward
// (cost, count) pass alone, both timed in the same iterations.
func BenchmarkWhatIf(b *testing.B) {
	c := bigCircuit(b)
	wt, err := newWeights(c)
	if err != nil {
		b.Fatal(err)
	}
	pins, _ := newPinTable(c.NumVars, nil)
	ctx := context.Background()
	var last *costCount
	var buf downBuf
	var up, down time.Duration
	b.ResetTimer()
	cpu0 := cpuTime()
	for b.Loop() {
		t0 := time.Now()
		o, err := evalOptimum(ctx, c, wt, pins, last)
		if err != nil {
			b.Fatal(err)
		}
		last = o.cc
		t1 := time.Now()
		if _, err := evalMarginals(ctx, c, wt, pins, o, &buf); err != nil {
			b.Fatal(err)
		}
		up += t1.Sub(t0)
		down += time.Since(t1)
	}
	b.ReportMetric(float64(up+down)/float64(up), "x-costcount")
	reportEdges(b, c, cpu0)
}

// BenchmarkPinRequery measures the latency of a Solve with one new pin on a
// prepared Solver: optimum and ties (the total of this circuit has about
// 10^5 digits; BenchmarkTotal measures it).
func BenchmarkPinRequery(b *testing.B) {
	c := bigCircuit(b)
	s, err := NewSolver(c)
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	i := 0
	b.ResetTimer()
	cpu0 := cpuTime()
	for b.Loop() {
		i++
		v := compile.Var(1 + (i*7919)%c.NumVars)
		if _, err := s.Solve(ctx, Query{Pins: []Pin{{Var: v, Value: i%2 == 0}}, SkipTotal: true}); err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(b.Elapsed().Milliseconds())/float64(b.N), "ms/query")
	b.ReportMetric(float64((cpuTime()-cpu0).Milliseconds())/float64(b.N), "cpu-ms/query")
}

// BenchmarkTotal measures counting all models of the large circuit exactly
// (the count has about 10^5 decimal digits, so it runs with big integers).
func BenchmarkTotal(b *testing.B) {
	c := bigCircuit(b)
	s, err := NewSolver(c)
	if err != nil {
		b.Fatal(err)
	}
	ctx := context.Background()
	b.ResetTimer()
	cpu0 := cpuTime()
	for b.Loop() {
		if _, err := s.Solve(ctx, Query{}); err != nil {
			b.Fatal(err)
		}
	}
	reportEdges(b, c, cpu0)
}

// BenchmarkTopKTies measures a top-10 query where every model ties (no
// weights), so that the exact tie-break needs the walk, on a chain circuit
// of about 10^4 edges.
func BenchmarkTopKTies(b *testing.B) {
	benchTopK(b, chainCircuit(300, 8, 2, false))
}

// BenchmarkTopKWide measures a top-10 query on a shallow circuit of the same
// size as bigCircuit: the same blocks joined by one AND node.
func BenchmarkTopKWide(b *testing.B) {
	benchTopK(b, blockCircuit(30000, 8, 1, true, true))
}
