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

	"crease.dev/crease/internal/budget"
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

// BenchmarkProbe runs the 5-fold probe at the default settings; the
// "workers=1" cases run it as a trace's stage task does (one worker
// for all folds), the others on every core. n=300/d=64/C=10 is the
// digits trace's input stage.
func BenchmarkProbe(b *testing.B) {
	for _, sz := range []struct{ n, d, c, workers int }{
		{300, 64, 10, 1}, {300, 16, 10, 1}, {500, 16, 4, 0}, {2000, 64, 10, 0}, {2000, 64, 10, 1}, {5000, 64, 10, 0},
	} {
		name := fmt.Sprintf("n=%d/d=%d/C=%d", sz.n, sz.d, sz.c)
		ctx := context.Background()
		if sz.workers > 0 {
			name += fmt.Sprintf("/workers=%d", sz.workers)
			ctx = budget.WithWorkers(ctx, sz.workers)
		}
		b.Run(name, func(b *testing.B) {
			x, labels := benchSample(sz.n, sz.d, sz.c)
			b.ReportAllocs()
			var iters int
			for b.Loop() {
				r, err := Probe(ctx, x, labels, nil)
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

// BenchmarkMeasure runs every measure at the default settings, on every
// core and, as a trace's stage task does, on one worker.
func BenchmarkMeasure(b *testing.B) {
	x, labels := benchSample(2000, 64, 10)
	for _, workers := range []int{0, 1} {
		name, ctx := "workers=all", context.Background()
		if workers > 0 {
			name, ctx = fmt.Sprintf("workers=%d", workers), budget.WithWorkers(ctx, workers)
		}
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Measure(ctx, x, labels, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// benchLoss is the probe's objective on n standardised Gaussian rows in
// d columns with k classes, and a point to evaluate it at.
func benchLoss(n, d, k int) (*softmaxLoss, []float64) {
	rng := rand.New(rand.NewPCG(5, 6))
	xs := make([]float64, n*d)
	for i := range xs {
		xs[i] = rng.NormFloat64()
	}
	y := make([]int, n)
	for i := range y {
		y[i] = i % k
	}
	theta := make([]float64, k*(d+1))
	for i := range theta {
		theta[i] = 0.1 * rng.NormFloat64()
	}
	return newSoftmaxLoss(xs, y, n, d, k, 1), theta
}

// BenchmarkSoftmaxLoss evaluates the probe's objective and gradient
// once, at the shapes of a digits trace's fold (240 training rows, 10
// classes; the widths of its stages) and of a larger one; the L-BFGS
// iterations of a fit cost about one evaluation each.
func BenchmarkSoftmaxLoss(b *testing.B) {
	for _, sz := range []struct{ n, d, k int }{{240, 64, 10}, {240, 16, 10}, {480, 3, 3}, {1600, 64, 10}} {
		b.Run(fmt.Sprintf("n=%d/d=%d/k=%d", sz.n, sz.d, sz.k), func(b *testing.B) {
			o, theta := benchLoss(sz.n, sz.d, sz.k)
			grad := make([]float64, len(theta))
			b.ReportAllocs()
			for b.Loop() {
				o.eval(grad, theta)
			}
		})
	}
}
