// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"

	"gonum.org/v1/gonum/blas/blas64"

	"crease.dev/crease/internal/knn"
)

// blockBytes bounds the distance block held at one time (rows × n × 8).
// It is a variable so that tests can force many small blocks.
var blockBytes = 32 << 20

// blockRows is the number of rows per distance block for n points.
func blockRows(n int) int {
	b := blockBytes / (8 * n)
	if b < 1 {
		b = 1
	}
	if b > n {
		b = n
	}
	return b
}

// centred returns the sample shifted by its column means (distances do
// not change; the Gram identity below loses less to cancellation) and the
// squared row norms.
func (s *sample) centred() ([]float64, []float64) {
	mu := make([]float64, s.d)
	for i := 0; i < s.n; i++ {
		for j, v := range s.row(i) {
			mu[j] += v
		}
	}
	for j := range mu {
		mu[j] /= float64(s.n)
	}
	c := make([]float64, len(s.x))
	sq := make([]float64, s.n)
	for i := 0; i < s.n; i++ {
		var t float64
		for j, v := range s.row(i) {
			w := v - mu[j]
			c[i*s.d+j] = w
			t += w * w
		}
		sq[i] = t
	}
	return c, sq
}

// distBlocks calls fn for consecutive row blocks [i0,i1) with the
// (i1−i0)×n Euclidean distances, computed as √max(0, ‖a‖²+‖b‖²−2a·b) by
// one product per block (knn.Gram), and exactly 0 on the diagonal. dst is
// reused between calls. It stops with ctx.Err() when ctx is cancelled.
func (s *sample) distBlocks(ctx context.Context, fn func(i0, i1 int, dst []float64)) error {
	c, sq := s.centred()
	all := blas64.General{Rows: s.n, Cols: s.d, Stride: s.d, Data: c}
	rows := blockRows(s.n)
	buf := make([]float64, rows*s.n)
	for i0 := 0; i0 < s.n; i0 += rows {
		if err := ctx.Err(); err != nil {
			return err
		}
		i1 := min(i0+rows, s.n)
		a := blas64.General{Rows: i1 - i0, Cols: s.d, Stride: s.d, Data: c[i0*s.d : i1*s.d]}
		g := blas64.General{Rows: i1 - i0, Cols: s.n, Stride: s.n, Data: buf[:(i1-i0)*s.n]}
		knn.Gram(g, a, all)
		for r := 0; r < i1-i0; r++ {
			i := i0 + r
			row := g.Data[r*s.n : (r+1)*s.n]
			for j := range row {
				v := sq[i] + sq[j] - 2*row[j]
				if v < 0 {
					v = 0
				}
				row[j] = math.Sqrt(v)
			}
			row[i] = 0
		}
		fn(i0, i1, g.Data)
	}
	return nil
}

// exactDist is the direct Euclidean distance between rows i and j.
func (s *sample) exactDist(i, j int) float64 {
	a, b := s.row(i), s.row(j)
	var t float64
	for k, v := range a {
		w := v - b[k]
		t += w * w
	}
	return math.Sqrt(t)
}
