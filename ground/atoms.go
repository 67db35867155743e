package ground

import "sort"

// The grounder's own atom store: atoms are interned in flat slices with an
// open-addressing hash table, and every predicate has a relation listing
// its possible atoms in the order they were derived, with hash indexes on
// the argument positions that rule bodies look up.

// predicate is a predicate name/arity known to the grounder.
type predicate struct {
	name  string
	arity int
	aux   bool
	rel   relation
}

// atom state bits.
const (
	stPossible uint8 = 1 << iota // derived in the over-approximation
	stCertain                    // true in every stable model
)

// atomTable interns ground atoms (predicate, arguments). Each atom has a
// record [predicate, atom, arguments...] in args, so that a lookup touches
// the hash slot and one record.
type atomTable struct {
	pred   []int32 // predicate of each atom
	off    []int32 // start of each atom's arguments in args
	args   []Term  // the records
	state  []uint8
	relPos []int32  // position in its predicate's relation, or -1
	slots  []uint64 // hash table: high 32 bits of the hash, then record start+1; 0 = empty
	count  int
}

func hashArgs(pred int32, args []Term) uint64 {
	h := uint64(pred)*0x9E3779B97F4A7C15 + 0x632BE59BD9B4E019
	for _, a := range args {
		h ^= uint64(uint32(a))
		h *= 0xBF58476D1CE4E5B9
		h ^= h >> 29
	}
	return h
}

// argsOf returns the arguments of atom a (not to be modified).
func (t *atomTable) argsOf(a int32, arity int) []Term {
	o := t.off[a]
	return t.args[o : o+int32(arity)]
}

// find returns the slot of pred(args) (empty when absent) and its hash tag.
func (t *atomTable) find(pred int32, args []Term) (uint64, uint64) {
	mask := uint64(len(t.slots) - 1)
	h := hashArgs(pred, args)
	tag := h &^ 0xFFFFFFFF
	for i := h & mask; ; i = (i + 1) & mask {
		s := t.slots[i]
		if s == 0 {
			return i, tag
		}
		if s&^0xFFFFFFFF != tag {
			continue
		}
		rec := t.args[int32(s)-1:]
		if rec[0] != Term(pred) {
			continue
		}
		ok := true
		for j, x := range args {
			if rec[2+j] != x {
				ok = false
				break
			}
		}
		if ok {
			return i, tag
		}
	}
}

// lookup returns the atom pred(args) and whether it exists.
func (t *atomTable) lookup(pred int32, args []Term) (int32, bool) {
	if len(t.slots) == 0 {
		return -1, false
	}
	i, _ := t.find(pred, args)
	if s := t.slots[i]; s != 0 {
		return int32(t.args[int32(s)]), true
	}
	return -1, false
}

// intern returns the atom pred(args), adding it when new.
func (t *atomTable) intern(pred int32, args []Term) int32 {
	if 2*(t.count+1) > len(t.slots) {
		t.grow()
	}
	i, tag := t.find(pred, args)
	if s := t.slots[i]; s != 0 {
		return int32(t.args[int32(s)])
	}
	a := int32(len(t.pred))
	rs := int32(len(t.args))
	t.pred = append(t.pred, pred)
	t.off = append(t.off, rs+2)
	t.args = append(t.args, Term(pred), Term(a))
	t.args = append(t.args, args...)
	t.state = append(t.state, 0)
	t.relPos = append(t.relPos, -1)
	t.slots[i] = tag | uint64(rs+1)
	t.count++
	return a
}

func (t *atomTable) grow() {
	n := 2 * len(t.slots)
	if n < 1024 {
		n = 1024
	}
	old := t.slots
	t.slots = make([]uint64, n)
	mask := uint64(n - 1)
	for _, s := range old {
		if s == 0 {
			continue
		}
		rs := int32(s) - 1
		a := int32(t.args[rs+1])
		end := int32(len(t.args))
		if int(a)+1 < len(t.off) {
			end = t.off[a+1] - 2
		}
		i := hashArgs(t.pred[a], t.args[rs+2:end]) & mask
		for t.slots[i] != 0 {
			i = (i + 1) & mask
		}
		t.slots[i] = s
	}
}

// relation lists the possible atoms of one predicate in derivation order.
// Semi-naive evaluation reads three ranges of it: old atoms [0, deltaStart),
// the delta [deltaStart, deltaEnd), and atoms newer than the current round,
// [deltaEnd, len(atoms)), which the current round does not see.
type relation struct {
	atoms      []int32
	deltaStart int
	deltaEnd   int
	indexes    []*index
}

// index maps the hash of the arguments at some positions to the relation
// positions of the atoms with those arguments, in increasing order. Hash
// collisions are harmless: candidates are matched in full.
type index struct {
	positions []int
	m         map[uint64][]int32
}

func hashPositions(args []Term, positions []int) uint64 {
	h := uint64(0x243F6A8885A308D3)
	for _, p := range positions {
		h ^= uint64(uint32(args[p]))
		h *= 0xBF58476D1CE4E5B9
		h ^= h >> 29
	}
	return h
}

// getIndex returns the relation's index on positions, creating it.
func (r *relation) getIndex(positions []int) *index {
	for _, ix := range r.indexes {
		if equalInts(ix.positions, positions) {
			return ix
		}
	}
	ix := &index{positions: positions, m: make(map[uint64][]int32)}
	r.indexes = append(r.indexes, ix)
	return ix
}

func equalInts(a, b []int) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// add appends atom a, whose arguments are args, to the relation.
func (r *relation) add(a int32, args []Term) int32 {
	pos := int32(len(r.atoms))
	r.atoms = append(r.atoms, a)
	for _, ix := range r.indexes {
		h := hashPositions(args, ix.positions)
		ix.m[h] = append(ix.m[h], pos)
	}
	return pos
}

// advance starts a new round: the atoms added during the last round become
// the delta. It reports whether the delta is non-empty.
func (r *relation) advance() bool {
	r.deltaStart = r.deltaEnd
	r.deltaEnd = len(r.atoms)
	return r.deltaStart < r.deltaEnd
}

// bounds returns the range of relation positions a literal reads.
func (r *relation) bounds(rk rangeKind) (int, int) {
	switch rk {
	case rangeOld:
		return 0, r.deltaStart
	case rangeDelta:
		return r.deltaStart, r.deltaEnd
	case rangeNew:
		return 0, r.deltaEnd
	}
	return 0, len(r.atoms)
}

// rangeKind selects which part of a relation a body literal reads.
type rangeKind uint8

const (
	rangeOld   rangeKind = iota // atoms older than the delta
	rangeDelta                  // the delta
	rangeNew                    // old atoms and the delta
	rangeAll                    // every atom (after the fixpoint)
)

// from returns the postings at or after position lo.
func from(list []int32, lo int) []int32 {
	if lo == 0 {
		return list
	}
	i := sort.Search(len(list), func(i int) bool { return int(list[i]) >= lo })
	return list[i:]
}

// chunkBits sets the size of a stream chunk: 1<<chunkBits integers.
const chunkBits = 20

// stream stores the ground instances as records of integers in chunks of
// fixed size, so that growing it never copies what is there. A record never
// straddles two chunks; its offset is chunk<<chunkBits + position.
type stream struct {
	chunks [][]int32
}

// tail returns the last chunk, with room for n more integers, and the
// offset its next record will have.
func (s *stream) tail(n int) (*[]int32, int32) {
	k := len(s.chunks) - 1
	if k < 0 || len(s.chunks[k])+n > cap(s.chunks[k]) {
		size := 1 << chunkBits
		if n > size {
			size = n
		}
		if k < 0 {
			size = 1024 // small programs need no megabytes
		} else if c := 2 * cap(s.chunks[k]); c < size && c >= n {
			size = c
		}
		s.chunks = append(s.chunks, make([]int32, 0, size))
		k++
	}
	return &s.chunks[k], int32(k<<chunkBits | len(s.chunks[k]))
}

// at returns the record at offset off (and what follows it in its chunk).
func (s *stream) at(off int32) []int32 {
	return s.chunks[off>>chunkBits][off&(1<<chunkBits-1):]
}

// each calls f with the offset and content of every record, in order.
func (s *stream) each(f func(off int32, rec []int32)) {
	for k, c := range s.chunks {
		for i := 0; i < len(c); {
			npos, nneg, nagg := unpack(c[i+2])
			n := 4 + npos + nneg + nagg
			f(int32(k<<chunkBits|i), c[i:i+n])
			i += n
		}
	}
}

// size returns the number of integers stored.
func (s *stream) size() int {
	n := 0
	for _, c := range s.chunks {
		n += len(c)
	}
	return n
}
