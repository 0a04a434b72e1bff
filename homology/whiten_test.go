// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestWhitenUndoesLinearMaps checks the fact the anisotropy guard rests
// on: whitening is affine invariant up to an orthogonal map (the
// whitened coordinates of A·x + b and of x differ by a rotation when A
// is invertible; e.g. Hastie, Tibshirani and Friedman, The Elements of
// Statistical Learning, 2nd ed., 2009, §4.3 on sphering), so all
// pairwise distances agree.
func TestWhitenUndoesLinearMaps(t *testing.T) {
	r := rand.New(rand.NewPCG(7, 11))
	tests := []struct {
		name string
		d    int
		cond float64
	}{
		{"plane, condition 6", 2, 6},
		{"R^3, condition 5", 3, 5},
		{"R^5, condition 3", 5, 3},
	}
	for _, tc := range tests {
		n := 60
		// A cloud with unequal spread along its axes (1 to 2; with
		// the stretch still inside whitenMaxGain).
		x := &cloud{n: n, dim: tc.d, x: make([]float64, n*tc.d)}
		for i := range n {
			for j := range tc.d {
				x.row(i)[j] = (1 + 0.25*float64(j)) * r.NormFloat64()
			}
		}
		// y = A x + b with A = diag(1..cond) times a random rotation
		// in the first two axes.
		y := &cloud{n: n, dim: tc.d, x: make([]float64, n*tc.d)}
		th := r.Float64() * 2 * math.Pi
		for i := range n {
			src, dst := x.row(i), y.row(i)
			copy(dst, src)
			dst[0], dst[1] = math.Cos(th)*src[0]-math.Sin(th)*src[1], math.Sin(th)*src[0]+math.Cos(th)*src[1]
			for j := range dst {
				g := math.Pow(tc.cond, float64(j)/float64(tc.d-1))
				dst[j] = g*dst[j] + 5
			}
		}
		all := make([]int, n)
		for i := range all {
			all[i] = i
		}
		wx, _ := whiten(x, all)
		wy, cond := whiten(y, all)
		if cond < 1.5 {
			t.Errorf("%s: condition number %v, want the stretch seen", tc.name, cond)
		}
		var worst float64
		for i := range n {
			for j := range i {
				dx, dy := math.Sqrt(sqDist(wx.row(i), wx.row(j))), math.Sqrt(sqDist(wy.row(i), wy.row(j)))
				worst = max(worst, math.Abs(dx-dy)/dx)
			}
		}
		if worst > 1e-9 {
			t.Errorf("%s: whitened distances differ by up to %.3g (relative)", tc.name, worst)
		}
	}
}
