package main

import (
	"io"
	"path/filepath"
	"testing"

	"trellis/scenarios"
)

// BenchmarkPinnedQuestion compares the two ways of answering a question
// with a pinned option about the demo model: solving the model from its
// source (grounding, unfolding and compiling every time) and answering from
// the circuit file compiled once. The ratio of the two is what compiling
// once buys.
func BenchmarkPinnedQuestion(b *testing.B) {
	dir := b.TempDir()
	model := filepath.Join(dir, "demo.trl")
	if err := writeFileAtomic(model, scenarios.Demo()); err != nil {
		b.Fatal(err)
	}
	trc := filepath.Join(dir, "demo.trc")
	env := environment{getenv: func(string) string { return "" }}
	if code := run([]string{"compile", model, "-o", trc}, io.Discard, io.Discard, env); code != exitOK {
		b.Fatalf("compile: exit code %d", code)
	}
	pin := []string{"--pin", "buy(lobby,cafe)", "--whatif", "--top", "3"}
	b.Run("solve-model", func(b *testing.B) {
		for b.Loop() {
			if code := run(append([]string{"solve", model}, pin...), io.Discard, io.Discard, env); code != exitOK {
				b.Fatalf("exit code %d", code)
			}
		}
	})
	b.Run("query-circuit", func(b *testing.B) {
		for b.Loop() {
			if code := run(append([]string{"query", trc}, pin...), io.Discard, io.Discard, env); code != exitOK {
				b.Fatalf("exit code %d", code)
			}
		}
	})
}
