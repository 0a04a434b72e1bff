// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package knn

import (
	"context"
	"math"
	"sync/atomic"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// FuzzSearch compares Search and Pairs with the brute-force reference on
// small clouds whose coordinates come from the fuzzer's bytes (a coarse
// grid shifted by a large offset, so ties and cancellation are common).
func FuzzSearch(f *testing.F) {
	f.Add([]byte{0, 1, 2, 3, 4, 5, 6, 7, 8, 9}, uint8(2), uint8(3), 1e6)
	f.Add([]byte{7, 7, 7, 7, 7, 7}, uint8(1), uint8(1), 0.0)
	f.Fuzz(func(t *testing.T, b []byte, dd, kk uint8, offset float64) {
		d := int(dd%4) + 1
		n := len(b) / d
		if n < 2 || n > 300 || math.IsNaN(offset) || math.Abs(offset) > 1e9 {
			t.Skip()
		}
		k := int(kk)%(n-1) + 1
		x := mat.NewDense(n, d, nil)
		for i := 0; i < n; i++ {
			for j := 0; j < d; j++ {
				x.Set(i, j, float64(b[i*d+j]%8)+offset)
			}
		}
		g, err := Search(context.Background(), x, k)
		if err != nil {
			t.Fatal(err)
		}
		wi, wd := bruteKNN(x, k)
		for i := range wi {
			for q := range wi[i] {
				if g.Index[i][q] != wi[i][q] || g.Dist[i][q] != wd[i][q] {
					t.Fatalf("row %d rank %d: got (%d, %v), want (%d, %v)", i, q, g.Index[i][q], g.Dist[i][q], wi[i][q], wd[i][q])
				}
			}
		}
		r := wd[0][k-1]
		var count atomic.Int64
		if err := Pairs(context.Background(), x, r, func(p []Pair) error { count.Add(int64(len(p))); return nil }); err != nil {
			t.Fatal(err)
		}
		want := 0
		c, _ := NewCloud(x)
		for i := 0; i < n; i++ {
			for j := i + 1; j < n; j++ {
				if c.Dist(i, j) <= r {
					want++
				}
			}
		}
		if int(count.Load()) != want {
			t.Fatalf("radius %v: %d pairs, want %d", r, count.Load(), want)
		}
	})
}
