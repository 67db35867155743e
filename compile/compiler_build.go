package compile

import (
	"bytes"
	"encoding/binary"
	"slices"
)

// The first two nodes of every dcBuilder.
const (
	dcFalse = 0
	dcTrue  = 1
)

// dcBuilder builds hash-consed circuit nodes in flat arrays: building a node
// equal to an existing one (same kind, argument and children) returns the
// existing index.
type dcBuilder struct {
	kind     []NodeKind
	arg      []int32
	start    []int32
	children []int32
	hashes   []uint64
	next     []int32 // chain of nodes in the same bucket
	buckets  []int32 // power-of-two size; -1 is empty
	litNode  []int32 // per internal literal, -1 if not built
	freeNode []int32 // per variable, -1 if not built
	max      int
	width    int // estimated width, for the node limit message
}

func (b *dcBuilder) init(nvars, max int) {
	b.max = max
	b.start = []int32{0}
	b.buckets = make([]int32, 1024)
	for i := range b.buckets {
		b.buckets[i] = -1
	}
	b.litNode = make([]int32, 2*nvars+2)
	b.freeNode = make([]int32, nvars+1)
	for i := range b.litNode {
		b.litNode[i] = -1
	}
	for i := range b.freeNode {
		b.freeNode[i] = -1
	}
	b.push(FalseNode, 0, nil, 0)
	b.push(TrueNode, 0, nil, 1)
}

func (b *dcBuilder) len() int { return len(b.kind) }

func dcMix(h, x uint64) uint64 {
	h ^= x
	h *= 0x9e3779b97f4a7c15
	return h ^ h>>29
}

func dcNodeHash(k NodeKind, arg int32, kids []int32) uint64 {
	h := dcMix(uint64(k)+1, uint64(uint32(arg)))
	for _, x := range kids {
		h = dcMix(h, uint64(uint32(x)))
	}
	return h
}

func (b *dcBuilder) push(k NodeKind, arg int32, kids []int32, h uint64) int32 {
	if len(b.kind) >= b.max {
		panic(dcBailout{&NodeLimitError{Limit: b.max, Width: b.width}})
	}
	id := int32(len(b.kind))
	b.kind = append(b.kind, k)
	b.arg = append(b.arg, arg)
	b.children = append(b.children, kids...)
	b.start = append(b.start, int32(len(b.children)))
	b.hashes = append(b.hashes, h)
	if len(b.kind) > len(b.buckets) {
		b.rehash()
	} else {
		i := h & uint64(len(b.buckets)-1)
		b.next = append(b.next, b.buckets[i])
		b.buckets[i] = id
	}
	return id
}

func (b *dcBuilder) rehash() {
	n := len(b.buckets) * 2
	for n < len(b.kind) {
		n *= 2
	}
	b.buckets = make([]int32, n)
	for i := range b.buckets {
		b.buckets[i] = -1
	}
	b.next = b.next[:0]
	for id, h := range b.hashes {
		i := h & uint64(n-1)
		b.next = append(b.next, b.buckets[i])
		b.buckets[i] = int32(id)
	}
}

// node returns the node (k, arg, kids), building it if it is new.
func (b *dcBuilder) node(k NodeKind, arg int32, kids []int32) int32 {
	h := dcNodeHash(k, arg, kids)
	for id := b.buckets[h&uint64(len(b.buckets)-1)]; id >= 0; id = b.next[id] {
		if b.hashes[id] == h && b.kind[id] == k && b.arg[id] == arg &&
			slices.Equal(b.children[b.start[id]:b.start[id+1]], kids) {
			return id
		}
	}
	return b.push(k, arg, kids, h)
}

// lit returns the LitNode of an internal literal.
func (b *dcBuilder) lit(l uint32) int32 {
	if n := b.litNode[l]; n >= 0 {
		return n
	}
	v := int32(l >> 1)
	if l&1 != 0 {
		v = -v
	}
	n := b.node(LitNode, v, nil)
	b.litNode[l] = n
	return n
}

// free returns the FreeNode of variable v.
func (b *dcBuilder) free(v int32) int32 {
	if n := b.freeNode[v]; n >= 0 {
		return n
	}
	n := b.node(FreeNode, v, nil)
	b.freeNode[v] = n
	return n
}

// and returns the conjunction of kids, which it may reorder.
func (b *dcBuilder) and(kids []int32) int32 {
	slices.Sort(kids)
	if len(kids) > 0 && kids[0] == dcFalse {
		return dcFalse
	}
	for len(kids) > 0 && kids[0] == dcTrue {
		kids = kids[1:]
	}
	switch len(kids) {
	case 0:
		return dcTrue
	case 1:
		return kids[0]
	}
	return b.node(AndNode, 0, kids)
}

// or returns the disjunction of the branches of a decision on x; kids hold
// no FalseNode.
func (b *dcBuilder) or(x int32, kids []int32) int32 {
	switch len(kids) {
	case 0:
		return dcFalse
	case 1:
		return kids[0]
	}
	return b.node(OrNode, x, kids)
}

// circuit returns the nodes reachable from root, renumbered in the same
// order, as a Circuit over nvars variables.
func (b *dcBuilder) circuit(nvars int, root int32) *Circuit {
	reach := make([]bool, len(b.kind))
	reach[root] = true
	for i := root; i >= 0; i-- {
		if reach[i] {
			for _, k := range b.children[b.start[i]:b.start[i+1]] {
				reach[k] = true
			}
		}
	}
	newID := make([]int32, len(b.kind))
	c := &Circuit{NumVars: nvars, Start: []int32{0}}
	for i := int32(0); i <= root; i++ {
		if !reach[i] {
			continue
		}
		newID[i] = int32(len(c.Kind))
		c.Kind = append(c.Kind, b.kind[i])
		c.Arg = append(c.Arg, b.arg[i])
		for _, k := range b.children[b.start[i]:b.start[i+1]] {
			c.Children = append(c.Children, newID[k])
		}
		c.Start = append(c.Start, int32(len(c.Children)))
	}
	c.Root = newID[root]
	return c
}

// dcCache is the component cache: it maps a component, given by its sorted
// variables and the sorted open clauses that lost a literal, to its node.
// Keys are stored in full (as delta-encoded varints), so a hash collision
// can never return a wrong node. Entries are kept in insertion order so
// that the latest ones can be dropped.
type dcCache struct {
	entries []dcEntry
	keys    []byte
	buckets []int32
	buf     []byte // the key being looked up
	base    int    // number of entries stored before entries[0]
	limit   int    // bytes of keys; past it the cache is emptied
}

type dcEntry struct {
	hash uint64
	key  int // start of the key in keys
	size int32
	node int32
	next int32
}

func (t *dcCache) init(limit int) {
	t.limit = limit
	t.buckets = make([]int32, 1024)
	for i := range t.buckets {
		t.buckets[i] = -1
	}
}

// reset empties the cache.
func (t *dcCache) reset() {
	t.base += len(t.entries)
	t.entries = t.entries[:0]
	t.keys = t.keys[:0]
	for i := range t.buckets {
		t.buckets[i] = -1
	}
}

// encode writes the key of a component into t.buf and returns its hash.
func (t *dcCache) encode(vars, cls []int32) uint64 {
	b := binary.AppendUvarint(t.buf[:0], uint64(len(vars)))
	prev := int32(0)
	for _, v := range vars {
		b = binary.AppendUvarint(b, uint64(v-prev))
		prev = v
	}
	prev = -1
	for _, c := range cls {
		b = binary.AppendUvarint(b, uint64(c-prev))
		prev = c
	}
	t.buf = b
	h := uint64(len(b))
	for len(b) >= 8 {
		h = dcMix(h, binary.LittleEndian.Uint64(b))
		b = b[8:]
	}
	var last uint64
	for i, x := range b {
		last |= uint64(x) << (8 * i)
	}
	return dcMix(h, last)
}

// lookup finds the key in t.buf.
func (t *dcCache) lookup(h uint64) (int32, bool) {
	for e := t.buckets[h&uint64(len(t.buckets)-1)]; e >= 0; e = t.entries[e].next {
		x := &t.entries[e]
		if x.hash == h && int(x.size) == len(t.buf) && bytes.Equal(t.keys[x.key:x.key+len(t.buf)], t.buf) {
			return x.node, true
		}
	}
	return 0, false
}

// store maps the key in t.buf to node.
func (t *dcCache) store(h uint64, node int32) {
	if len(t.keys)+len(t.buf) > t.limit {
		t.reset()
	}
	id := int32(len(t.entries))
	t.entries = append(t.entries, dcEntry{hash: h, key: len(t.keys), size: int32(len(t.buf)), node: node})
	t.keys = append(t.keys, t.buf...)
	if len(t.entries) > len(t.buckets) {
		n := len(t.buckets) * 2
		t.buckets = make([]int32, n)
		for i := range t.buckets {
			t.buckets[i] = -1
		}
		for i := range t.entries {
			b := t.entries[i].hash & uint64(n-1)
			t.entries[i].next = t.buckets[b]
			t.buckets[b] = int32(i)
		}
		return
	}
	b := h & uint64(len(t.buckets)-1)
	t.entries[id].next = t.buckets[b]
	t.buckets[b] = id
}

// mark returns the number of entries stored so far, for truncate.
func (t *dcCache) mark() int { return t.base + len(t.entries) }

// truncate drops the entries stored since mark.
func (t *dcCache) truncate(mark int) {
	mark = max(mark-t.base, 0)
	for i := len(t.entries) - 1; i >= mark; i-- {
		b := t.entries[i].hash & uint64(len(t.buckets)-1)
		t.buckets[b] = t.entries[i].next // entry i heads its chain
	}
	if mark < len(t.entries) {
		t.keys = t.keys[:t.entries[mark].key]
		t.entries = t.entries[:mark]
	}
}
