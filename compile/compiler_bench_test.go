package compile

import (
	"context"
	"fmt"
	"math/big"
	"strings"
	"syscall"
	"testing"
	"time"

	"trellis/ground"
	"trellis/unfold"
)

// cpuTime returns the processor time the process has used, which is less
// sensitive than the wall clock to other programs sharing the machine.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

func benchCompile(b *testing.B, f *CNF) {
	b.ReportAllocs()
	var c *Circuit
	var rep *Report
	cpu0 := cpuTime()
	defer func() {
		b.ReportMetric(float64((cpuTime()-cpu0).Nanoseconds())/float64(b.N), "cpu-ns/op")
	}()
	for b.Loop() {
		var err error
		c, rep, err = Compile(context.Background(), f, Options{})
		if err != nil {
			b.Fatal(err)
		}
	}
	b.ReportMetric(float64(c.NumNodes()), "nodes")
	b.ReportMetric(float64(c.NumEdges()), "edges")
	b.ReportMetric(float64(rep.Width), "width")
	b.ReportMetric(float64(rep.Decisions), "decisions")
}

// BenchmarkDomino8x8 compiles the domino tilings of the chessboard.
func BenchmarkDomino8x8(b *testing.B) { benchCompile(b, dominoCNF(8, 8)) }

// BenchmarkQueens compiles the n-queens formula.
func BenchmarkQueens(b *testing.B) {
	for _, n := range []int{10, 12} {
		b.Run(fmt.Sprintf("n=%d", n), func(b *testing.B) { benchCompile(b, queensCNF(n)) })
	}
}

// gridCNF returns a formula over the k×n grid with a variable per cell and
// one per direction of every edge: an edge needs both its cells, an edge is
// used in one direction at most, and every chosen cell outside the first
// column has an incoming edge. Its primal graph has width O(k), so circuits
// should grow linearly in n.
func gridCNF(k, n int) *CNF {
	f := &CNF{}
	cell := make([]Var, k*n)
	for i := range cell {
		cell[i] = f.NewVar()
	}
	in := make([][]Lit, k*n)
	link := func(u, v int) {
		uv, vu := f.NewVar(), f.NewVar()
		for _, e := range [][3]Var{{uv, cell[u], cell[v]}, {vu, cell[v], cell[u]}} {
			f.AddClause(e[0].Neg(), e[1].Pos())
			f.AddClause(e[0].Neg(), e[2].Pos())
		}
		f.AddClause(uv.Neg(), vu.Neg())
		in[v] = append(in[v], uv.Pos())
		in[u] = append(in[u], vu.Pos())
	}
	for c := 0; c < n; c++ {
		for r := 0; r < k; r++ {
			i := c*k + r
			if r+1 < k {
				link(i, i+1)
			}
			if c+1 < n {
				link(i, i+k)
			}
		}
	}
	for i := k; i < k*n; i++ {
		f.AddClause(append([]Lit{cell[i].Neg()}, in[i]...)...)
	}
	return f
}

// BenchmarkGrid compiles k×n grid formulas of growing length; nodes/n should
// stay about constant. The time of n over that of n/2 says how the work
// grows with the length.
func BenchmarkGrid(b *testing.B) {
	for _, k := range []int{2, 3} {
		for _, n := range []int{10, 20, 40, 80, 160, 320} {
			b.Run(fmt.Sprintf("%dx%d", k, n), func(b *testing.B) {
				f := gridCNF(k, n)
				benchCompile(b, f)
			})
		}
	}
}

// BenchmarkCountVsEnumerate compares compiling and counting with counting by
// enumerating the models one at a time with a plain DPLL search, on proper
// 3-colourings of cycles, which have 2^n + 2(−1)^n models (chromatic
// polynomial of a cycle). speedup is the processor time of the enumeration
// over that of compiling and counting, in the same run.
func BenchmarkCountVsEnumerate(b *testing.B) {
	for _, n := range []int{13, 17, 20, 23} {
		f := cycleColouringCNF(n, 3)
		want := uint64(1)<<n + 2
		if n%2 == 1 {
			want = uint64(1)<<n - 2
		}
		b.Run(fmt.Sprintf("models=%d", want), func(b *testing.B) {
			// Compiling takes milliseconds: repeat it to measure it well.
			const reps = 20
			var compileTime, enumTime time.Duration
			for b.Loop() {
				t0 := cpuTime()
				var got *big.Int
				for r := 0; r < reps; r++ {
					c, _, err := Compile(context.Background(), f, Options{})
					if err != nil {
						b.Fatal(err)
					}
					got = Count(c)
				}
				t1 := cpuTime()
				m := dpllEnumerate(f)
				t2 := cpuTime()
				if !got.IsUint64() || got.Uint64() != want || m != want {
					b.Fatalf("Count %v, enumeration %d, want %d", got, m, want)
				}
				compileTime += (t1 - t0) / reps
				enumTime += t2 - t1
			}
			b.ReportMetric(float64(compileTime.Nanoseconds())/float64(b.N), "compile-cpu-ns/op")
			b.ReportMetric(float64(enumTime.Nanoseconds())/float64(b.N), "enumerate-cpu-ns/op")
			b.ReportMetric(float64(enumTime)/float64(compileTime), "speedup")
		})
	}
}

// randomBenchCNF returns a random 3-CNF with n variables and ratio·n
// clauses drawn by a fixed linear congruential generator.
func randomBenchCNF(n int, ratio float64, seed uint64) *CNF {
	f := &CNF{NumVars: n}
	x := seed
	next := func() int {
		x = x*6364136223846793005 + 1442695040888963407
		return int(x >> 33)
	}
	for i := 0; i < int(ratio*float64(n)); i++ {
		var c []Lit
		for j := 0; j < 3; j++ {
			l := Lit(next()%n + 1)
			if next()%2 == 0 {
				l = -l
			}
			c = append(c, l)
		}
		f.AddClause(c...)
	}
	return f
}

// BenchmarkRandom3CNF compiles a random 3-CNF of unbounded width, where
// decisions matter more than decompositions.
func BenchmarkRandom3CNF(b *testing.B) { benchCompile(b, randomBenchCNF(50, 2.5, 7)) }

// gridNetworkSource returns a model (invented, for speed measurements) of a
// network build-out on a k×n grid of rooms: any cable run between
// neighbouring rooms may be bought, a room is online when a bought run links
// it to an online room, the uplink room is online, and every room must be
// online.
func gridNetworkSource(k, n int) []byte {
	var b strings.Builder
	for i := 1; i <= k; i++ {
		for j := 1; j <= n; j++ {
			fmt.Fprintf(&b, "room(c(%d, %d)).\n", i, j)
			if j < n {
				fmt.Fprintf(&b, "run(c(%d, %d), c(%d, %d), %d).\n", i, j, i, j+1, 1+(3*i+7*j)%9)
			}
			if i < k {
				fmt.Fprintf(&b, "run(c(%d, %d), c(%d, %d), %d).\n", i, j, i+1, j, 1+(5*i+2*j)%9)
			}
		}
	}
	b.WriteString(`uplink(c(1, 1)).
choose any of buy(A, B) for run(A, B, _).
wired(A, B) if buy(A, B).
wired(B, A) if buy(A, B).
online(R) if uplink(R).
online(B) if online(A), wired(A, B).
forbid room(R), not online(R).
penalty C if buy(A, B), run(A, B, C).
display buy/2.
`)
	return []byte(b.String())
}

// BenchmarkGridNetwork compiles the completion of the unfolded grid network
// models of growing length (grounding, unfolding and completion are not
// timed). On 3×n grids the unfolded program is much wider (width 70 at
// n = 5) and n = 10 already takes minutes, so only 2×n is measured.
func BenchmarkGridNetwork(b *testing.B) {
	for _, k := range []int{2} {
		for _, n := range []int{10, 20, 40, 80, 160} {
			b.Run(fmt.Sprintf("%dx%d", k, n), func(b *testing.B) {
				ctx := context.Background()
				p, _, err := ground.Ground(ctx, "grid.trl", gridNetworkSource(k, n), ground.Options{})
				if err != nil {
					b.Fatal(err)
				}
				q, _, err := unfold.Unfold(ctx, p, unfold.Options{NoWidth: true})
				if err != nil {
					b.Fatal(err)
				}
				enc, err := Complete(q)
				if err != nil {
					b.Fatal(err)
				}
				benchCompile(b, &enc.CNF)
			})
		}
	}
}
