// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"testing"

	"crease.dev/crease/trace/tracecheck"
)

// TestArmPipeline is a model-pipeline unit test: after retraining the
// robot-arm classifier, its first two layers must keep the three classes
// apart (no cross-class gluing before the logits, stage 5), and at the
// logits every class must be one component with no holes. On failure,
// tracecheck prints the measure's series across stages.
//
// Why these hold for the shipped model: its input classes are bands on
// the torus of joint angles (β = (1,1), (1,1), (2,2); checked against
// GUDHI in cmd/crease/internal/demo), the 16-unit layers are wide enough to embed
// them without identifying points of different classes, and a
// classifier's logits for one class fill a connected, hole-free region.
func TestArmPipeline(t *testing.T) {
	tr, err := logitsTrace(t.Context(), "../../cmd/crease/internal/demo/data/")
	if err != nil {
		t.Fatal(err)
	}
	last := len(tr.Stages) - 1
	tracecheck.NoCrossGlueBefore(t, tr, last)
	for _, c := range tr.Sample.Classes {
		tracecheck.SimpleFrom(t, tr, c, last)
	}
}
