// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology_test

import (
	"context"
	"fmt"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/homology"
)

func ExamplePointEdges() {
	// Four points on a line at 0, 1, 3 and 6: within 2 only the
	// neighbours at distance 1 and 2 are joined.
	x := mat.NewDense(4, 1, []float64{0, 1, 3, 6})
	set := &homology.Settings{Threshold: 2}
	s, err := homology.PointEdges(context.Background(), x, set)
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, e := range s.Edges {
		fmt.Printf("%d–%d %g\n", e.I, e.J, e.D)
	}
	// The edges give the barcode of Rips: the gap of 3 to the last point
	// is beyond the threshold, so two components stay apart.
	b, err := homology.RipsDistances(context.Background(), s, set)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("H0:", b.Bars[0])
	// Output:
	// 1–0 1
	// 2–1 2
	// H0: [{0 1} {0 2} {0 +Inf} {0 +Inf}]
}
