// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// benchSample is n Gaussian points in R^d in c classes with shifted means.
func benchSample(n, d, c int) (*mat.Dense, []int) {
	rng := rand.New(rand.NewPCG(11, 12))
	x := mat.NewDense(n, d, nil)
	labels := make([]int, n)
	for i := 0; i < n; i++ {
		labels[i] = i % c
		for j := 0; j < d; j++ {
			v := rng.NormFloat64()
			if j == labels[i]%d {
				v += 2
			}
			x.Set(i, j, v)
		}
	}
	return x, labels
}

func BenchmarkProbe(b *testing.B) {
	for _, sz := range []struct{ n, d, c int }{{500, 16, 4}, {2000, 64, 10}, {5000, 64, 10}} {
		b.Run(fmt.Sprintf("n=%d/d=%d/C=%d", sz.n, sz.d, sz.c), func(b *testing.B) {
			x, labels := benchSample(sz.n, sz.d, sz.c)
			b.ReportAllocs()
			var iters int
			for b.Loop() {
				r, err := Probe(context.Background(), x, labels, nil)
				if err != nil {
					b.Fatal(err)
				}
				iters = 0
				for _, it := range r.Iterations {
					iters += it
				}
			}
			b.ReportMetric(float64(iters), "lbfgs-iters")
		})
	}
}

func BenchmarkSilhouette(b *testing.B) {
	for _, sz := range []struct{ n, d, c int }{{1000, 64, 10}, {5000, 64, 10}, {20000, 64, 10}} {
		b.Run(fmt.Sprintf("n=%d/d=%d", sz.n, sz.d), func(b *testing.B) {
			x, labels := benchSample(sz.n, sz.d, sz.c)
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Silhouette(context.Background(), x, labels); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkMeasure(b *testing.B) {
	x, labels := benchSample(2000, 64, 10)
	b.ReportAllocs()
	for b.Loop() {
		if _, err := Measure(context.Background(), x, labels, nil); err != nil {
			b.Fatal(err)
		}
	}
}
