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
// of each other are left out. It also checks the estimated density
// against the cut of sparseDensity for a few thresholds.
func TestCollapseGate(t *testing.T) {
	for _, tc := range []struct {
		cloud     string
		threshold float64 // 0: the enclosing radius
		want      bool
		sparse    bool // want the density at most sparseDensity
	}{
		{"torus2000", 1.0, true, true},
		{"torus2000", 1.50595025, true, false},
		{"torus2000", 2.98898254, false, false},
		{"torus2000", 0, false, false},
		{"sphere600", 0, false, false},
		{"digits1797", 19.1963494, false, true},
		{"digits1797", 38.3340574, false, false},
		{"digits1797", 0, false, false},
		{"clusters1500_r16", 4.02777065, false, true},
		{"clusters1500_r16", 8.04067941, false, false},
		{"clusters1500_r16", 0, false, false},
		{"noisycircle1000", 0, true, false},
		// 400 points of the ReLU circle in R⁶⁴ (TestReLUCircleBar):
		// 0.21 s plain, 0.03 s collapsed.
		{"relu_circle", 0, true, false},
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
		got, density := collapseGate(pts, homology.Euclidean, tc.threshold)
		t.Logf("%s %g: %v, density %.3f (%v)", tc.cloud, tc.threshold, got, density, time.Since(start))
		if got != tc.want {
			t.Errorf("collapseGate(%s, %g) = %v, want %v", tc.cloud, tc.threshold, got, tc.want)
		}
		if sparse := density <= sparseDensity; sparse != tc.sparse {
			t.Errorf("collapseGate(%s, %g): density %.3g, want sparse %v", tc.cloud, tc.threshold, density, tc.sparse)
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
		if c, _ := collapseGate(pts, homology.Euclidean, 0); c {
			b.Fatal("collapseGate chose the collapse for the digits")
		}
	}
}
