// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"errors"
	"math"
	"reflect"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestProbeCases checks the probe on samples whose answer is known.
func TestProbeCases(t *testing.T) {
	sep, sepLabels := benchSample(200, 4, 2)
	// Push the classes far apart: linearly separable, so a logistic
	// regression classifies every held-out point (Hastie, Tibshirani and
	// Friedman, The Elements of Statistical Learning, 2nd ed., §4.4).
	for i, c := range sepLabels {
		sep.Set(i, 0, sep.At(i, 0)+20*float64(c))
	}
	gap := make([]int, len(sepLabels))
	for i, c := range sepLabels {
		gap[i] = 2 * c // class 1 absent
	}
	for _, test := range []struct {
		name   string
		x      mat.Matrix
		labels []int
		want   float64
		reason string
	}{
		{"separable", sep, sepLabels, 1, "separable classes are always recovered"},
		{"label gap", sep, gap, 1, "an absent class index is not modelled"},
	} {
		t.Run(test.name, func(t *testing.T) {
			r, err := Probe(context.Background(), test.x, test.labels, nil)
			if err != nil {
				t.Fatal(err)
			}
			if r.Accuracy != test.want || !r.Converged {
				t.Errorf("accuracy %v converged %v, want %v: %s", r.Accuracy, r.Converged, test.want, test.reason)
			}
			again, err := Probe(context.Background(), test.x, test.labels, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(r, again) {
				t.Errorf("two runs differ: the probe must be deterministic")
			}
		})
	}
}

// TestLBFGSQuadratic checks the solver on f(x) = Σ i·(x_i − 1)², whose
// minimum is x = 1 (a convex quadratic; Nocedal and Wright, §7.2).
func TestLBFGSQuadratic(t *testing.T) {
	eval := func(g, x []float64) float64 {
		var f float64
		for i, v := range x {
			w := float64(i + 1)
			f += w * (v - 1) * (v - 1)
			if g != nil {
				g[i] = 2 * w * (v - 1)
			}
		}
		return f
	}
	x := make([]float64, 20)
	_, ok, err := lbfgs(context.Background(), eval, x, 1e-10, 500)
	if err != nil || !ok {
		t.Fatalf("converged %v, err %v", ok, err)
	}
	for i, v := range x {
		if math.Abs(v-1) > 1e-9 {
			t.Errorf("x[%d] = %v, want 1", i, v)
		}
	}
}

// TestLBFGSCancelled checks that a done context stops the fit with the
// context's error.
func TestLBFGSCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	eval := func(g, x []float64) float64 {
		calls++
		if calls == 3 {
			cancel()
		}
		var f float64
		for i, v := range x {
			f += float64(i+1) * (v - 1) * (v - 1)
			if g != nil {
				g[i] = 2 * float64(i+1) * (v - 1)
			}
		}
		return f
	}
	x := make([]float64, 50)
	_, ok, err := lbfgs(ctx, eval, x, 1e-300, 500)
	if !errors.Is(err, context.Canceled) || ok {
		t.Fatalf("converged %v, err %v; want context.Canceled", ok, err)
	}
	if calls > 10 {
		t.Errorf("%d evaluations after cancelling at the 3rd", calls-3)
	}
}

// TestMeasureSettings checks that Measure fills in and reports its
// settings and agrees with the single measures.
func TestMeasureSettings(t *testing.T) {
	f := loadFixture(t, "softmax")
	x := f.matrix()
	var calls int
	r, err := Measure(context.Background(), x, f.Labels, &Settings{Softmax: true, Progress: func(Progress) { calls++ }})
	if err != nil {
		t.Fatal(err)
	}
	if r.Settings.K != DefaultK || r.Settings.Probe.Folds != DefaultFolds || r.Settings.Probe.C != DefaultC || r.Settings.TwoNN.Discard != DefaultDiscard {
		t.Errorf("settings not filled in: %+v", r.Settings)
	}
	if calls != 9 {
		t.Errorf("%d progress calls, want 9", calls)
	}
	// Against scikit-learn (fixture), through Measure's shared graph.
	for _, k := range f.KNN {
		if k.K == DefaultK && !close(r.KNN.Accuracy, k.LOOAccuracy, tol) {
			t.Errorf("knn %v, scikit-learn %v", r.KNN.Accuracy, k.LOOAccuracy)
		}
	}
	if !close(r.Silhouette.Score, f.Silhouette, tol) || r.Voronoi == nil || r.Probe == nil || r.TwoNN == nil {
		t.Errorf("report incomplete or wrong: silhouette %v (want %v)", r.Silhouette.Score, f.Silhouette)
	}
	if !close(r.Probe.Accuracy, f.Probe.Accuracy, 0.01) {
		t.Errorf("probe %v, scikit-learn %v", r.Probe.Accuracy, f.Probe.Accuracy)
	}
	if _, err := Measure(context.Background(), mat.NewDense(2, 2, []float64{2, 0, 0, 0}), []int{0, 1}, &Settings{Softmax: true}); err == nil {
		t.Errorf("Measure accepted non-probability rows with Softmax set")
	}
}
