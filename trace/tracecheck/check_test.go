// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package tracecheck_test

import (
	"context"
	"fmt"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
	"crease.dev/crease/trace/tracecheck"
)

// fakeTB records Errorf calls instead of failing.
type fakeTB struct {
	testing.TB
	msgs []string
}

func (f *fakeTB) Helper() {}
func (f *fakeTB) Errorf(format string, args ...any) {
	f.msgs = append(f.msgs, fmt.Sprintf(format, args...))
}

// ringTrace traces two rings of 24 points (testdata/trace/rings.csv)
// through identity, ReLU and a
// projection onto the first coordinate, at relative scale 0.2: each
// ring has β = (1, 1) (Hatcher, Algebraic Topology, Example 2.23) until
// the projection makes it a segment, β = (1, 0), and the projection
// glues the rings together.
func ringTrace(t *testing.T) *trace.Trace {
	return ringTraceStages(t, []onnxload.Stage{
		{Kind: onnxload.Affine, In: 2, Out: 2, W: mat.NewDense(2, 2, []float64{1, 0, 0, 1}), B: []float64{0, 0}},
		{Kind: onnxload.ReLU, In: 2, Out: 2},
		{Kind: onnxload.Affine, In: 2, Out: 2, W: mat.NewDense(2, 2, []float64{1, 0, 0, 0}), B: []float64{0, 0}},
	})
}

// softmaxTrace classifies the rings by the logits (y − c, c − y) and a
// softmax: with c = 5.5 every point of "high" (y ≥ 7) and "low" (y ≤ 4)
// has its own class's probability strictly largest, which is the
// interior of its own vertex's Voronoi cell; with c = 2.5 the points of
// "low" above y = 2.5 fall into the cell of "high".
func softmaxTrace(t *testing.T, c float64) *trace.Trace {
	return ringTraceStages(t, []onnxload.Stage{
		// Classes are ordered lexically: "high" is 0, "low" is 1.
		{Kind: onnxload.Affine, In: 2, Out: 2, W: mat.NewDense(2, 2, []float64{0, 1, 0, -1}), B: []float64{-c, c}},
		{Kind: onnxload.Softmax, In: 2, Out: 2},
	})
}

func ringTraceStages(t *testing.T, stages []onnxload.Stage) *trace.Trace {
	f, err := os.Open("../../testdata/trace/rings.csv")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	s, err := trace.ReadCSV(f, "rings.csv", &trace.CSVSettings{Label: "ring"})
	if err != nil {
		t.Fatal(err)
	}
	set := trace.DefaultSettings()
	set.Scale = 0.2
	tr, err := trace.Run(context.Background(), stages, s, set)
	if err != nil {
		t.Fatal(err)
	}
	return tr
}

func TestChecks(t *testing.T) {
	tr := ringTrace(t)
	good, bad := softmaxTrace(t, 5.5), softmaxTrace(t, 2.5)
	for _, tc := range []struct {
		name  string
		check func(testing.TB) bool
		ok    bool
		want  []string // substrings of the failure message
	}{
		{"simple from 3", func(tb testing.TB) bool { return tracecheck.SimpleFrom(tb, tr, "low", 3) }, true, nil},
		{"simple from 0", func(tb testing.TB) bool { return tracecheck.SimpleFrom(tb, tr, "low", 0) }, false,
			[]string{`class "low"`, "stage 0 (input)", "β1: 0:input=1 1:affine=1 2:relu=1 3:affine=0"}},
		{"unknown class", func(tb testing.TB) bool { return tracecheck.SimpleFrom(tb, tr, "mid", 0) }, false, []string{`unknown class "mid"`}},
		{"no glue before 3", func(tb testing.TB) bool { return tracecheck.NoCrossGlueBefore(tb, tr, 3) }, true, nil},
		{"no glue before 4", func(tb testing.TB) bool { return tracecheck.NoCrossGlueBefore(tb, tr, 4) }, false,
			[]string{"stage 3 (affine) glues 46 pairs", "glued.cross: 0:input=- 1:affine=0 2:relu=0 3:affine=46"}},
		{"no softmax", func(tb testing.TB) bool { return tracecheck.SoftmaxSeparates(tb, tr) }, false, []string{"no softmax stage"}},
		{"softmax separates", func(tb testing.TB) bool { return tracecheck.SoftmaxSeparates(tb, good) }, true, nil},
		// The rings (Hatcher's circles, apart on the y-axis) are linearly
		// separable at the input; the projection onto x mixes them.
		{"separable by 0", func(tb testing.TB) bool { return tracecheck.SeparableBy(tb, tr, 0) }, true, nil},
		{"knn at least", func(tb testing.TB) bool { return tracecheck.MeasureAtLeast(tb, tr, 2, "", "knn.accuracy", 1) }, true, nil},
		{"knn falls", func(tb testing.TB) bool { return tracecheck.MeasureAtLeast(tb, tr, 3, "", "knn.accuracy", 0.9) }, false,
			[]string{"knn.accuracy = ", "at stage 3 (affine); want at least 0.9", "knn.accuracy: 0:input=1"}},
		{"unknown measure", func(tb testing.TB) bool { return tracecheck.MeasureAtLeast(tb, tr, 1, "", "knn.acc", 1) }, false, []string{`unknown measure "knn.acc"`, "knn.accuracy"}},
		{"measure absent here", func(tb testing.TB) bool { return tracecheck.MeasureAtLeast(tb, tr, 1, "", "voronoi.inside", 1) }, false, []string{`has no measure "voronoi.inside"`}},
		{"softmax mixes", func(tb testing.TB) bool { return tracecheck.SoftmaxSeparates(tb, bad) }, false,
			[]string{`class "low"`, "inside its own Voronoi cell at stage 2 (softmax)", "voronoi.inside: 0:input=- 1:affine=- 2:softmax=0.2917"}}, // 7 of 24: the angles 225°..315°, where sin θ < −1/2
	} {
		t.Run(tc.name, func(t *testing.T) {
			f := &fakeTB{TB: t}
			if got := tc.check(f); got != tc.ok {
				t.Fatalf("check returned %v, want %v; messages %q", got, tc.ok, f.msgs)
			}
			if tc.ok != (len(f.msgs) == 0) {
				t.Fatalf("messages %q with result %v", f.msgs, tc.ok)
			}
			for _, w := range tc.want {
				if !strings.Contains(strings.Join(f.msgs, "\n"), w) {
					t.Errorf("message %q lacks %q", f.msgs, w)
				}
			}
		})
	}
}
