package main

import (
	"context"
	"fmt"
	"hash/fnv"
	"math/rand/v2"
	"os"
	"slices"
	"strings"
	"time"
)

// row is everything measured about one instance.
type row struct {
	Fam  family
	In   instance
	Main *result

	// Naive is the pipeline with the naive unfolding sequence; nil when it
	// was not run, with NaiveNote saying why.
	Naive     *result
	NaiveNote string
	// Enum is the enumeration baseline; nil when not run (EnumNote).
	Enum     *enumResult
	EnumNote string
	// PB is the gophersat baseline on the bundles; nil elsewhere.
	PB     *pbResult
	PBNote string

	// Check compares the computed count with the published one, and the
	// baselines' answers with the pipeline's; empty when there is nothing
	// to compare.
	Check string
}

// Notes for baselines that were not run.
const (
	noteNoCycle    = "no cycles"
	noteMainOver   = "not run: the pipeline did not finish"
	noteSmallerOut = "not run: over the limit at a smaller size"
)

// runInfo describes the conditions of a run.
type runInfo struct {
	LoadStart, LoadEnd string // 1-minute load average, "?" when unknown
	Elapsed            time.Duration
}

// loadAverage returns the 1-minute load average from /proc/loadavg.
func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "?"
	}
	f := strings.Fields(string(b))
	if len(f) == 0 {
		return "?"
	}
	return f[0]
}

// bench generates and measures every instance of every family.
func bench(ctx context.Context, cfg config) ([]row, runInfo, error) {
	info := runInfo{LoadStart: loadAverage()}
	start := time.Now()
	var rows []row
	for _, fam := range families() {
		if len(cfg.Only) > 0 && !slices.Contains(cfg.Only, fam.Key) {
			continue
		}
		sizes := fam.Full
		if cfg.Quick {
			sizes = fam.Quick
		}
		if cfg.Sizes > 0 {
			sizes = sizes[:min(cfg.Sizes, len(sizes))]
		}
		var mainOut, naiveOut, enumOut, pbOut bool
		for _, size := range sizes {
			if err := ctx.Err(); err != nil {
				return nil, info, err
			}
			r := rand.New(rand.NewPCG(cfg.Seed, familySeed(fam.Key, size)))
			in := fam.Make(r, size)
			rw := row{Fam: fam, In: in}
			if mainOut {
				rw.Main = &result{Status: statusSkipped, WidthBefore: -1, WidthAfter: -1}
			} else {
				rw.Main = runPipeline(ctx, in.Family+".trl", in.Src, cfg.Timeout, false, true)
				mainOut = over(rw.Main.Status)
			}
			m := rw.Main

			switch {
			case naiveOut:
				rw.NaiveNote = noteSmallerOut
			case m.Status == statusSkipped || m.Stage == stageNames[stGround] || m.Stage == stageNames[stUnfold]:
				rw.NaiveNote = noteMainOver
			case m.Components == 0:
				rw.NaiveNote = noteNoCycle
			default:
				rw.Naive = runPipeline(ctx, in.Family+".trl", in.Src, cfg.Timeout, true, false)
				naiveOut = over(rw.Naive.Status)
			}

			switch {
			case enumOut:
				rw.EnumNote = noteSmallerOut
			case m.enc == nil:
				rw.EnumNote = noteMainOver
			default:
				rw.Enum = enumerate(ctx, m.enc, cfg.Timeout)
				enumOut = over(rw.Enum.Status)
			}

			if in.Knap != nil {
				if pbOut {
					rw.PBNote = noteSmallerOut
				} else {
					rw.PB = runGophersat(ctx, in.Knap, cfg.Timeout)
					pbOut = over(rw.PB.Status)
				}
			}
			m.estimateWidths()
			m.prog, m.unfolded, m.enc = nil, nil, nil
			rw.Check = check(&rw)
			rows = append(rows, rw)
			if cfg.Progress != nil {
				fmt.Fprintf(cfg.Progress, "%-10s %-14s %-15s %9s  naive %-15s enum %-15s %s\n",
					fam.Key, in.Name, m.Status, m.TotalCPU.Round(time.Millisecond),
					baseText(rw.Naive, rw.NaiveNote), enumText(rw.Enum, rw.EnumNote), rw.Check)
			}
		}
	}
	info.LoadEnd = loadAverage()
	info.Elapsed = time.Since(start)
	return rows, info, nil
}

// familySeed mixes the family key and the size into the second word of the
// generator's seed, so that every instance has its own stream.
func familySeed(key string, size int) uint64 {
	h := fnv.New64a()
	fmt.Fprintf(h, "%s/%d", key, size)
	return h.Sum64()
}

// baseText is a short progress note on the naive baseline.
func baseText(r *result, note string) string {
	if r == nil {
		return "-"
	}
	if !r.ok() {
		return r.Status
	}
	return r.TotalCPU.Round(time.Millisecond).String()
}

// enumText is a short progress note on the enumeration baseline.
func enumText(r *enumResult, note string) string {
	if r == nil {
		return "-"
	}
	if r.Status != statusOK {
		return r.Status
	}
	return r.CPU.Round(time.Millisecond).String()
}

// check compares the answers: the count with a published value, and the
// baselines that finished with the pipeline. It returns "" when there is
// nothing to compare.
func check(rw *row) string {
	m := rw.Main
	var msgs []string
	bad := false
	if rw.In.Published != nil {
		switch {
		case !m.ok():
			msgs = append(msgs, "not checked ("+rw.In.Source+")")
		case m.Count.Cmp(rw.In.Published) == 0:
			msgs = append(msgs, "✓ "+rw.In.Source)
		default:
			bad = true
			msgs = append(msgs, fmt.Sprintf("✗ %s says %s", rw.In.Source, rw.In.Published))
		}
	}
	if m.ok() {
		if n := rw.Naive; n != nil && n.ok() && (n.Count.Cmp(m.Count) != 0 || n.Optimum != m.Optimum || n.Ties.Cmp(m.Ties) != 0) {
			bad = true
			msgs = append(msgs, fmt.Sprintf("✗ naive unfolding answers %s/%s/%s", n.Optimum, n.Ties, n.Count))
		}
		if e := rw.Enum; e != nil && e.Status == statusOK && (!m.Count.IsUint64() || e.Models != m.Count.Uint64() || e.Optimum != m.Optimum || e.Ties != m.Ties.Uint64()) {
			bad = true
			msgs = append(msgs, fmt.Sprintf("✗ enumeration answers %s/%d/%d", e.Optimum, e.Ties, e.Models))
		}
		if p := rw.PB; p != nil && p.Status == statusOK {
			want := m.Optimum
			if want == "none" {
				want = "-1"
			}
			if fmt.Sprint(p.Optimum) != want {
				bad = true
				msgs = append(msgs, fmt.Sprintf("✗ gophersat optimum %d", p.Optimum))
			}
		}
	}
	if len(msgs) == 0 {
		return ""
	}
	s := msgs[0]
	for _, x := range msgs[1:] {
		s += "; " + x
	}
	if bad {
		s = "MISMATCH: " + s
	}
	return s
}
