// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/homology"
	"crease.dev/crease/onnxload"
)

// TestMaxAssignment checks the Hungarian method against every
// permutation (the assignment problem's definition: Kuhn, 1955).
func TestMaxAssignment(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 5))
	for _, k := range []int{1, 2, 3, 4, 5, 6} {
		for range 20 {
			a := make([][]float64, k)
			for i := range a {
				a[i] = make([]float64, k)
				for j := range a[i] {
					a[i][j] = float64(r.IntN(10))
				}
			}
			got := maxAssignment(a)
			sum := func(p []int) float64 {
				var s float64
				for i, j := range p {
					s += a[i][j]
				}
				return s
			}
			if seen := slices.Clone(got); len(seen) != k {
				t.Fatalf("k=%d: assignment %v", k, got)
			} else {
				slices.Sort(seen)
				for i, v := range seen {
					if v != i {
						t.Fatalf("k=%d: %v is not a permutation", k, got)
					}
				}
			}
			best := math.Inf(-1)
			perm := make([]int, k)
			for i := range perm {
				perm[i] = i
			}
			var walk func(int)
			walk = func(i int) {
				if i == k {
					best = max(best, sum(perm))
					return
				}
				for j := i; j < k; j++ {
					perm[i], perm[j] = perm[j], perm[i]
					walk(i + 1)
					perm[i], perm[j] = perm[j], perm[i]
				}
			}
			walk(0)
			if sum(got) != best {
				t.Fatalf("k=%d: %v sums to %v, best is %v (matrix %v)", k, got, sum(got), best, a)
			}
		}
	}
}

// TestClassUnits traces a two-unit softmax classifier whose unit 0 is
// the class named "outer" and unit 1 "inner", so alphabetical order
// (inner, outer) is the wrong one. Inferred and given orders must both
// put every point inside its own class's Voronoi cell; a wrong given
// order must put none there and warn.
func TestClassUnits(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 9))
	n := 40
	x := mat.NewDense(2*n, 2, nil)
	labels := make([]string, 2*n)
	for i := range 2 * n {
		side := 1.0
		labels[i] = "outer"
		if i >= n {
			side, labels[i] = -1, "inner"
		}
		x.Set(i, 0, side*(3+r.Float64()))
		x.Set(i, 1, r.NormFloat64())
	}
	s, err := NewSample(x, labels)
	if err != nil {
		t.Fatal(err)
	}
	stages := []onnxload.Stage{
		{Kind: onnxload.Affine, In: 2, Out: 2, Nodes: []string{"fc"}, W: mat.NewDense(2, 2, []float64{1, 0, -1, 0}), B: []float64{0, 0}},
		{Kind: onnxload.Softmax, In: 2, Out: 2, Nodes: []string{"softmax"}},
	}
	for _, tc := range []struct {
		name   string
		order  []string
		source string
		inside float64
		note   string
	}{
		{"inferred", nil, UnitsInferred, 1, ""},
		{"given", []string{"outer", "inner"}, UnitsGiven, 1, ""},
		{"given wrongly", []string{"inner", "outer"}, UnitsGiven, 0, "check the class order"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			tr, err := Run(context.Background(), stages, s, &Settings{MaxDim: H0Only, SkipProbe: true, ClassOrder: tc.order})
			if err != nil {
				t.Fatal(err)
			}
			um := tr.Sample.Units
			if um == nil || um.Source != tc.source {
				t.Fatalf("units %+v, want source %q", um, tc.source)
			}
			// Classes are sorted: inner = 0, outer = 1.
			want := []int{1, 0}
			if tc.inside == 0 {
				want = []int{0, 1}
			}
			if !slices.Equal(um.Units, want) {
				t.Errorf("units %v, want %v", um.Units, want)
			}
			got := tr.Stages[2].Measures["voronoi.inside"]
			if got != tc.inside {
				t.Errorf("voronoi.inside %v, want %v", got, tc.inside)
			}
			if !strings.Contains(um.Note, tc.note) || (tc.note == "") != (um.Note == "") {
				t.Errorf("note %q, want %q", um.Note, tc.note)
			}
		})
	}
	// Three classes against two outputs: no match, no Voronoi test.
	labels3 := slices.Clone(labels)
	for i := range 10 {
		labels3[i] = "middle"
	}
	s3, err := NewSample(x, labels3)
	if err != nil {
		t.Fatal(err)
	}
	tr, err := Run(context.Background(), stages, s3, &Settings{MaxDim: H0Only, SkipProbe: true})
	if err != nil {
		t.Fatal(err)
	}
	if um := tr.Sample.Units; um == nil || um.Units != nil || !strings.Contains(um.Note, "left out") {
		t.Errorf("units %+v, want no match and a note", um)
	}
	if _, ok := tr.Stages[2].Measures["voronoi.inside"]; ok {
		t.Error("voronoi.inside computed against units that are not the classes")
	}
	if _, err := Run(context.Background(), stages, s, &Settings{ClassOrder: []string{"outer", "middle"}}); err == nil || !strings.Contains(err.Error(), `"inner"`) {
		t.Errorf("an order missing a class: err = %v", err)
	}
}

// TestRunMemoryBudget checks that the run's budget is shared by the
// tasks that run at once: a budget too small for one task's share fails
// with the homology's MemoryError, before allocating, and says so.
func TestRunMemoryBudget(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 4))
	x := mat.NewDense(200, 3, nil)
	labels := make([]string, 200)
	for i := range 200 {
		for j := range 3 {
			x.Set(i, j, r.NormFloat64())
		}
		labels[i] = []string{"a", "b"}[i%2]
	}
	s, err := NewSample(x, labels)
	if err != nil {
		t.Fatal(err)
	}
	stages := []onnxload.Stage{{Kind: onnxload.ReLU, In: 3, Out: 3, Nodes: []string{"relu"}}}
	_, err = Run(context.Background(), stages, s, &Settings{Cap: -1, SkipProbe: true, Workers: 4, MaxBytes: 400 << 10})
	var me *homology.MemoryError
	if !errors.As(err, &me) || !strings.Contains(err.Error(), "each task that runs at once has 102400 bytes") {
		t.Fatalf("err = %v, want a MemoryError naming the share of 400 KiB / 4", err)
	}
	if _, err := Run(context.Background(), stages, s, &Settings{Cap: -1, SkipProbe: true, Workers: 4, MaxBytes: 1 << 30}); err != nil {
		t.Fatalf("with 1 GiB: %v", err)
	}
}
