// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"math"
	"testing"
)

// TestGroupScale checks the resolution of regular polygons against the
// chord of a circle, 2r·sin(θ/2) for a central angle θ (elementary
// geometry): every vertex of a regular m-gon of radius r has its k-th
// nearest neighbours ⌈k/2⌉ steps away, and k is reduced to √m.
func TestGroupScale(t *testing.T) {
	for _, test := range []struct {
		m, k  int
		r     float64
		steps int // of the k-th neighbour after the reduction
	}{
		{m: 24, k: 8, r: 1, steps: 2},    // √24 → k = 4
		{m: 100, k: 8, r: 2, steps: 4},   // k = 8
		{m: 9, k: 8, r: 0.5, steps: 2},   // √9 → k = 3
		{m: 400, k: 6, r: 1.5, steps: 3}, // k = 6
	} {
		rows := make([][]float64, test.m)
		for i := range rows {
			a := 2 * math.Pi * float64(i) / float64(test.m)
			rows[i] = []float64{test.r * math.Cos(a), test.r * math.Sin(a)}
		}
		c, err := cloudFromRows(rows)
		if err != nil {
			t.Fatal(err)
		}
		tri, err := euclidean(context.Background(), c)
		if err != nil {
			t.Fatal(err)
		}
		all := make([]int, test.m)
		for i := range all {
			all[i] = i
		}
		want := 2 * test.r * math.Sin(float64(test.steps)*math.Pi/float64(test.m))
		if got := groupScale(tri, all, test.k, nil); math.Abs(got-want) > 1e-12*test.r {
			t.Errorf("%d-gon of radius %g, k = %d: resolution %v, want %v", test.m, test.r, test.k, got, want)
		}
		// The same with the distances of every point given.
		if got := groupScale(tri, all, test.k, kthDistances(tri, nil, test.k)); math.Abs(got-want) > 1e-12*test.r {
			t.Errorf("%d-gon of radius %g, k = %d, distances given: resolution %v, want %v", test.m, test.r, test.k, got, want)
		}
	}
}

// TestResolution checks that a bar is judged at the resolution of the
// component nearest its birth by ratio.
func TestResolution(t *testing.T) {
	res := []float64{0.01, 1, 100}
	for _, test := range []struct {
		birth, want float64
	}{
		{0.001, 0.01},
		{0.012, 0.01},
		{0.09, 0.01}, // 9× above 0.01, 11× below 1
		{0.11, 1},
		{1, 1},
		{9, 1},
		{11, 100},
		{1e6, 100},
	} {
		if got := resolution(res, test.birth); got != test.want {
			t.Errorf("resolution(%v, %v) = %v, want %v", res, test.birth, got, test.want)
		}
	}
	if got := resolution([]float64{3}, 1e-9); got != 3 {
		t.Errorf("one component: %v, want 3", got)
	}
}
