// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// Whitening of RuleRatio's reading of dimensions d ≥ 1.
const (
	// whitenVariance is the share of the variance whose principal axes
	// whiten rescales; the axes of the rest (the noise floor) keep
	// their relative size, so that noise is not blown up.
	whitenVariance = 1 - 1e-3
	// whitenMaxGain is the largest factor by which whiten stretches an
	// axis relative to the widest one: enough to undo a linear map of
	// condition number 10 (the stretches of the textbook suite), while
	// an axis of noise is amplified at most that much (ours; on the
	// suite, 100 read no better).
	whitenMaxGain = 10
	// whitenMinCond is the least condition number (widest over
	// narrowest standard deviation among the rescaled axes) at which
	// the whitened reading is made; below it rescaling changes distances by less
	// than the factor the ratio rule already tolerates.
	whitenMinCond = 1.5
)

// whiten returns the rows idx of c in principal coordinates about
// their mean, each axis among those carrying the leading whitenVariance
// of the variance divided by its standard deviation (at least the
// widest's over whitenMaxGain), the other axes by the widest's. It also
// returns the condition number of the rescaled axes. With fewer than
// two rows or no spread it returns nil, 1.
func whiten(c *cloud, idx []int) (*cloud, float64) {
	n, d := len(idx), c.dim
	if n < 2 {
		return nil, 1
	}
	mean := make([]float64, d)
	for _, i := range idx {
		for j, v := range c.row(i) {
			mean[j] += v
		}
	}
	for j := range mean {
		mean[j] /= float64(n)
	}
	x := mat.NewDense(n, d, nil)
	for r, i := range idx {
		row := x.RawRowView(r)
		for j, v := range c.row(i) {
			row[j] = v - mean[j]
		}
	}
	var cov mat.SymDense
	cov.SymOuterK(1/float64(n), x.T())
	var eig mat.EigenSym
	if !eig.Factorize(&cov, true) {
		return nil, 1
	}
	vals := eig.Values(nil) // ascending
	var vecs mat.Dense
	eig.VectorsTo(&vecs)
	var total float64
	for _, v := range vals {
		total += max(v, 0)
	}
	top := max(vals[d-1], 0)
	if !(total > 0) || !(top > 0) {
		return nil, 1
	}
	s1 := math.Sqrt(top)
	scale := make([]float64, d)
	var cum float64
	cond := 1.0
	for j := d - 1; j >= 0; j-- {
		sj := math.Sqrt(max(vals[j], 0))
		if cum < whitenVariance*total {
			f := max(sj, s1/whitenMaxGain)
			scale[j] = 1 / f
			cond = max(cond, s1/f)
		} else {
			scale[j] = 1 / s1
		}
		cum += max(vals[j], 0)
	}
	var y mat.Dense
	y.Mul(x, &vecs)
	out := &cloud{n: n, dim: d, x: make([]float64, n*d)}
	for r := range n {
		row := y.RawRowView(r)
		o := out.row(r)
		for j, v := range row {
			o[j] = v * scale[j]
		}
	}
	return out, cond
}
