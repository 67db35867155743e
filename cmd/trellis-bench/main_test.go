package main

import (
	"bytes"
	"context"
	"image/png"
	"math/big"
	"math/rand/v2"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"trellis/compile"
	"trellis/ground"
	"trellis/unfold"
)

// TestMain lets the test binary act as the gophersat child process, as the
// command does.
func TestMain(m *testing.M) {
	if os.Getenv(childEnv) != "" {
		os.Exit(childMain(os.Stdin, os.Stdout))
	}
	os.Exit(m.Run())
}

// TestSmallestSizes runs the generator and the pipeline on the smallest
// size of every family, with the baselines, and checks the published counts
// and that the table and the plot are written.
func TestSmallestSizes(t *testing.T) {
	dir := t.TempDir()
	cfg := config{Out: dir, Seed: 1, Timeout: 2 * time.Second, Quick: true, Sizes: 1}
	rows, info, err := bench(context.Background(), cfg)
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) != len(families()) {
		t.Fatalf("%d rows for %d families", len(rows), len(families()))
	}
	for _, r := range rows {
		if !r.Main.ok() {
			t.Errorf("%s %s: %s in %s", r.Fam.Key, r.In.Name, r.Main.Status, r.Main.Stage)
			continue
		}
		if strings.Contains(r.Check, "MISMATCH") {
			t.Errorf("%s %s: %s", r.Fam.Key, r.In.Name, r.Check)
		}
		if r.In.Published != nil && r.Main.Count.Cmp(r.In.Published) != 0 {
			t.Errorf("%s %s: %s models, %s says %s", r.Fam.Key, r.In.Name, r.Main.Count, r.In.Source, r.In.Published)
		}
		if r.Enum == nil {
			t.Errorf("%s %s: enumeration baseline not run: %s", r.Fam.Key, r.In.Name, r.EnumNote)
		}
		if r.Fam.Key == "bundle" && (r.PB == nil || r.PB.Status != statusOK) {
			t.Errorf("%s %s: gophersat baseline did not finish: %+v", r.Fam.Key, r.In.Name, r.PB)
		}
	}
	if err := writeOutputs(cfg, info, rows); err != nil {
		t.Fatal(err)
	}
	md, err := os.ReadFile(filepath.Join(dir, tableFile))
	if err != nil {
		t.Fatal(err)
	}
	for _, r := range rows {
		if !bytes.Contains(md, []byte("| "+r.Fam.Key+" | "+r.In.Name+" |")) {
			t.Errorf("the table has no row for %s %s", r.Fam.Key, r.In.Name)
		}
	}
	f, err := os.Open(filepath.Join(dir, plotFile))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatalf("the plot is not a PNG image: %v", err)
	}
	if b := img.Bounds(); b.Dx() < 800 || b.Dy() < 400 {
		t.Errorf("the plot is only %v", b)
	}
	left, _ := filepath.Glob(filepath.Join(dir, ".*"))
	if len(left) > 0 {
		t.Errorf("temporary files left behind: %v", left)
	}
}

// TestPublishedCounts checks the counting models of the published-count
// family on more sizes than the smallest.
func TestPublishedCounts(t *testing.T) {
	if testing.Short() {
		t.Skip("slow")
	}
	for _, in := range []instance{
		domino("domino2", 2, 12), // OEIS A000045: F(13) = 233
		domino("domino", 4, 4),   // OEIS A004003: 36
		queens(5),                // OEIS A000170: 10
		queens(6),                // OEIS A000170: 4
		connected(4),             // OEIS A001187: 38
		connected(5),             // OEIS A001187: 728
	} {
		r := runPipeline(context.Background(), in.Name, in.Src, 20*time.Second, false, false)
		if !r.ok() {
			t.Errorf("%s: %s in %s", in.Name, r.Status, r.Stage)
			continue
		}
		if r.Count.Cmp(in.Published) != 0 {
			t.Errorf("%s: %s models, %s says %s", in.Name, r.Count, in.Source, in.Published)
		}
	}
}

// TestFibonacci checks the helper against the first Fibonacci numbers
// (OEIS A000045: 1, 1, 2, 3, 5, 8, 13, 21, 34, 55).
func TestFibonacci(t *testing.T) {
	want := []int64{1, 1, 2, 3, 5, 8, 13, 21, 34, 55}
	for i, w := range want {
		if got := fibonacci(i + 1); got.Cmp(big.NewInt(w)) != 0 {
			t.Errorf("F(%d) = %s, want %d", i+1, got, w)
		}
	}
}

// TestEnumerateAgainstCount compares the DPLL enumerator with the
// compiler's exact count on the completions of generated instances.
func TestEnumerateAgainstCount(t *testing.T) {
	for _, tc := range []struct {
		key  string
		size int
	}{{"grid2", 3}, {"sparse", 8}, {"bundle", 20}, {"services", 12}, {"connected", 4}, {"queens", 5}} {
		var in instance
		for _, f := range families() {
			if f.Key == tc.key {
				in = f.Make(rand.New(rand.NewPCG(7, familySeed(tc.key, tc.size))), tc.size)
			}
		}
		ctx := context.Background()
		p, _, err := ground.Ground(ctx, in.Name, in.Src, ground.Options{})
		if err != nil {
			t.Fatalf("%s: %v", in.Name, err)
		}
		q, _, err := unfold.Unfold(ctx, p, unfold.Options{NoWidth: true})
		if err != nil {
			t.Fatalf("%s: %v", in.Name, err)
		}
		enc, err := compile.Complete(q)
		if err != nil {
			t.Fatalf("%s: %v", in.Name, err)
		}
		c, _, err := compile.Compile(ctx, &enc.CNF, compile.Options{})
		if err != nil {
			t.Fatalf("%s: %v", in.Name, err)
		}
		e := enumerate(ctx, enc, 20*time.Second)
		if e.Status != statusOK {
			t.Fatalf("%s: enumeration %s", in.Name, e.Status)
		}
		if want := compile.Count(c); !want.IsUint64() || want.Uint64() != e.Models {
			t.Errorf("%s %s: enumeration lists %d models, the circuit counts %s", tc.key, in.Name, e.Models, want)
		}
	}
}

// TestOverTheLimit checks that an instance that cannot finish in time is
// recorded as over the limit, with the stage it was in.
func TestOverTheLimit(t *testing.T) {
	in := gridNetwork(rand.New(rand.NewPCG(1, 1)), 3, 30)
	r := runPipeline(context.Background(), in.Name, in.Src, 50*time.Millisecond, false, false)
	if r.Status != statusOver {
		t.Fatalf("status %q, want %q", r.Status, statusOver)
	}
	if r.Stage == "" {
		t.Errorf("no stage recorded")
	}
	if r.Total > wallFactor*time.Second {
		t.Errorf("the run took %v", r.Total)
	}
}

// TestGeneratorsDeterministic checks that the same seed gives the same
// source.
func TestGeneratorsDeterministic(t *testing.T) {
	for _, f := range families() {
		size := f.Quick[len(f.Quick)-1]
		a := f.Make(rand.New(rand.NewPCG(3, familySeed(f.Key, size))), size)
		b := f.Make(rand.New(rand.NewPCG(3, familySeed(f.Key, size))), size)
		if !bytes.Equal(a.Src, b.Src) {
			t.Errorf("%s: two runs with one seed differ", f.Key)
		}
	}
}
