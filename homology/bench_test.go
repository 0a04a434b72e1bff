// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"testing"

	"gonum.org/v1/gonum/mat"
)

var cloudBenchSink *Barcode

// BenchmarkClouds times Rips on the committed benchmark clouds of
// testdata/homology/bench (written by testdata/gen/homology_clouds.py)
// with the settings of the calibration table: a uniform-angle
// torus in R³ (R=2, r=1) at thresholds 1.0, 1.5, 3.0 and the enclosing
// radius; three Gaussian clusters in R¹⁶ at the enclosing radius; the 1797
// UCI digits in R⁶⁴ (scikit-learn load_digits, raw pixels); 1000 noisy
// unit-circle points in R²; 600 points of S² with H2 at threshold 1.0.
// All are H≤1 unless named otherwise. The large cases take seconds to
// tens of seconds each; pick them with -bench. bench/homology.sh times the
// same cases through the command line against GUDHI.
func BenchmarkClouds(b *testing.B) {
	cases := []struct {
		name, file string
		set        Settings
	}{
		{"torus2000/thr1.0", "torus2000.csv", Settings{MaxDim: 1, Threshold: 1.0}},
		{"torus2000/thr1.5", "torus2000.csv", Settings{MaxDim: 1, Threshold: 1.5}},
		{"torus2000/thr3.0", "torus2000.csv", Settings{MaxDim: 1, Threshold: 3.0}},
		{"torus2000/enclosing", "torus2000.csv", Settings{MaxDim: 1}},
		{"clusters1500_r16/enclosing", "clusters1500_r16.csv", Settings{MaxDim: 1}},
		{"digits1797/enclosing", "digits1797.csv", Settings{MaxDim: 1}},
		{"noisycircle1000/enclosing", "noisycircle1000.csv", Settings{MaxDim: 1}},
		{"sphere600/H2/thr1.0", "sphere600.csv", Settings{MaxDim: 2, Threshold: 1.0}},
	}
	clouds := map[string]*mat.Dense{}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			x, ok := clouds[c.file]
			if !ok {
				x = gudhiLoadCloud(b, "bench/"+c.file)
				clouds[c.file] = x
			}
			b.ReportAllocs()
			for b.Loop() {
				bc, err := Rips(context.Background(), x, &c.set)
				if err != nil {
					b.Fatal(err)
				}
				cloudBenchSink = bc
			}
			b.ReportMetric(float64(cloudBenchSink.Stats.Edges), "edges")
		})
	}
}
