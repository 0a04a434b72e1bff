// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"os"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

// circles reads testdata/trace/rings.csv (testdata/gen/trace_rings.py):
// two classes of 24 points on circles of radius 1 centred at (3, 3)
// ("low") and (3, 8) ("high"), at angles 2πk/24, the lower halves
// mirroring the upper halves exactly.
func circles(t testing.TB) *trace.Sample {
	f, err := os.Open("../testdata/trace/rings.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := trace.ReadCSV(f, "rings.csv", &trace.CSVSettings{Label: "ring"})
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

// circleTrace runs projectModel on circles at relative scale 0.2.
func circleTrace(t testing.TB) *trace.Trace {
	set := trace.DefaultSettings()
	set.Rule, set.Scale = trace.ScaleRelative, 0.2
	tr, err := trace.Run(context.Background(), projectModel(), circles(t), set)
	if err != nil {
		t.Fatal(err)
	}
	return tr
}
