package main

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"io"
	"math"
	"os"
	"os/exec"
	"slices"
	"strconv"
	"syscall"
	"time"

	"github.com/crillab/gophersat/solver"
)

// childEnv, when set in the environment, makes the program solve one
// pseudo-Boolean problem read from standard input with gophersat instead of
// running the benchmarks. The baseline runs in a child process so that it
// can be stopped at the time limit (gophersat takes no context) and so that
// its peak memory is the child's maximum resident set size.
const childEnv = "TRELLIS_BENCH_GOPHERSAT"

// pbResult is what the gophersat baseline measured.
type pbResult struct {
	Status  string        // statusOK, statusOver or an error
	Time    time.Duration // time to the optimum, measured in the child
	CPU     time.Duration // CPU time of the child (user + system)
	Optimum int           // the minimum price; -1 when there is no bundle
	// PeakHeap is the child's heap high-water mark during the solver
	// call, sampled like the pipeline's.
	PeakHeap uint64
}

// childAnswer is what the child writes to standard output.
type childAnswer struct {
	Optimum  int    `json:"optimum"`
	Nanos    int64  `json:"nanos"`
	PeakHeap uint64 `json:"peak_heap"`
}

// runGophersat minimises the price of bundle k with gophersat in a child
// process, stopped after limit.
func runGophersat(ctx context.Context, k *bundle, limit time.Duration) *pbResult {
	res := &pbResult{Optimum: -1}
	exe, err := os.Executable()
	if err != nil {
		res.Status = err.Error()
		return res
	}
	in, err := json.Marshal(k)
	if err != nil {
		res.Status = err.Error()
		return res
	}
	ctx, cancel := context.WithTimeout(ctx, wallFactor*limit)
	defer cancel()
	cmd := exec.CommandContext(ctx, exe)
	// The child limits its own CPU time (whole seconds, rounded up).
	cmd.Env = append(os.Environ(), fmt.Sprintf("%s=%d", childEnv, int64(math.Ceil(limit.Seconds()))))
	cmd.Stdin = bytes.NewReader(in)
	var out, errb bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errb
	err = cmd.Run()
	if cmd.ProcessState != nil {
		// (The child's maximum resident set size is of no use: Linux keeps
		// the parent's across the fork and exec.)
		if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
			res.CPU = time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
		}
	}
	// The Go runtime ignores SIGXCPU at the soft limit, so the kernel
	// kills the child at the hard limit a second later.
	cpuOut := false
	if cmd.ProcessState != nil {
		if ws, ok := cmd.ProcessState.Sys().(syscall.WaitStatus); ok && ws.Signaled() {
			cpuOut = ws.Signal() == syscall.SIGXCPU || ws.Signal() == syscall.SIGKILL
		}
	}
	switch {
	case ctx.Err() != nil:
		res.Status = statusOverWall
		return res
	case cpuOut:
		res.Status = statusOver
		return res
	case err != nil:
		res.Status = oneLine(fmt.Sprintf("gophersat child: %v: %s", err, errb.String()))
		return res
	}
	var a childAnswer
	if err := json.Unmarshal(out.Bytes(), &a); err != nil {
		res.Status = "gophersat child: " + err.Error()
		return res
	}
	res.Status, res.Optimum, res.Time, res.PeakHeap = statusOK, a.Optimum, time.Duration(a.Nanos), a.PeakHeap
	return res
}

// childMain reads a bundle, minimises its price with gophersat and writes
// the optimum and the time it took; it returns the exit code.
func childMain(r io.Reader, w io.Writer) int {
	if secs, err := strconv.ParseUint(os.Getenv(childEnv), 10, 64); err == nil && secs > 0 {
		// Over the limit the kernel stops the process with SIGXCPU.
		lim := syscall.Rlimit{Cur: secs, Max: secs + 1}
		if err := syscall.Setrlimit(syscall.RLIMIT_CPU, &lim); err != nil {
			fmt.Fprintln(os.Stderr, err)
			return 1
		}
	}
	var k bundle
	if err := json.NewDecoder(r).Decode(&k); err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 1
	}
	mem := startHeapSampler()
	start := time.Now()
	opt := minimizeBundle(&k)
	a := childAnswer{Optimum: opt, Nanos: time.Since(start).Nanoseconds(), PeakHeap: mem.stop()}
	if err := json.NewEncoder(w).Encode(a); err != nil {
		fmt.Fprintln(os.Stderr, err)
		return 1
	}
	return 0
}

// minimizeBundle returns the least price of a bundle that takes exactly one
// option per slot within the limits of every rack and the budget, or -1 when there is none. Option
// i is the pseudo-Boolean variable i+1.
func minimizeBundle(k *bundle) int {
	n := len(k.Slot)
	// The constructors of gophersat take ownership of their slices and
	// change them, so each gets fresh copies.
	ones := func(m int) []int {
		w := make([]int, m)
		for i := range w {
			w[i] = 1
		}
		return w
	}
	var cs []solver.PBConstr
	bySlot := make([][]int, k.Slots)
	for i, s := range k.Slot {
		bySlot[s] = append(bySlot[s], i+1)
	}
	for _, vs := range bySlot {
		cs = append(cs, solver.Eq(vs, ones(len(vs)), 1)...)
	}
	racks := (k.Slots + k.SlotsPerRack - 1) / k.SlotsPerRack
	inRack := make([][]int, racks)
	for i, s := range k.Slot {
		inRack[s/k.SlotsPerRack] = append(inRack[s/k.SlotsPerRack], i)
	}
	for _, opts := range inRack {
		vs, pw, wt := make([]int, len(opts)), make([]int, len(opts)), make([]int, len(opts))
		for j, o := range opts {
			vs[j], pw[j], wt[j] = o+1, k.Power[o], k.Weight[o]
		}
		vs2 := slices.Clone(vs)
		cs = append(cs, solver.LtEq(vs, pw, k.MaxPower), solver.LtEq(vs2, wt, k.MaxWeight))
	}
	all := make([]int, n)
	for i := range all {
		all[i] = i + 1
	}
	cs = append(cs, solver.LtEq(all, slices.Clone(k.Price), k.Budget))
	pb := solver.ParsePBConstrs(cs)
	lits := make([]solver.Lit, n)
	for i := range lits {
		lits[i] = solver.IntToLit(int32(i + 1))
	}
	pb.SetCostFunc(lits, slices.Clone(k.Price))
	return solver.New(pb).Minimize()
}
