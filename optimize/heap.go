package optimize

// The priority queues of this package are binary heaps kept in plain
// slices; before(a, b) reports whether a leaves the heap before b.

// heapUp restores the order of h after an element was appended to it.
func heapUp[T any](h []T, before func(a, b T) bool) {
	i := len(h) - 1
	for i > 0 {
		p := (i - 1) / 2
		if !before(h[i], h[p]) {
			break
		}
		h[i], h[p] = h[p], h[i]
		i = p
	}
}

// heapDown restores the order of h below position i.
func heapDown[T any](h []T, i int, before func(a, b T) bool) {
	for {
		l := 2*i + 1
		if l >= len(h) {
			break
		}
		m := l
		if r := l + 1; r < len(h) && before(h[r], h[l]) {
			m = r
		}
		if !before(h[m], h[i]) {
			break
		}
		h[i], h[m] = h[m], h[i]
		i = m
	}
}

// heapPop removes the first element of the non-empty heap h and returns it
// with the shortened heap.
func heapPop[T any](h []T, before func(a, b T) bool) (T, []T) {
	top := h[0]
	last := len(h) - 1
	h[0] = h[last]
	h = h[:last]
	heapDown(h, 0, before)
	return top, h
}
