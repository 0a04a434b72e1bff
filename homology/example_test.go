// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology_test

import (
	"context"
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/homology"
)

func ExampleRips() {
	// Eight evenly spaced points on the unit circle: one component and one
	// loop, which lives until chords of 3 steps enter, as Adamaszek and
	// Adams ("The Vietoris–Rips complexes of a circle", 2017) predict:
	// with steps up to 2 of 8 the complex is a circle, with 3 a 3-sphere.
	x := mat.NewDense(8, 2, nil)
	for i := 0; i < 8; i++ {
		a := 2 * math.Pi * float64(i) / 8
		x.SetRow(i, []float64{math.Cos(a), math.Sin(a)})
	}
	b, err := homology.Rips(context.Background(), x, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("H1: [%.4f, %.4f)\n", b.Bars[1][0].Birth, b.Bars[1][0].Death)
	fmt.Println("Betti at 1:", b.Betti(1))
	// Output:
	// H1: [0.7654, 1.8478)
	// Betti at 1: [1 1]
}

func ExampleRipsDistances() {
	// A 4-cycle given as a sparse edge list: missing pairs never connect.
	s, err := homology.NewSparse(4, []homology.Edge{{I: 0, J: 1, D: 1}, {I: 1, J: 2, D: 1}, {I: 2, J: 3, D: 1}, {I: 3, J: 0, D: 1}})
	if err != nil {
		fmt.Println(err)
		return
	}
	b, err := homology.RipsDistances(context.Background(), s, nil)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println(b.Bars[1])
	// Output:
	// [{1 +Inf}]
}

func ExampleBottleneck() {
	a := []homology.Bar{{Birth: 0, Death: 2}, {Birth: 0, Death: math.Inf(1)}}
	b := []homology.Bar{{Birth: 0.5, Death: 2}, {Birth: 0.25, Death: math.Inf(1)}}
	fmt.Println(homology.Bottleneck(a, b))
	// Output:
	// 0.5
}

func ExampleLandmarks() {
	x := mat.NewDense(4, 1, []float64{0, 1, 2, 10})
	idx, radius := homology.Landmarks(x, 2, 1)
	fmt.Println(len(idx), radius)
	// Output:
	// 2 2
}

func ExampleBarcode_Betti() {
	sq := [][]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}
	b, _ := homology.RipsPoints(context.Background(), sq, &homology.Settings{MaxDim: 1})
	fmt.Println(b.Betti(0.5), b.Betti(1), b.Betti(1.5))
	// Output:
	// [4 0] [1 1] [1 0]
}
