// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"crease.dev/crease/trace"
)

// TestTextLabelUnits traces a classifier trained by PyTorch 1.13 on
// scikit-learn's make_circles whose output unit 0 is the class "outer"
// and unit 1 "inner" (testdata/gen/trace_text_labels.py), so that the
// alphabetical order of the labels is the wrong one. With the order
// inferred from the model's predictions, and with the order given, the
// softmax Voronoi test at the last stage must equal torch's accuracy
// recorded in the sidecar; with the order given wrongly, one minus it.
func TestTextLabelUnits(t *testing.T) {
	dir := filepath.Join("..", "testdata", "trace")
	b, err := os.ReadFile(filepath.Join(dir, "circles_text.json"))
	if err != nil {
		t.Fatal(err)
	}
	var side struct {
		Units    []string `json:"units"`
		Accuracy float64  `json:"torch_accuracy"`
	}
	if err := json.Unmarshal(b, &side); err != nil {
		t.Fatal(err)
	}
	f, err := os.Open(filepath.Join(dir, "circles_text.csv"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := trace.ReadCSV(f, "circles_text.csv", &trace.CSVSettings{Label: "circle"})
	if err != nil {
		t.Fatal(err)
	}
	reversed := slices.Clone(side.Units)
	slices.Reverse(reversed)
	for _, tc := range []struct {
		name  string
		order []string
		want  float64
	}{
		{"inferred", nil, side.Accuracy},
		{"given", side.Units, side.Accuracy},
		{"given wrongly", reversed, 1 - side.Accuracy},
	} {
		t.Run(tc.name, func(t *testing.T) {
			set := &trace.Settings{MaxDim: trace.H0Only, SkipProbe: true, Cap: -1, ClassOrder: tc.order}
			tr, err := trace.RunFile(context.Background(), filepath.Join(dir, "circles_text.onnx"), s, set)
			if err != nil {
				t.Fatal(err)
			}
			last := tr.Stages[len(tr.Stages)-1]
			if last.Kind != trace.KindSoftmax {
				t.Fatalf("last stage is %s, want softmax", last.Kind)
			}
			if got, ok := last.Measures["voronoi.inside"]; !ok || got != tc.want {
				t.Errorf("voronoi.inside = %v (present %v), want %v", got, ok, tc.want)
			}
			if tc.order == nil {
				um := tr.Sample.Units
				for c, name := range tr.Sample.Classes {
					if u := um.Units[c]; side.Units[u] != name {
						t.Errorf("class %q matched to unit %d, which is %q", name, u, side.Units[u])
					}
				}
			}
		})
	}
}
