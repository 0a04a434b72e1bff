// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
)

// Landmarks picks m rows of points by greedy max–min (farthest point)
// sampling in the Euclidean metric: the first is chosen at random from
// seed, each next one is the point farthest from those chosen (ties to
// the smallest index). It returns the indices in the order chosen and
// the covering radius, the largest distance from a point to its nearest
// landmark. By the stability theorem the barcode of the landmarks is
// within 2·radius of the barcode of all points in bottleneck distance
// (with the diameter convention of this package).
//
// m is clamped to 1..n; an empty matrix gives nil and 0. NaN
// coordinates make the result meaningless; Rips rejects them.
func Landmarks(points mat.Matrix, m int, seed uint64) (idx []int, radius float64) {
	if points == nil {
		return nil, 0
	}
	n, d := points.Dims()
	if n == 0 {
		return nil, 0
	}
	m = min(max(m, 1), n)
	x := make([]float64, n*d)
	for i := 0; i < n; i++ {
		for j := 0; j < d; j++ {
			x[i*d+j] = points.At(i, j)
		}
	}
	near := make([]float64, n) // squared distance to the nearest landmark
	for i := range near {
		near[i] = math.Inf(1)
	}
	rng := rand.New(rand.NewPCG(seed, 0x9e3779b97f4a7c15))
	cur := rng.IntN(n)
	idx = make([]int, 0, m)
	for {
		idx = append(idx, cur)
		xc := x[cur*d : cur*d+d]
		far, farD := -1, -1.0
		for i := 0; i < n; i++ {
			xi := x[i*d : i*d+d]
			s := 0.0
			for k, v := range xi {
				t := v - xc[k]
				s += t * t
			}
			if s < near[i] {
				near[i] = s
			}
			if near[i] > farD {
				far, farD = i, near[i]
			}
		}
		if len(idx) == m {
			return idx, math.Sqrt(farD)
		}
		cur = far
	}
}
