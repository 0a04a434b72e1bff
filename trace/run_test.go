// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"bytes"
	"context"
	"errors"
	"strings"
	"testing"

	"github.com/google/go-cmp/cmp"
	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

// TestRunCircles checks Betti numbers and gluing on two circles pushed
// through identity, ReLU and a projection. References: a circle has
// β = (1, 1) (Hatcher, Algebraic Topology, 2002, Example 2.23, H₁(S¹) =
// Z); a segment is contractible, β = (1, 0). The glued pairs are counted
// by hand from the construction: the projection (x, y) ↦ (x, 0) sends
// the points at angles θ and −θ of one circle together (11 pairs per
// circle of 24 points), and every point of one circle to the one or two
// points of the other with the same cosine (2·1 + 22·2 = 46 pairs);
// relu.Glue counts exactly these, as the projected sample has duplicate
// points (median nearest-neighbour distance 0).
func TestRunCircles(t *testing.T) {
	tr := circleTrace(t)
	type want struct {
		kind       trace.StageKind
		whole, cls []int
		glued      *trace.Glued
	}
	wants := []want{
		{"input", []int{2, 2}, []int{1, 1}, nil},
		{"affine", []int{2, 2}, []int{1, 1}, &trace.Glued{}},
		{"relu", []int{2, 2}, []int{1, 1}, &trace.Glued{}},
		{"affine", []int{1, 0}, []int{1, 0}, &trace.Glued{Total: 68, Within: 22, Cross: 46}},
	}
	if len(tr.Stages) != len(wants) {
		t.Fatalf("got %d stages, want %d", len(tr.Stages), len(wants))
	}
	for i, w := range wants {
		s := tr.Stages[i]
		if s.Index != i || s.Kind != w.kind || s.Width != 2 {
			t.Errorf("stage %d: index %d kind %q width %d, want kind %q width 2", i, s.Index, s.Kind, s.Width, w.kind)
		}
		if diff := cmp.Diff(w.whole, s.Whole.Betti); diff != "" {
			t.Errorf("stage %d whole Betti (-want +got):\n%s", i, diff)
		}
		for _, g := range s.Classes {
			if diff := cmp.Diff(w.cls, g.Betti); diff != "" {
				t.Errorf("stage %d class %s Betti (-want +got):\n%s", i, g.Label, diff)
			}
			if g.Count != 24 {
				t.Errorf("stage %d class %s count %d, want 24", i, g.Label, g.Count)
			}
		}
		if diff := cmp.Diff(w.glued, s.Glued); diff != "" {
			t.Errorf("stage %d glued (-want +got):\n%s", i, diff)
		}
	}
	// Barcodes were computed only up to the scale rule's ε.
	g := tr.Stages[0].Classes[0]
	if g.Threshold != g.Scale || !g.Truncated || g.Scale != 0.2*g.Diameter {
		t.Errorf("class threshold %v, scale %v, diameter %v, truncated %v: want threshold = scale = 0.2·diameter, truncated", g.Threshold, g.Scale, g.Diameter, g.Truncated)
	}
}

// TestRunRules checks the persistence and hop-count rules on the same
// circles, where every rule must find β = (1, 1) per class at the input
// (Hatcher, Example 2.23) and (1, 0) after the projection.
func TestRunRules(t *testing.T) {
	for _, tc := range []struct {
		name string
		set  trace.Settings
	}{
		{"ratio", trace.Settings{MaxDim: 1, Rule: trace.ScaleRatio}},
		{"persistence", trace.Settings{MaxDim: 1, Rule: trace.ScalePersistence, Persistence: 0.2}},
		{"hops", trace.Settings{MaxDim: 1, Rule: trace.ScaleHops, K: 4, Hops: 1}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tr, err := trace.Run(context.Background(), projectModel(), circles(t), &tc.set)
			if err != nil {
				t.Fatal(err)
			}
			for _, c := range []struct {
				stage int
				want  []int
			}{{0, []int{1, 1}}, {3, []int{1, 0}}} {
				for _, g := range tr.Stages[c.stage].Classes {
					if !cmp.Equal(g.Betti, c.want) {
						t.Errorf("stage %d class %s: Betti %v, want %v", c.stage, g.Label, g.Betti, c.want)
					}
				}
			}
		})
	}
}

// TestRunErrors checks that bad input gives an error naming the problem.
func TestRunErrors(t *testing.T) {
	s := circles(t)
	wide := []onnxload.Stage{{Kind: onnxload.Affine, In: 3, Out: 1, W: mat.NewDense(1, 3, nil), B: []float64{0}}}
	for _, tc := range []struct {
		name   string
		stages []onnxload.Stage
		s      *trace.Sample
		set    *trace.Settings
		want   string
	}{
		{"width", wide, s, nil, "3"},
		{"nil sample", projectModel(), nil, nil, "no sample"},
		{"maxdim", projectModel(), s, &trace.Settings{MaxDim: 4}, "maxdim"},
		{"scale", projectModel(), s, &trace.Settings{Scale: -1}, "scale"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := trace.Run(context.Background(), tc.stages, tc.s, tc.set)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("got error %v, want one mentioning %q", err, tc.want)
			}
		})
	}
}

// TestRunCancel cancels after the first finished task: Run must return
// the context's error and only complete stages.
func TestRunCancel(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	set := trace.DefaultSettings()
	set.Scale = 0.2
	set.Workers = 1
	set.Progress = func(trace.Progress) { cancel() }
	tr, err := trace.Run(ctx, projectModel(), circles(t), set)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("got error %v, want context.Canceled", err)
	}
	if tr == nil || len(tr.Stages) >= 4 {
		t.Fatalf("got %v, want a partial trace", tr)
	}
	for _, s := range tr.Stages {
		for _, g := range s.Classes {
			if g.Betti == nil {
				t.Errorf("stage %d class %s unfinished but returned", s.Index, g.Label)
			}
		}
	}
}

// TestJSONRoundTrip checks that reading the JSON back gives an equal
// trace and that two runs give byte-identical JSON.
func TestJSONRoundTrip(t *testing.T) {
	a, b := circleTrace(t), circleTrace(t)
	var ja, jb bytes.Buffer
	if err := a.WriteJSON(&ja); err != nil {
		t.Fatal(err)
	}
	if err := b.WriteJSON(&jb); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(ja.Bytes(), jb.Bytes()) {
		t.Error("two runs gave different JSON")
	}
	back, err := trace.ReadJSON(bytes.NewReader(ja.Bytes()))
	if err != nil {
		t.Fatal(err)
	}
	if diff := cmp.Diff(a, back); diff != "" {
		t.Errorf("round trip (-want +got):\n%s", diff)
	}
}

// TestReadJSONErrors checks that broken layouts are rejected.
func TestReadJSONErrors(t *testing.T) {
	for _, tc := range []struct{ name, in, want string }{
		{"schema", `{"schema": 99, "stages": []}`, "schema version 99"},
		{"unknown field", `{"schema": 1, "bogus": 1}`, "bogus"},
		{"index", `{"schema": 1, "sample": {"classes": []}, "stages": [{"index": 1, "kind": "input"}]}`, "index 1"},
		{"kind", `{"schema": 1, "sample": {"classes": []}, "stages": [{"index": 0, "kind": "relu"}]}`, "kind"},
		{"bar", `{"schema": 1, "sample": {"classes": []}, "stages": [{"index": 0, "kind": "input", "whole": {"bars": [[[1]]]}}]}`, "bar"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, err := trace.ReadJSON(strings.NewReader(tc.in))
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("got %v, want an error mentioning %q", err, tc.want)
			}
		})
	}
}
