// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"testing"

	"crease.dev/crease/trace"
	"crease.dev/crease/trace/overlap"
)

// TestDefaultOverlapK keeps trace's documented default equal to overlap's.
func TestDefaultOverlapK(t *testing.T) {
	if trace.DefaultOverlapK != overlap.DefaultK {
		t.Errorf("trace.DefaultOverlapK = %d, overlap.DefaultK = %d", trace.DefaultOverlapK, overlap.DefaultK)
	}
}

// digitsReference is testdata/trace/digits_reference.json, written by
// testdata/gen/trace_digits.py with torch 1.13.1 and scikit-learn 1.2.1.
type digitsReference struct {
	Rows, K, Folds int
	Seed           uint64
	Stages         map[string]struct {
		KNNAccuracy     float64 `json:"knn_accuracy"`
		KNNBoundaryTies int     `json:"knn_boundary_ties"`
		ProbeAccuracy   float64 `json:"probe_accuracy"`
	}
}

// TestDigitsAcceptance traces the digits model (UCI 8×8 digits, open
// data via scikit-learn) over its 300-row sample and compares the k-NN
// agreement and the linear-probe accuracy at the input and at the last
// hidden stage with scikit-learn 1.2.1 on the same activations computed
// by torch; the probe must do at least as well at the last hidden stage
// as at the input.
func TestDigitsAcceptance(t *testing.T) {
	b, err := os.ReadFile("../testdata/trace/digits_reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref digitsReference
	if err := json.Unmarshal(b, &ref); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open("../testdata/onnx/digits_sample.csv")
	if err != nil {
		t.Fatal(err)
	}
	s, err := trace.ReadCSV(f, "digits_sample.csv", &trace.CSVSettings{Label: "label"})
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	set := &trace.Settings{MaxDim: trace.H0Only, OverlapK: ref.K, Seed: ref.Seed, Cap: -1}
	tr, err := trace.RunFile(context.Background(), "../testdata/onnx/digits.onnx", s, set)
	if err != nil {
		t.Fatal(err)
	}
	if len(tr.Sample.Indices) != ref.Rows {
		t.Fatalf("traced %d rows, reference %d", len(tr.Sample.Indices), ref.Rows)
	}
	if st := tr.Stage(4); st == nil || st.Kind != trace.KindReLU || st.Width != 16 {
		t.Fatalf("stage 4 is %+v, want the second ReLU of width 16", st)
	}
	probe := map[string]float64{}
	for name, want := range ref.Stages {
		st := tr.Stage(int(name[0] - '0'))
		// One vote may flip per point whose k-th neighbour distance ties
		// the next one (the order of tied neighbours is not defined).
		knnTol := float64(want.KNNBoundaryTies)/float64(ref.Rows) + 1e-12
		if got, _ := st.Value("", "knn.accuracy"); math.Abs(got-want.KNNAccuracy) > knnTol {
			t.Errorf("stage %s: k-NN accuracy %v, scikit-learn %v (tolerance %v)", name, got, want.KNNAccuracy, knnTol)
		}
		got, _ := st.Value("", "probe.accuracy")
		// The probe fits by L-BFGS to a stopping rule, as scikit-learn
		// does with its own; allow one point of 300 to fall either way.
		if math.Abs(got-want.ProbeAccuracy) > 1.0/float64(ref.Rows)+1e-12 {
			t.Errorf("stage %s: probe accuracy %v, scikit-learn %v", name, got, want.ProbeAccuracy)
		}
		knn, _ := st.Value("", "knn.accuracy")
		t.Logf("stage %s: k-NN %v (sklearn %v), probe %v (sklearn %v)", name, knn, want.KNNAccuracy, got, want.ProbeAccuracy)
		probe[name] = got
	}
	if probe["4"] < probe["0"] {
		t.Errorf("probe accuracy at the last hidden stage %v is below the input's %v", probe["4"], probe["0"])
	}
}
