// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"fmt"
	"math"
	"sync"
	"sync/atomic"
	"unsafe"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/budget"
)

// PointEdges lists the edges of the Vietoris–Rips complex of a point
// cloud (one point per row) under set.Metric: the pairs of points at
// distance at most the threshold, with the very lengths (bit for bit)
// that PointDistances gives them, but without storing the n(n−1)/2
// distances. Where few pairs are within the threshold, this takes a
// fraction of the memory of PointDistances; the distances are computed
// two or three times instead, blockwise over the rows on all cores.
//
// The threshold is the one Rips uses: set.Threshold, or the enclosing
// radius when that is zero or larger (edges longer than it do not change
// the barcode). RipsDistances or CollapseEdges of the result with the
// same settings give the bars of Rips. Pairs at distance +Inf are not
// listed. The edges are ordered by their larger index I, then by J < I.
//
// Only the Euclidean and Cosine metrics are supported: the hop counts of
// KNNGeodesic depend on the whole k-NN graph, so it gives an ErrSettings
// error (use PointDistances). Other errors are those of Rips, and a
// *MemoryError when the list, counted before it is allocated, would
// exceed set.MaxBytes.
func PointEdges(ctx context.Context, points mat.Matrix, set *Settings) (*Sparse, error) {
	ctx = withWorkers(ctx, set)
	c, r, err := prepareMatrix(points, set)
	if err != nil {
		return nil, err
	}
	return cloudEdges(ctx, c, r)
}

// edgeKeys computes, row by row, keys that order the distances of a
// cloud: keys(i, dst) fills dst[j], j < i, with the key of d(i,j);
// bound(t) is the largest key of a distance ≤ t; dist turns a key into
// the distance.
type edgeKeys struct {
	keys  func(i int, dst []float64)
	bound func(t float64) float64
	dist  func(key float64) float64
}

// keysOf returns the keys of the metric of r on c.
func keysOf(c *cloud, r resolved) (*edgeKeys, error) {
	switch r.metric {
	case Euclidean:
		// Squared distances: math.Sqrt is correctly rounded, hence
		// monotone, so it can wait for the listed edges.
		return &edgeKeys{
			keys: func(i int, dst []float64) {
				xi := c.row(i)
				for j := range dst {
					dst[j] = sqDist(xi, c.row(j))
				}
			},
			bound: sqBound,
			dist:  math.Sqrt,
		}, nil
	case Cosine:
		// The arithmetic of the cosine function, for the same bits.
		norm, err := cosineNorms(c)
		if err != nil {
			return nil, err
		}
		same := func(x float64) float64 { return x }
		return &edgeKeys{
			keys: func(i int, dst []float64) {
				xi := c.row(i)
				for j := range dst {
					dst[j] = cosineDissim(xi, c.row(j), norm[i], norm[j])
				}
			},
			bound: same,
			dist:  same,
		}, nil
	}
	return nil, fmt.Errorf("%w: edge lists of the %v metric need the whole k-NN graph; use PointDistances", ErrSettings, r.metric)
}

// sqBound returns the largest b with math.Sqrt(b) ≤ t, so that a squared
// distance q is at most b exactly when math.Sqrt(q) ≤ t.
func sqBound(t float64) float64 {
	if math.IsInf(t, 1) {
		return t
	}
	b := t * t
	for b > 0 && math.Sqrt(b) > t {
		b = math.Nextafter(b, 0)
	}
	for {
		up := math.Nextafter(b, math.Inf(1))
		if math.Sqrt(up) > t {
			return b
		}
		b = up
	}
}

// finiteBound lowers a bound of +Inf to the largest float, so that pairs
// at distance +Inf are never edges.
func finiteBound(b float64) float64 {
	return min(b, math.MaxFloat64)
}

// forRows calls f(w, i, keys) for every row i in 1..n−1, keys holding
// the keys of row i, on workers w that take blocks of rows in turn (so
// the triangular work stays balanced). It stops early with ctx.Err()
// when ctx is cancelled. skip, if not nil, leaves out the rows it
// reports.
func (k *edgeKeys) forRows(ctx context.Context, n, workers, block int, skip func(i int) bool, f func(w, i int, keys []float64)) error {
	var next atomic.Int64
	var wg sync.WaitGroup
	errs := make([]error, workers)
	for w := range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			keys := make([]float64, n)
			for {
				lo := 1 + int(next.Add(1)-1)*block
				if lo >= n {
					return
				}
				if err := ctx.Err(); err != nil {
					errs[w] = err
					return
				}
				for i := lo; i < min(lo+block, n); i++ {
					if skip != nil && skip(i) {
						continue
					}
					k.keys(i, keys[:i])
					f(w, i, keys[:i])
				}
			}
		}()
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// cloudEdges is PointEdges for a validated cloud.
func cloudEdges(ctx context.Context, c *cloud, r resolved) (*Sparse, error) {
	k, err := keysOf(c, r)
	if err != nil {
		return nil, err
	}
	n := c.n
	workers := min(budget.Workers(ctx), max(1, n/64))
	// Blocks of up to 16 rows and about 2²⁰ coordinates, so that a
	// cancellation is seen within milliseconds.
	block := max(1, min(16, (1<<20)/(n*c.dim)))
	// Per row: its count and its largest key; per worker: the largest
	// key of each column.
	est := int64(n) * (8 + 8 + 16*int64(workers))
	if est > r.maxBytes {
		return nil, &MemoryError{Estimate: est, Budget: r.maxBytes, Points: n, What: "the per-point tables of the edge list"}
	}
	if r.progress != nil {
		r.progress(Progress{Phase: "distances", Total: int64(n)})
	}
	count := make([]int64, n)
	rowMax := make([]float64, n)
	colMax := make([][]float64, workers)
	for w := range colMax {
		colMax[w] = make([]float64, n)
	}
	var nan atomic.Int64
	nan.Store(-1)
	bound := finiteBound(k.bound(r.threshold))
	err = k.forRows(ctx, n, workers, block, nil, func(w, i int, keys []float64) {
		m, cnt := 0.0, int64(0)
		cm := colMax[w]
		for j, v := range keys {
			if v <= bound {
				cnt++
			}
			m = max(m, v)
			cm[j] = max(cm[j], v)
			if v != v {
				nan.CompareAndSwap(-1, int64(i)<<32|int64(j))
			}
		}
		count[i], rowMax[i] = cnt, m
	})
	if err != nil {
		return nil, err
	}
	if p := nan.Load(); p >= 0 {
		return nil, fmt.Errorf("%w: the %v distance of rows %d and %d is NaN (coordinates too large)", ErrDistances, r.metric, p>>32, p&(1<<32-1))
	}
	enc := math.Inf(1)
	for i := range n {
		m := rowMax[i]
		for w := range colMax {
			m = max(m, colMax[w][i])
		}
		enc = min(enc, m)
	}
	if e := k.dist(enc); e < r.threshold {
		// The threshold is the enclosing radius: count again.
		bound = finiteBound(k.bound(e))
		err = k.forRows(ctx, n, workers, block, nil, func(_, i int, keys []float64) {
			cnt := int64(0)
			for _, v := range keys {
				if v <= bound {
					cnt++
				}
			}
			count[i] = cnt
		})
		if err != nil {
			return nil, err
		}
	}
	var m int64
	for i, cnt := range count {
		count[i] = m
		m += cnt
	}
	if est += m * int64(unsafe.Sizeof(Edge{})); est > r.maxBytes {
		return nil, &MemoryError{Estimate: est, Budget: r.maxBytes, Points: n, What: fmt.Sprintf("the list of %d edges", m)}
	}
	edges := make([]Edge, m)
	// count now holds where each row starts.
	end := func(i int) int64 {
		if i+1 < n {
			return count[i+1]
		}
		return m
	}
	err = k.forRows(ctx, n, workers, block, func(i int) bool { return count[i] == end(i) }, func(_, i int, keys []float64) {
		out := edges[count[i]:end(i)]
		at := 0
		for j, v := range keys {
			if v <= bound {
				out[at] = Edge{I: i, J: j, D: k.dist(v)}
				at++
			}
		}
	})
	if err != nil {
		return nil, err
	}
	return &Sparse{N: n, Edges: edges}, nil
}
