// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

// before reports whether x comes before y in the filtration: smaller
// diameter, then (reverse colexicographic refinement) larger index.
// The pivot of a coboundary column is its earliest entry.
func before(x, y *entry) bool {
	return x.db < y.db || (x.db == y.db && x.k > y.k)
}

// entryHeap is a 4-ary min-heap (shallower than a binary heap, so fewer cache misses) of entries ordered by before. It is
// written out by hand, without container/heap, so that the comparison
// inlines.
type entryHeap struct {
	a []entry
}

func (h *entryHeap) reset() { h.a = h.a[:0] }

func (h *entryHeap) push(x entry) {
	if len(h.a) == cap(h.a) {
		h.grow()
	}
	h.a = append(h.a, x)
	a := h.a
	i := len(a) - 1
	for i > 0 {
		p := (i - 1) / 4
		if !before(&x, &a[p]) {
			break
		}
		a[i] = a[p]
		i = p
	}
	a[i] = x
}

// grow doubles the capacity. append grows large slices by only 1.25×,
// which for a working coboundary of many millions of entries spends
// more time copying than sifting (and, measured, peaks higher in memory
// than doubling because more dead copies await collection).
func (h *entryHeap) grow() {
	a := make([]entry, len(h.a), max(2*cap(h.a), 1024))
	copy(a, h.a)
	h.a = a
}

// heapify restores the heap order after entries were appended to h.a.
func (h *entryHeap) heapify() {
	if len(h.a) < 2 {
		return
	}
	for i := (len(h.a) - 2) / 4; i >= 0; i-- {
		h.down(i)
	}
}

func (h *entryHeap) down(i int) {
	a := h.a
	n := len(a)
	x := a[i]
	for {
		c := 4*i + 1
		if c >= n {
			break
		}
		end := min(c+4, n)
		for j := c + 1; j < end; j++ {
			if before(&a[j], &a[c]) {
				c = j
			}
		}
		if !before(&a[c], &x) {
			break
		}
		a[i] = a[c]
		i = c
	}
	a[i] = x
}

func (h *entryHeap) pop() entry {
	a := h.a
	top := a[0]
	last := len(a) - 1
	a[0] = a[last]
	h.a = a[:last]
	if last > 0 {
		h.down(0)
	}
	return top
}

// pivot removes entries whose coefficients sum to zero mod p from the top
// and returns the earliest remaining entry, with its summed coefficient,
// leaving it on the heap.
func (h *entryHeap) pivot(p int64) (entry, bool) {
	for len(h.a) > 0 {
		top := h.a[0]
		h.pop()
		c := top.coef()
		for len(h.a) > 0 && h.a[0].k>>coefBits == top.k>>coefBits {
			c += h.a[0].coef()
			h.pop()
		}
		c %= p
		if c != 0 {
			top.k = top.k&^(1<<coefBits-1) | uint64(c)
			h.push(top)
			return top, true
		}
	}
	return entry{}, false
}
