package grammar

import (
	"fmt"
	"strings"
	"testing"
)

// benchModel generates an invented model with n rooms: facts, rules,
// choices, constraints with aggregates and penalties, about 12 statements
// per room.
func benchModel(n int) []byte {
	var b strings.Builder
	b.WriteString("# generated\nparam budget = 1000.\n")
	for i := 0; i < n; i++ {
		fmt.Fprintf(&b, "room(r%d). size(r%d, %d). label(r%d, \"room %d\").\n", i, i, i%17, i, i)
		fmt.Fprintf(&b, "run(r%d, r%d, %d). run(r%d, r%d, %d).\n", i, (i+1)%n, 10+i%7, i, (i+7)%n, 30+i%11)
	}
	for i := 0; i < n/10+1; i++ {
		fmt.Fprintf(&b, "choose any of buy(A, B) for run(A, B, C), C > %d, C <= %d * 2 + 1.\n", i, i)
		b.WriteString("wired(A, B) if buy(A, B).\nwired(B, A) if buy(A, B).\n")
		b.WriteString("online(B) if online(A), wired(A, B), not blocked(A, B).\n")
		b.WriteString("forbid room(R), not online(R).\n")
		fmt.Fprintf(&b, "forbid sum(C, A, B : buy(A, B), run(A, B, C)) > budget - %d.\n", i)
		fmt.Fprintf(&b, "penalty C at priority %d per A, B if buy(A, B), run(A, B, C).\n", i%3)
		b.WriteString("choose between 1 and 2 of uplink(R); spare(R) for size(R, S), S > 3 if room(R).\n")
	}
	b.WriteString("display buy/2.\n")
	return []byte(b.String())
}

// BenchmarkParse parses a generated model of about 12000 statements.
// BenchmarkScan tokenises the same model and is the baseline: the ratio
// of the two is the cost of the participle parse and the conversion.
func BenchmarkParse(b *testing.B) {
	src := benchModel(2000)
	b.SetBytes(int64(len(src)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := ParseFile("bench.trl", src); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkParseParticiple parses the model of BenchmarkParse with every
// statement going through participle (no fast path for plain facts).
func BenchmarkParseParticiple(b *testing.B) {
	src := benchModel(2000)
	b.SetBytes(int64(len(src)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := (Config{noFastPath: true}).ParseFile("bench.trl", src); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkScan tokenises the model of BenchmarkParse.
func BenchmarkScan(b *testing.B) {
	src := benchModel(2000)
	b.SetBytes(int64(len(src)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		var errs ErrorList
		scan("bench.trl", src, &errs, DefaultMaxErrors)
		if len(errs) > 0 {
			b.Fatal(errs)
		}
	}
}

// BenchmarkFormat formats the parsed model of BenchmarkParse.
func BenchmarkFormat(b *testing.B) {
	src := benchModel(2000)
	f, err := ParseFile("bench.trl", src)
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(src)))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		Format(f)
	}
}

// TestBenchModelParses keeps the benchmark input valid.
func TestBenchModelParses(t *testing.T) {
	f, err := ParseFile("bench.trl", benchModel(30))
	if err != nil {
		t.Fatal(err)
	}
	if got, want := len(f.Statements), 1+30*5+4*8+1; got != want {
		t.Errorf("%d statements, want %d", got, want)
	}
}
