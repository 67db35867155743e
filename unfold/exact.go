package unfold

// exactPathLimit bounds the number of simple paths the exhaustive search
// keeps; larger components are left to the other constructions.
const exactPathLimit = 5000

// exactBudget bounds the work (search nodes plus path advances) of one
// exhaustive search, and exactTotalBudget that of all the exhaustive
// searches of one unfolding.
const (
	exactBudget      = 1000000
	exactTotalBudget = 20000000
)

// exact searches for a sequence holding every simple path of d that beats
// incumbent: fewest largest copies first, then shortest. It returns nil when
// it finds none within its budget. The search deepens on the largest copies
// m and then on the length, and extends the sequence one vertex at a time,
// appending only vertices that some not yet embedded path needs next
// (appending another vertex embeds nothing and can be left out).
func (s *searcher) exact(d *digraph, incumbent []int32) []int32 {
	paths := simplePaths(d, s.entries(d), exactPathLimit)
	if paths == nil {
		return nil
	}
	budget := min(exactBudget, s.exactLeft)
	if budget <= 0 {
		return nil
	}
	e := &exactSearch{d: d, paths: paths, budget: budget}
	defer func() { s.exactLeft -= budget - e.budget }()
	longest := 0
	for _, p := range paths {
		longest = max(longest, len(p))
	}
	mInc := copies(d.n, incumbent)
	for m := 1; m <= mInc; m++ {
		top := m * d.n
		if m == mInc {
			top = len(incumbent) - 1
		}
		for L := max(d.n, longest); L <= top; L++ {
			if s.ctx.Err() != nil {
				return nil
			}
			e.reset(m, L)
			switch e.search(0) {
			case walkOK:
				return e.seq
			case walkGiveUp:
				return nil
			}
		}
	}
	return nil
}

// simplePaths lists every simple path of d (as vertex lists) that starts at
// a vertex marked in entry (any vertex when entry is nil), or returns nil
// when there are more than limit.
func simplePaths(d *digraph, entry []bool, limit int) [][]int32 {
	var paths [][]int32
	visited := make([]bool, d.n)
	var path []int32
	var walk func(v int32) bool
	walk = func(v int32) bool {
		if len(paths) >= limit {
			return false
		}
		paths = append(paths, append([]int32(nil), path...))
		for _, w := range d.succ(v) {
			if visited[w] {
				continue
			}
			visited[w] = true
			path = append(path, w)
			ok := walk(w)
			path = path[:len(path)-1]
			visited[w] = false
			if !ok {
				return false
			}
		}
		return true
	}
	for v := 0; v < d.n; v++ {
		if entry != nil && !entry[v] {
			continue
		}
		visited[v] = true
		path = append(path[:0], int32(v))
		ok := walk(int32(v))
		visited[v] = false
		if !ok {
			return nil
		}
	}
	return paths
}

// exactSearch is the state of the exhaustive search for fixed largest
// copies m and length L.
type exactSearch struct {
	d      *digraph
	paths  [][]int32
	budget int

	m, L     int
	seq      []int32
	count    []int     // occurrences of each vertex in seq
	progress []int32   // embedded prefix length of each path
	need     [][]int32 // paths waiting for each vertex next
	left     []int     // left[k]: paths with k vertices still to embed
	open     int       // paths not fully embedded
	rem      []int     // rem[v]: open paths with v still to embed
	needed   int       // vertices v with rem[v] > 0
}

func (e *exactSearch) reset(m, L int) {
	n := e.d.n
	e.m, e.L = m, L
	e.seq = e.seq[:0]
	e.count = make([]int, n)
	e.progress = make([]int32, len(e.paths))
	e.need = make([][]int32, n)
	e.left = make([]int, n+1)
	e.open = len(e.paths)
	e.rem = make([]int, n)
	e.needed = 0
	for i, p := range e.paths {
		e.need[p[0]] = append(e.need[p[0]], int32(i))
		e.left[len(p)]++
		for _, v := range p {
			if e.rem[v] == 0 {
				e.needed++
			}
			e.rem[v]++
		}
	}
}

// search extends e.seq at position pos.
func (e *exactSearch) search(pos int) int {
	if e.open == 0 {
		return walkOK
	}
	rest := e.L - pos
	if rest == 0 || e.needed > rest {
		return walkFail
	}
	// The longest remaining part of an open path must fit.
	for k := len(e.left) - 1; k > rest; k-- {
		if e.left[k] > 0 {
			return walkFail
		}
	}
	if e.budget == 0 {
		return walkGiveUp
	}
	e.budget--
	for v := 0; v < e.d.n; v++ {
		if e.count[v] >= e.m || len(e.need[v]) == 0 {
			continue
		}
		// Append v: advance every path waiting for it.
		waiting := e.need[v]
		if e.budget < len(waiting) {
			return walkGiveUp
		}
		e.budget -= len(waiting)
		e.need[v] = nil
		for _, i := range waiting {
			p := e.paths[i]
			k := len(p) - int(e.progress[i])
			e.left[k]--
			e.progress[i]++
			e.rem[v]--
			if e.rem[v] == 0 {
				e.needed--
			}
			if k == 1 {
				e.open--
				continue
			}
			e.left[k-1]++
			w := p[e.progress[i]]
			e.need[w] = append(e.need[w], i)
		}
		e.count[v]++
		e.seq = append(e.seq, int32(v))
		r := walkFail
		// A vertex out of copies must not be needed any more.
		if e.count[v] < e.m || e.rem[v] == 0 {
			r = e.search(pos + 1)
		}
		if r == walkOK {
			return r
		}
		// Undo, in reverse.
		e.seq = e.seq[:len(e.seq)-1]
		e.count[v]--
		for j := len(waiting) - 1; j >= 0; j-- {
			i := waiting[j]
			p := e.paths[i]
			if int(e.progress[i]) == len(p) {
				e.open++
			} else {
				w := p[e.progress[i]]
				e.need[w] = e.need[w][:len(e.need[w])-1]
				e.left[len(p)-int(e.progress[i])]--
			}
			e.progress[i]--
			e.left[len(p)-int(e.progress[i])]++
			if e.rem[v] == 0 {
				e.needed++
			}
			e.rem[v]++
		}
		e.need[v] = waiting
		if r == walkGiveUp {
			return r
		}
	}
	return walkFail
}
