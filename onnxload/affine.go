// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// affinePanels packs the transpose of an Out×In weight matrix w into
// panels of 8 output columns for affineTileBias: panel q holds w[8q+j][t]
// at q·8·In + 8t + j, zero past Out.
func affinePanels(w *mat.Dense) []float64 {
	out, in := w.Dims()
	p := make([]float64, (out+7)/8*8*in)
	for j := range out {
		base := j / 8 * 8 * in
		for t, v := range w.RawRowView(j) {
			p[base+8*t+j%8] = v
		}
	}
	return p
}

// affineInto sets dst = x·wᵀ + b for x (n×In), dst (n×Out) and p the
// panels of w (affinePanels). Every entry is formed by fused
// multiply–adds over t = 0, 1, …, In−1 in order from zero, then the bias
// is added, on either path, so a row's result depends on no other row.
// It needs useTile.
func affineInto(dst, x, w *mat.Dense, p, b []float64) {
	n, in := x.Dims()
	out := len(b)
	xr, dr := x.RawMatrix(), dst.RawMatrix()
	var tile [32]float64
	var bias [8]float64
	r := 0
	if in > 0 {
		for ; r+4 <= n; r += 4 {
			for j0 := 0; j0 < out; j0 += 8 {
				if j0+8 <= out {
					affineTileBias(in, &xr.Data[r*xr.Stride], xr.Stride, &p[j0*in], &b[j0], &dr.Data[r*dr.Stride+j0], dr.Stride)
					continue
				}
				// The last columns: through a tile of 8, padded.
				cols := out - j0
				copy(bias[:], b[j0:])
				affineTileBias(in, &xr.Data[r*xr.Stride], xr.Stride, &p[j0*in], &bias[0], &tile[0], 8)
				for i := range 4 {
					copy(dr.Data[(r+i)*dr.Stride+j0:][:cols], tile[8*i:])
				}
			}
		}
	}
	for ; r < n; r++ {
		xrow := xr.Data[r*xr.Stride:][:in]
		drow := dr.Data[r*dr.Stride:][:out]
		for j := range drow {
			wrow := w.RawRowView(j)
			var acc float64
			for t, v := range xrow {
				acc = math.FMA(v, wrow[t], acc)
			}
			drow[j] = acc + b[j]
		}
	}
}
