package compile

import (
	"context"
	"math/big"
	"testing"
)

// exactlyOne adds the clauses of "exactly one of xs": one clause for at least
// one and a binary clause per pair for at most one.
func exactlyOne(f *CNF, xs []Var) {
	atLeastOne(f, xs)
	atMostOne(f, xs)
}

func atLeastOne(f *CNF, xs []Var) {
	c := make([]Lit, len(xs))
	for i, x := range xs {
		c[i] = x.Pos()
	}
	f.AddClause(c...)
}

func atMostOne(f *CNF, xs []Var) {
	for i := range xs {
		for j := i + 1; j < len(xs); j++ {
			f.AddClause(xs[i].Neg(), xs[j].Neg())
		}
	}
}

// dominoCNF returns a CNF whose models are the domino tilings of the rows×cols
// board: one variable per domino position, every cell covered exactly once.
func dominoCNF(rows, cols int) *CNF {
	f := &CNF{}
	cover := make([][]Var, rows*cols)
	for r := 0; r < rows; r++ {
		for c := 0; c < cols; c++ {
			if c+1 < cols {
				v := f.NewVar()
				cover[r*cols+c] = append(cover[r*cols+c], v)
				cover[r*cols+c+1] = append(cover[r*cols+c+1], v)
			}
			if r+1 < rows {
				v := f.NewVar()
				cover[r*cols+c] = append(cover[r*cols+c], v)
				cover[(r+1)*cols+c] = append(cover[(r+1)*cols+c], v)
			}
		}
	}
	for _, xs := range cover {
		exactlyOne(f, xs)
	}
	return f
}

// queensCNF returns a CNF whose models are the placements of n non-attacking
// queens on an n×n board: one queen per row, at most one per column and per
// diagonal.
func queensCNF(n int) *CNF {
	f := &CNF{}
	cell := func(r, c int) Var { return Var(r*n + c + 1) }
	f.NumVars = n * n
	for r := 0; r < n; r++ {
		var xs []Var
		for c := 0; c < n; c++ {
			xs = append(xs, cell(r, c))
		}
		exactlyOne(f, xs)
	}
	for c := 0; c < n; c++ {
		var xs []Var
		for r := 0; r < n; r++ {
			xs = append(xs, cell(r, c))
		}
		atMostOne(f, xs)
	}
	for d := -(n - 1); d <= n-1; d++ {
		var xs, ys []Var
		for r := 0; r < n; r++ {
			if c := r + d; c >= 0 && c < n {
				xs = append(xs, cell(r, c))
			}
			if c := d + n - 1 - r; c >= 0 && c < n {
				ys = append(ys, cell(r, c))
			}
		}
		atMostOne(f, xs)
		atMostOne(f, ys)
	}
	return f
}

// cycleColouringCNF returns a CNF whose models are the proper k-colourings of
// the cycle on n vertices, one variable per vertex and colour.
func cycleColouringCNF(n, k int) *CNF {
	f := &CNF{NumVars: n * k}
	x := func(v, c int) Var { return Var(v*k + c + 1) }
	for v := 0; v < n; v++ {
		var xs []Var
		for c := 0; c < k; c++ {
			xs = append(xs, x(v, c))
		}
		exactlyOne(f, xs)
		w := (v + 1) % n
		for c := 0; c < k; c++ {
			f.AddClause(x(v, c).Neg(), x(w, c).Neg())
		}
	}
	return f
}

func compileCount(t testing.TB, f *CNF) *big.Int {
	t.Helper()
	c, _, err := Compile(context.Background(), f, Options{})
	if err != nil {
		t.Fatal(err)
	}
	return Count(c)
}

// TestDominoStrip checks that the 2×n strip has F(n+1) domino tilings, F the
// Fibonacci numbers with F(1) = F(2) = 1 (a textbook fact: the last column
// holds one vertical domino or two horizontal ones).
func TestDominoStrip(t *testing.T) {
	fib := []int64{0, 1, 1}
	for len(fib) < 23 {
		fib = append(fib, fib[len(fib)-1]+fib[len(fib)-2])
	}
	for n := 1; n <= 20; n++ {
		got := compileCount(t, dominoCNF(2, n))
		if got.Cmp(big.NewInt(fib[n+1])) != 0 {
			t.Errorf("2×%d strip: %v tilings, want F(%d) = %d", n, got, n+1, fib[n+1])
		}
	}
}

// TestDomino8x8 checks the number of domino tilings of the chessboard,
// 12,988,816 (Kasteleyn 1961; Temperley and Fisher 1961).
func TestDomino8x8(t *testing.T) {
	if testing.Short() {
		t.Skip("slow")
	}
	got := compileCount(t, dominoCNF(8, 8))
	if got.Cmp(big.NewInt(12988816)) != 0 {
		t.Errorf("8×8 board: %v tilings, want 12988816", got)
	}
}

// TestQueens checks the number of solutions of the n-queens problem for
// n = 1..10 against OEIS A000170.
func TestQueens(t *testing.T) {
	want := []int64{1, 0, 0, 2, 10, 4, 40, 92, 352, 724} // OEIS A000170, n = 1..10
	for n := 1; n <= len(want); n++ {
		if n > 8 && testing.Short() {
			break
		}
		got := compileCount(t, queensCNF(n))
		if got.Cmp(big.NewInt(want[n-1])) != 0 {
			t.Errorf("%d queens: %v solutions, want %d", n, got, want[n-1])
		}
	}
}

// TestCycleColourings checks the number of proper k-colourings of the cycle
// C_n against its chromatic polynomial (k−1)^n + (−1)^n (k−1).
func TestCycleColourings(t *testing.T) {
	for k := 2; k <= 4; k++ {
		for n := 3; n <= 12; n++ {
			want := new(big.Int).Exp(big.NewInt(int64(k-1)), big.NewInt(int64(n)), nil)
			if n%2 == 0 {
				want.Add(want, big.NewInt(int64(k-1)))
			} else {
				want.Sub(want, big.NewInt(int64(k-1)))
			}
			got := compileCount(t, cycleColouringCNF(n, k))
			if got.Cmp(want) != 0 {
				t.Errorf("C_%d with %d colours: %v colourings, want %v", n, k, got, want)
			}
		}
	}
}

// TestGridLinear checks that on k×n grid formulas, whose primal graphs have
// width O(k), the circuit grows linearly in n: adding ten columns adds about
// the same number of nodes each time (the behaviour bounded-width
// compilation promises; the 10% slack is a rule of thumb, no source).
func TestGridLinear(t *testing.T) {
	for _, k := range []int{2, 3} {
		size := func(n int) int {
			c, _, err := Compile(context.Background(), gridCNF(k, n), Options{})
			if err != nil {
				t.Fatal(err)
			}
			return c.NumNodes()
		}
		a, b, c := size(10), size(20), size(30)
		if d1, d2 := b-a, c-b; float64(d2) > 1.1*float64(d1) {
			t.Errorf("%d×10, %d×20, %d×30: %d, %d, %d nodes; more than linear growth", k, k, k, a, b, c)
		}
	}
}
