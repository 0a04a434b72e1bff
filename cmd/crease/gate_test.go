// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"path/filepath"
	"testing"
	"time"

	"crease.dev/crease/homology"
)

// TestCollapseGate checks collapseGate's choice on the bench clouds
// against the faster path measured by bench/homology.sh (the table
// beside collapseSamples); cases where the two paths took within 20 %
// of each other are left out.
func TestCollapseGate(t *testing.T) {
	for _, tc := range []struct {
		cloud     string
		threshold float64 // 0: the enclosing radius
		want      bool
	}{
		{"torus2000", 1.0, true},
		{"torus2000", 1.50595025, true},
		{"torus2000", 2.98898254, false},
		{"torus2000", 0, false},
		{"sphere600", 0, false},
		{"digits1797", 38.3340574, false},
		{"digits1797", 0, false},
		{"clusters1500_r16", 8.04067941, false},
		{"clusters1500_r16", 0, false},
		{"noisycircle1000", 0, true},
		// 400 points of the ReLU circle in R⁶⁴ (TestReLUCircleBar):
		// 0.21 s plain, 0.03 s collapsed.
		{"relu_circle", 0, true},
	} {
		path := filepath.Join("..", "..", "testdata", "homology", "bench", tc.cloud+".csv")
		if tc.cloud == "relu_circle" {
			path = filepath.Join("..", "..", "testdata", "homology", "relu_circle.csv")
		}
		pts, _, err := readPoints(path, nil, "", "auto")
		if err != nil {
			t.Fatal(err)
		}
		start := time.Now()
		got := collapseGate(pts, homology.Euclidean, tc.threshold)
		t.Logf("%s %g: %v (%v)", tc.cloud, tc.threshold, got, time.Since(start))
		if got != tc.want {
			t.Errorf("collapseGate(%s, %g) = %v, want %v", tc.cloud, tc.threshold, got, tc.want)
		}
	}
}

// BenchmarkCollapseGate times the choice on the largest bench cloud,
// the digits (1797 in R⁶⁴) at the enclosing radius, where it reads the
// most distances; it is small beside the 0.4 s of the plain path.
func BenchmarkCollapseGate(b *testing.B) {
	pts, _, err := readPoints(filepath.Join("..", "..", "testdata", "homology", "bench", "digits1797.csv"), nil, "", "auto")
	if err != nil {
		b.Fatal(err)
	}
	for b.Loop() {
		if collapseGate(pts, homology.Euclidean, 0) {
			b.Fatal("collapseGate chose the collapse for the digits")
		}
	}
}
