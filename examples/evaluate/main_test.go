// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"context"
	"strings"
	"testing"
)

// TestEvaluate runs the evaluation on the demo's two robot-arm models:
// the well-sized one glues no classes in its first layer (stages 1–2);
// the narrow one's 2-unit first layer glues classes at stage 1, so the
// evaluation fails (status 1). A missing model is bad input (status 2).
func TestEvaluate(t *testing.T) {
	const dir = "../../cmd/crease/internal/demo/data/"
	for _, tc := range []struct {
		name  string
		model string
		want  int
		say   string
	}{
		{"well-sized passes", "arm_wide.onnx", 0, "ok"},
		{"narrow fails", "arm_narrow.onnx", 1, "FAIL: stage 1 (affine) glues"},
		{"missing model", "none.onnx", 2, "none.onnx"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			code := run(context.Background(), []string{"-model", dir + tc.model, "-data", dir + "arm.csv"}, &out, &errb)
			if code != tc.want {
				t.Fatalf("exit %d, want %d\n%s%s", code, tc.want, out.String(), errb.String())
			}
			if !strings.Contains(out.String()+errb.String(), tc.say) {
				t.Errorf("output lacks %q:\n%s%s", tc.say, out.String(), errb.String())
			}
		})
	}
}
