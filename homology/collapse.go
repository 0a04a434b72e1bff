// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"math/bits"
	"slices"
)

// CollapseEdges returns a sparse edge list whose Vietoris–Rips (flag)
// filtration has the same persistence barcode as the input's up to
// threshold (edges of length ≤ threshold), usually with far fewer edges.
// Feed the result to RipsDistances with the same threshold. A threshold
// of 0 or +Inf keeps every finite edge; negative values and NaN are
// errors.
//
// The method is the edge collapse of J.-D. Boissonnat and S. Pritam,
// "Edge collapse and persistence of flag complexes" (SoCG 2020): an edge
// {a,b} of a graph G is dominated by a vertex w ∉ {a,b} when
// N[a]∩N[b] ⊆ N[w] (closed neighbourhoods); removing a dominated edge
// from the flag complex of G is a sequence of elementary collapses, so it
// does not change the homotopy type. If an edge e of time t is dominated
// in the graph G_t of the edges of time ≤ t, delaying e to the next time
// of the filtration leaves every inclusion flag(G′_s) ⊆ flag(G_s) a
// homotopy equivalence commuting with the inclusions in s, so the
// persistence modules are isomorphic. As in the paper, the edges are
// processed from the longest down: each is delayed while it stays
// dominated in the current (already collapsed) later filtration, taking
// as its new filtration value the first time it is no longer dominated,
// and it is dropped when it stays dominated up to threshold. Only edges
// at an end of e can end its domination (another edge leaves N[a]∩N[b]
// unchanged and only enlarges N[w]), so only their times are tried. The
// returned lengths are these (possibly later) filtration values, sorted.
func CollapseEdges(ctx context.Context, d Distances, threshold float64) (*Sparse, error) {
	if d == nil {
		return nil, fmt.Errorf("%w: nil distances", ErrDistances)
	}
	if math.IsNaN(threshold) || threshold < 0 {
		return nil, fmt.Errorf("%w: collapse threshold %v is negative or NaN", ErrSettings, threshold)
	}
	if threshold == 0 {
		threshold = math.Inf(1)
	}
	n := d.Len()
	edges, err := collapseInput(ctx, d, threshold)
	if err != nil {
		return nil, err
	}
	if n <= denseLimit {
		return collapseDense(ctx, n, edges)
	}
	c := newCollapser(n, edges)
	dead := 0
	live := func(k, m int) int { return k + (m-k)/8 }
	for k := len(edges) - 1; k >= 0; k-- {
		if k%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		if c.shift(int32(k)) {
			dead++
			// Dropped edges never return: squeeze them out of the lists
			// once they are most of them (amortised linear).
			if dead > len(edges)/16 && dead > live(k, len(edges)) {
				c.compact()
				dead = 0
			}
		}
	}
	return collapseOutput(n, edges, func(k int) float64 { return c.time[k] }), nil
}

// collapseOutput lists the edges that were not trimmed with their new
// filtration values time(k), sorted stably by value.
func collapseOutput(n int, edges []cEdge, time func(k int) float64) *Sparse {
	kept := 0
	for k := range edges {
		if !math.IsInf(time(k), 1) {
			kept++
		}
	}
	out := make([]Edge, 0, kept)
	for k, e := range edges {
		if t := time(k); !math.IsInf(t, 1) {
			out = append(out, Edge{I: int(e.a), J: int(e.b), D: t})
		}
	}
	slices.SortStableFunc(out, func(x, y Edge) int { return cmp.Compare(x.D, y.D) })
	return &Sparse{N: n, Edges: out}
}

// collapseDense is the collapse for n ≤ denseLimit. It computes the same
// filtration values as the list-based collapser, faster: when edge k is
// processed, every edge of lower index still has its input length (at
// most e_k's), so the graph at any time s ≥ e_k is the bitset "low" of
// those edges plus the processed edges kept so far ("up", usually few)
// of time ≤ s. Neighbourhood intersections and subset tests are then
// word operations on n-bit rows, and the search for the end of a
// domination scans only the short "up" lists.
//
// Every time an edge ever gets is an input length (or trimmed), so times
// are kept as ranks among the distinct input lengths, 4 bytes each in a
// lower-triangular table of the current times (a quarter of an n×n
// float64 table, and faster for it: torus2000 in R³ at threshold 1.5 went
// from 200 to 130 ms), and comparing ranks is comparing the lengths.
func collapseDense(ctx context.Context, n int, edges []cEdge) (*Sparse, error) {
	words := (n + 63) / 64
	c := &bitCollapser{
		edges: edges,
		time:  make([]uint32, len(edges)),
		tri:   make([]uint32, n*(n-1)/2),
		start: make([]int, n),
		n:     n,
		words: words,
		low:   make([]uint64, n*words),
		up:    make([][]upEdge, n),
		ca:    make([]uint64, words),
		cb:    make([]uint64, words),
		cn:    make([]uint64, words),
	}
	for i := range c.tri {
		c.tri[i] = rankNone
	}
	for u := range c.start {
		c.start[u] = u * (u - 1) / 2
	}
	// The edges are sorted by length: rank r is the r-th distinct one.
	distinct := 0
	for k, e := range edges {
		if k == 0 || e.d != edges[k-1].d {
			distinct++
		}
	}
	lengths := make([]float64, 0, distinct)
	for k, e := range edges {
		if k == 0 || e.d != edges[k-1].d {
			lengths = append(lengths, e.d)
		}
		r := uint32(len(lengths) - 1)
		c.time[k] = r
		c.tri[c.start[e.b]+int(e.a)] = r
		c.low[int(e.a)*words+int(e.b)>>6] |= 1 << (uint(e.b) & 63)
		c.low[int(e.b)*words+int(e.a)>>6] |= 1 << (uint(e.a) & 63)
	}
	for k := len(edges) - 1; k >= 0; k-- {
		if k%1024 == 0 {
			if err := ctx.Err(); err != nil {
				return nil, err
			}
		}
		c.step(int32(k))
	}
	return collapseOutput(n, edges, func(k int) float64 {
		if r := c.time[k]; r != rankNone {
			if t := lengths[r]; t != edges[k].d {
				return t
			}
			return edges[k].d // the bits of its own length
		}
		return trimmed
	}), nil
}

// rankNone is the time rank of an absent or trimmed edge, above every
// length.
const rankNone = math.MaxUint32

// bitCollapser holds the state of collapseDense. Times are ranks of the
// distinct input lengths.
type bitCollapser struct {
	edges    []cEdge
	time     []uint32 // per edge: its current filtration value
	tri      []uint32 // current edge times, lower triangle (rankNone: none)
	start    []int    // where the row of each vertex starts in tri
	n, words int
	low      []uint64   // n rows of words: neighbours by edges of index < k
	up       [][]upEdge // per vertex: processed edges kept, with final times
	ca, cb   []uint64   // scratch rows
	cn       []uint64   // scratch: common neighbours
}

// upEdge is a processed edge at a vertex: the other end and its time.
type upEdge struct {
	v int32
	t uint32
}

// setTime sets the filtration value of edge k.
func (c *bitCollapser) setTime(k int32, t uint32) {
	e := c.edges[k]
	c.time[k] = t
	c.tri[c.start[e.b]+int(e.a)] = t
}

// at returns the current time of the edge {u,v}, u ≠ v.
func (c *bitCollapser) at(u, v int32) uint32 {
	if u < v {
		u, v = v, u
	}
	return c.tri[c.start[u]+int(v)]
}

// step processes edge k (all edges of higher index are done): it delays
// the edge to the first time at which it is not dominated, or trims it;
// see collapser.shift, which it mirrors.
func (c *bitCollapser) step(k int32) {
	e := c.edges[k]
	words := c.words
	c.low[int(e.a)*words+int(e.b)>>6] &^= 1 << (uint(e.b) & 63)
	c.low[int(e.b)*words+int(e.a)>>6] &^= 1 << (uint(e.a) & 63)
	s := c.time[k]
	if w := c.dominated(e.a, e.b, s); w >= 0 {
		for {
			next := uint32(rankNone)
			for _, end := range [2]int32{e.a, e.b} {
				other := e.a + e.b - end
				for _, x := range c.up[end] {
					t := x.t
					if t <= s || t >= next || x.v == other {
						continue
					}
					if x.v != w && c.at(other, x.v) <= t && c.at(w, x.v) > t {
						next = t
					}
				}
			}
			if next == rankNone {
				c.setTime(k, rankNone)
				return
			}
			s = next
			if w = c.dominated(e.a, e.b, s); w < 0 {
				c.setTime(k, s)
				break
			}
		}
	}
	t := c.time[k]
	c.up[e.a] = append(c.up[e.a], upEdge{e.b, t})
	c.up[e.b] = append(c.up[e.b], upEdge{e.a, t})
}

// row fills dst with the neighbours of u in the graph at time s.
func (c *bitCollapser) row(dst []uint64, u int32, s uint32) {
	copy(dst, c.low[int(u)*c.words:int(u)*c.words+c.words])
	for _, x := range c.up[u] {
		if x.t <= s {
			dst[x.v>>6] |= 1 << (uint(x.v) & 63)
		}
	}
}

// dominated returns the least vertex w ∉ {a,b} with N[a]∩N[b] ⊆ N[w] in
// the graph at time s, or −1.
func (c *bitCollapser) dominated(a, b int32, s uint32) int32 {
	c.row(c.ca, a, s)
	c.row(c.cb, b, s)
	cn := c.cn
	for i := range cn {
		cn[i] = c.ca[i] & c.cb[i]
	}
	// a and b are adjacent to every candidate, so only the other common
	// neighbours need checking: those not in w's low row must be joined
	// to w by a processed edge of time ≤ s.
	for i, word := range cn {
		for ; word != 0; word &= word - 1 {
			w := i<<6 | bits.TrailingZeros64(word)
			low := c.low[w*c.words : w*c.words+c.words]
			ok := true
		check:
			for j, m := range cn {
				for r := m &^ low[j]; r != 0; r &= r - 1 {
					x := j<<6 | bits.TrailingZeros64(r)
					if x != w && c.at(int32(w), int32(x)) > s {
						ok = false
						break check
					}
				}
			}
			if ok {
				return int32(w)
			}
		}
	}
	return -1
}

// cEdge is an edge of the collapse, a < b.
type cEdge struct {
	a, b int32
	d    float64
}

// collapseInput lists the finite edges of length ≤ threshold, sorted by
// (length, a, b), checking every value. The list is counted before it is
// allocated.
func collapseInput(ctx context.Context, d Distances, threshold float64) ([]cEdge, error) {
	keep := func(v float64) bool { return v <= threshold && !math.IsInf(v, 1) }
	var edges []cEdge
	add := func(i, j int, v float64) error {
		if math.IsNaN(v) || v < 0 {
			return fmt.Errorf("%w: distance (%d,%d) is %v", ErrDistances, i, j, v)
		}
		if keep(v) {
			edges = append(edges, cEdge{int32(min(i, j)), int32(max(i, j)), v})
		}
		return nil
	}
	switch d := d.(type) {
	case *Sparse:
		m, err := checkSparse(d, keep)
		if err != nil {
			return nil, err
		}
		edges = make([]cEdge, 0, m)
		for _, e := range d.Edges {
			if keep(e.D) {
				edges = append(edges, cEdge{int32(min(e.I, e.J)), int32(max(e.I, e.J)), e.D})
			}
		}
	case *LowerTriangular:
		if int64(len(d.Data)) != int64(d.N)*int64(d.N-1)/2 {
			return nil, fmt.Errorf("%w: %d lower-triangular entries for %d points", ErrDistances, len(d.Data), d.N)
		}
		// Above the enclosing radius the complex is a cone: edges longer
		// than it do not change the barcode.
		if r, _ := enclosingRadius(d); r < threshold {
			threshold = r
		}
		m := 0
		for _, v := range d.Data {
			if keep(v) {
				m++
			}
		}
		edges = make([]cEdge, 0, m)
		for i := 1; i < d.N; i++ {
			if i%256 == 0 {
				if err := ctx.Err(); err != nil {
					return nil, err
				}
			}
			for j, v := range d.Data[i*(i-1)/2 : i*(i-1)/2+i] {
				if err := add(i, j, v); err != nil {
					return nil, err
				}
			}
		}
	default:
		n := d.Len()
		for i := 1; i < n; i++ {
			for j := 0; j < i; j++ {
				if err := add(i, j, d.Dist(i, j)); err != nil {
					return nil, err
				}
			}
		}
	}
	if err := sortEdges(ctx, edges); err != nil {
		return nil, err
	}
	return edges, nil
}

// sortEdges sorts the edges by (length, a, b) in the length buckets of
// sortFiltration: one pass counts and one distributes the edges, then
// each bucket is sorted in the cache, on all cores. The two passes
// repeat sortFiltration's on purpose: written once for both element
// types, with the length read through a function, they took 1.7× as
// long (BenchmarkSortFiltration, 48 against 81 ms per 2²⁰ simplices).
func sortEdges(ctx context.Context, edges []cEdge) error {
	order := func(x, y cEdge) int {
		switch {
		case x.d < y.d:
			return -1
		case x.d > y.d:
			return 1
		case x.a != y.a:
			return cmp.Compare(x.a, y.a)
		}
		return cmp.Compare(x.b, y.b)
	}
	if len(edges) < bucketMin {
		slices.SortFunc(edges, order)
		return nil
	}
	lo, hi := edges[0].d, edges[0].d
	for _, e := range edges {
		lo, hi = min(lo, e.d), max(hi, e.d)
	}
	bk, ok := newLengthBuckets(lo, hi, len(edges), false)
	if !ok {
		slices.SortFunc(edges, order)
		return nil
	}
	start := make([]int, bk.n+1)
	for _, e := range edges {
		start[bk.of(e.d)+1]++
	}
	buf := make([]cEdge, len(edges))
	fill := bucketStarts(start)
	for _, e := range edges {
		b := bk.of(e.d)
		buf[fill[b]] = e
		fill[b]++
	}
	err := sortBuckets(ctx, start, func(i, j int) { slices.SortFunc(buf[i:j], order) })
	if err != nil {
		return err
	}
	copy(edges, buf)
	return nil
}

// checkSparse checks the edge list s as NewSparse does and returns how
// many of its lengths keep accepts.
func checkSparse(s *Sparse, keep func(float64) bool) (int, error) {
	if !smallSparseValid(s) {
		if _, err := NewSparse(s.N, s.Edges); err != nil {
			return 0, err
		}
	}
	m := 0
	for _, e := range s.Edges {
		if keep(e.D) {
			m++
		}
	}
	return m, nil
}

// smallSparseValid reports whether s has at most denseLimit points and
// passes the checks of NewSparse. It finds repeated pairs with an n×n
// bitset, a fraction of the memory and time of NewSparse's map.
func smallSparseValid(s *Sparse) bool {
	n := s.N
	if n < 0 || n > denseLimit {
		return false
	}
	seen := make([]uint64, (n*n+63)/64)
	for _, e := range s.Edges {
		if e.I < 0 || e.I >= n || e.J < 0 || e.J >= n || e.I == e.J || math.IsNaN(e.D) || e.D < 0 {
			return false
		}
		bit := min(e.I, e.J)*n + max(e.I, e.J)
		if seen[bit>>6]&(1<<(bit&63)) != 0 {
			return false
		}
		seen[bit>>6] |= 1 << (bit & 63)
	}
	return true
}

// trimmed is the filtration value of an edge removed altogether.
var trimmed = math.Inf(1)

// collapser holds the state of the edge collapse: the current
// filtration gives each edge a time; the graph at time s has the edges
// of time ≤ s.
type collapser struct {
	edges []cEdge
	time  []float64  // per edge: its current filtration value
	nbr   [][]nb     // all edges at each vertex, sorted by vertex
	at    [][2]int32 // per edge: its index in the lists of a and of b

	ids map[int64]int32 // edge ids
	n   int

	cn []int32 // scratch: common neighbours
}

// nb is an edge at a vertex: the other end, the edge id and the edge's
// current time (kept here too so that list scans stay sequential).
type nb struct {
	v, id int32
	t     float64
}

// denseLimit is the largest number of points collapsed with bitsets and
// a triangular table of time ranks (128 MiB at the limit, what an n×n
// float64 table took at half of it); larger clouds use lists and a hash
// table of edge ids. The table pays: on 6000 points of a torus in R³,
// the lists took 1.9 s at threshold 0.5 (209k edges) and 11.2 s at 0.8
// (544k), the table 0.54 and 1.3 s, for 87 and 101 MB allocated against
// 28 and 88 MB.
var denseLimit = 8192

func newCollapser(n int, edges []cEdge) *collapser {
	c := &collapser{
		edges: edges,
		time:  make([]float64, len(edges)),
		nbr:   make([][]nb, n),
		n:     n,
	}
	deg := make([]int32, n)
	for _, e := range edges {
		deg[e.a]++
		deg[e.b]++
	}
	for v := range c.nbr {
		c.nbr[v] = make([]nb, 0, deg[v])
	}
	c.ids = make(map[int64]int32, len(edges))
	for k, e := range edges {
		c.time[k] = e.d
		c.nbr[e.a] = append(c.nbr[e.a], nb{e.b, int32(k), e.d})
		c.nbr[e.b] = append(c.nbr[e.b], nb{e.a, int32(k), e.d})
		c.ids[int64(e.a)*int64(n)+int64(e.b)] = int32(k)
	}
	c.at = make([][2]int32, len(edges))
	for _, l := range c.nbr {
		slices.SortFunc(l, func(x, y nb) int { return cmp.Compare(x.v, y.v) })
	}
	c.reindex()
	return c
}

// setTime sets the current filtration value of edge k.
func (c *collapser) setTime(k int32, t float64) {
	c.time[k] = t
	e := c.edges[k]
	c.nbr[e.a][c.at[k][0]].t = t
	c.nbr[e.b][c.at[k][1]].t = t
}

// id returns the edge id of {u,v}, or −1.
func (c *collapser) id(u, v int32) int32 {
	if u > v {
		u, v = v, u
	}
	if k, ok := c.ids[int64(u)*int64(c.n)+int64(v)]; ok {
		return k
	}
	return -1
}

// in reports whether u = v or the edge {u,v} is in the graph at time s.
func (c *collapser) in(u, v int32, s float64) bool {
	if u == v {
		return true
	}
	k := c.id(u, v)
	return k >= 0 && c.time[k] <= s
}

// dominated looks for a vertex w ∉ {a,b} with N[a]∩N[b] ⊆ N[w] in the
// graph at time s and returns it, or −1.
func (c *collapser) dominated(a, b int32, s float64) int32 {
	// Merge the neighbour lists, sorted by vertex.
	c.cn = c.cn[:0]
	la, lb := c.nbr[a], c.nbr[b]
	for i, j := 0, 0; i < len(la) && j < len(lb); {
		switch x, y := la[i], lb[j]; {
		case x.v < y.v:
			i++
		case x.v > y.v:
			j++
		default:
			if x.t <= s && y.t <= s {
				c.cn = append(c.cn, x.v)
			}
			i++
			j++
		}
	}
	// a and b are adjacent to every candidate, so only the other common
	// neighbours need checking.
	for _, w := range c.cn {
		ok := true
		for _, x := range c.cn {
			if !c.in(w, x, s) {
				ok = false
				break
			}
		}
		if ok {
			return w
		}
	}
	return -1
}

// shift moves edge k to the first time at or after its own at which it
// is not dominated in the current filtration, or trims it when it stays
// dominated to the end. Only the edges at its ends can end a domination
// (an edge elsewhere leaves N[a]∩N[b] unchanged and only enlarges the
// witness's neighbourhood), so the times tried are the later times of
// those edges.
func (c *collapser) shift(k int32) (dropped bool) {
	e := c.edges[k]
	s := c.time[k]
	w := c.dominated(e.a, e.b, s)
	if w < 0 {
		return false
	}
	for {
		// The first later time at which an edge at an end brings a common
		// neighbour that w does not see; w dominates until then.
		next := math.Inf(1)
		for _, end := range [2]int32{e.a, e.b} {
			other := e.a + e.b - end
			for _, x := range c.nbr[end] {
				t := x.t
				if t <= s || t >= next || x.v == other {
					continue
				}
				if c.in(other, x.v, t) && !c.in(w, x.v, t) {
					next = t
				}
			}
		}
		if math.IsInf(next, 1) {
			break
		}
		s = next
		if w = c.dominated(e.a, e.b, s); w < 0 {
			c.setTime(k, s)
			return false
		}
	}
	c.setTime(k, trimmed)
	return true
}

// compact removes the dropped edges from the neighbour lists.
func (c *collapser) compact() {
	for u, l := range c.nbr {
		c.nbr[u] = slices.DeleteFunc(l, func(x nb) bool { return math.IsInf(x.t, 1) })
	}
	c.reindex()
}

// reindex records where each edge sits in the lists of its ends.
func (c *collapser) reindex() {
	for u, l := range c.nbr {
		for i, x := range l {
			if c.edges[x.id].a == int32(u) {
				c.at[x.id][0] = int32(i)
			} else {
				c.at[x.id][1] = int32(i)
			}
		}
	}
}
