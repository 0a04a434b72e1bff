// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/trace/overlap"
)

// line is a sample worked by hand in the examples: class 0 at 0 and 1,
// class 1 at 3 and 4 on the real line.
var (
	line       = mat.NewDense(4, 1, []float64{0, 1, 3, 4})
	lineLabels = []int{0, 0, 1, 1}
)

func ExampleFisher() {
	// μ = 2, μ₀ = 0.5, μ₁ = 3.5: tr S_B = 2·1.5² + 2·1.5² = 9 and
	// tr S_W = 4·0.5² = 1.
	f, err := overlap.Fisher(line, lineLabels)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(f.Between, f.Within, f.Ratio)
	// Output: 9 1 9
}

func ExampleMargin() {
	// The closest points of different classes are 1 and 3; every point's
	// classmate is at distance 1.
	m, err := overlap.Margin(context.Background(), line, lineLabels)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(m.Cross, m.CrossPair, m.Within, m.Ratio)
	// Output: 2 [1 2] 1 2
}

func ExampleSilhouette() {
	// Point 0: a = 1, b = (3+4)/2, s = 2.5/3.5; point 1: a = 1,
	// b = (2+3)/2, s = 1.5/2.5; the other class mirrors them.
	s, err := overlap.Silhouette(context.Background(), line, lineLabels)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.6f %.6f\n", s.Score, (2.5/3.5+1.5/2.5)/2)
	// Output: 0.657143 0.657143
}

func ExampleNC1() {
	// Σ_W = 0.25, Σ_B = 1.5² = 2.25: tr(Σ_W Σ_B⁺)/C = (0.25/2.25)/2.
	r, err := overlap.NC1(line, lineLabels)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.6f rank %d\n", r.Value, r.Rank)
	// Output: 0.055556 rank 1
}

func ExampleKNNAgreement() {
	// With k = 1 every point's nearest other point is its classmate; with
	// k = 3 each point sees one classmate and two others.
	for _, k := range []int{1, 3} {
		r, err := overlap.KNNAgreement(context.Background(), line, lineLabels, k)
		if err != nil {
			fmt.Println(err)
			return
		}
		fmt.Printf("k=%d accuracy %.3f share %.3f\n", r.K, r.Accuracy, r.Share)
	}
	// Output:
	// k=1 accuracy 1.000 share 1.000
	// k=3 accuracy 0.000 share 0.333
}

func ExampleVoronoi() {
	p := mat.NewDense(4, 3, []float64{
		0.7, 0.2, 0.1, // class 0, inside its cell, gap 0.5
		0.4, 0.4, 0.2, // class 0, on the boundary with class 1
		0.1, 0.8, 0.1, // class 1, inside, gap 0.7
		0.6, 0.3, 0.1, // class 1, in class 0's cell
	})
	r, err := overlap.Voronoi(p, []int{0, 0, 1, 1}, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(r.Inside[:2], r.InsideAll)
	fmt.Printf("class 0 gap mean %.2f, class 1 own margin min %.2f\n", r.Gap[0].Mean, r.Own[1].Min)
	// Output:
	// [0.5 0.5] 0.5
	// class 0 gap mean 0.25, class 1 own margin min -0.30
}

func ExamplePCADim() {
	// Variances 9/2 and 1/2 along the axes: ratios 0.9, 0.1, 0.
	x := mat.NewDense(4, 3, []float64{3, 0, 0, -3, 0, 0, 0, 1, 0, 0, -1, 0})
	r, err := overlap.PCADim(x)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("%.3f %d %d\n", r.Ratios, r.Dim90, r.Dim95)
	// Output: [0.900 0.100 0.000] 2 2
}

func ExampleTwoNN() {
	// 1000 points on a circle in R² have intrinsic dimension 1.
	rng := rand.New(rand.NewPCG(3, 4))
	x := mat.NewDense(1000, 2, nil)
	for i := 0; i < 1000; i++ {
		a := 2 * math.Pi * rng.Float64()
		x.Set(i, 0, math.Cos(a))
		x.Set(i, 1, math.Sin(a))
	}
	r, err := overlap.TwoNN(context.Background(), x, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("MLE %.2f, line fit %.2f over %d of %d ratios\n", r.MLE, r.Fit, r.FitPoints, r.N)
	// Output: MLE 1.02, line fit 1.06 over 900 of 1000 ratios
}

func ExampleFolds() {
	f, err := overlap.Folds([]int{0, 0, 0, 1, 1, 1}, 3, 1)
	if err != nil {
		fmt.Println(err)
		return
	}
	// Every fold gets one point of each class.
	count := make([][2]int, 3)
	for i, g := range f {
		count[g][[]int{0, 0, 0, 1, 1, 1}[i]]++
	}
	fmt.Println(count)
	// Output: [[1 1] [1 1] [1 1]]
}

// blobs returns n points per class around the corners of a square.
func blobs(n int) (*mat.Dense, []int) {
	rng := rand.New(rand.NewPCG(5, 6))
	centres := [][2]float64{{0, 0}, {4, 0}, {0, 4}, {4, 4}}
	x := mat.NewDense(4*n, 2, nil)
	labels := make([]int, 4*n)
	for c, m := range centres {
		for i := 0; i < n; i++ {
			r := c*n + i
			x.Set(r, 0, m[0]+rng.NormFloat64())
			x.Set(r, 1, m[1]+rng.NormFloat64())
			labels[r] = c
		}
	}
	return x, labels
}

func ExampleProbe() {
	x, labels := blobs(50)
	r, err := overlap.Probe(context.Background(), x, labels, &overlap.ProbeSettings{Folds: 5, Seed: 7})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("accuracy %.2f over %d folds, C = %v, converged %v\n", r.Accuracy, len(r.FoldAccuracy), r.Settings.C, r.Converged)
	// Output: accuracy 0.96 over 5 folds, C = 1, converged true
}

func ExampleMeasure() {
	x, labels := blobs(50)
	r, err := overlap.Measure(context.Background(), x, labels, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("n=%d d=%d classes=%d k=%d\n", r.N, r.D, r.Classes, r.Settings.K)
	fmt.Printf("knn %.2f, fisher %.2f, silhouette %.2f, probe %.2f, PCA dims %d/%d\n",
		r.KNN.Accuracy, r.Fisher.Ratio, r.Silhouette.Score, r.Probe.Accuracy, r.PCA.Dim90, r.PCA.Dim95)
	// Output:
	// n=200 d=2 classes=4 k=5
	// knn 0.95, fisher 4.26, silhouette 0.51, probe 0.96, PCA dims 2/2
}
