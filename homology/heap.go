// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"runtime/debug"
	"slices"
)

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
	// p, when not zero, is the characteristic of the field: a full heap
	// of at least minCompact entries is then compacted before it grows.
	p int64
}

// minCompact is the smallest heap capacity compacted instead of grown:
// 64 MiB of entries. Smaller heaps are cheaper to grow than to sort.
const minCompact = 1 << 22

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
//
// A heap of at least minCompact entries in which, judged from a sample,
// a quarter or more of the entries repeat a simplex is first compacted
// (equal simplices summed, zeros dropped), and grows only if that freed
// less than half of it. A column whose additions cancel heavily (over
// Z/2 especially) then stays near its number of distinct nonzero
// entries. On the benchmark clouds checked (noisy circle, torus at
// threshold 3.0) the entries were almost all distinct and it did not run.
func (h *entryHeap) grow() {
	if h.p != 0 && cap(h.a) >= minCompact && h.worthCompacting() {
		h.compact(h.p)
		if 2*len(h.a) <= cap(h.a) {
			return
		}
	}
	a := make([]entry, len(h.a), max(2*cap(h.a), 1024))
	copy(a, h.a)
	big := cap(h.a) >= minCompact
	h.a = a
	if big {
		// Return the old array (and those of earlier growths) now rather
		// than at the next collection, which for a heap growing by big
		// arrays comes late: this lowers the peak resident memory.
		debug.FreeOSMemory()
	}
}

// add appends x without restoring the heap order (see heapify).
func (h *entryHeap) add(x entry) {
	if len(h.a) == cap(h.a) {
		h.grow()
	}
	h.a = append(h.a, x)
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

// compact sorts the entries, sums the coefficients of equal simplices
// mod p and drops those that vanish. A slice sorted by before is a
// valid heap.
func (h *entryHeap) compact(p int64) {
	a := h.a
	slices.SortFunc(a, func(x, y entry) int {
		if x.db != y.db {
			if x.db < y.db {
				return -1
			}
			return 1
		}
		// Larger index first; equal indices tie whatever the coefficient.
		xk, yk := x.k>>coefBits, y.k>>coefBits
		if xk > yk {
			return -1
		}
		if xk < yk {
			return 1
		}
		return 0
	})
	out := a[:0]
	for i := 0; i < len(a); {
		x := a[i]
		key := x.k >> coefBits
		c := x.coef()
		j := i + 1
		for j < len(a) && a[j].k>>coefBits == key {
			c += a[j].coef()
			j++
		}
		if c %= p; c != 0 {
			out = append(out, entry{x.db, key<<coefBits | uint64(c)})
		}
		i = j
	}
	h.a = out
}

// worthCompacting reports whether compacting h would remove at least a
// quarter of its entries (see worthCompacting).
func (h *entryHeap) worthCompacting() bool {
	return worthCompacting(h.a, func(x entry) uint64 { return x.k >> coefBits })
}

// worthCompacting estimates, from the multiplicities in a of the
// simplices (named by key) of a sample of its entries, whether
// compaction would remove at least a quarter of the entries. It costs
// one scan of a, far less than the sort.
func worthCompacting[T any](a []T, key func(T) uint64) bool {
	const samples = 1024
	const slots = 4 * samples
	var keys [slots]uint64 // key+1; 0 marks an empty slot
	var count [slots]int32
	step := len(a) / samples
	if step == 0 {
		return false
	}
	slot := func(k uint64) int {
		for i := hashIndex(k) & (slots - 1); ; i = (i + 1) & (slots - 1) {
			if keys[i] == k || keys[i] == 0 {
				return int(i)
			}
		}
	}
	for s := 0; s < samples; s++ {
		k := key(a[s*step]) + 1
		keys[slot(k)] = k
	}
	for i := range a {
		k := key(a[i]) + 1
		if j := slot(k); keys[j] == k {
			count[j]++
		}
	}
	// A simplex occurring m times leaves at most one entry: a uniformly
	// chosen entry survives with probability at most 1/m.
	kept := 0.0
	for s := 0; s < samples; s++ {
		kept += 1 / float64(count[slot(key(a[s*step])+1)])
	}
	return kept <= 0.75*samples
}
