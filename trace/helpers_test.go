// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

// circles returns two classes of m points each on circles of radius 1
// centred at (3, 3) ("low") and (3, 8) ("high"), at angles 2πk/m.
func circles(t testing.TB, m int) *trace.Sample {
	x := mat.NewDense(2*m, 2, nil)
	labels := make([]string, 2*m)
	for k := range m {
		// Angle 2πk/m; the lower half mirrors the upper half exactly.
		j := min(k, m-k)
		th := 2 * math.Pi * float64(j) / float64(m)
		c, sn := math.Cos(th), math.Sin(th)
		if k > m/2 {
			sn = -sn
		}
		x.SetRow(k, []float64{3 + c, 3 + sn})
		x.SetRow(m+k, []float64{3 + c, 8 + sn})
		labels[k], labels[m+k] = "low", "high"
	}
	s, err := trace.NewSample(x, labels)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// projectModel is identity affine, ReLU, then projection onto the
// first coordinate (kept 2 wide), built by hand.
func projectModel() []onnxload.Stage {
	return []onnxload.Stage{
		{Kind: onnxload.Affine, In: 2, Out: 2, Nodes: []string{"fc1"}, W: mat.NewDense(2, 2, []float64{1, 0, 0, 1}), B: []float64{0, 0}},
		{Kind: onnxload.ReLU, In: 2, Out: 2, Nodes: []string{"relu1"}},
		{Kind: onnxload.Affine, In: 2, Out: 2, Nodes: []string{"proj"}, W: mat.NewDense(2, 2, []float64{1, 0, 0, 0}), B: []float64{0, 0}},
	}
}

// circleTrace runs projectModel on circles(24) at relative scale 0.2.
func circleTrace(t testing.TB) *trace.Trace {
	set := trace.DefaultSettings()
	set.Scale = 0.2
	tr, err := trace.Run(context.Background(), projectModel(), circles(t, 24), set)
	if err != nil {
		t.Fatal(err)
	}
	return tr
}
