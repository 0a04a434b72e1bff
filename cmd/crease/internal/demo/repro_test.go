// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package demo

import (
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"testing"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

// reproDir holds the data and models of the reproduction, made by
// testdata/gen/betti_repro.py.
var reproDir = filepath.Join("..", "..", "..", "..", "testdata", "repro")

// reproSettings are those of the reproduction: the defaults (H0 and H1
// read by the ratio rule) on every point, 600 per class, classes only.
func reproSettings() *trace.Settings {
	return &trace.Settings{Cap: -1, SkipWhole: true}
}

// summed returns, per stage, the Betti numbers summed over classes and
// dimensions.
func summed(tr *trace.Trace) []int {
	out := make([]int, len(tr.Stages))
	for i := range tr.Stages {
		for _, g := range tr.Stages[i].Classes {
			for _, b := range g.Betti {
				out[i] += b
			}
		}
	}
	return out
}

// settledFrom returns the first stage from which v equals target up to
// the last stage, or −1.
func settledFrom(v []int, target int) int {
	k := -1
	for i := len(v) - 1; i >= 0 && v[i] == target; i-- {
		k = i
	}
	return k
}

// TestReproduction checks a published finding on our own data (Naitzat,
// Zhitnikov, Lim, "Topology of deep neural networks", JMLR 21, 2020):
// networks trained to 100 % training accuracy reduce each class to
// β = (1, 0) by the output, and a ReLU network's summed Betti numbers
// fall at least as early as those of a tanh network of the same shape.
//
// The data is a chain of three solid rings in R³ (class "ends": the two
// outer rings, β = (2, 2); class "link": the middle ring, β = (1, 1), by
// construction); both networks are 3→10×6→2 trained with PyTorch 1.13
// (records in testdata/repro/*.onnx.json).
func TestReproduction(t *testing.T) {
	f, err := os.Open(filepath.Join(reproDir, "chain.csv"))
	if err != nil {
		t.Fatal(err)
	}
	s, err := trace.ReadCSV(f, "chain.csv", &trace.CSVSettings{Label: "class"})
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	settled := map[string]int{}
	for _, act := range []string{"relu", "tanh"} {
		path := filepath.Join(reproDir, act+".onnx")
		var rec struct {
			Accuracy float64 `json:"accuracy_train"`
		}
		data, err := os.ReadFile(path + ".json")
		if err != nil {
			t.Fatal(err)
		}
		if err := json.Unmarshal(data, &rec); err != nil || rec.Accuracy != 1 {
			t.Fatalf("%s: PyTorch training accuracy %v (%v), want 1", act, rec.Accuracy, err)
		}
		// Our forward pass agrees: every training point is classified
		// correctly.
		m, err := onnxload.Open(path, nil)
		if err != nil {
			t.Fatal(err)
		}
		stages, err := m.Stages(nil)
		if err != nil {
			t.Fatal(err)
		}
		acts, err := onnxload.Forward(context.Background(), stages, s.X, nil)
		if err != nil {
			t.Fatal(err)
		}
		logits := acts[len(acts)-1]
		wrong := 0
		for i, l := range s.Labels {
			// Classes are ordered lexically, "ends" < "link", as in the generator.
			pred := 0
			if logits.At(i, 1) > logits.At(i, 0) {
				pred = 1
			}
			if pred != l {
				wrong++
			}
		}
		if wrong > 0 {
			t.Errorf("%s: %d of %d training points misclassified by our forward pass", act, wrong, len(s.Labels))
		}

		tr, err := trace.Run(context.Background(), stages, s, reproSettings())
		if err != nil {
			t.Fatal(err)
		}
		in, out := tr.Stage(0), tr.Stage(len(tr.Stages)-1)
		for c, want := range map[string][]int{"ends": {2, 2}, "link": {1, 1}} {
			if got := in.Group(c).Betti; !slices.Equal(got, want) {
				t.Errorf("%s: input class %s: β = %v, want %v", act, c, got, want)
			}
			if got := out.Group(c).Betti; !slices.Equal(got, []int{1, 0}) {
				t.Errorf("%s: output class %s: β = %v, want (1, 0)", act, c, got)
			}
		}
		sum := summed(tr)
		settled[act] = settledFrom(sum, len(tr.Sample.Classes))
		t.Logf("%s: summed Betti numbers per stage %v; (1,0) for every class from stage %d", act, sum, settled[act])
	}
	if settled["relu"] < 0 || settled["tanh"] < 0 || settled["relu"] > settled["tanh"] {
		t.Errorf("summed Betti numbers settle at stage %d (ReLU) and %d (tanh); the finding wants ReLU no later", settled["relu"], settled["tanh"])
	}
}
