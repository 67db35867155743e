package ground

import (
	"context"
	"fmt"
	"math/rand/v2"
	"runtime"
	"strings"
	"syscall"
	"testing"
	"time"
)

// reachModel returns a model with a random sparse directed graph of n
// nodes and about deg edges per node, every edge open to a choice, and
// reachability from every node: about n * (reachable nodes) * deg ground
// rules when the graph is well connected.
func reachModel(n, deg int, seed uint64) []byte {
	r := rand.New(rand.NewPCG(seed, 1))
	var b strings.Builder
	fmt.Fprintf(&b, "node(0..%d).\n", n-1)
	seen := make(map[[2]int]bool)
	for x := 0; x < n; x++ {
		for k := 0; k < deg; k++ {
			y := r.IntN(n)
			if y == x || seen[[2]int{x, y}] {
				continue
			}
			seen[[2]int{x, y}] = true
			fmt.Fprintf(&b, "edge(%d, %d).\n", x, y)
		}
	}
	b.WriteString("choose any of use(X, Y) for edge(X, Y).\n")
	b.WriteString("reach(S, S) if node(S).\n")
	b.WriteString("reach(S, Y) if reach(S, X), use(X, Y), node(S).\n")
	return []byte(b.String())
}

// BenchmarkGroundReach grounds reachability from every node of a random
// graph with 1,000 nodes and 3 edges per node (about 3 million ground
// rules). It reports ground rules per second and the live heap per ground
// rule after grounding.
func BenchmarkGroundReach(b *testing.B) {
	src := reachModel(1000, 3, 7)
	b.ReportAllocs()
	var rules int
	var live uint64
	var cpu time.Duration
	for i := 0; i < b.N; i++ {
		// Collect garbage outside the timed part, so that the live heap
		// after grounding can be measured.
		b.StopTimer()
		runtime.GC()
		var before runtime.MemStats
		runtime.ReadMemStats(&before)
		b.StartTimer()
		start := cpuTime()
		p, _, err := Ground(context.Background(), "reach.trl", src, Options{})
		if err != nil {
			b.Fatal(err)
		}
		cpu += cpuTime() - start
		b.StopTimer()
		runtime.GC()
		var after runtime.MemStats
		runtime.ReadMemStats(&after)
		rules = len(p.Rules)
		live = after.HeapAlloc - before.HeapAlloc
		runtime.KeepAlive(p)
		b.StartTimer()
	}
	// The CPU time of the process (all threads, the collector included)
	// tells more than the wall clock on a shared machine.
	b.ReportMetric(cpu.Seconds()/float64(b.N), "cpu-s/op")
	b.ReportMetric(float64(rules)*float64(b.N)/b.Elapsed().Seconds(), "rules/s")
	b.ReportMetric(float64(live)/float64(rules), "heapB/rule")
	b.ReportMetric(float64(rules), "rules")
}

// cpuTime returns the user and system CPU time of the process so far.
func cpuTime() time.Duration {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}
