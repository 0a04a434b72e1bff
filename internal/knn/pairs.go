// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package knn

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/budget"
)

// Pair is two points i < j at Euclidean distance D.
type Pair struct {
	I, J int
	D    float64
}

// Pairs calls visit with every pair of distinct rows i < j of x whose
// Euclidean distance is at most r, as [Cloud.Pairs] does.
func Pairs(ctx context.Context, x mat.Matrix, r float64, visit func(batch []Pair) error) error {
	c, err := NewCloud(x)
	if err != nil {
		return err
	}
	return c.Pairs(ctx, r, visit)
}

// Pairs calls visit with every pair of points i < j whose distance,
// computed as by [Cloud.Dist], is at most r. Each such pair is passed
// exactly once, in batches; within a batch pairs are ordered by I, then J,
// but the order of batches is unspecified. visit may be called from
// several goroutines at once and must be safe for that; the batch slice
// is reused after visit returns. A non-nil error from visit stops the
// enumeration and is returned. Pairs returns an error if r is negative or
// NaN, or ctx.Err() if ctx is cancelled.
//
// Memory use does not grow with the number of pairs: each worker holds one
// block of products and one batch of at most a block's worth of pairs.
func (c *Cloud) Pairs(ctx context.Context, r float64, visit func(batch []Pair) error) error {
	if math.IsNaN(r) || r < 0 || math.IsInf(r, 0) {
		return &Error{Row: -1, Col: -1, Reason: fmt.Sprintf("radius %v is not a finite non-negative number", r)}
	}
	r2 := r * r
	workers := budget.Workers(ctx)
	bufs := make([][]float64, workers)
	batches := make([][]Pair, workers)
	nb := (c.n + rowBlock - 1) / rowBlock
	return parallel(ctx, nb, c.progress, func(w, b int) error {
		if bufs[w] == nil {
			bufs[w] = make([]float64, blockLen(c.n))
		}
		i0, i1 := b*rowBlock, min((b+1)*rowBlock, c.n)
		for j0 := i0; j0 < c.n; j0 += colBlock {
			if err := ctx.Err(); err != nil {
				return err
			}
			j1 := min(j0+colBlock, c.n)
			gm := c.gram(bufs[w], i0, i1, j0, j1)
			batch := batches[w][:0]
			for q := 0; q < i1-i0; q++ {
				i := i0 + q
				row := gm.Data[q*gm.Stride : q*gm.Stride+(j1-j0)]
				start := max(0, i+1-j0)
				for jj := start; jj < len(row); jj++ {
					j := j0 + jj
					v := c.norm[i] + c.norm[j] - 2*row[jj]
					if v > r2+c.slack*(c.norm[i]+c.norm[j]) {
						continue
					}
					if d := c.Dist(i, j); d <= r {
						batch = append(batch, Pair{i, j, d})
					}
				}
			}
			batches[w] = batch
			if len(batch) > 0 {
				if err := visit(batch); err != nil {
					return err
				}
			}
		}
		return nil
	})
}
