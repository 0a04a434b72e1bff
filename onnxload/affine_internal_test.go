// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestAffineInto checks the tile kernel against gonum's matrix product
// (within 1e-13 of the largest |x|·|w| sum), and that each row's result
// is bit for bit the one it gets alone, which the scalar path computes
// with math.FMA (IEEE 754-2008 fusedMultiplyAdd) in the same order.
func TestAffineInto(t *testing.T) {
	if !useTile {
		t.Skip("no tile kernel on this machine")
	}
	r := rand.New(rand.NewPCG(3, 5))
	for _, test := range []struct{ n, in, out int }{
		{1, 1, 1}, {4, 1, 8}, {5, 3, 7}, {7, 64, 32}, {64, 32, 16}, {13, 16, 10}, {9, 784, 20}, {8, 2, 9}, {3, 5, 17},
	} {
		t.Run(fmt.Sprintf("%dx%d->%d", test.n, test.in, test.out), func(t *testing.T) {
			x := mat.NewDense(test.n, test.in, nil)
			w := mat.NewDense(test.out, test.in, nil)
			b := make([]float64, test.out)
			for i := range test.n {
				for j := range test.in {
					x.Set(i, j, r.NormFloat64())
				}
			}
			for i := range test.out {
				b[i] = r.NormFloat64()
				for j := range test.in {
					w.Set(i, j, r.NormFloat64())
				}
			}
			// A view with a wider stride, as Forward's blocks are.
			wide := mat.NewDense(test.n, test.in+3, nil)
			xv := wide.Slice(0, test.n, 1, 1+test.in).(*mat.Dense)
			xv.Copy(x)
			got := mat.NewDense(test.n, test.out, nil)
			affineInto(got, xv, w, affinePanels(w), b)
			var want mat.Dense
			want.Mul(x, w.T())
			for i := range test.n {
				for j := range test.out {
					var scale float64
					for k := range test.in {
						scale += math.Abs(x.At(i, k) * w.At(j, k))
					}
					if d := math.Abs(got.At(i, j) - (want.At(i, j) + b[j])); d > 1e-13*(scale+math.Abs(b[j])) {
						t.Fatalf("entry (%d,%d) = %v, want %v", i, j, got.At(i, j), want.At(i, j)+b[j])
					}
				}
				one := mat.NewDense(1, test.out, nil)
				affineInto(one, x.Slice(i, i+1, 0, test.in).(*mat.Dense), w, affinePanels(w), b)
				for j := range test.out {
					if one.At(0, j) != got.At(i, j) {
						t.Fatalf("row %d, column %d: %v in the batch, %v alone", i, j, got.At(i, j), one.At(0, j))
					}
				}
			}
		})
	}
}
