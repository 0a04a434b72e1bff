// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Rips computes the Vietoris–Rips barcode of a point cloud, one point
// per row of points, with the metric, threshold, dimensions and field of
// set (nil means DefaultSettings()). Errors: fewer than two points
// (ErrTooFewPoints), NaN or ±Inf coordinates (ErrNonFinite), invalid
// settings (ErrSettings), K ≥ number of points, memory over budget
// (*MemoryError), index overflow (ErrOverflow) and ctx.Err() on
// cancellation.
func Rips(ctx context.Context, points mat.Matrix, set *Settings) (*Barcode, error) {
	ctx = withWorkers(ctx, set)
	c, r, err := prepareMatrix(points, set)
	if err != nil {
		return nil, err
	}
	return ripsCloud(ctx, c, r)
}

func prepareMatrix(points mat.Matrix, set *Settings) (*cloud, resolved, error) {
	r, err := resolve(set)
	if err != nil {
		return nil, r, err
	}
	c, err := cloudFromMatrix(points)
	return c, r, err
}

// RipsPoints is Rips for a cloud given as rows; rows of different
// lengths give ErrRagged.
func RipsPoints(ctx context.Context, points [][]float64, set *Settings) (*Barcode, error) {
	ctx = withWorkers(ctx, set)
	r, err := resolve(set)
	if err != nil {
		return nil, err
	}
	c, err := cloudFromRows(points)
	if err != nil {
		return nil, err
	}
	return ripsCloud(ctx, c, r)
}

// PointDistances returns the distances of the cloud under the metric of
// set (nil means Euclidean), in compressed lower-triangular storage.
func PointDistances(ctx context.Context, points mat.Matrix, set *Settings) (*LowerTriangular, error) {
	ctx = withWorkers(ctx, set)
	c, r, err := prepareMatrix(points, set)
	if err != nil {
		return nil, err
	}
	return cloudDistances(ctx, c, r)
}

func cloudDistances(ctx context.Context, c *cloud, r resolved) (*LowerTriangular, error) {
	if r.metric == KNNGeodesic && (r.k < 1 || r.k >= c.n) {
		return nil, fmt.Errorf("%w: knn metric needs 1 ≤ K < %d points, got K = %d", ErrSettings, c.n, r.k)
	}
	est := int64(c.n) * int64(c.n-1) / 2 * 8
	if r.metric == KNNGeodesic {
		est += int64(c.n) * int64(c.n) * 4
	}
	if est > r.maxBytes {
		return nil, &MemoryError{Estimate: est, Budget: r.maxBytes, Points: c.n, What: "the distance matrix"}
	}
	if r.progress != nil {
		r.progress(Progress{Phase: "distances", Total: int64(c.n)})
	}
	switch r.metric {
	case Cosine:
		return cosine(ctx, c)
	case KNNGeodesic:
		t, err := euclidean(ctx, c)
		if err != nil {
			return nil, err
		}
		return knnGeodesic(ctx, t, r.k)
	}
	return euclidean(ctx, c)
}

func ripsCloud(ctx context.Context, c *cloud, r resolved) (*Barcode, error) {
	t, err := cloudDistances(ctx, c, r)
	if err != nil {
		return nil, err
	}
	b, err := ripsTriangle(ctx, t, r)
	if err != nil {
		return nil, err
	}
	b.Metric = r.metric
	if r.metric == KNNGeodesic {
		b.K = r.k
	}
	return b, nil
}

// RipsDistances computes the Vietoris–Rips barcode of precomputed
// distances: a *LowerTriangular (see NewLowerTriangular,
// NewFullDistances), a *Sparse edge list, or any other Distances (read
// through Dist). Pairs at distance +Inf never enter the complex.
// set.Metric and set.K are ignored.
func RipsDistances(ctx context.Context, d Distances, set *Settings) (*Barcode, error) {
	ctx = withWorkers(ctx, set)
	r, err := resolve(set)
	if err != nil {
		return nil, err
	}
	if d == nil || d.Len() < 2 {
		n := 0
		if d != nil {
			n = d.Len()
		}
		return nil, fmt.Errorf("%w: distances on %d", ErrTooFewPoints, n)
	}
	r.metric, r.k = Euclidean, 0
	switch d := d.(type) {
	case *LowerTriangular:
		if int64(len(d.Data)) != int64(d.N)*int64(d.N-1)/2 {
			return nil, fmt.Errorf("%w: %d lower-triangular entries for %d points", ErrDistances, len(d.Data), d.N)
		}
		for k, v := range d.Data {
			if math.IsNaN(v) || v < 0 {
				return nil, fmt.Errorf("%w: entry %d is %v", ErrDistances, k, v)
			}
		}
		return ripsTriangle(ctx, d, r)
	case *Sparse:
		if _, err := NewSparse(d.N, d.Edges); err != nil {
			return nil, err
		}
		return ripsSparse(ctx, d, r)
	}
	n := d.Len()
	est := int64(n) * int64(n-1) / 2 * 8
	if est > r.maxBytes {
		return nil, &MemoryError{Estimate: est, Budget: r.maxBytes, Points: n, What: "the distance matrix"}
	}
	data := make([]float64, n*(n-1)/2)
	for i := 1; i < n; i++ {
		for j := 0; j < i; j++ {
			v := d.Dist(i, j)
			if math.IsNaN(v) || v < 0 {
				return nil, fmt.Errorf("%w: distance (%d,%d) is %v", ErrDistances, i, j, v)
			}
			data[i*(i-1)/2+j] = v
		}
	}
	return ripsTriangle(ctx, &LowerTriangular{N: n, Data: data}, r)
}

func newEngine(ctx context.Context, n int, r resolved) (*engine, error) {
	// Per-vertex tables: binomials, neighbour list offsets, union–find
	// and scratch, about 100 bytes.
	if est := int64(n) * 100; est > r.maxBytes {
		return nil, &MemoryError{Estimate: est, Budget: r.maxBytes, Points: n, What: "the per-vertex tables"}
	}
	e := &engine{ctx: ctx, n: n, maxDim: r.maxDim, p: int64(r.p), budget: r.maxBytes, progress: r.progress}
	if err := e.makeBinomials(); err != nil {
		return nil, err
	}
	e.makeInverses()
	e.nextTick = tickEvery
	return e, nil
}

// threshold picks the threshold actually used from the user's choice and
// the scale beyond which nothing changes.
func pickThreshold(user, enc, maxFinite float64) (thr, full float64, truncated bool) {
	full = enc
	if isInf(enc) {
		full = maxFinite
	}
	if user >= full {
		return full, full, false
	}
	return user, full, true
}

func ripsTriangle(ctx context.Context, t *LowerTriangular, r resolved) (*Barcode, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	enc, maxFinite := enclosingRadius(t)
	thr, _, trunc := pickThreshold(r.threshold, enc, maxFinite)
	e, err := newEngine(ctx, t.N, r)
	if err != nil {
		return nil, err
	}
	e.thr = thr
	if err := e.buildFromTriangle(t); err != nil {
		return nil, err
	}
	return e.finish(r, thr, enc, trunc)
}

func ripsSparse(ctx context.Context, s *Sparse, r resolved) (*Barcode, error) {
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	// Enclosing radius: +Inf unless some vertex is joined to all others.
	n := s.N
	if est := int64(n) * 100; est > r.maxBytes {
		return nil, &MemoryError{Estimate: est, Budget: r.maxBytes, Points: n, What: "the per-vertex tables"}
	}
	rowMax := make([]float64, n)
	deg := make([]int, n)
	maxFinite := 0.0
	for _, ed := range s.Edges {
		if isInf(ed.D) {
			continue
		}
		deg[ed.I]++
		deg[ed.J]++
		rowMax[ed.I] = max(rowMax[ed.I], ed.D)
		rowMax[ed.J] = max(rowMax[ed.J], ed.D)
		maxFinite = max(maxFinite, ed.D)
	}
	enc := math.Inf(1)
	for v := range n {
		if deg[v] == n-1 {
			enc = min(enc, rowMax[v])
		}
	}
	thr, _, trunc := pickThreshold(r.threshold, enc, maxFinite)
	e, err := newEngine(ctx, n, r)
	if err != nil {
		return nil, err
	}
	e.thr = thr
	if err := e.buildFromSparse(s); err != nil {
		return nil, err
	}
	return e.finish(r, thr, enc, trunc)
}

func (e *engine) finish(r resolved, thr, enc float64, trunc bool) (*Barcode, error) {
	bars, err := e.run()
	if err != nil {
		return nil, err
	}
	return &Barcode{
		Bars:            bars,
		Threshold:       thr,
		EnclosingRadius: enc,
		Truncated:       trunc,
		Field:           r.p,
		Metric:          r.metric,
		MaxDim:          r.maxDim,
		Points:          e.n,
		Stats:           e.stats,
	}, nil
}
