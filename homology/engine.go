// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"fmt"
	"math"
	"time"
)

// maxVerts is the largest number of vertices of a simplex the engine
// handles: a 4-simplex, the cofaces of the 3-simplices of H3.
const maxVerts = 5

// simplex is a simplex of the filtration: its diameter and its index in
// the combinatorial number system, {v_k > … > v_0} ↦ Σ C(v_i, i+1).
type simplex struct {
	d float64
	i int64
}

// entry is a simplex with a coefficient in Z/p, packed as
// index<<coefBits | coefficient so that a heap entry takes 16 bytes.
// The diameter is stored as its IEEE-754 bits: for non-negative floats
// the bits order like the values, so the heap compares integers.
type entry struct {
	db uint64
	k  uint64
}

// coefBits is the number of low bits of entry.k holding the coefficient.
const coefBits = 8

// indexLimit bounds simplex indices so that they pack into entry.k.
const indexLimit = int64(1) << (63 - coefBits)

func mkEntry(d float64, i, c int64) entry {
	if d == 0 {
		d = 0 // −0 has the sign bit set
	}
	return entry{math.Float64bits(d), uint64(i)<<coefBits | uint64(c)}
}

func (x entry) diam() float64 { return math.Float64frombits(x.db) }

func (x entry) idx() int64  { return int64(x.k >> coefBits) }
func (x entry) coef() int64 { return int64(x.k & (1<<coefBits - 1)) }

// engine holds the 1-skeleton of the Rips complex within the threshold
// as neighbour lists, and the tables needed to enumerate cofaces.
type engine struct {
	ctx    context.Context
	n      int
	maxDim int
	p      int64
	inv    []int64 // inv[c] = c⁻¹ mod p
	thr    float64

	// binom[t][v] = C(v, t) for t = 0..maxDim+2, v = 0..n.
	binom [maxVerts + 1][]int64

	// Neighbour lists: the neighbours of v are nbIdx[nbStart[v]:nbStart[v+1]]
	// in decreasing order, with their distances in nbDist.
	nbStart []int
	nbIdx   []int32
	nbDist  []float64
	// nbRank holds the filtration ranks of the lengths in nbDist: their
	// positions in lengths, the sorted distinct edge lengths.
	nbRank  []uint32
	lengths []float64

	edges  []simplex // all edges within the threshold
	sorted bool      // edges are in filtration order already

	// tri, when not nil, holds all distances for O(1) lookups.
	tri []float64

	budget   int64
	progress func(Progress)
	work     int64 // cofaces enumerated so far
	nextTick int64
	lastProg time.Time
	phase    Progress
	stats    Stats
}

// tickEvery is the number of enumerated cofaces between checks of the
// context: a few milliseconds of work.
const tickEvery = 1 << 17

// tick checks for cancellation and reports progress.
func (e *engine) tick() error {
	e.nextTick = e.work + tickEvery
	if err := e.ctx.Err(); err != nil {
		return err
	}
	if e.progress != nil {
		if now := time.Now(); now.Sub(e.lastProg) >= 100*time.Millisecond {
			e.lastProg = now
			e.progress(e.phase)
		}
	}
	return nil
}

func (e *engine) startPhase(name string, dim int, total int64) {
	e.phase = Progress{Phase: name, Dim: dim, Total: total}
	if e.progress != nil {
		e.lastProg = time.Now()
		e.progress(e.phase)
	}
}

// makeBinomials fills e.binom, refusing with ErrOverflow when the indices
// of (maxDim+1)-simplices on n vertices would not fit in 55 bits.
func (e *engine) makeBinomials() error {
	const limit = indexLimit
	top := e.maxDim + 2
	for t := 0; t <= maxVerts; t++ {
		e.binom[t] = make([]int64, e.n+1)
	}
	for v := 0; v <= e.n; v++ {
		e.binom[0][v] = 1
		for t := 1; t <= maxVerts; t++ {
			if v == 0 {
				continue
			}
			s := e.binom[t-1][v-1] + e.binom[t][v-1]
			if s >= limit || s < 0 {
				if t <= top {
					return fmt.Errorf("%w: C(%d,%d) exceeds 2⁵⁵; %d points are too many for dimension %d (use Landmarks)", ErrOverflow, v, t, e.n, e.maxDim)
				}
				s = limit // unused entries; keep them saturated
			}
			e.binom[t][v] = s
		}
	}
	return nil
}

func (e *engine) makeInverses() {
	p := e.p
	e.inv = make([]int64, p)
	if p == 2 {
		e.inv[1] = 1
		return
	}
	for c := int64(1); c < p; c++ {
		// Fermat: c^(p−2).
		r, b, x := int64(1), c, p-2
		for x > 0 {
			if x&1 == 1 {
				r = r * b % p
			}
			b = b * b % p
			x >>= 1
		}
		e.inv[c] = r
	}
}

// buildFromTriangle makes the neighbour lists and edge list from dense
// distances, keeping edges of finite length ≤ thr.
func (e *engine) buildFromTriangle(t *LowerTriangular) error {
	n := e.n
	deg := make([]int, n+1)
	var m int64
	lo, hi := math.Inf(1), math.Inf(-1)
	for i := 1; i < n; i++ {
		row := t.Data[i*(i-1)/2 : i*(i-1)/2+i]
		for j, d := range row {
			if d <= e.thr && !isInf(d) {
				deg[i]++
				deg[j]++
				m++
				lo, hi = min(lo, d), max(hi, d)
			}
		}
	}
	// The distances (8 bytes a pair), and for a moment the ranks of all
	// pairs (4 bytes, see makeRanks).
	if err := e.checkEdgeBudget(m, int64(len(t.Data))*12); err != nil {
		return err
	}
	e.allocLists(deg, m)
	e.tri = t.Data
	// The edges are written straight into their buckets by length
	// (sortFiltration's first pass, reading the distances instead of an
	// unsorted edge list, which saves that list's copy: 26 MB for the
	// digits at the enclosing radius), then each bucket is sorted.
	var start, slot []int
	bk, ok := newLengthBuckets(lo, hi, int(m), false)
	if ok && m >= bucketMin {
		start = make([]int, bk.n+1)
		for i := 1; i < n; i++ {
			for _, d := range t.Data[i*(i-1)/2 : i*(i-1)/2+i] {
				if d <= e.thr && !isInf(d) {
					start[bk.of(d)+1]++
				}
			}
		}
		slot = bucketStarts(start)
	}
	fill := make([]int, n)
	copy(fill, e.nbStart[:n])
	e.edges = make([]simplex, m)
	next := 0
	// Walk i downwards so that every list is filled in decreasing order.
	for i := n - 1; i >= 1; i-- {
		base := i * (i - 1) / 2
		row := t.Data[base : base+i]
		for j := i - 1; j >= 0; j-- {
			d := row[j]
			if d <= e.thr && !isInf(d) {
				e.nbIdx[fill[i]], e.nbDist[fill[i]] = int32(j), d
				fill[i]++
				e.nbIdx[fill[j]], e.nbDist[fill[j]] = int32(i), d
				fill[j]++
				k := next
				if slot != nil {
					b := bk.of(d)
					k = slot[b]
					slot[b]++
				}
				e.edges[k] = simplex{d, int64(base + j)}
				next++
			}
		}
	}
	if slot != nil {
		e.sorted = true
		return sortEachBucket(e.ctx, e.edges, start, false)
	}
	return nil
}

// buildFromSparse makes the neighbour lists from an edge list.
func (e *engine) buildFromSparse(s *Sparse) error {
	n := e.n
	deg := make([]int, n+1)
	var m int64
	for _, ed := range s.Edges {
		if ed.D <= e.thr && !isInf(ed.D) {
			deg[ed.I]++
			deg[ed.J]++
			m++
		}
	}
	// Where at least a quarter of the pairs are edges (a collapse near
	// the enclosing radius keeps most of them: S² at 600 points, 177 071
	// of 179 700), a table of all pairs, +Inf for those that are not
	// edges, costs at most half the lists (8 bytes a pair against 32 an
	// edge) and turns every length lookup from a search of a neighbour
	// list into one read; the apparent-pair tests are those of the dense
	// path. With it, makeRanks also holds 4 bytes a pair for a moment.
	pairs := int64(n) * int64(n-1) / 2
	dense := 4*m >= pairs
	already := int64(0)
	if dense {
		already = pairs * 12
	}
	if err := e.checkEdgeBudget(m, already); err != nil {
		return err
	}
	e.allocLists(deg, m)
	if dense {
		e.tri = make([]float64, pairs)
		for i := range e.tri {
			e.tri[i] = math.Inf(1)
		}
		for _, ed := range s.Edges {
			if ed.D <= e.thr && !isInf(ed.D) {
				i, j := max(ed.I, ed.J), min(ed.I, ed.J)
				e.tri[i*(i-1)/2+j] = ed.D
			}
		}
	}
	fill := make([]int, n)
	copy(fill, e.nbStart[:n])
	e.edges = make([]simplex, 0, m)
	for _, ed := range s.Edges {
		if ed.D <= e.thr && !isInf(ed.D) {
			i, j := max(ed.I, ed.J), min(ed.I, ed.J)
			e.nbIdx[fill[i]], e.nbDist[fill[i]] = int32(j), ed.D
			fill[i]++
			e.nbIdx[fill[j]], e.nbDist[fill[j]] = int32(i), ed.D
			fill[j]++
			e.edges = append(e.edges, simplex{ed.D, int64(i*(i-1)/2 + j)})
		}
	}
	// Sort each list decreasingly by neighbour index.
	for v := 0; v < n; v++ {
		lo, hi := e.nbStart[v], e.nbStart[v+1]
		sortNeighbours(e.nbIdx[lo:hi], e.nbDist[lo:hi])
	}
	return nil
}

func sortNeighbours(idx []int32, dist []float64) {
	// Insertion sort for short lists, else a paired heap sort.
	if len(idx) < 32 {
		for a := 1; a < len(idx); a++ {
			for b := a; b > 0 && idx[b] > idx[b-1]; b-- {
				idx[b], idx[b-1] = idx[b-1], idx[b]
				dist[b], dist[b-1] = dist[b-1], dist[b]
			}
		}
		return
	}
	n := len(idx)
	down := func(r, end int) {
		for {
			c := 2*r + 1
			if c >= end {
				return
			}
			if c+1 < end && idx[c+1] < idx[c] {
				c++
			}
			if idx[r] <= idx[c] {
				return
			}
			idx[r], idx[c] = idx[c], idx[r]
			dist[r], dist[c] = dist[c], dist[r]
			r = c
		}
	}
	// Min-heap, then repeatedly move the minimum to the end: decreasing order.
	for r := n/2 - 1; r >= 0; r-- {
		down(r, n)
	}
	for end := n - 1; end > 0; end-- {
		idx[0], idx[end] = idx[end], idx[0]
		dist[0], dist[end] = dist[end], dist[0]
		down(0, end)
	}
}

func (e *engine) allocLists(deg []int, m int64) {
	n := e.n
	e.nbStart = make([]int, n+1)
	for v := 0; v < n; v++ {
		e.nbStart[v+1] = e.nbStart[v] + deg[v]
	}
	e.nbIdx = make([]int32, 2*m)
	e.nbDist = make([]float64, 2*m)
}

// edgeBytes is the estimated memory per edge within the threshold:
// neighbour lists (2×16: index, length, rank), the edge list (16), a
// column (16) and pivot map slots (32).
const edgeBytes = 32 + 16 + 16 + 32

func (e *engine) checkEdgeBudget(m int64, already int64) error {
	est := already + m*edgeBytes + int64(e.n)*64
	if est > e.budget {
		return &MemoryError{Estimate: est, Budget: e.budget, Points: e.n,
			What: fmt.Sprintf("the Rips complex with %d edges", m)}
	}
	return nil
}

// makeRanks fills e.lengths with the distinct edge lengths, sorted, and
// e.nbRank with the ranks of the neighbour distances. The edges must be
// sorted by length.
func (e *engine) makeRanks() {
	e.lengths = e.lengths[:0]
	for i, s := range e.edges {
		if i == 0 || s.d != e.edges[i-1].d {
			e.lengths = append(e.lengths, s.d)
		}
	}
	e.nbRank = make([]uint32, len(e.nbDist))
	if e.tri == nil {
		for i, d := range e.nbDist {
			e.nbRank[i] = e.rankOf(d)
		}
		return
	}
	// With all distances held (8 bytes a pair) a 4-byte rank per pair
	// is affordable for a moment, and much cheaper to fill and read than
	// a binary search per neighbour: the ranks of the sorted edges are
	// consecutive, and a vertex's list reads the array mostly in order.
	rankOf := make([]uint32, len(e.tri))
	r := uint32(0)
	for i, s := range e.edges {
		if i > 0 && s.d != e.edges[i-1].d {
			r++
		}
		rankOf[s.i] = r
	}
	for v := 0; v < e.n; v++ {
		for c := e.nbStart[v]; c < e.nbStart[v+1]; c++ {
			a, b := v, int(e.nbIdx[c])
			if a < b {
				a, b = b, a
			}
			e.nbRank[c] = rankOf[a*(a-1)/2+b]
		}
	}
}

// rankOf returns the filtration rank of d, an edge length.
func (e *engine) rankOf(d float64) uint32 {
	l, h := 0, len(e.lengths)
	for l < h {
		m := int(uint(l+h) >> 1)
		if e.lengths[m] < d {
			l = m + 1
		} else {
			h = m
		}
	}
	return uint32(l)
}

// dist returns the length of edge {a,b}; it is meant for edges of
// simplices within the threshold (otherwise it may return the length
// or +Inf).
func (e *engine) dist(a, b int32) float64 {
	if e.tri != nil {
		if a < b {
			a, b = b, a
		}
		return e.tri[int(a)*(int(a)-1)/2+int(b)]
	}
	lo, hi := e.nbStart[a], e.nbStart[a+1]
	idx := e.nbIdx[lo:hi]
	// idx is decreasing.
	l, h := 0, len(idx)
	for l < h {
		m := int(uint(l+h) >> 1)
		if idx[m] > b {
			l = m + 1
		} else {
			h = m
		}
	}
	if l < len(idx) && idx[l] == b {
		return e.nbDist[lo+l]
	}
	return math.Inf(1)
}

// vertices decodes the k vertices of simplex idx into w, decreasing.
func (e *engine) vertices(idx int64, k int, w []int32) {
	if k == 2 {
		// Edge {i > j} has index i(i−1)/2 + j: invert with a square root
		// and correct for rounding.
		i := int64((1 + math.Sqrt(1+8*float64(idx))) / 2)
		for i*(i-1)/2 > idx {
			i--
		}
		for (i+1)*i/2 <= idx {
			i++
		}
		w[0], w[1] = int32(i), int32(idx-i*(i-1)/2)
		return
	}
	v := e.n - 1
	for t := k; t >= 1; t-- {
		b := e.binom[t]
		// Largest u ≤ v with C(u,t) ≤ idx; C(t−1,t) = 0.
		lo, hi := t-1, v
		for lo < hi {
			m := int(uint(lo+hi+1) >> 1)
			if b[m] <= idx {
				lo = m
			} else {
				hi = m - 1
			}
		}
		w[k-t] = int32(lo)
		idx -= b[lo]
		v = lo - 1
	}
}

// index returns the index of the simplex with decreasing vertices w.
func (e *engine) index(w []int32) int64 {
	k := len(w)
	var s int64
	for p, v := range w {
		s += e.binom[k-p][v]
	}
	return s
}

// cofaces enumerates the cofaces of a simplex in decreasing index order,
// by intersecting the neighbour lists of its vertices.
type cofaces struct {
	e     *engine
	w     [maxVerts]int32
	cur   [maxVerts]int
	end   [maxVerts]int
	k     int
	lead  int
	sd    float64
	sr    uint32 // rank of the diameter of the simplex
	r     uint32 // rank of the diameter of the last coface returned
	p     int
	above int64
	below int64
	jmin  int32
}

// set starts the enumeration of the cofaces of s (k vertices). With
// topOnly, only cofaces whose new vertex exceeds all vertices of s are
// produced, so each simplex is produced once from one facet.
func (it *cofaces) set(s simplex, k int, topOnly bool) {
	e := it.e
	it.k = k
	it.sd = s.d
	it.sr = e.rankOf(s.d)
	e.vertices(s.i, k, it.w[:k])
	it.p = 0
	it.above = 0
	it.below = s.i
	it.jmin = -1
	if topOnly {
		it.jmin = it.w[0]
	}
	best := -1
	for q := 0; q < k; q++ {
		v := it.w[q]
		it.cur[q], it.end[q] = e.nbStart[v], e.nbStart[v+1]
		if l := it.end[q] - it.cur[q]; best < 0 || l < best {
			best, it.lead = l, q
		}
	}
}

// next returns the next coface, its diameter and whether its coefficient
// in the coboundary is −1.
func (it *cofaces) next() (simplex, bool, bool) {
	e := it.e
	l := it.lead
	for it.cur[l] < it.end[l] {
		c := it.cur[l]
		j := e.nbIdx[c]
		if j <= it.jmin {
			it.cur[l] = it.end[l]
			break
		}
		// The diameter and its rank (both read sequentially along the
		// neighbour lists: looking the length up from the rank would be a
		// cache miss per coface).
		diam := max(it.sd, e.nbDist[c])
		r := max(it.sr, e.nbRank[c])
		it.cur[l] = c + 1
		ok := true
		for q := 0; q < it.k; q++ {
			if q == l {
				continue
			}
			cq, eq := it.cur[q], it.end[q]
			for cq < eq && e.nbIdx[cq] > j {
				cq++
			}
			it.cur[q] = cq
			if cq == eq {
				it.cur[l] = it.end[l]
				return simplex{}, false, false
			}
			if e.nbIdx[cq] != j {
				ok = false
				break
			}
			if d := e.nbDist[cq]; d > diam {
				diam = d
				r = e.nbRank[cq]
			}
		}
		if !ok {
			continue
		}
		for it.p < it.k && it.w[it.p] > j {
			t := it.k - it.p
			v := it.w[it.p]
			it.below -= e.binom[t][v]
			it.above += e.binom[t+1][v]
			it.p++
		}
		t := it.k - it.p
		e.work++
		it.r = r
		return simplex{diam, it.above + e.binom[t+1][j] + it.below}, t&1 == 1, true
	}
	return simplex{}, false, false
}

// zeroCofacet returns the earliest cofacet of s (k vertices) in the
// filtration if it has the same diameter as s: the cofacet of largest
// index among those of diameter s.d.
func (e *engine) zeroCofacet(it *cofaces, s simplex, k int) (simplex, bool) {
	if e.tri != nil {
		return e.zeroCofacetDense(s, k)
	}
	it.set(s, k, false)
	for {
		c, _, ok := it.next()
		if !ok {
			return simplex{}, false
		}
		if c.d == s.d {
			return c, true
		}
	}
}

// zeroCofacetDense is zeroCofacet with O(1) distance lookups: it walks
// the neighbours of one vertex in decreasing order and tests the others
// only for neighbours close enough.
func (e *engine) zeroCofacetDense(s simplex, k int) (simplex, bool) {
	var w [maxVerts]int32
	e.vertices(s.i, k, w[:k])
	c, _, ok := e.zeroCofacetDenseW(w[:k], s)
	return c, ok
}

// zeroCofacetDenseW is zeroCofacetDense for a simplex whose vertices w
// (decreasing) are known; it also returns the cofacet's vertices.
func (e *engine) zeroCofacetDenseW(w []int32, s simplex) (simplex, [maxVerts]int32, bool) {
	k := len(w)
	lead := 0
	for q := 1; q < k; q++ {
		if e.nbStart[w[q]+1]-e.nbStart[w[q]] < e.nbStart[w[lead]+1]-e.nbStart[w[lead]] {
			lead = q
		}
	}
	lo, hi := e.nbStart[w[lead]], e.nbStart[w[lead]+1]
	idx, dist := e.nbIdx[lo:hi], e.nbDist[lo:hi]
	tri := e.tri
	for c, j := range idx {
		if dist[c] > s.d {
			continue
		}
		ok := true
		for q := 0; q < k; q++ {
			v := w[q]
			if q == lead {
				continue
			}
			if v == j {
				ok = false
				break
			}
			a, b := int(v), int(j)
			if a < b {
				a, b = b, a
			}
			if tri[a*(a-1)/2+b] > s.d {
				ok = false
				break
			}
		}
		if !ok {
			continue
		}
		var f [maxVerts]int32
		q, p := 0, 0
		for p < k && w[p] > j {
			f[q] = w[p]
			q, p = q+1, p+1
		}
		f[q] = j
		q++
		for p < k {
			f[q] = w[p]
			q, p = q+1, p+1
		}
		return simplex{s.d, e.index(f[:k+1])}, f, true
	}
	return simplex{}, [maxVerts]int32{}, false
}

// zeroFacet returns the latest facet of s (k vertices) in the filtration
// if it has the same diameter as s: the facet of smallest index among
// those of diameter s.d.
func (e *engine) zeroFacet(s simplex, k int) (simplex, bool) {
	var w [maxVerts]int32
	e.vertices(s.i, k, w[:k])
	f, _, ok := e.zeroFacetW(w[:k], s.d)
	return f, ok
}

// zeroFacetW is zeroFacet for a simplex of diameter d whose vertices w
// (decreasing) are known; it also returns the facet's vertices.
func (e *engine) zeroFacetW(w []int32, d float64) (simplex, [maxVerts]int32, bool) {
	k := len(w)
	var dd [maxVerts][maxVerts]float64
	for a := 0; a < k; a++ {
		for b := a + 1; b < k; b++ {
			x := e.dist(w[a], w[b])
			dd[a][b], dd[b][a] = x, x
		}
	}
	// Removing a larger vertex gives a smaller index: try w[0] first.
	for r := 0; r < k; r++ {
		fd := 0.0
		for a := 0; a < k; a++ {
			for b := a + 1; b < k; b++ {
				if a != r && b != r && dd[a][b] > fd {
					fd = dd[a][b]
				}
			}
		}
		if fd == d {
			var f [maxVerts]int32
			q := 0
			for a := 0; a < k; a++ {
				if a != r {
					f[q] = w[a]
					q++
				}
			}
			return simplex{fd, e.index(f[:k-1])}, f, true
		}
	}
	return simplex{}, [maxVerts]int32{}, false
}

// apparentAsFacet reports whether s, with vertices w (decreasing), is
// the facet of a zero-persistence apparent pair.
func (e *engine) apparentAsFacet(it *cofaces, s simplex, w []int32) bool {
	k := len(w)
	if e.tri != nil {
		t, tw, ok := e.zeroCofacetDenseW(w, s)
		if !ok {
			return false
		}
		f, _, ok := e.zeroFacetW(tw[:k+1], t.d)
		return ok && f.i == s.i
	}
	t, ok := e.zeroCofacet(it, s, k)
	if !ok {
		return false
	}
	f, ok := e.zeroFacet(t, k+1)
	return ok && f.i == s.i
}

// apparentFacet returns the facet σ with which t (k vertices) forms a
// zero-persistence apparent pair (σ, t), if any.
func (e *engine) apparentFacet(it *cofaces, t simplex, k int) (simplex, bool) {
	var w [maxVerts]int32
	e.vertices(t.i, k, w[:k])
	return e.apparentFacetW(it, t, w[:k])
}

// apparentFacetW is apparentFacet for a simplex whose vertices w
// (decreasing) are known.
func (e *engine) apparentFacetW(it *cofaces, t simplex, w []int32) (simplex, bool) {
	k := len(w)
	f, fw, ok := e.zeroFacetW(w, t.d)
	if !ok {
		return simplex{}, false
	}
	var c simplex
	if e.tri != nil {
		c, _, ok = e.zeroCofacetDenseW(fw[:k-1], f)
	} else {
		c, ok = e.zeroCofacet(it, f, k-1)
	}
	if ok && c.i == t.i {
		return f, true
	}
	return simplex{}, false
}

// cofaceSign returns the coefficient (1 or p−1) of t (k+1 vertices) in the
// coboundary of its facet s.
func (e *engine) cofaceSign(s simplex, t simplex, k int) int64 {
	var ws, wt [maxVerts]int32
	e.vertices(s.i, k, ws[:k])
	e.vertices(t.i, k+1, wt[:k+1])
	// Find the vertex of t missing from s; its position from the bottom
	// is the number of vertices of t below it.
	q := 0
	for q < k && ws[q] == wt[q] {
		q++
	}
	pos := k - q
	if pos&1 == 1 {
		return e.p - 1
	}
	return 1
}
