// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// bruteDistances returns the distances of a cloud as a full matrix. It
// sums the squares with the engine's kernel: the brute force checks the
// reduction, and a last-bit difference in a distance could move an edge
// across the enclosing radius.
func bruteDistances(pts [][]float64) [][]float64 {
	n := len(pts)
	d := make([][]float64, n)
	for i := range d {
		d[i] = make([]float64, n)
		for j := range d[i] {
			d[i][j] = math.Sqrt(sqDist(pts[i], pts[j]))
		}
	}
	return d
}

func engBarsEqual(a, b []Bar, tol float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i].Birth-b[i].Birth) > tol {
			return false
		}
		if !(a[i].Death == b[i].Death || math.Abs(a[i].Death-b[i].Death) <= tol) {
			return false
		}
	}
	return true
}

// checkAgainstBrute compares the engine with the brute-force boundary
// matrix reduction of bruteRips (the standard persistence algorithm,
// Edelsbrunner–Letscher–Zomorodian 2002) on the same distances.
func checkAgainstBrute(t *testing.T, pts [][]float64, maxDim int, thr float64, p int) {
	t.Helper()
	got, err := RipsPoints(context.Background(), pts, &Settings{MaxDim: maxDim, Threshold: thr, Field: p})
	if err != nil {
		t.Fatalf("RipsPoints: %v", err)
	}
	want := bruteRips(bruteDistances(pts), maxDim, got.Threshold, p)
	for d := 0; d <= maxDim; d++ {
		if !engBarsEqual(got.Bars[d], want[d], 1e-12) {
			t.Fatalf("n=%d maxdim=%d thr=%v p=%d: H%d\n got %v\nwant %v\npoints %v", len(pts), maxDim, thr, p, d, got.Bars[d], want[d], pts)
		}
	}
}

func TestAgainstBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := 0; trial < 300; trial++ {
		n := 3 + rng.IntN(8)
		dim := 1 + rng.IntN(4)
		pts := make([][]float64, n)
		for i := range pts {
			pts[i] = make([]float64, dim)
			for k := range pts[i] {
				// Coarse grid values produce many ties.
				if trial%2 == 0 {
					pts[i][k] = float64(rng.IntN(4))
				} else {
					pts[i][k] = rng.Float64()
				}
			}
		}
		maxDim := rng.IntN(4)
		if n > 8 && maxDim == 3 {
			maxDim = 2
		}
		thr := 0.0
		if trial%3 == 0 {
			thr = 0.3 + rng.Float64()
		}
		p := []int{2, 3, 5}[rng.IntN(3)]
		checkAgainstBrute(t, pts, maxDim, thr, p)
	}
}

// FuzzRips compares the engine with the brute-force reduction on small
// clouds decoded from the fuzzer's bytes.
func FuzzRips(f *testing.F) {
	f.Add([]byte{0, 0, 10, 0, 10, 10, 0, 10}, uint8(1), uint8(0))
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12}, uint8(2), uint8(1))
	f.Add([]byte{0, 0, 0, 3, 0, 0, 0, 3, 0, 0, 0, 3, 3, 3, 3}, uint8(3), uint8(2))
	f.Fuzz(func(t *testing.T, data []byte, md, fld uint8) {
		const dim = 3
		n := len(data) / dim
		if n < 2 || n > 9 {
			t.Skip()
		}
		pts := make([][]float64, n)
		for i := range pts {
			pts[i] = make([]float64, dim)
			for k := range pts[i] {
				pts[i][k] = float64(data[i*dim+k] % 8)
			}
		}
		maxDim := int(md % 4)
		if n > 8 && maxDim == 3 {
			maxDim = 2
		}
		p := []int{2, 3, 5, 7}[fld%4]
		checkAgainstBrute(t, pts, maxDim, 0, p)
	})
}
