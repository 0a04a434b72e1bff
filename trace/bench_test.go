// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"os"
	"testing"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

// BenchmarkRun traces the digits model (6 stages, 10 classes, H0–H1,
// default settings) over caps of its 300-row sample and reports the
// share of worker time spent in homology.
func BenchmarkRun(b *testing.B) {
	f, err := os.Open("../testdata/onnx/digits_sample.csv")
	if err != nil {
		b.Fatal(err)
	}
	s, err := trace.ReadCSV(f, "digits_sample.csv", nil)
	f.Close()
	if err != nil {
		b.Fatal(err)
	}
	m, err := onnxload.Open("../testdata/onnx/digits.onnx", nil)
	if err != nil {
		b.Fatal(err)
	}
	stages, err := m.Stages(nil)
	if err != nil {
		b.Fatal(err)
	}
	for _, bc := range []struct {
		name string
		cap  int
	}{{"cap=10", 10}, {"cap=default", 0}} {
		b.Run(bc.name, func(b *testing.B) {
			b.ReportAllocs()
			var share float64
			for b.Loop() {
				set := trace.DefaultSettings()
				set.Cap = bc.cap
				set.Timing = true
				tr, err := trace.Run(context.Background(), stages, s, set)
				if err != nil {
					b.Fatal(err)
				}
				share += tr.Timing.HomologyShare()
			}
			b.ReportMetric(share/float64(b.N), "homology-share")
		})
	}
}
