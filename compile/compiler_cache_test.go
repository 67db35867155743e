package compile

import "testing"

// TestCacheTruncate checks that truncate drops exactly the entries stored
// after a mark, also when the cache was emptied in between.
func TestCacheTruncate(t *testing.T) {
	var c dcCache
	c.init(1 << 20)
	key := func(i int) ([]int32, []int32) { return []int32{int32(i), int32(i + 1)}, []int32{int32(2 * i)} }
	put := func(i int) {
		v, k := key(i)
		c.store(c.encode(v, k), int32(100+i))
	}
	has := func(i int) bool {
		v, k := key(i)
		n, ok := c.lookup(c.encode(v, k))
		if ok && n != int32(100+i) {
			t.Fatalf("entry %d maps to node %d", i, n)
		}
		return ok
	}
	for i := 0; i < 3000; i++ { // enough to grow the table
		put(i)
	}
	m := c.mark()
	for i := 3000; i < 3100; i++ {
		put(i)
	}
	c.truncate(m)
	for i := 0; i < 3100; i++ {
		if has(i) != (i < 3000) {
			t.Fatalf("after truncate: entry %d present = %v", i, has(i))
		}
	}
	// A mark taken before the cache is emptied drops every later entry.
	m = c.mark()
	put(5000)
	c.reset()
	put(5001)
	put(5002)
	m2 := c.mark()
	put(5003)
	c.truncate(m2)
	if !has(5001) || !has(5002) || has(5003) || has(5000) || has(1) {
		t.Fatalf("after reset and truncate(m2): %v %v %v %v %v", has(5001), has(5002), has(5003), has(5000), has(1))
	}
	c.truncate(m)
	if has(5001) || has(5002) {
		t.Fatal("truncate to a mark before the reset kept entries")
	}
	put(7)
	if !has(7) {
		t.Fatal("store after truncate failed")
	}
}
