// Command trellis-bench measures the trellis pipeline on generated model
// families of growing size and writes the table BENCHMARKS.md and the plot
// benchmarks.png.
//
// Usage:
//
//	go run ./cmd/trellis-bench [-quick] [-out DIR] [-seed N] [-timeout 30s] [-families grid3,bundle]
//
// Every instance is written as rule-language source and run through the
// whole pipeline (ground, unfold, complete, compile, solve) under a limit
// on CPU time (with a wall-clock bound a few times longer, for a busy
// machine); an instance that does not finish in time is recorded as over
// the limit, and the larger sizes of its family as not run. The same run measures three baselines: the naive unfolding
// sequence instead of the searched one, enumeration of the models one at a
// time with a plain DPLL search, and (on the product bundles) gophersat's
// pseudo-Boolean optimisation.
package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strings"
	"time"
)

func main() {
	if os.Getenv(childEnv) != "" {
		os.Exit(childMain(os.Stdin, os.Stdout))
	}
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

// config holds the command line settings.
type config struct {
	Quick   bool
	Out     string
	Seed    uint64
	Timeout time.Duration
	// Only keeps the families whose keys it lists (all when empty).
	Only []string
	// Sizes replaces every family's sizes with its first Sizes sizes when
	// positive (for tests).
	Sizes int
	// Progress receives a line per instance; nil for none.
	Progress io.Writer
}

// run parses the arguments and runs the benchmarks; it returns the exit
// code.
func run(args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("trellis-bench", flag.ContinueOnError)
	fs.SetOutput(stderr)
	var cfg config
	fs.BoolVar(&cfg.Quick, "quick", false, "run small sizes only (under 2 minutes)")
	fs.StringVar(&cfg.Out, "out", "", "directory for BENCHMARKS.md and benchmarks.png (default: the repository root)")
	fs.Uint64Var(&cfg.Seed, "seed", 1, "seed of the generated instances")
	fs.DurationVar(&cfg.Timeout, "timeout", 0, "time limit per instance and per baseline run (CPU time; default 30s, 3s with -quick)")
	only := fs.String("families", "", "comma-separated family keys to run (default: all)")
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, flag.ErrHelp) {
			return 0
		}
		return 2
	}
	if fs.NArg() > 0 {
		fmt.Fprintf(stderr, "trellis-bench: unexpected argument %q\n", fs.Arg(0))
		return 2
	}
	if *only != "" {
		cfg.Only = strings.Split(*only, ",")
	}
	if cfg.Timeout == 0 {
		cfg.Timeout = 30 * time.Second
		if cfg.Quick {
			cfg.Timeout = 3 * time.Second
		}
	}
	if cfg.Out == "" {
		root, err := repoRoot()
		if err != nil {
			fmt.Fprintf(stderr, "trellis-bench: %v; give the output directory with -out\n", err)
			return 1
		}
		cfg.Out = root
	}
	cfg.Progress = stderr
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	rows, info, err := bench(ctx, cfg)
	if err != nil {
		fmt.Fprintf(stderr, "trellis-bench: %v\n", err)
		return 1
	}
	if err := writeOutputs(cfg, info, rows); err != nil {
		fmt.Fprintf(stderr, "trellis-bench: %v\n", err)
		return 1
	}
	fmt.Fprintf(stdout, "wrote %s and %s\n", filepath.Join(cfg.Out, tableFile), filepath.Join(cfg.Out, plotFile))
	return 0
}

// repoRoot returns the nearest directory at or above the working directory
// that holds a go.mod file.
func repoRoot() (string, error) {
	dir, err := os.Getwd()
	if err != nil {
		return "", err
	}
	for {
		if _, err := os.Stat(filepath.Join(dir, "go.mod")); err == nil {
			return dir, nil
		}
		parent := filepath.Dir(dir)
		if parent == dir {
			return "", errors.New("no go.mod in the working directory or above it")
		}
		dir = parent
	}
}
