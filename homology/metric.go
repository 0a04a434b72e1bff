// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"cmp"
	"context"
	"fmt"
	"math"
	"slices"
	"sync"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/budget"
)

// cloud is a validated point cloud stored row-major.
type cloud struct {
	n, dim int
	x      []float64
}

func (c *cloud) row(i int) []float64 { return c.x[i*c.dim : (i+1)*c.dim] }

func cloudFromMatrix(m mat.Matrix) (*cloud, error) {
	if m == nil {
		return nil, fmt.Errorf("%w: nil matrix", ErrTooFewPoints)
	}
	r, c := m.Dims()
	if r < 2 {
		return nil, fmt.Errorf("%w: cloud has %d", ErrTooFewPoints, r)
	}
	if c < 1 {
		return nil, fmt.Errorf("homology: points have no coordinates")
	}
	cl := &cloud{n: r, dim: c, x: make([]float64, r*c)}
	if d, ok := m.(mat.RawMatrixer); ok {
		raw := d.RawMatrix()
		for i := 0; i < r; i++ {
			copy(cl.x[i*c:(i+1)*c], raw.Data[i*raw.Stride:i*raw.Stride+c])
		}
	} else {
		for i := 0; i < r; i++ {
			for j := 0; j < c; j++ {
				cl.x[i*c+j] = m.At(i, j)
			}
		}
	}
	return cl, cl.checkFinite()
}

func cloudFromRows(rows [][]float64) (*cloud, error) {
	if len(rows) < 2 {
		return nil, fmt.Errorf("%w: cloud has %d", ErrTooFewPoints, len(rows))
	}
	c := len(rows[0])
	if c < 1 {
		return nil, fmt.Errorf("homology: row 0 has no coordinates")
	}
	cl := &cloud{n: len(rows), dim: c, x: make([]float64, len(rows)*c)}
	for i, r := range rows {
		if len(r) != c {
			return nil, fmt.Errorf("%w: row %d has %d coordinates, row 1 has %d", ErrRagged, i+1, len(r), c)
		}
		copy(cl.x[i*c:], r)
	}
	return cl, cl.checkFinite()
}

func (c *cloud) checkFinite() error {
	for k, v := range c.x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: %v at row %d, column %d", ErrNonFinite, v, k/c.dim+1, k%c.dim+1)
		}
		if math.Abs(v) > MaxCoordinate {
			return fmt.Errorf("%w: %v at row %d, column %d is above %g, where squared distances overflow", ErrMagnitude, v, k/c.dim+1, k%c.dim+1, MaxCoordinate)
		}
	}
	return nil
}

// parallelRows runs f(i) for i in 0..n−1 on up to budget.Workers(ctx) goroutines,
// rows interleaved so that triangular work is balanced. It stops early
// and returns ctx.Err() when ctx is cancelled.
func parallelRows(ctx context.Context, n int, f func(i int)) error {
	w := min(budget.Workers(ctx), max(1, n/64))
	var wg sync.WaitGroup
	errs := make([]error, w)
	for g := 0; g < w; g++ {
		wg.Add(1)
		go func(g int) {
			defer wg.Done()
			for i := g; i < n; i += w {
				if i%64 == g%64 && ctx.Err() != nil {
					errs[g] = ctx.Err()
					return
				}
				f(i)
			}
		}(g)
	}
	wg.Wait()
	for _, err := range errs {
		if err != nil {
			return err
		}
	}
	return nil
}

// euclidean returns the Euclidean distances of the cloud.
func euclidean(ctx context.Context, c *cloud) (*LowerTriangular, error) {
	n := c.n
	data := make([]float64, n*(n-1)/2)
	err := parallelRows(ctx, n, func(i int) {
		xi := c.row(i)
		out := data[i*(i-1)/2 : i*(i-1)/2+i]
		for j := range out {
			out[j] = math.Sqrt(sqDist(xi, c.row(j)))
		}
	})
	if err != nil {
		return nil, err
	}
	return &LowerTriangular{N: n, Data: data}, nil
}

// sqDist returns the squared Euclidean distance of x and y (len(y) ≥
// len(x)). Four partial sums break the dependency chain of one running
// sum, so the loop runs about three times faster; the result differs
// from the sequential sum only by rounding.
func sqDist(x, y []float64) float64 {
	y = y[:len(x)]
	var s0, s1, s2, s3 float64
	k := 0
	for ; k+4 <= len(x); k += 4 {
		t0 := x[k] - y[k]
		t1 := x[k+1] - y[k+1]
		t2 := x[k+2] - y[k+2]
		t3 := x[k+3] - y[k+3]
		s0 += t0 * t0
		s1 += t1 * t1
		s2 += t2 * t2
		s3 += t3 * t3
	}
	for ; k < len(x); k++ {
		t := x[k] - y[k]
		s0 += t * t
	}
	return (s0 + s1) + (s2 + s3)
}

// cosine returns the cosine dissimilarities of the cloud.
func cosine(ctx context.Context, c *cloud) (*LowerTriangular, error) {
	n := c.n
	norm, err := cosineNorms(c)
	if err != nil {
		return nil, err
	}
	data := make([]float64, n*(n-1)/2)
	err = parallelRows(ctx, n, func(i int) {
		xi := c.row(i)
		out := data[i*(i-1)/2 : i*(i-1)/2+i]
		for j := range out {
			out[j] = cosineDissim(xi, c.row(j), norm[i], norm[j])
		}
	})
	if err != nil {
		return nil, err
	}
	return &LowerTriangular{N: n, Data: data}, nil
}

// cosineNorms returns the Euclidean norms of the rows of c, refusing a
// zero row (its cosine is undefined).
func cosineNorms(c *cloud) ([]float64, error) {
	norm := make([]float64, c.n)
	for i := range norm {
		if norm[i] = math.Sqrt(dot(c.row(i), c.row(i))); norm[i] == 0 {
			return nil, fmt.Errorf("homology: cosine metric: row %d is the zero vector", i+1)
		}
	}
	return norm, nil
}

// cosineDissim returns 1 − cos(x, y), at least 0, for x and y of norms
// nx and ny.
func cosineDissim(x, y []float64, nx, ny float64) float64 {
	return max(1-dot(x, y)/(nx*ny), 0)
}

// dot returns the inner product of x and y (len(y) ≥ len(x)), summed in
// order.
func dot(x, y []float64) float64 {
	y = y[:len(x)]
	s := 0.0
	for k, v := range x {
		s += v * y[k]
	}
	return s
}

// knnGeodesic replaces Euclidean distances e by hop counts on the
// symmetrised k-nearest-neighbour graph (ties in distance broken by the
// smaller index). Unreachable pairs get +Inf. e is overwritten.
func knnGeodesic(ctx context.Context, e *LowerTriangular, k int) (*LowerTriangular, error) {
	n := e.N
	adj := make([][]int32, n)
	var mu sync.Mutex
	nb := make([][]int32, n)
	err := parallelRows(ctx, n, func(i int) {
		idx := make([]int32, 0, n-1)
		for j := 0; j < n; j++ {
			if j != i {
				idx = append(idx, int32(j))
			}
		}
		slices.SortFunc(idx, func(a, b int32) int {
			if c := cmp.Compare(e.Dist(i, int(a)), e.Dist(i, int(b))); c != 0 {
				return c
			}
			return cmp.Compare(a, b)
		})
		mu.Lock()
		nb[i] = slices.Clone(idx[:k])
		mu.Unlock()
	})
	if err != nil {
		return nil, err
	}
	for i, list := range nb {
		for _, j := range list {
			adj[i] = append(adj[i], j)
			adj[j] = append(adj[j], int32(i))
		}
	}
	for i := range adj {
		slices.Sort(adj[i])
		adj[i] = slices.Compact(adj[i])
	}
	inf := math.Inf(1)
	err = parallelRows(ctx, n, func(s int) {
		hop := make([]int32, n)
		for i := range hop {
			hop[i] = -1
		}
		queue := make([]int32, 0, n)
		hop[s] = 0
		queue = append(queue, int32(s))
		for q := 0; q < len(queue); q++ {
			u := queue[q]
			for _, v := range adj[u] {
				if hop[v] < 0 {
					hop[v] = hop[u] + 1
					queue = append(queue, v)
				}
			}
		}
		// Row s holds the pairs (s, j) with j < s.
		out := e.Data[s*(s-1)/2 : s*(s-1)/2+s]
		for j := range out {
			if hop[j] < 0 {
				out[j] = inf
			} else {
				out[j] = float64(hop[j])
			}
		}
	})
	if err != nil {
		return nil, err
	}
	return e, nil
}

// enclosingRadius returns min over i of max over j of d(i,j) and the
// largest finite distance.
func enclosingRadius(t *LowerTriangular) (enc, maxFinite float64) {
	n := t.N
	rowMax := make([]float64, n)
	for i := 1; i < n; i++ {
		row := t.Data[i*(i-1)/2 : i*(i-1)/2+i]
		for j, d := range row {
			if d > rowMax[i] {
				rowMax[i] = d
			}
			if d > rowMax[j] {
				rowMax[j] = d
			}
			if d > maxFinite && !isInf(d) {
				maxFinite = d
			}
		}
	}
	enc = math.Inf(1)
	for _, m := range rowMax {
		enc = min(enc, m)
	}
	return enc, maxFinite
}
