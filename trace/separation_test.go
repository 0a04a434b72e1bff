// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"strings"
	"testing"

	"crease.dev/crease/trace"
)

func TestSeparation(t *testing.T) {
	stage := func(kind trace.StageKind, knn, probe float64) trace.Stage {
		m := map[string]float64{"knn.accuracy": knn}
		if probe >= 0 {
			m["probe.accuracy"] = probe
		}
		return trace.Stage{Kind: kind, Width: 4, Measures: m}
	}
	for _, tc := range []struct {
		name      string
		stages    []trace.Stage
		separable int
		peak      int
		drops     []int
		text      string
	}{
		{"separates at the logits", []trace.Stage{stage("input", 0.7, 0.6), stage("affine", 0.8, 0.9), stage("relu", 0.9, 1), stage("affine", 0.95, 1)}, 2, 3, nil, "first linearly separable at stage 2"},
		{"a narrow layer loses it", []trace.Stage{stage("input", 0.9, 0.8), stage("affine", 0.6, 0.7), stage("relu", 0.61, 0.7)}, -1, 0, []int{1}, "stage 1 (affine, width 4) lowers it from 0.900 to 0.600"},
		{"no probe", []trace.Stage{stage("input", 0.5, -1), stage("affine", 0.5, -1)}, -1, 0, nil, "or the probe was not run"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := (&trace.Trace{Stages: tc.stages}).Separation()
			if s.FirstSeparable != tc.separable || s.KNNPeak != tc.peak || len(s.Drops) != len(tc.drops) {
				t.Fatalf("got %+v", s)
			}
			for i, d := range s.Drops {
				if d.Stage != tc.drops[i] {
					t.Errorf("drop %d at stage %d, want %d", i, d.Stage, tc.drops[i])
				}
			}
			if !strings.Contains(s.String(), tc.text) {
				t.Errorf("%q lacks %q", s.String(), tc.text)
			}
		})
	}
}
