// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"math"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/trace"
)

// TestActivationFoldMeasures traces the activation fixtures that
// PyTorch 1.13 exported (testdata/gen/onnx_activations.py) and checks
// that each piecewise-linear activation stage records the fold measures
// its kind supports: all of them where the function has flat pieces
// (ReLU6, Hardtanh, Hardsigmoid), only the pattern measures where it is
// injective (PReLU), none for smooth kinds. The inputs are spread so that
// every piece is reached; an input below a flat piece's breakpoint maps
// to its constant (a textbook property of clamping), so fold.untouched
// is below 1 wherever a flat piece exists.
func TestActivationFoldMeasures(t *testing.T) {
	// 60 points in R³ on a spiral reaching ±8, two classes.
	x := mat.NewDense(60, 3, nil)
	labels := make([]int, 60)
	for i := range 60 {
		a := float64(i) * 0.37
		r := 8 * float64(i+1) / 60
		x.SetRow(i, []float64{r * math.Cos(a), r * math.Sin(a), r * math.Cos(2*a)})
		labels[i] = i % 2
	}
	for _, tc := range []struct {
		file string
		kind trace.StageKind
		all  bool // every fold measure, else only the pattern ones
		none bool // no fold measure
	}{
		{"act_relu6_op17.onnx", "relu6", true, false},
		{"act_hardtanh_op17.onnx", "hardtanh", true, false},
		{"act_hardsigmoid_op17.onnx", "hardsigmoid", true, false},
		{"act_prelu4_op17.onnx", "prelu", false, false},
		{"act_selu_op17.onnx", "selu", false, true},
		{"act_mish_op17.onnx", "mish", false, true},
	} {
		t.Run(string(tc.kind), func(t *testing.T) {
			s, err := trace.NewSampleInts(x, labels)
			if err != nil {
				t.Fatal(err)
			}
			tr, err := trace.RunFile(context.Background(), filepath.Join("..", "testdata", "onnx", tc.file), s, &trace.Settings{SkipProbe: true})
			if err != nil {
				t.Fatal(err)
			}
			found := false
			for _, st := range tr.Stages {
				if st.Kind != tc.kind {
					continue
				}
				found = true
				_, face := st.Measures["fold.face"]
				_, patterns := st.Measures["fold.patterns"]
				switch {
				case tc.none && (face || patterns):
					t.Errorf("stage %d (%s) has fold measures: %v", st.Index, st.Kind, st.Measures)
				case tc.all && (!face || !patterns):
					t.Errorf("stage %d (%s) lacks fold.face or fold.patterns", st.Index, st.Kind)
				case tc.all && st.Measures["fold.untouched"] >= 1:
					t.Errorf("stage %d (%s): fold.untouched %v, want below 1 (inputs reach the flat pieces)", st.Index, st.Kind, st.Measures["fold.untouched"])
				case !tc.all && !tc.none && (face || !patterns):
					t.Errorf("stage %d (%s): face %v, patterns %v; want the pattern measures only", st.Index, st.Kind, face, patterns)
				}
			}
			if !found {
				t.Fatalf("no %s stage in %s", tc.kind, tc.file)
			}
		})
	}
}
