// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package demo

import (
	"context"
	"math"
	"slices"
	"strings"
	"testing"

	"crease.dev/crease/trace"
)

// TestDemoScenario checks what the demo promises. The scenario (see the
// package doc): a two-joint arm on the torus of joint angles, classes
// clear / near / contact; the well-sized model 4→16→16→3 and the narrow
// model 4→2→16→3.
//
//   - At the input, each class's Betti numbers equal those of its region
//     of the torus (computed by testdata/gen/demo_arm.py on a 720×720
//     grid, Euler–Poincaré formula) and GUDHI 3.7.1's Rips Betti numbers
//     of the same 300 points at 0.2 × diameter (both in data/arm.json).
//   - The narrow model glues points of different classes at its first
//     stage (a 4→2 projection cannot be injective on a 2-torus); the
//     well-sized one glues none in its first layer (stages 1 and 2).
//   - Both traces reach β = (1, 0) for every class at some stage.
func TestDemoScenario(t *testing.T) {
	meta, err := Meta()
	if err != nil {
		t.Fatal(err)
	}
	traces := map[string]*trace.Trace{}
	for _, name := range Models {
		tr, err := Run(context.Background(), name, Settings())
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		traces[name] = tr
		in := tr.Stage(0)
		for _, c := range meta.Classes {
			got := in.Group(c).Betti
			if want := meta.RegionBetti[c][:2]; !slices.Equal(got, want) {
				t.Errorf("%s: input class %s: β = %v, want the region's %v", name, c, got, want)
			}
			if want := meta.SampleRipsBetti[c]["0.20"]; !slices.Equal(got, want) {
				t.Errorf("%s: input class %s: β = %v, want GUDHI's %v", name, c, got, want)
			}
		}
		v := Judge(tr)
		if v.FirstSimple < 0 {
			t.Errorf("%s: no stage where every class is simple", name)
		}
		line := v.String(tr)
		if len(v.NotSimple) > 0 && !strings.Contains(line, "not at the output") {
			t.Errorf("%s: verdict %q hides classes not simple at the output: %v", name, line, v.NotSimple)
		}
	}
	narrow, wide := traces[Narrow], traces[Wide]
	if g := narrow.Stage(1).Glued; g == nil || g.Cross == 0 {
		t.Errorf("narrow model: stage 1 glued %+v, want cross-class gluing", g)
	}
	if v := Judge(narrow); v.FirstCross != 1 {
		t.Errorf("narrow model: first cross-class gluing at stage %d, want 1", v.FirstCross)
	}
	if v := Judge(wide); v.FirstLayer != 2 || v.FirstLayerCross != 0 {
		t.Errorf("well-sized model: first layer to stage %d glues %d cross-class pairs, want stage 2 and 0", v.FirstLayer, v.FirstLayerCross)
	}
	if v := Judge(narrow); v.FirstLayerCross == 0 {
		t.Errorf("narrow model: first layer glues no cross-class pairs")
	}
	for _, i := range []int{1, 2} {
		if g := wide.Stage(i).Glued; g == nil || g.Cross != 0 {
			t.Errorf("well-sized model: stage %d glued %+v, want no cross-class pairs", i, g)
		}
	}
}

func TestBadModelName(t *testing.T) {
	for _, name := range []string{"", "arm", "../demo"} {
		if _, err := Model(name); err == nil || !strings.Contains(err.Error(), "no embedded model") {
			t.Errorf("Model(%q): error %v, want one naming the missing model", name, err)
		}
	}
}

// TestClassOrder checks class identity on the demo's PyTorch 1.13
// models (testdata/gen/demo_arm.py), which were trained with the text
// labels in the order clear, near, contact: not alphabetical. Whether
// the order is given (as Run does, from the generator's record) or
// inferred from the model's predictions, the softmax Voronoi test must
// find inside their own cell exactly the points the model classifies
// right, its accuracy that PyTorch recorded.
func TestClassOrder(t *testing.T) {
	meta, err := Meta()
	if err != nil {
		t.Fatal(err)
	}
	if slices.IsSorted(meta.Classes) {
		t.Fatalf("classes %v are alphabetical; the test needs another order", meta.Classes)
	}
	for _, name := range Models {
		info, err := TrainingOf(name)
		if err != nil {
			t.Fatal(err)
		}
		stages, err := Stages(name)
		if err != nil {
			t.Fatal(err)
		}
		s, err := Sample()
		if err != nil {
			t.Fatal(err)
		}
		for _, order := range [][]string{meta.Classes, nil} {
			set := &trace.Settings{MaxDim: trace.H0Only, SkipProbe: true, SkipWhole: true, Cap: -1, ClassOrder: order}
			tr, err := trace.Run(context.Background(), stages, s, set)
			if err != nil {
				t.Fatal(err)
			}
			last := tr.Stages[len(tr.Stages)-1]
			got := last.Measures["voronoi.inside"]
			if math.Abs(got-info.AccuracyDemo) > 1e-9 {
				t.Errorf("%s, order %v (%s): voronoi.inside %v, PyTorch's accuracy %v", name, order, tr.Sample.Units.Source, got, info.AccuracyDemo)
			}
		}
	}
}
