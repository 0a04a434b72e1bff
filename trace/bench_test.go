// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"os"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/spaces"
	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

// BenchmarkRun traces the digits model (6 stages, 10 classes, H0–H1,
// default settings) over caps of its 300-row sample and reports the
// share of worker time spent in homology, and the worker time of the
// collapse and class-overlap measures relative to the homology's (issue
// 12 asks for at most 1.5 together; Timing.String prints them too).
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
	stages := digitsStages(b)
	for _, bc := range []struct {
		name string
		cap  int
	}{{"cap=10", 10}, {"cap=default", 0}} {
		b.Run(bc.name, func(b *testing.B) {
			b.ReportAllocs()
			var share, relu, overlap float64
			for b.Loop() {
				set := trace.DefaultSettings()
				set.Cap = bc.cap
				set.Timing = true
				tr, err := trace.Run(context.Background(), stages, s, set)
				if err != nil {
					b.Fatal(err)
				}
				t := tr.Timing
				share += t.HomologyShare()
				relu += float64(t.Relu) / float64(t.Homology)
				overlap += float64(t.Overlap) / float64(t.Homology)
			}
			b.ReportMetric(share/float64(b.N), "homology-share")
			b.ReportMetric(relu/float64(b.N), "collapse/homology")
			b.ReportMetric(overlap/float64(b.N), "overlap/homology")
		})
	}
}

// BenchmarkRunTenClassesH2 traces the digits model at H0–H2 over 10
// classes of 400 points each, samples of textbook spaces
// (internal/spaces) carried into R⁶⁴ and shifted apart: the case the
// Betti reading's speed target names (under 60 s on 2 cores). "cap=default"
// reads 120 points per class, "cap=none" every point.
//
//	go test ./trace -run - -bench RunTenClassesH2 -benchtime 1x
func BenchmarkRunTenClassesH2(b *testing.B) {
	stages := digitsStages(b)
	all := spaces.All()
	const per = 400
	x := mat.NewDense(10*per, 64, nil)
	labels := make([]int, 10*per)
	for c := range 10 {
		sp := all[c%len(all)]
		pts := sp.Sample(per, 0.025, spaces.Embedding{D: 64, Cond: 1}, uint64(100+c))
		for i := range per {
			row := x.RawRowView(c*per + i)
			copy(row, pts.RawRowView(i))
			for j := range row {
				// The digits model reads pixel intensities in [0, 1].
				row[j] = 0.5 + 0.05*row[j]
			}
			labels[c*per+i] = c
		}
	}
	s, err := trace.NewSampleInts(x, labels)
	if err != nil {
		b.Fatal(err)
	}
	for _, bc := range []struct {
		name string
		cap  int
	}{{"cap=default", 0}, {"cap=none", -1}} {
		b.Run(bc.name, func(b *testing.B) {
			for b.Loop() {
				set := trace.DefaultSettings()
				set.MaxDim = 2
				set.Cap = bc.cap
				if _, err := trace.Run(context.Background(), stages, s, set); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// digitsStages returns the stages of the digits model.
func digitsStages(b *testing.B) []onnxload.Stage {
	m, err := onnxload.Open("../testdata/onnx/digits.onnx", nil)
	if err != nil {
		b.Fatal(err)
	}
	stages, err := m.Stages(nil)
	if err != nil {
		b.Fatal(err)
	}
	return stages
}
