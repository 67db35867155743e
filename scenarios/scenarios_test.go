package scenarios

import (
	"bytes"
	"math/big"
	"testing"

	"trellis/grammar"
)

// TestFiles checks that every scenario has a model that parses, is already
// in canonical format, and has well-formed expected answers.
func TestFiles(t *testing.T) {
	names := Names()
	if len(names) < 4 {
		t.Fatalf("want at least 4 scenarios, have %v", names)
	}
	for _, name := range names {
		t.Run(name, func(t *testing.T) {
			src, err := Model(name)
			if err != nil {
				t.Fatal(err)
			}
			f, err := grammar.ParseFile(name+"/model.trl", src)
			if err != nil {
				t.Fatalf("model does not parse: %v", err)
			}
			if got := grammar.Format(f); !bytes.Equal(got, src) {
				t.Errorf("model is not in canonical format; trellis fmt gives:\n%s", got)
			}
			if _, err := FS.ReadFile(name + "/README.md"); err != nil {
				t.Error(err)
			}
			e, err := Answers(name)
			if err != nil {
				t.Fatal(err)
			}
			ties, ok1 := new(big.Int).SetString(e.Ties, 10)
			total, ok2 := new(big.Int).SetString(e.Total, 10)
			if !ok1 || !ok2 || ties.Sign() <= 0 || ties.Cmp(total) > 0 {
				t.Errorf("ties %q and total %q: want 0 < ties <= total", e.Ties, e.Total)
			}
			if !ties.IsInt64() || int64(len(e.Optimal)) != ties.Int64() {
				t.Errorf("%d optimal configurations listed, ties %s", len(e.Optimal), e.Ties)
			}
			for i := 1; i < len(e.Optimum); i++ {
				if e.Optimum[i-1].Priority <= e.Optimum[i].Priority {
					t.Errorf("optimum priorities not in decreasing order: %v", e.Optimum)
				}
			}
		})
	}
}

func TestDemo(t *testing.T) {
	src, err := Model(DemoName)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(Demo(), src) {
		t.Error("Demo() differs from the demo scenario's model")
	}
}
