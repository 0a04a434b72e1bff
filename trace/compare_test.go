// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/trace"
)

// TestCompare compares the circle trace with one whose last stage keeps
// half of the second coordinate. Up to stage 2 the traces are equal; at
// stage 3 the second model maps each ring to an ellipse with semi-axes 1
// and 1/2, which still has β = (1, 1) (Hatcher, Example 2.23: it is a
// circle up to homeomorphism) and glues nothing, so the Betti numbers of
// the classes and the glued counts change there.
func TestCompare(t *testing.T) {
	a := circleTrace(t)
	stages := projectModel()
	stages[2].W = mat.NewDense(2, 2, []float64{1, 0, 0, 0.5})
	set := trace.DefaultSettings()
	set.Rule, set.Scale = trace.ScaleRelative, 0.2
	b, err := trace.Run(context.Background(), stages, circles(t), set)
	if err != nil {
		t.Fatal(err)
	}
	c, err := trace.Compare(a, b, &trace.CompareSettings{Tol: 1e-9})
	if err != nil {
		t.Fatal(err)
	}
	if c.Diverge != 3 {
		t.Fatalf("diverge at %d (%s), want 3", c.Diverge, c.Reason)
	}
	s := c.Stages[3]
	for _, g := range s.Classes {
		if g.Betti[1] != 1 {
			t.Errorf("class %s: Δβ₁ = %d, want 1", g.Label, g.Betti[1])
		}
		if !(g.Bottleneck[1] > 0) {
			t.Errorf("class %s: bottleneck in H1 %v, want > 0", g.Label, g.Bottleneck[1])
		}
	}
	// In A both rings project onto one segment, where the points of the
	// two classes coincide; in B the ellipses lie apart (y near 1.5 and
	// 4), so every point's 5 nearest neighbours share its class and the
	// per-class 5-NN agreement rises to 1.
	for _, g := range s.Classes {
		d, ok := g.Measures["knn.accuracy"]
		bv := b.Stages[3].Group(g.Label).Measures["knn.accuracy"]
		if !ok || !(d > 0) || bv != 1 {
			t.Errorf("class %s: Δ knn.accuracy %v (present %v), B's %v; want a rise to 1", g.Label, d, ok, bv)
		}
	}
	if got := s.Measures["glued.cross"]; got != -46 {
		t.Errorf("Δ glued.cross = %v, want −46", got)
	}
	for _, st := range c.Stages {
		for _, g := range append(st.Classes, st.Whole) {
			for d, v := range g.Bottleneck {
				if math.IsInf(v, 0) || math.IsNaN(v) {
					t.Errorf("stage %d %q dimension %d: bottleneck %v, want finite (bars clipped at the threshold)", st.Index, g.Label, d, v)
				}
			}
		}
	}
	for i := range 3 {
		if c.Stages[i].Max != 0 {
			t.Errorf("stage %d: max change %v, want 0", i, c.Stages[i].Max)
		}
	}
	// With a tolerance above every change the traces agree... except the
	// Betti numbers, which BettiTol must also allow (the whole sample gains two loops).
	loose, _ := trace.Compare(a, b, &trace.CompareSettings{Tol: math.Inf(1), BettiTol: 2})
	if loose.Diverge != -1 {
		t.Errorf("loose comparison diverges at %d (%s)", loose.Diverge, loose.Reason)
	}
}

// TestWriteCSV checks the long CSV layout against the trace's values.
func TestWriteCSV(t *testing.T) {
	tr := circleTrace(t)
	var buf bytes.Buffer
	if err := tr.WriteCSV(&buf); err != nil {
		t.Fatal(err)
	}
	recs, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if got := recs[0]; len(got) != 5 || got[0] != "stage" || got[4] != "value" {
		t.Fatalf("header %v", got)
	}
	found := map[string]string{}
	for _, r := range recs[1:] {
		found[r[0]+"/"+r[2]+"/"+r[3]] = r[4]
	}
	for key, want := range map[string]string{
		"0/low/betti.1":   "1",
		"3/low/betti.1":   "0",
		"3//glued.cross":  "46",
		"3//glued.within": "22",
		"0/high/count":    "24",
		"0//betti.0":      "2",
	} {
		if found[key] != want {
			t.Errorf("%s = %q, want %q", key, found[key], want)
		}
	}
	if _, ok := found["0//glued.cross"]; ok {
		t.Error("the input stage has no glued counts")
	}
}
