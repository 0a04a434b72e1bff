// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"math/bits"
	"runtime/debug"
	"slices"
)

// keyHeap is a 4-ary min-heap of working-column entries packed in one
// word each. It also defines that word for radixColumn, the working
// column of the reduction, which keeps a keyHeap for its entries below
// the last pivot. The word, used when it fits, holds the filtration rank
// of the diameter (its position among the sorted distinct edge
// lengths), then the complement of the simplex index, then the
// coefficient:
//
//	rank<<(ib+cb) | (idxMax−index)<<cb | coefficient
//
// The filtration order (diameter, then decreasing index) is then the
// order of the words, so a comparison is one integer compare and an
// entry takes 8 bytes instead of 16.
type keyHeap struct {
	a      []uint64
	p      int64
	cb     uint   // coefficient bits
	ib     uint   // index bits
	idxMax uint64 // 1<<ib − 1
}

// newKeyHeap returns a keyHeap for coefficients mod p, simplex indices
// below maxIndex and ranks below ranks, and whether they fit in a word.
func newKeyHeap(p int64, maxIndex int64, ranks int) (keyHeap, bool) {
	cb := uint(bits.Len64(uint64(p - 1)))
	ib := uint(bits.Len64(uint64(maxIndex)))
	rb := uint(bits.Len64(uint64(ranks)))
	h := keyHeap{p: p, cb: cb, ib: ib, idxMax: 1<<ib - 1}
	return h, cb+ib+rb <= 64
}

func (h *keyHeap) key(rank uint32, i, c int64) uint64 {
	return uint64(rank)<<(h.ib+h.cb) | (h.idxMax-uint64(i))<<h.cb | uint64(c)
}

// simplexKey drops the coefficient.
func (h *keyHeap) simplexKey(x uint64) uint64 { return x >> h.cb }

func (h *keyHeap) rank(x uint64) uint32 { return uint32(x >> (h.ib + h.cb)) }
func (h *keyHeap) idx(x uint64) int64   { return int64(h.idxMax - (x>>h.cb)&h.idxMax) }
func (h *keyHeap) coef(x uint64) int64  { return int64(x & (1<<h.cb - 1)) }

func (h *keyHeap) reset() { h.a = h.a[:0] }

func (h *keyHeap) push(x uint64) {
	if len(h.a) == cap(h.a) {
		h.grow()
	}
	h.a = append(h.a, x)
	a := h.a
	i := len(a) - 1
	for i > 0 {
		p := (i - 1) / 4
		if x >= a[p] {
			break
		}
		a[i] = a[p]
		i = p
	}
	a[i] = x
}

// grow doubles the capacity, compacting first under the rule of
// entryHeap.grow (the same byte size: minCompact 16-byte entries).
func (h *keyHeap) grow() {
	if cap(h.a) >= 2*minCompact && worthCompacting(h.a, h.simplexKey) {
		h.compact()
		if 2*len(h.a) <= cap(h.a) {
			return
		}
	}
	a := make([]uint64, len(h.a), max(2*cap(h.a), 2048))
	copy(a, h.a)
	big := cap(h.a) >= 2*minCompact
	h.a = a
	if big {
		debug.FreeOSMemory()
	}
}

func (h *keyHeap) down(i int) {
	a := h.a
	n := len(a)
	x := a[i]
	for {
		c := 4*i + 1
		if c >= n {
			break
		}
		end := min(c+4, n)
		m := a[c]
		for j := c + 1; j < end; j++ {
			if a[j] < m {
				c, m = j, a[j]
			}
		}
		if m >= x {
			break
		}
		a[i] = m
		i = c
	}
	a[i] = x
}

func (h *keyHeap) pop() uint64 {
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

// pivot is entryHeap.pivot for packed entries.
func (h *keyHeap) pivot() (uint64, bool) {
	p := h.p
	for len(h.a) > 0 {
		top := h.pop()
		s := top >> h.cb
		c := h.coef(top)
		for len(h.a) > 0 && h.a[0]>>h.cb == s {
			c += h.coef(h.a[0])
			h.pop()
		}
		c %= p
		if c != 0 {
			top = s<<h.cb | uint64(c)
			h.push(top)
			return top, true
		}
	}
	return 0, false
}

// compact is entryHeap.compact for packed entries.
func (h *keyHeap) compact() {
	a := h.a
	slices.Sort(a)
	out := a[:0]
	for i := 0; i < len(a); {
		s := a[i] >> h.cb
		c := int64(0)
		j := i
		for j < len(a) && a[j]>>h.cb == s {
			c += h.coef(a[j])
			j++
		}
		if c %= h.p; c != 0 {
			out = append(out, s<<h.cb|uint64(c))
		}
		i = j
	}
	h.a = out
}
