// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"cmp"
	"fmt"
	"math"
	"math/bits"
	"runtime"
	"slices"
	"sync"
	"sync/atomic"
	"unsafe"

	"crease.dev/crease/internal/budget"
)

// filtrationOrder sorts simplices of one dimension in filtration order:
// by diameter, then by decreasing index.
func filtrationOrder(a, b simplex) int {
	if c := cmp.Compare(a.d, b.d); c != 0 {
		return c
	}
	return cmp.Compare(b.i, a.i)
}

// reverseOrder is the order in which cohomology columns are reduced.
func reverseOrder(a, b simplex) int { return filtrationOrder(b, a) }

// packKeys enables one-word working-column entries (keyHeap) where they
// fit; tests turn it off to check the 16-byte path.
var packKeys = true

// run computes the bars of dimensions 0..maxDim.
func (e *engine) run() ([][]Bar, error) {
	bars := make([][]Bar, e.maxDim+1)
	e.stats.Columns = make([]int64, e.maxDim+1)
	e.stats.Apparent = make([]int64, e.maxDim+1)
	e.stats.Emergent = make([]int64, e.maxDim+1)
	e.stats.Cleared = make([]int64, e.maxDim+1)
	e.stats.Edges = int64(len(e.edges))

	e.startPhase("edges", 0, int64(len(e.edges)))
	if !e.sorted {
		if err := sortFiltration(e.ctx, e.edges, false); err != nil {
			return nil, err
		}
	}
	e.makeRanks()
	// The sort's buffer and makeRanks' table of all pairs are garbage
	// now; collecting it here, rather than when the heap has doubled,
	// lets the reduction reuse their pages (the tables are free of
	// pointers, so the collection marks almost nothing): the digits at
	// the enclosing radius peaked at 129 MB without it.
	runtime.GC()
	var columns []simplex
	var err error
	bars[0], columns, err = e.dim0()
	if err != nil {
		return nil, err
	}
	simplices := e.edges
	for d := 1; d <= e.maxDim; d++ {
		pm := newPivotMap(len(columns))
		if bars[d], err = e.reduce(columns, d, pm); err != nil {
			return nil, err
		}
		if d < e.maxDim {
			columns, simplices, err = e.assemble(simplices, pm, d+1, d+1 < e.maxDim)
			if err != nil {
				return nil, err
			}
		}
	}
	for d := range bars {
		SortBars(bars[d])
	}
	return bars, nil
}

// dim0 computes the H0 bars by union–find over the edges in filtration
// order, and returns the edges that merge nothing (the columns of H1)
// in reduction order, without those in zero-persistence apparent pairs.
func (e *engine) dim0() ([]Bar, []simplex, error) {
	n := e.n
	parent := make([]int32, n)
	rank := make([]uint8, n)
	for i := range parent {
		parent[i] = int32(i)
	}
	find := func(x int32) int32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	var bars []Bar
	var columns []simplex
	if e.maxDim == 1 {
		// The edges are not listed again (assemble), so the columns,
		// a subsequence of them, are written over them: the k-th edge
		// is read before anything is written at k or beyond.
		columns = e.edges[:0]
	}
	var w [2]int32
	var ends [][2]int32 // scratch: the ends of a group of equal lengths
	wantCols := e.maxDim >= 1
	var eb *edgeBits
	if wantCols {
		eb = e.newEdgeBits()
	}
	edges := e.edges
	for g := 0; g < len(edges); {
		// The group of edges of one length: an apparent pair's triangle
		// may have any of them as its other edges.
		h := g + 1
		for h < len(edges) && edges[h].d == edges[g].d {
			h++
		}
		// The ends of the group's edges, decoded once for the bits and
		// the union–find.
		ends = ends[:0]
		for _, s := range edges[g:h] {
			e.vertices(s.i, 2, w[:])
			ends = append(ends, w)
		}
		if eb != nil {
			eb.add(eb.le, ends)
		}
		for k := g; k < h; k++ {
			s := edges[k]
			if e.work >= e.nextTick || k&0xffff == 0 {
				e.phase.Done = int64(k)
				if err := e.tick(); err != nil {
					return nil, nil, err
				}
			}
			w := ends[k-g]
			u, v := find(w[0]), find(w[1])
			if u != v {
				if s.d > 0 {
					bars = append(bars, Bar{0, s.d})
				}
				if rank[u] < rank[v] {
					u, v = v, u
				}
				parent[v] = u
				if rank[u] == rank[v] {
					rank[u]++
				}
				continue
			}
			if !wantCols {
				continue
			}
			if eb != nil && eb.apparent(w[0], w[1]) {
				e.stats.Apparent[1]++
				continue
			}
			columns = append(columns, s)
		}
		if eb != nil {
			eb.add(eb.lt, ends)
		}
		g = h
	}
	if wantCols && eb == nil {
		var err error
		n0 := len(columns)
		if columns, err = e.dropApparent(columns, 2); err != nil {
			return nil, nil, err
		}
		e.stats.Apparent[1] += int64(n0 - len(columns))
	}
	for i := range parent {
		if find(int32(i)) == int32(i) {
			bars = append(bars, Bar{0, math.Inf(1)})
		}
	}
	slices.Reverse(columns)
	if e.maxDim == 1 {
		e.edges = nil
	}
	return bars, columns, nil
}

// edgeBitsLimit bounds the memory of edgeBits (two n×n bit matrices:
// 2 MiB for 4096 points, 32 MiB for 16384).
const edgeBitsLimit = 32 << 20

// useEdgeBits lets tests turn the edgeBits path off to check the
// dropApparent path it replaces.
var useEdgeBits = true

// edgeBits finds the zero-persistence apparent pairs of edges during the
// union–find pass, which visits the edges in filtration order: le holds
// the graph of the edges of length ≤ the current one, lt of those of
// length < it, as one bit row per vertex. The zero cofacet of an edge
// {a,b} of length δ (the triangle of largest index among those of
// diameter δ) is {a,b,j} for the largest common neighbour j in le; the
// edge is its zero facet (the facet of smallest index among those of
// diameter δ) when the facets of smaller index are shorter than δ,
// which lt tells. Each test is a few word operations, where the test on
// distances (apparentAsFacet) scans a neighbour list.
type edgeBits struct {
	words  int
	le, lt []uint64
}

// newEdgeBits returns the bit rows for the engine's vertices, or nil
// when they would take more than edgeBitsLimit or a quarter of the
// budget.
func (e *engine) newEdgeBits() *edgeBits {
	if !useEdgeBits {
		return nil
	}
	words := (e.n + 63) / 64
	size := int64(e.n) * int64(words)
	if est := 2 * 8 * size; est > edgeBitsLimit || est > e.budget/4 {
		return nil
	}
	return &edgeBits{words: words, le: make([]uint64, size), lt: make([]uint64, size)}
}

// add sets in m the bits of the edges whose ends are listed.
func (b *edgeBits) add(m []uint64, ends [][2]int32) {
	for _, w := range ends {
		x, y := int(w[0]), int(w[1])
		m[x*b.words+y>>6] |= 1 << (y & 63)
		m[y*b.words+x>>6] |= 1 << (x & 63)
	}
}

// has reports whether {x,y} is an edge of m.
func (b *edgeBits) has(m []uint64, x, y int32) bool {
	return m[int(x)*b.words+int(y)>>6]>>(y&63)&1 != 0
}

// apparent reports whether the edge {a > c}, of the current length, is
// the facet of a zero-persistence apparent pair.
func (b *edgeBits) apparent(a, c int32) bool {
	ra := b.le[int(a)*b.words : int(a)*b.words+b.words]
	rc := b.le[int(c)*b.words : int(c)*b.words+b.words]
	for k := b.words - 1; k >= 0; k-- {
		x := ra[k] & rc[k]
		if x == 0 {
			continue
		}
		j := int32(k<<6 | (63 - bits.LeadingZeros64(x)))
		// The facets of {a,c,j} in increasing index: remove the largest
		// vertex, then the middle one, then the smallest.
		switch {
		case j > a: // {a,c} comes first
			return true
		case j > c: // {j,c} comes first
			return b.has(b.lt, j, c)
		default: // {c,j} and {a,j} come first
			return b.has(b.lt, c, j) && b.has(b.lt, a, j)
		}
	}
	return false
}

// reduce reduces the coboundary columns of the d-simplices in columns
// (in reduction order), records the pivots in pm and returns the bars of
// dimension d.
func (e *engine) reduce(columns []simplex, d int, pm *pivotMap) ([]Bar, error) {
	k := d + 1 // vertices of a column simplex
	p := e.p
	var bars []Bar
	it := &cofaces{e: e}
	ait := &cofaces{e: e}
	cob, red := entryHeap{p: p}, entryHeap{p: p}
	// kob replaces cob when its entries pack into one word.
	kf, packed := newKeyHeap(p, e.binom[k+1][e.n], len(e.lengths))
	packed = packed && packKeys
	kob := newRadixColumn(kf)
	// The reduction matrix: for column c, the simplices added to it (other
	// than itself) are vEnt[vStart[c]:vStart[c+1]].
	vStart := make([]int, len(columns)+1)
	var vEnt []entry
	e.stats.Columns[d] = int64(len(columns))
	e.startPhase("reduce", d, int64(len(columns)))

	// addCob pushes f·δs into cob.
	addCob := func(s simplex, f int64) {
		it.set(s, k, false)
		for {
			c, neg, ok := it.next()
			if !ok {
				return
			}
			cf := f
			if neg {
				cf = p - f
			}
			if packed {
				kob.push(kf.key(it.r, c.i, cf))
			} else {
				cob.push(mkEntry(c.d, c.i, cf))
			}
		}
	}
	for ci, col := range columns {
		if e.work >= e.nextTick {
			e.phase.Done = int64(ci)
			if err := e.tick(); err != nil {
				return nil, err
			}
			if est := int64(cap(cob.a)+cap(red.a)+cap(vEnt))*16 + int64(kob.size())*8; est > e.budget {
				return nil, &MemoryError{Estimate: est, Budget: e.budget, Points: e.n,
					What: fmt.Sprintf("reducing the H%d columns", d)}
			}
		}
		cob.reset()
		kob.reset()
		red.reset()
		// Enumerate the coboundary; stop at an emergent pair: the first
		// coface of the same diameter is the pivot, and if no other column
		// has it, the column is reduced already.
		it.set(col, k, false)
		emergent := true
		settled := false
		for {
			c, neg, ok := it.next()
			if !ok {
				break
			}
			cf := int64(1)
			if neg {
				cf = p - 1
			}
			if emergent && c.d == col.d {
				emergent = false
				if !pm.has(c.i) {
					if _, ap := e.apparentFacet(ait, c, k+1); !ap {
						pm.put(c.i, ci, cf)
						e.stats.Emergent[d]++
						settled = true
						break
					}
				}
			}
			if packed {
				kob.push(kf.key(it.r, c.i, cf))
			} else {
				cob.add(mkEntry(c.d, c.i, cf))
			}
		}
		if settled {
			vStart[ci+1] = len(vEnt)
			continue
		}
		cob.heapify()
		for {
			var piv entry
			var ok bool
			if packed {
				var x uint64
				if x, ok = kob.pivot(); ok {
					piv = mkEntry(e.lengths[kf.rank(x)], kf.idx(x), kf.coef(x))
				}
			} else {
				piv, ok = cob.pivot(p)
			}
			if !ok {
				bars = append(bars, Bar{col.d, math.Inf(1)})
				break
			}
			pc, pi := piv.coef(), piv.idx()
			if oc, ocC, found := pm.get(pi); found {
				f := (p - pc*e.inv[ocC]%p) % p
				other := columns[oc]
				red.push(mkEntry(other.d, other.i, f))
				addCob(other, f)
				for _, v := range vEnt[vStart[oc]:vStart[oc+1]] {
					g := v.coef() * f % p
					red.push(mkEntry(v.diam(), v.idx(), g))
					addCob(simplex{v.diam(), v.idx()}, g)
				}
			} else if sf, ap := e.apparentFacet(ait, simplex{piv.diam(), pi}, k+1); ap {
				sign := e.cofaceSign(sf, simplex{piv.diam(), pi}, k)
				f := (p - pc*e.inv[sign]%p) % p
				red.push(mkEntry(sf.d, sf.i, f))
				addCob(sf, f)
			} else {
				pm.put(pi, ci, pc)
				if piv.diam() > col.d {
					bars = append(bars, Bar{col.d, piv.diam()})
				}
				// Store the reduction column.
				for {
					r, ok := red.pivot(p)
					if !ok {
						break
					}
					red.pop()
					vEnt = append(vEnt, r)
				}
				break
			}
			if e.work >= e.nextTick {
				if err := e.tick(); err != nil {
					return nil, err
				}
			}
		}
		vStart[ci+1] = len(vEnt)
	}
	return bars, nil
}

// assemble lists the (d)-simplices as top cofaces of the (d−1)-simplices
// in prev, and returns those that must be reduced (not cleared by pm and
// not in a zero-persistence apparent pair) in reduction order. With
// keep, it also returns all d-simplices.
//
// The checks are made as each coface is listed, so that only the
// simplices to be reduced are held (most of a dense cloud's triangles
// are in apparent pairs: the digits at the enclosing radius have some
// 10⁹, which listed first would need 16 GB), on all cores over chunks
// of prev whose outputs are joined in order, so the result is that of a
// single pass.
func (e *engine) assemble(prev []simplex, pm *pivotMap, d int, keep bool) (cols, all []simplex, err error) {
	k := d + 1
	e.startPhase("assemble", d, int64(len(prev)))
	const chunk = 512
	chunks := (len(prev) + chunk - 1) / chunk
	workers := min(budget.Workers(e.ctx), max(1, chunks))
	type part struct{ cols, all []simplex }
	parts := make([]part, chunks)
	errs := make([]error, workers)
	var next, held, cleared, apparent atomic.Int64
	var failed atomic.Bool
	base := *e // read-only tables; each worker counts its own work
	var wg sync.WaitGroup
	for g := range workers {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			ec := base
			it, chk := &cofaces{e: &ec}, &cofaces{e: &ec}
			var w [maxVerts]int32
			var nCleared, nApparent int64
			defer func() { cleared.Add(nCleared); apparent.Add(nApparent) }()
			for !failed.Load() {
				ci := int(next.Add(1) - 1)
				if ci >= chunks {
					return
				}
				if err := e.ctx.Err(); err != nil {
					errs[g] = err
					failed.Store(true)
					return
				}
				if g == 0 {
					// Only this worker touches e's progress fields.
					e.phase.Done = int64(min(ci*chunk, len(prev)))
					e.work = ec.work
					if err := e.tick(); err != nil {
						errs[g] = err
						failed.Store(true)
						return
					}
				}
				var pt part
				for _, s := range prev[ci*chunk : min((ci+1)*chunk, len(prev))] {
					it.set(s, k-1, true)
					for {
						c, _, ok := it.next()
						if !ok {
							break
						}
						if keep {
							pt.all = append(pt.all, c)
						}
						if pm.has(c.i) {
							nCleared++
							continue
						}
						ec.vertices(c.i, k, w[:k])
						if k > 2 {
							if _, ap := ec.apparentFacetW(chk, c, w[:k]); ap {
								nApparent++
								continue
							}
						}
						if ec.apparentAsFacet(chk, c, w[:k]) {
							nApparent++
							continue
						}
						pt.cols = append(pt.cols, c)
					}
				}
				parts[ci] = pt
				// What is held, and its copy into one list at the end.
				h := held.Add(int64(cap(pt.cols) + cap(pt.all)))
				if est := 2 * h * int64(unsafe.Sizeof(simplex{})); est > e.budget {
					errs[g] = &MemoryError{Estimate: est, Budget: e.budget, Points: e.n,
						What: fmt.Sprintf("listing the %d-simplices", d)}
					failed.Store(true)
					return
				}
			}
		}(g)
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, nil, err
		}
	}
	e.stats.Cleared[d] += cleared.Load()
	e.stats.Apparent[d] += apparent.Load()
	nc, na := 0, 0
	for _, pt := range parts {
		nc += len(pt.cols)
		na += len(pt.all)
	}
	cols = make([]simplex, 0, nc)
	if keep {
		all = make([]simplex, 0, na)
	}
	for i, pt := range parts {
		cols = append(cols, pt.cols...)
		all = append(all, pt.all...)
		parts[i] = part{}
	}
	if err := sortFiltration(e.ctx, cols, true); err != nil {
		return nil, nil, err
	}
	return cols, all, nil
}

// dropApparent removes from cands (simplices of k vertices) those in a
// zero-persistence apparent pair, as facet or (k > 2) as cofacet,
// keeping the order. A cofacet of such a pair is paired already, so
// skipping it is clearing.
// The checks are independent and read-only, so they run on all cores.
func (e *engine) dropApparent(cands []simplex, k int) ([]simplex, error) {
	workers := min(budget.Workers(e.ctx), max(1, len(cands)/4096))
	keep := make([]bool, len(cands))
	errs := make([]error, workers)
	var wg sync.WaitGroup
	chunk := (len(cands) + workers - 1) / workers
	for g := 0; g < workers; g++ {
		lo, hi := g*chunk, min((g+1)*chunk, len(cands))
		wg.Add(1)
		go func(g, lo, hi int) {
			defer wg.Done()
			ec := *e // private work counter; shared read-only tables
			it := &cofaces{e: &ec}
			var w [maxVerts]int32
			for i := lo; i < hi; i++ {
				if (i-lo)&0xfff == 0 && e.ctx.Err() != nil {
					errs[g] = e.ctx.Err()
					return
				}
				// Decode the vertices once for both checks.
				ec.vertices(cands[i].i, k, w[:k])
				if k > 2 {
					if _, ap := ec.apparentFacetW(it, cands[i], w[:k]); ap {
						continue
					}
				}
				keep[i] = !ec.apparentAsFacet(it, cands[i], w[:k])
			}
		}(g, lo, hi)
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return nil, err
		}
	}
	out := cands[:0]
	for i, s := range cands {
		if keep[i] {
			out = append(out, s)
		}
	}
	return out, nil
}
