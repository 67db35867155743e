package main

import (
	"fmt"
	"math/big"
	"math/rand/v2"
	"strings"
)

// instance is one generated model.
type instance struct {
	Family string // family key, see families
	Name   string // instance name within the family, such as "3×20"
	Size   int    // the family's size parameter (n, options, services)
	Src    []byte // the model as rule-language source

	// Published is the count of valid configurations a published source
	// gives for this instance (nil when there is none), and Source names it.
	Published *big.Int
	Source    string

	// Knap is the instance as a pseudo-Boolean problem, for the gophersat
	// baseline; nil outside the bundle family.
	Knap *bundle
}

// family describes one benchmark family.
type family struct {
	Key   string // short identifier, used in the table and the plot
	Title string // one line for the table
	// Sizes lists the size parameters of the quick and of the full run.
	Quick, Full []int
	// Make generates the instance of the given size from r.
	Make func(r *rand.Rand, size int) instance
}

// families returns the benchmark families in table order.
func families() []family {
	return []family{
		{Key: "grid2", Title: "network build-out, 2×n grid", Quick: []int{2, 8, 32}, Full: []int{2, 8, 32, 64, 128},
			Make: func(r *rand.Rand, n int) instance { return gridNetwork(r, 2, n) }},
		{Key: "grid3", Title: "network build-out, 3×n grid", Quick: []int{2, 5, 10, 20, 40}, Full: []int{2, 5, 10, 20, 50, 100, 150, 200},
			Make: func(r *rand.Rand, n int) instance { return gridNetwork(r, 3, n) }},
		{Key: "grid4", Title: "network build-out, 4×n grid", Quick: []int{2, 4, 8}, Full: []int{2, 4, 8, 16, 32},
			Make: func(r *rand.Rand, n int) instance { return gridNetwork(r, 4, n) }},
		{Key: "sparse", Title: "network build-out, random sparse network (n rooms)", Quick: []int{8, 16, 32}, Full: []int{8, 16, 32, 64, 128},
			Make: sparseNetwork},
		{Key: "bundle", Title: "product bundle (n options; power, weight, budget sums)", Quick: []int{20, 30, 50}, Full: []int{20, 30, 50, 100, 200, 500, 1000, 2000},
			Make: productBundle},
		{Key: "services", Title: "service stack with cyclic needs (n services)", Quick: []int{12, 50, 100, 200}, Full: []int{12, 50, 100, 200, 500, 1000, 2000, 5000},
			Make: serviceStack},
		{Key: "domino2", Title: "domino tilings of a 2×n board", Quick: []int{2, 10, 40}, Full: []int{2, 10, 40, 80},
			Make: func(_ *rand.Rand, n int) instance { return domino("domino2", 2, n) }},
		{Key: "domino", Title: "domino tilings of a 2m×2m board", Quick: []int{1, 2, 3}, Full: []int{1, 2, 3, 4},
			Make: func(_ *rand.Rand, m int) instance { return domino("domino", 2*m, 2*m) }},
		{Key: "queens", Title: "n queens", Quick: []int{4, 6, 8}, Full: []int{4, 6, 8, 9, 10},
			Make: func(_ *rand.Rand, n int) instance { return queens(n) }},
		{Key: "connected", Title: "connected labelled graphs on n nodes", Quick: []int{1, 3, 5, 6}, Full: []int{1, 3, 5, 6, 7},
			Make: func(_ *rand.Rand, n int) instance { return connected(n) }},
	}
}

// networkRules is the shared part of the network build-out models: any
// cable run may be bought; a room is online when a bought run (used in
// either direction) links it to an online room; every room must be online;
// every bought run costs its price.
const networkRules = `
choose any of buy(A, B) for run(A, B, _).

wired(A, B) if buy(A, B).
wired(B, A) if buy(A, B).
online(R) if uplink(R).
online(B) if online(A), wired(A, B).

forbid room(R), not online(R).
penalty C if buy(A, B), run(A, B, C).

display buy/2.
`

// gridNetwork is the network build-out on a k×n grid of rooms with the
// uplink in a corner and runs of random price between neighbours.
func gridNetwork(r *rand.Rand, k, n int) instance {
	var b strings.Builder
	fmt.Fprintf(&b, "# Invented benchmark: network build-out on a %d×%d grid of rooms.\n", k, n)
	for i := 1; i <= k; i++ {
		for j := 1; j <= n; j++ {
			fmt.Fprintf(&b, "room(c(%d, %d)).\n", i, j)
		}
	}
	b.WriteString("uplink(c(1, 1)).\n")
	for i := 1; i <= k; i++ {
		for j := 1; j <= n; j++ {
			if j < n {
				fmt.Fprintf(&b, "run(c(%d, %d), c(%d, %d), %d).\n", i, j, i, j+1, 1+r.IntN(9))
			}
			if i < k {
				fmt.Fprintf(&b, "run(c(%d, %d), c(%d, %d), %d).\n", i, j, i+1, j, 1+r.IntN(9))
			}
		}
	}
	b.WriteString(networkRules)
	return instance{Family: fmt.Sprintf("grid%d", k), Name: fmt.Sprintf("%d×%d", k, n), Size: n, Src: []byte(b.String())}
}

// sparseNetwork is the network build-out on a random sparse network of n
// rooms: a random tree in which every room links to one of the few rooms
// before it, plus about n/3 extra runs between nearby rooms (buildings are
// wired along corridors, so the networks have small bandwidth).
func sparseNetwork(r *rand.Rand, n int) instance {
	const window = 4
	var b strings.Builder
	fmt.Fprintf(&b, "# Invented benchmark: network build-out on a random sparse network of %d rooms.\n", n)
	for i := 1; i <= n; i++ {
		fmt.Fprintf(&b, "room(r%d).\n", i)
	}
	b.WriteString("uplink(r1).\n")
	seen := make(map[[2]int]bool)
	add := func(a, c int) {
		if a > c {
			a, c = c, a
		}
		if a == c || seen[[2]int{a, c}] {
			return
		}
		seen[[2]int{a, c}] = true
		fmt.Fprintf(&b, "run(r%d, r%d, %d).\n", a, c, 1+r.IntN(9))
	}
	for i := 2; i <= n; i++ {
		add(max(1, i-1-r.IntN(window)), i)
	}
	for e := 0; e < n/3+1; e++ {
		a := 1 + r.IntN(n)
		add(a, min(n, a+1+r.IntN(window)))
	}
	b.WriteString(networkRules)
	return instance{Family: "sparse", Name: fmt.Sprintf("%d rooms", n), Size: n, Src: []byte(b.String())}
}

// bundle is a product bundle as plain data: options in slots, exactly one
// option per slot; slots in racks, each rack with a power supply and a
// weight limit; one budget over everything; the price to minimise.
type bundle struct {
	Slot                 []int // slot of each option
	Power, Weight, Price []int
	SlotsPerRack         int // slot s is in rack s / SlotsPerRack
	MaxPower, MaxWeight  int // per rack
	Budget               int
	Slots                int
}

// productBundle is a bundle of n options in slots of five; the bundle takes
// exactly one option per slot. Slots come in racks of four; the options of
// a rack must stay within the rack's power supply and weight limit, and the
// whole bundle within a budget; it costs the sum of its prices. Cheaper
// options tend to draw more power and weigh more, and the limits are set so
// that they bind.
func productBundle(r *rand.Rand, n int) instance {
	const per, perRack = 5, 4
	slots := max(1, n/per)
	k := &bundle{Slots: slots, SlotsPerRack: perRack}
	var b strings.Builder
	fmt.Fprintf(&b, "# Invented benchmark: a product bundle of %d options in %d slots.\n", slots*per, slots)
	for s := 0; s < slots; s++ {
		fmt.Fprintf(&b, "slot(s%d, k%d).\n", s+1, s/perRack+1)
	}
	for s := 0; s < slots; s++ {
		for j := 0; j < per; j++ {
			o := len(k.Slot)
			pw, wt := 1+r.IntN(4), 1+r.IntN(4)
			pr := 1 + r.IntN(2) + (8-pw-wt)/3
			k.Slot = append(k.Slot, s)
			k.Power = append(k.Power, pw)
			k.Weight = append(k.Weight, wt)
			k.Price = append(k.Price, pr)
			fmt.Fprintf(&b, "option(s%d, o%d, %d, %d, %d).\n", s+1, o+1, pw, wt, pr)
		}
	}
	k.MaxPower = perRack*5/2 + 1
	k.MaxWeight = perRack*5/2 + 1
	k.Budget = slots*5/2 + 2
	fmt.Fprintf(&b, "param max_power = %d.\nparam max_weight = %d.\nparam budget = %d.\n", k.MaxPower, k.MaxWeight, k.Budget)
	b.WriteString(`
rack(K) if slot(_, K).
choose exactly 1 of pick(O) for option(S, O, _, _, _) if slot(S, _).

forbid rack(K), sum(P, O : pick(O), option(S, O, P, _, _), slot(S, K)) > max_power.
forbid rack(K), sum(W, O : pick(O), option(S, O, _, W, _), slot(S, K)) > max_weight.
forbid sum(C, O : pick(O), option(_, O, _, _, C)) > budget.

penalty C if pick(O), option(_, O, _, _, C).

display pick/1.
`)
	return instance{Family: "bundle", Name: fmt.Sprintf("%d options", slots*per), Size: slots * per, Src: []byte(b.String()), Knap: k}
}

// serviceStack is a stack of n services, each providing one of n/2 roles
// (two alternative services per role) and needing up to two roles near its
// own, so that the needs form many cycles (the first provider of every role
// needs only roles below its own, so that there is a valid stack). A service works when it is
// chosen and every role it needs is served by a working service; this is
// positive recursion through the cycles of the needs. Every chosen service
// must work, some roles must be served, and chosen services cost their
// price.
func serviceStack(r *rand.Rand, n int) instance {
	const window = 3
	roles := max(2, n/2)
	var b strings.Builder
	fmt.Fprintf(&b, "# Invented benchmark: a stack of %d services providing %d roles.\n", n, roles)
	for s := 0; s < n; s++ {
		role := s % roles
		fmt.Fprintf(&b, "provides(v%d, r%d).\nprice(v%d, %d).\n", s+1, role+1, s+1, 1+r.IntN(9))
		// The first provider of a role needs only roles below it, so that
		// choosing every first provider works; the others need roles on
		// both sides, which closes cycles.
		first := s < roles
		near := func() int {
			for {
				q := role - window + r.IntN(2*window+1)
				if q >= 0 && q < roles && q != role && (!first || q < role) {
					return q
				}
			}
		}
		switch x := r.IntN(10); {
		case x < 2 || first && role == 0:
			fmt.Fprintf(&b, "base(v%d).\n", s+1)
		case x < 6:
			fmt.Fprintf(&b, "needs1(v%d, r%d).\n", s+1, near()+1)
		default:
			fmt.Fprintf(&b, "needs2(v%d, r%d, r%d).\n", s+1, near()+1, near()+1)
		}
	}
	for q := 0; q < roles; q += 10 {
		fmt.Fprintf(&b, "goal(r%d).\n", q+1)
	}
	b.WriteString(`
choose any of chosen(S) for provides(S, _).

works(S) if chosen(S), base(S).
works(S) if chosen(S), needs1(S, R), served(R).
works(S) if chosen(S), needs2(S, R, Q), served(R), served(Q).
served(R) if works(S), provides(S, R).

forbid chosen(S), not works(S).
forbid goal(R), not served(R).
penalty P if chosen(S), price(S, P).

display chosen/1.
`)
	return instance{Family: "services", Name: fmt.Sprintf("%d services", n), Size: n, Src: []byte(b.String())}
}

// domino counts the domino tilings of a rows×cols board: every cell is
// covered by exactly one placed domino.
func domino(fam string, rows, cols int) instance {
	var b strings.Builder
	fmt.Fprintf(&b, "# Domino tilings of a %d×%d board.\n", rows, cols)
	fmt.Fprintf(&b, "cell(1..%d, 1..%d).\n", rows, cols)
	b.WriteString(`
dom(I, J, I, J + 1) if cell(I, J), cell(I, J + 1).
dom(I, J, I + 1, J) if cell(I, J), cell(I + 1, J).
covers(A, B, C, D, A, B) if dom(A, B, C, D).
covers(A, B, C, D, C, D) if dom(A, B, C, D).
choose exactly 1 of place(A, B, C, D) for covers(A, B, C, D, I, J) if cell(I, J).

display place/4.
`)
	in := instance{Family: fam, Name: fmt.Sprintf("%d×%d", rows, cols), Src: []byte(b.String())}
	if fam == "domino2" {
		in.Size = cols
		// The 2×n board has Fibonacci(n+1) tilings (OEIS A000045).
		in.Published, in.Source = fibonacci(cols+1), "OEIS A000045"
	} else {
		in.Size = rows
		// Tilings of the 2m×2m board, OEIS A004003 (8×8: Kasteleyn 1961).
		a004003 := map[int]int64{2: 2, 4: 36, 6: 6728, 8: 12988816}
		if v, ok := a004003[rows]; ok && rows == cols {
			in.Published, in.Source = big.NewInt(v), "OEIS A004003"
			if rows == 8 {
				in.Source = "Kasteleyn 1961; OEIS A004003"
			}
		}
	}
	return in
}

// fibonacci returns F(n) with F(1) = F(2) = 1.
func fibonacci(n int) *big.Int {
	a, b := big.NewInt(0), big.NewInt(1)
	for i := 0; i < n; i++ {
		a.Add(a, b)
		a, b = b, a
	}
	return a
}

// queens places n non-attacking queens on an n×n board, one per row.
func queens(n int) instance {
	var b strings.Builder
	fmt.Fprintf(&b, "# %d queens.\n", n)
	fmt.Fprintf(&b, "row(1..%d).\ncol(1..%d).\n", n, n)
	b.WriteString(`
choose exactly 1 of queen(R, C) for col(C) if row(R).

forbid queen(R, C), queen(S, C), R < S.
forbid queen(R, C), queen(S, D), R < S, S - R = D - C.
forbid queen(R, C), queen(S, D), R < S, S - R = C - D.

display queen/2.
`)
	// Solutions of the n-queens problem, OEIS A000170 (n = 1..12).
	a000170 := []int64{1, 0, 0, 2, 10, 4, 40, 92, 352, 724, 2680, 14200}
	in := instance{Family: "queens", Name: fmt.Sprintf("%d queens", n), Size: n, Src: []byte(b.String())}
	if n >= 1 && n <= len(a000170) {
		in.Published, in.Source = big.NewInt(a000170[n-1]), "OEIS A000170"
	}
	return in
}

// connected counts the connected labelled graphs on n nodes: any set of
// edges, every node reachable from node 1 (reachability is recursive
// through the cycles of the complete graph).
func connected(n int) instance {
	var b strings.Builder
	fmt.Fprintf(&b, "# Connected labelled graphs on %d nodes.\n", n)
	fmt.Fprintf(&b, "node(1..%d).\n", n)
	b.WriteString(`
choose any of edge(X, Y) for node(X), node(Y), X < Y.

reach(1).
reach(Y) if reach(X), edge(X, Y).
reach(X) if reach(Y), edge(X, Y).

forbid node(X), not reach(X).

display edge/2.
`)
	// Connected labelled graphs on n nodes, OEIS A001187 (n = 1..7).
	a001187 := []int64{1, 1, 4, 38, 728, 26704, 1866256}
	in := instance{Family: "connected", Name: fmt.Sprintf("%d nodes", n), Size: n, Src: []byte(b.String())}
	if n >= 1 && n <= len(a001187) {
		in.Published, in.Source = big.NewInt(a001187[n-1]), "OEIS A001187"
	}
	return in
}
