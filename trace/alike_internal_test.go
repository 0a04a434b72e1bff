// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"fmt"
	"strings"
	"testing"

	"crease.dev/crease/onnxload"
)

// TestMatchStages checks the structural matching of CompareModels on
// stage sequences: equal models pair index by index; a fused view (two
// affine stages merged into one) pairs the fused stage with the affine
// stage of the same width and leaves the other unmatched; a deeper
// model leaves its extra layer unmatched.
func TestMatchStages(t *testing.T) {
	stages := func(spec string) []Stage {
		var out []Stage
		for i, f := range strings.Fields(spec) {
			var kind string
			var w int
			fmt.Sscanf(strings.Replace(f, ":", " ", 1), "%s %d", &kind, &w)
			out = append(out, Stage{Index: i, Kind: StageKind(kind), Width: w})
		}
		return out
	}
	tests := []struct {
		name, a, b string
		pairs      string
		unmatched  string
	}{
		{"same", "input:2 affine:16 relu:16 affine:3", "input:2 affine:16 relu:16 affine:3", "0-0 1-1 2-2 3-3", ""},
		{"fused", "input:2 affine:8 affine:16 relu:16 affine:3", "input:2 affine:16 relu:16 affine:3", "0-0 2-1 3-2 4-3", "A 1"},
		{"deeper", "input:2 affine:16 relu:16 affine:3", "input:2 affine:16 relu:16 affine:16 relu:16 affine:3", "0-0 1-1 2-2 3-5", "B 3 B 4"},
		{"softmax", "input:2 affine:3 softmax:3", "input:2 affine:3", "0-0 1-1", "A 2"},
	}
	// With origin nodes, a fused stage pairs with the unfused stage that
	// ends at its last node.
	a := []Stage{{Index: 0, Kind: KindInput, Width: 8}, {Index: 1, Kind: KindAffine, Width: 5, Nodes: []string{"/0/Gemm"}},
		{Index: 2, Kind: KindAffine, Width: 5, Nodes: []string{"/1/BatchNormalization"}}, {Index: 3, Kind: KindReLU, Width: 5, Nodes: []string{"/2/Relu"}}}
	b := []Stage{{Index: 0, Kind: KindInput, Width: 8}, {Index: 1, Kind: KindAffine, Width: 5, Nodes: []string{"/0/Gemm", "/1/BatchNormalization"}},
		{Index: 2, Kind: KindReLU, Width: 5, Nodes: []string{"/2/Relu"}}}
	if pairs, un := matchStages(a, b); fmt.Sprint(pairs) != "[[0 0] [2 1] [3 2]]" || fmt.Sprint(un) != "[A 1]" {
		t.Errorf("fused with nodes: pairs %v, unmatched %v; want [[0 0] [2 1] [3 2]] and [A 1]", pairs, un)
	}
	for _, tc := range tests {
		pairs, un := matchStages(stages(tc.a), stages(tc.b))
		var got []string
		for _, p := range pairs {
			got = append(got, fmt.Sprintf("%d-%d", p[0], p[1]))
		}
		if g := strings.Join(got, " "); g != tc.pairs {
			t.Errorf("%s: pairs %q, want %q", tc.name, g, tc.pairs)
		}
		if g := strings.Join(un, " "); g != tc.unmatched {
			t.Errorf("%s: unmatched %q, want %q", tc.name, g, tc.unmatched)
		}
	}
}

// TestKindNames checks that the StageKind constants are the names
// onnxload gives its kinds, so that a trace's kinds compare equal to
// them.
func TestKindNames(t *testing.T) {
	for _, tc := range []struct {
		k    StageKind
		kind onnxload.Kind
	}{
		{KindAffine, onnxload.Affine}, {KindReLU, onnxload.ReLU}, {KindSoftmax, onnxload.Softmax}, {KindLogSoftmax, onnxload.LogSoftmax},
	} {
		if got := KindOf(tc.kind); got != tc.k {
			t.Errorf("KindOf(%v) = %q, want %q", tc.kind, got, tc.k)
		}
	}
	if KindInput.Activation() || KindAffine.Activation() || !KindReLU.Activation() || !KindOf(onnxload.Tanh).Activation() {
		t.Error("Activation: want true exactly for activation kinds")
	}
}
