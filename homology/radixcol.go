// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"math/bits"
	"runtime/debug"
)

// radixColumn is a working column of packed entries (the words of
// keyHeap) kept as a radix heap: a priority queue for keys that never
// fall below the last one taken out, which is how a column is reduced
// (every coboundary added has the current pivot as its least entry).
// Bucket b holds the entries whose simplex key first differs from the
// last one taken out (last) in bit b−1, bucket 0 those equal to it. A
// push appends to its bucket; taking out the least entry of a column
// whose bucket 0 is empty redistributes only the lowest non-empty
// bucket, into lower buckets. An entry thus moves at most once per bit,
// and the entries far above the pivots, most of them in a column of
// millions, are never touched again, where a binary or 4-ary heap sifts
// through about twenty cache misses for every entry it takes out.
//
// Entries below last (from added columns whose smaller entries cancel
// among themselves) go to low, an ordinary heap below all buckets.
type radixColumn struct {
	f      keyHeap // the word layout
	last   uint64  // simplex key (word >> f.cb) of the last entry taken out
	bucket [65][]uint64
	low    keyHeap
	count  int // entries in the buckets
}

func newRadixColumn(f keyHeap) *radixColumn {
	c := &radixColumn{f: f}
	c.low = f
	c.low.a = nil
	return c
}

func (c *radixColumn) reset() {
	for b := range c.bucket {
		c.bucket[b] = c.bucket[b][:0]
	}
	c.low.reset()
	c.last = 0
	c.count = 0
}

// size is the capacity in entries, for memory checks.
func (c *radixColumn) size() int {
	n := cap(c.low.a)
	for _, b := range c.bucket {
		n += cap(b)
	}
	return n
}

func (c *radixColumn) push(x uint64) {
	s := x >> c.f.cb
	if s < c.last {
		c.low.push(x)
		return
	}
	b := bits.Len64(s ^ c.last)
	if len(c.bucket[b]) == cap(c.bucket[b]) {
		c.grow(b)
	}
	c.bucket[b] = append(c.bucket[b], x)
	c.count++
}

// grow makes room in bucket b by keyHeap.grow: it doubles the capacity,
// and compacts a large bucket in which many entries repeat a simplex
// instead (the order within a bucket does not matter).
func (c *radixColumn) grow(b int) {
	h := c.f
	h.a = c.bucket[b]
	n := len(h.a)
	h.grow()
	c.count -= n - len(h.a)
	c.bucket[b] = h.a
}

// take removes and returns the least entry (by simplex; any of equal
// ones), and false when the column is empty.
func (c *radixColumn) take() (uint64, bool) {
	if len(c.low.a) > 0 {
		return c.low.pop(), true
	}
	if c.count == 0 {
		return 0, false
	}
	if len(c.bucket[0]) == 0 {
		b := 1
		for len(c.bucket[b]) == 0 {
			b++
		}
		a := c.bucket[b]
		m := a[0] >> c.f.cb
		for _, x := range a[1:] {
			m = min(m, x>>c.f.cb)
		}
		c.last = m
		// Count first, so that each bucket grows at most once, to the
		// size it needs and a quarter more.
		var cnt [65]int
		for _, x := range a {
			cnt[bits.Len64(x>>c.f.cb^m)]++
		}
		for nb := 0; nb < b; nb++ {
			if d := c.bucket[nb]; cnt[nb] > 0 && len(d)+cnt[nb] > cap(d) {
				need := len(d) + cnt[nb]
				n := make([]uint64, len(d), need+need/4)
				copy(n, d)
				c.bucket[nb] = n
			}
		}
		for _, x := range a {
			nb := bits.Len64(x>>c.f.cb ^ m)
			c.bucket[nb] = append(c.bucket[nb], x)
		}
		switch {
		case cap(a) >= minCompact:
			// Return a big array now rather than at the next collection,
			// as grow does: this lowers the peak resident memory.
			c.bucket[b] = nil
			debug.FreeOSMemory()
		case cap(a) >= 1<<16:
			c.bucket[b] = nil // large arrays are rarely needed again
		default:
			c.bucket[b] = a[:0]
		}
	}
	a := c.bucket[0]
	x := a[len(a)-1]
	c.bucket[0] = a[:len(a)-1]
	c.count--
	return x, true
}

// same reports whether the least entry left has simplex key s, the key
// of the entry just taken out.
func (c *radixColumn) same(s uint64) bool {
	if len(c.low.a) > 0 {
		return c.low.a[0]>>c.f.cb == s
	}
	return len(c.bucket[0]) > 0 && c.last == s
}

// pivot is keyHeap.pivot: the least simplex whose coefficients do not
// sum to zero, left in the column; false when the column is zero.
func (c *radixColumn) pivot() (uint64, bool) {
	p, cb := c.f.p, c.f.cb
	for {
		x, ok := c.take()
		if !ok {
			return 0, false
		}
		s := x >> cb
		k := c.f.coef(x)
		for c.same(s) {
			y, _ := c.take()
			k += c.f.coef(y)
		}
		if k %= p; k != 0 {
			x = s<<cb | uint64(k)
			c.push(x)
			return x, true
		}
	}
}
