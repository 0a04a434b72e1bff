// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package knn

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math"
	"slices"
	"sync"
	"sync/atomic"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/budget"
)

// Block sizes of the distance computation: rowBlock rows of the sample are
// compared with colBlock columns at a time, so each worker holds a
// rowBlock×colBlock product (1 MiB).
const (
	rowBlock = 128
	colBlock = 1024
)

// MaxCoordinate is the largest coordinate magnitude NewCloud accepts:
// sums of squared differences of larger values can overflow float64.
// It equals homology.MaxCoordinate.
const MaxCoordinate = 1e150

// Graph is a k-nearest-neighbour graph. Row i of Index and Dist lists the
// K nearest other points of point i, sorted by distance and then by index;
// Dist holds Euclidean distances. A Graph is not modified after Search
// returns it and is safe for concurrent reads.
type Graph struct {
	K     int
	Index [][]int
	Dist  [][]float64
}

// Error reports bad input. Row and Col are 0-based and are −1 when they
// do not apply; the message gives them 1-based, as every crease message
// does.
type Error struct {
	Row, Col int
	Reason   string
}

// Error implements the error interface.
func (e *Error) Error() string {
	switch {
	case e.Row >= 0 && e.Col >= 0:
		return fmt.Sprintf("knn: row %d, column %d: %s", e.Row+1, e.Col+1, e.Reason)
	case e.Row >= 0:
		return fmt.Sprintf("knn: row %d: %s", e.Row+1, e.Reason)
	}
	return "knn: " + e.Reason
}

// Cloud is a validated copy of a point set, prepared for repeated
// neighbour queries. Build it once with [NewCloud] when several queries
// run on the same points. A Cloud is immutable and safe for concurrent use.
type Cloud struct {
	n, d  int
	raw   []float64 // row-major n×d, the input values
	cen   blas64.General
	norm  []float64 // squared norms of the centred rows
	slack float64   // rounding bound factor: |approx−true| ≤ slack·(normᵢ+normⱼ)

	progress func(done, total int)
}

// WithProgress returns a Cloud sharing c's points whose [Cloud.Search] and
// [Cloud.Pairs] call progress after each finished block of rows with the
// number of blocks done so far and the total. Calls never overlap and done
// increases by one each time; progress must not block for long.
func (c *Cloud) WithProgress(progress func(done, total int)) *Cloud {
	d := *c
	d.progress = progress
	return &d
}

// NewCloud copies the rows of x as points. It returns an [*Error] if x is
// nil or empty or holds NaN, ±Inf or a value above MaxCoordinate in
// magnitude (naming the first such row and column).
func NewCloud(x mat.Matrix) (*Cloud, error) {
	if x == nil {
		return nil, &Error{Row: -1, Col: -1, Reason: "nil matrix"}
	}
	n, d := x.Dims()
	if n == 0 || d == 0 {
		return nil, &Error{Row: -1, Col: -1, Reason: fmt.Sprintf("empty sample (%d×%d)", n, d)}
	}
	c := &Cloud{n: n, d: d, raw: make([]float64, n*d)}
	if rm, ok := x.(mat.RawMatrixer); ok {
		r := rm.RawMatrix()
		for i := 0; i < n; i++ {
			copy(c.raw[i*d:(i+1)*d], r.Data[i*r.Stride:i*r.Stride+d])
		}
	} else {
		for i := 0; i < n; i++ {
			for j := 0; j < d; j++ {
				c.raw[i*d+j] = x.At(i, j)
			}
		}
	}
	for i, v := range c.raw {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil, &Error{Row: i / d, Col: i % d, Reason: fmt.Sprintf("non-finite value %v", v)}
		}
		if math.Abs(v) > MaxCoordinate {
			return nil, &Error{Row: i / d, Col: i % d, Reason: fmt.Sprintf("value %v is above %g, where squared distances overflow", v, MaxCoordinate)}
		}
	}
	mean := make([]float64, d)
	for i := 0; i < n; i++ {
		for j, v := range c.raw[i*d : (i+1)*d] {
			mean[j] += v
		}
	}
	for j := range mean {
		mean[j] /= float64(n)
	}
	cen := make([]float64, n*d)
	c.norm = make([]float64, n)
	for i := 0; i < n; i++ {
		var s float64
		for j := 0; j < d; j++ {
			v := c.raw[i*d+j] - mean[j]
			cen[i*d+j] = v
			s += v * v
		}
		c.norm[i] = s
	}
	c.cen = blas64.General{Rows: n, Cols: d, Stride: d, Data: cen}
	// Error of the Gram formula for a d-term dot product and two d-term
	// norms, plus the rounding of the centring, is below a small multiple
	// of d·ε·(‖xᵢ‖²+‖xⱼ‖²) (standard forward error bound γ_d of a sum of
	// products); a factor 4 on top keeps the bound safe.
	c.slack = 4 * float64(2*d+16) * 0x1p-52
	return c, nil
}

// Len returns the number of points.
func (c *Cloud) Len() int { return c.n }

// Dim returns the number of coordinates of each point.
func (c *Cloud) Dim() int { return c.d }

// Dist returns the Euclidean distance between points i and j, computed
// directly from the coordinates as all distances in this package are. It
// panics if i or j is out of range.
func (c *Cloud) Dist(i, j int) float64 {
	a := c.raw[i*c.d : (i+1)*c.d]
	b := c.raw[j*c.d : (j+1)*c.d]
	var s float64
	for k, v := range a {
		t := v - b[k]
		s += t * t
	}
	return math.Sqrt(s)
}

// gram writes the products of rows [i0,i1) with rows [j0,j1) of the centred
// cloud into buf (row-major, stride j1−j0).
func (c *Cloud) gram(buf []float64, i0, i1, j0, j1 int) blas64.General {
	a := blas64.General{Rows: i1 - i0, Cols: c.d, Stride: c.d, Data: c.cen.Data[i0*c.d:]}
	b := blas64.General{Rows: j1 - j0, Cols: c.d, Stride: c.d, Data: c.cen.Data[j0*c.d:]}
	g := blas64.General{Rows: i1 - i0, Cols: j1 - j0, Stride: j1 - j0, Data: buf[:(i1-i0)*(j1-j0)]}
	Gram(g, a, b)
	return g
}

// Gram writes the products a·bᵀ of the rows of a with the rows of b into
// dst (a.Rows × b.Rows), in the calling goroutine. It panics if the shapes
// do not match.
//
// It makes one matrix–vector product b·aᵢ per row of a (gonum's Dgemv,
// whose kernel takes four rows of b at a time): on the blocks of this
// package that is 1.7–5 times as fast as gonum's Dgemm
// (BenchmarkGram), whose kernels take one dot product at a time and
// which would also start goroutines of its own, outside the context's
// worker budget.
func Gram(dst, a, b blas64.General) {
	if a.Cols != b.Cols || dst.Rows != a.Rows || dst.Cols != b.Rows {
		panic(fmt.Sprintf("knn: Gram of %d×%d and %d×%d into %d×%d", a.Rows, a.Cols, b.Rows, b.Cols, dst.Rows, dst.Cols))
	}
	for i := 0; i < a.Rows; i++ {
		x := blas64.Vector{N: a.Cols, Inc: 1, Data: a.Data[i*a.Stride : i*a.Stride+a.Cols]}
		y := blas64.Vector{N: b.Rows, Inc: 1, Data: dst.Data[i*dst.Stride : i*dst.Stride+dst.Cols]}
		blas64.Gemv(blas.NoTrans, 1, b, x, 0, y)
	}
}

// blockLen is the length of a buffer for one block of products of n
// points: rowBlock × colBlock, or less for a cloud with fewer points.
func blockLen(n int) int { return min(rowBlock, n) * min(colBlock, n) }

// parallel runs work(block) for block = 0..nblocks−1 on all cores, stopping
// at the first error or cancellation.
func parallel(ctx context.Context, nblocks int, progress func(done, total int), work func(w, block int) error) error {
	workers := min(budget.Workers(ctx), nblocks)
	var (
		pmu     sync.Mutex
		done    int
		next    atomic.Int64
		once    sync.Once
		firstEr error
		stop    atomic.Bool
		wg      sync.WaitGroup
	)
	fail := func(err error) {
		once.Do(func() { firstEr = err })
		stop.Store(true)
	}
	for w := 0; w < workers; w++ {
		wg.Go(func() {
			for !stop.Load() {
				b := int(next.Add(1) - 1)
				if b >= nblocks {
					return
				}
				if err := ctx.Err(); err != nil {
					fail(err)
					return
				}
				if err := work(w, b); err != nil {
					fail(err)
					return
				}
				if progress != nil {
					pmu.Lock()
					done++
					progress(done, nblocks)
					pmu.Unlock()
				}
			}
		})
	}
	wg.Wait()
	if firstEr == nil {
		firstEr = ctx.Err()
	}
	return firstEr
}

// Search returns the exact k nearest neighbours of every row of x under
// the Euclidean distance. It returns an error if x is empty or holds NaN
// or ±Inf, if k < 1 or k ≥ n, or if ctx is cancelled.
func Search(ctx context.Context, x mat.Matrix, k int) (*Graph, error) {
	c, err := NewCloud(x)
	if err != nil {
		return nil, err
	}
	return c.Search(ctx, k)
}

// cand is a candidate neighbour: approximate squared distance and index.
type cand struct {
	v float64
	j int
}

// rowState tracks the candidates of one row during a search.
type rowState struct {
	top   []float64 // max-heap of the k smallest approximate values
	cands []cand
	prune int // prune cands when longer than this (and than 2k+32)
}

func (s *rowState) threshold() float64 { return s.top[0] }

// offer adds candidate j at approximate value v (within slk of its
// exact one), prunes the list when it grows long, and returns the change
// in the list's length.
func (s *rowState) offer(v float64, j, k int, slk float64) int {
	s.push(v, k)
	s.cands = append(s.cands, cand{v, j})
	if len(s.cands) <= max(2*k+32, s.prune) {
		return 1
	}
	before := len(s.cands)
	t := s.threshold() + slk
	keep := s.cands[:0]
	for _, cd := range s.cands {
		if cd.v <= t {
			keep = append(keep, cd)
		}
	}
	s.cands = keep
	// Prune again when the list has doubled, so that ties, which no
	// pruning removes, cost linear time.
	s.prune = 2 * len(keep)
	return 1 - (before - len(keep))
}

func (s *rowState) push(v float64, k int) {
	h := s.top
	if len(h) < k {
		h = append(h, v)
		for i := len(h) - 1; i > 0; {
			p := (i - 1) / 2
			if h[p] >= h[i] {
				break
			}
			h[p], h[i] = h[i], h[p]
			i = p
		}
		s.top = h
		return
	}
	if v >= h[0] {
		return
	}
	h[0] = v
	for i := 0; ; {
		l, r, m := 2*i+1, 2*i+2, i
		if l < len(h) && h[l] > h[m] {
			m = l
		}
		if r < len(h) && h[r] > h[m] {
			m = r
		}
		if m == i {
			break
		}
		h[m], h[i] = h[i], h[m]
		i = m
	}
}

// Search returns the exact k nearest neighbours of every point, as the
// package-level [Search] does.
//
// Each pair of points is compared once: a worker takes a block of rows
// and the columns from that block on, and offers every product to both
// rows in a candidate list of its own (n rows per worker), which it
// prunes to the values within its k-th smallest plus the rounding slack.
// The lists of all workers are then merged row by row, and the
// candidates within the merged k-th value plus the slack get their exact
// distances. A worker's k-th smallest value is never below the merged
// one, so its pruning keeps every candidate the merge needs.
//
// Clouds of at most pairsFrom points are searched one block of rows at a
// time. When many points tie (a stage that sends many points to one place),
// the lists of all rows cannot be pruned; once a worker holds more than
// maxCands candidates the search starts over one block of rows at a time
// (searchRows), which compares every pair twice but holds candidates for
// one block only.
func (c *Cloud) Search(ctx context.Context, k int) (*Graph, error) {
	if k < 1 || k >= c.n {
		return nil, &Error{Row: -1, Col: -1, Reason: fmt.Sprintf("k = %d out of range 1..%d for %d points", k, c.n-1, c.n)}
	}
	g := &Graph{K: k, Index: make([][]int, c.n), Dist: make([][]float64, c.n)}
	idx := make([]int, c.n*k)
	dst := make([]float64, c.n*k)
	for i := range g.Index {
		g.Index[i] = idx[i*k : (i+1)*k : (i+1)*k]
		g.Dist[i] = dst[i*k : (i+1)*k : (i+1)*k]
	}
	var err error
	if c.n <= pairsFrom {
		err = c.searchRows(ctx, k, g)
	} else if err = c.searchPairs(ctx, k, g); err == errTies {
		err = c.searchRows(ctx, k, g)
	}
	if err != nil {
		return nil, err
	}
	return g, nil
}

// set makes the k exact candidates of keep that come first, by distance
// and then index, the neighbours of row i; it reorders keep.
func (g *Graph) set(i int, keep []cand) {
	slices.SortFunc(keep, func(a, b cand) int {
		if c := cmp.Compare(a.v, b.v); c != 0 {
			return c
		}
		return a.j - b.j
	})
	for q := range g.K {
		g.Index[i][q] = keep[q].j
		g.Dist[i][q] = keep[q].v
	}
}

// pairsFrom is the smallest cloud searched pair by pair: on smaller
// ones the lists per worker and their merge cost more than comparing
// every pair twice (measured on whole digits traces, 1797 points split
// into classes of about 180: 10 % slower pair by pair).
const pairsFrom = 2 * colBlock

// errTies stops searchPairs when ties keep too many candidates.
var errTies = errors.New("knn: too many tied candidates")

// maxCands returns the most candidates one worker of searchPairs may
// hold for n points and k neighbours: a few times what pruning leaves.
func maxCands(n, k int) int { return 4*n*(k+8) + 1<<16 }

// searchPairs is the search of [Cloud.Search] comparing each pair once.
func (c *Cloud) searchPairs(ctx context.Context, k int, g *Graph) error {
	maxNorm := 0.0
	for _, v := range c.norm {
		maxNorm = max(maxNorm, v)
	}
	// Both the true k-th distance and every candidate's value are within
	// slk[i] of their approximations.
	slk := make([]float64, c.n)
	for i, v := range c.norm {
		slk[i] = 2 * c.slack * (v + maxNorm)
	}
	workers := budget.Workers(ctx)
	bufs := make([][]float64, workers)
	states := make([][]rowState, workers)
	nb := (c.n + rowBlock - 1) / rowBlock
	held := make([]int, workers) // candidates each worker holds, about
	limit := maxCands(c.n, k)
	err := parallel(ctx, nb, c.progress, func(w, b int) error {
		if bufs[w] == nil {
			bufs[w] = make([]float64, blockLen(c.n))
			states[w] = make([]rowState, c.n)
		}
		st := states[w]
		i0, i1 := b*rowBlock, min((b+1)*rowBlock, c.n)
		for j0 := i0; j0 < c.n; j0 += colBlock {
			if err := ctx.Err(); err != nil {
				return err
			}
			j1 := min(j0+colBlock, c.n)
			gm := c.gram(bufs[w], i0, i1, j0, j1)
			for r := range i1 - i0 {
				i := i0 + r
				row := gm.Data[r*gm.Stride : r*gm.Stride+(j1-j0)]
				si, ni, slki := &st[i], c.norm[i], slk[i]
				start := max(0, i+1-j0)
				norms, sts, slks := c.norm[j0+start:j1], st[j0+start:j1], slk[j0+start:j1]
				for q, dot := range row[start:] {
					v := ni + norms[q] - 2*dot
					if len(si.top) < k || v <= si.top[0]+slki {
						held[w] += si.offer(v, j0+start+q, k, slki)
					}
					if sj := &sts[q]; len(sj.top) < k || v <= sj.top[0]+slks[q] {
						held[w] += sj.offer(v, i, k, slks[q])
					}
				}
			}
			if held[w] > limit {
				return errTies
			}
		}
		return nil
	})
	if err != nil {
		return err
	}
	// Merge the workers' lists, rows in blocks on all cores.
	err = parallel(ctx, nb, nil, func(w, b int) error {
		var tops []float64
		var keep []cand
		for i := b * rowBlock; i < min((b+1)*rowBlock, c.n); i++ {
			tops = tops[:0]
			for _, st := range states {
				if st != nil {
					tops = append(tops, st[i].top...)
				}
			}
			slices.Sort(tops)
			t := tops[k-1] + slk[i]
			keep = keep[:0]
			for _, st := range states {
				if st == nil {
					continue
				}
				for _, cd := range st[i].cands {
					if cd.v <= t {
						keep = append(keep, cand{c.Dist(i, cd.j), cd.j})
					}
				}
			}
			g.set(i, keep)
		}
		return nil
	})
	return err
}

// searchRows is the search of [Cloud.Search] one block of rows at a
// time against all columns: every pair is compared twice, but a worker
// holds candidates for one block of rows only, however many points tie.
func (c *Cloud) searchRows(ctx context.Context, k int, g *Graph) error {
	maxNorm := 0.0
	for _, v := range c.norm {
		maxNorm = max(maxNorm, v)
	}
	workers := budget.Workers(ctx)
	bufs := make([][]float64, workers)
	states := make([][]rowState, workers)
	nb := (c.n + rowBlock - 1) / rowBlock
	err := parallel(ctx, nb, c.progress, func(w, b int) error {
		if bufs[w] == nil {
			bufs[w] = make([]float64, blockLen(c.n))
			states[w] = make([]rowState, min(rowBlock, c.n))
		}
		i0, i1 := b*rowBlock, min((b+1)*rowBlock, c.n)
		st := states[w][:i1-i0]
		for r := range st {
			st[r].top = st[r].top[:0]
			st[r].cands = st[r].cands[:0]
			st[r].prune = 0
		}
		for j0 := 0; j0 < c.n; j0 += colBlock {
			if err := ctx.Err(); err != nil {
				return err
			}
			j1 := min(j0+colBlock, c.n)
			gm := c.gram(bufs[w], i0, i1, j0, j1)
			for r := range st {
				i := i0 + r
				s := &st[r]
				// Both the true k-th distance and every candidate's value
				// are within slk of their approximations.
				slk := 2 * c.slack * (c.norm[i] + maxNorm)
				row := gm.Data[r*gm.Stride : r*gm.Stride+(j1-j0)]
				for jj, dot := range row {
					j := j0 + jj
					if j == i {
						continue
					}
					v := c.norm[i] + c.norm[j] - 2*dot
					if len(s.top) < k || v <= s.threshold()+slk {
						s.offer(v, j, k, slk)
					}
				}
			}
		}
		for r := range st {
			i := i0 + r
			s := &st[r]
			slk := 2 * c.slack * (c.norm[i] + maxNorm)
			t := s.threshold() + slk
			keep := s.cands[:0]
			for _, cd := range s.cands {
				if cd.v <= t {
					keep = append(keep, cand{c.Dist(i, cd.j), cd.j})
				}
			}
			g.set(i, keep)
			s.cands = keep
		}
		return nil
	})
	return err
}
