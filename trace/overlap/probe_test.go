// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"errors"
	"math"
	"reflect"
	"slices"
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

// heldOut returns the held-out prediction of every point under the
// folds of [Folds] with settings r.
func heldOut(t *testing.T, s *sample, r ProbeSettings) []int {
	t.Helper()
	fold, err := Folds(s.labels, r.Folds, r.Seed)
	if err != nil {
		t.Fatal(err)
	}
	pred := make([]int, s.n)
	for f := range r.Folds {
		var train []int
		for i, g := range fold {
			if g != f {
				train = append(train, i)
			}
		}
		m, err := fitLogistic(context.Background(), s, train, r)
		if err != nil {
			t.Fatal(err)
		}
		for i, g := range fold {
			if g == f {
				pred[i] = m.predict(s.row(i))
			}
		}
	}
	return pred
}

// TestProbeGradTol checks that the default stopping tolerance is tight
// enough for what the probe reports: on the fixtures every held-out
// prediction equals that of fits run to GradTol 1e-11, well past the
// default.
func TestProbeGradTol(t *testing.T) {
	for _, name := range fixtureNames {
		f := loadFixture(t, name)
		s, err := newSample("probe", f.matrix(), f.Labels, true)
		if err != nil {
			t.Fatal(err)
		}
		set := ProbeSettings{Folds: f.Probe.Folds, Seed: f.Probe.Seed, C: f.Probe.C}
		got := heldOut(t, s, set.resolvedValue())
		set.GradTol = 1e-11
		want := heldOut(t, s, set.resolvedValue())
		for i := range got {
			if got[i] != want[i] {
				t.Errorf("%s: point %d predicted %d at the default GradTol %v, %d at 1e-11", name, i, got[i], DefaultGradTol, want[i])
			}
		}
	}
}

// TestProbeConstantColumns checks that columns constant on the sample
// (left out of the fit, see fitLogistic) change no prediction: the blobs
// fixture with two zero columns and a constant one gives the fixture's
// own held-out predictions; and that a sample with no other column is
// fitted by its intercepts.
func TestProbeConstantColumns(t *testing.T) {
	f := loadFixture(t, "blobs")
	x := f.matrix()
	n, d := x.Dims()
	wide := mat.NewDense(n, d+3, nil)
	for i := range n {
		for j := range d {
			wide.Set(i, j+1, x.At(i, j))
		}
		wide.Set(i, d+2, 3.5)
	}
	set := ProbeSettings{Folds: f.Probe.Folds, Seed: f.Probe.Seed, C: f.Probe.C}.resolvedValue()
	s, err := newSample("probe", x, f.Labels, true)
	if err != nil {
		t.Fatal(err)
	}
	sw, err := newSample("probe", wide, f.Labels, true)
	if err != nil {
		t.Fatal(err)
	}
	if want, got := heldOut(t, s, set), heldOut(t, sw, set); !reflect.DeepEqual(got, want) {
		t.Errorf("with constant columns the predictions differ:\n got %v\nwant %v", got, want)
	}
	// With every column constant only the intercepts are fitted, and the
	// model predicts the most frequent class of its training fold: here
	// class 0 (15 of 30 points; 12 of the 24 in every training fold).
	flat := mat.NewDense(30, 2, nil)
	labels := make([]int, 30)
	for i := range labels {
		flat.Set(i, 1, 2)
		switch {
		case i < 15:
			labels[i] = 0
		case i < 24:
			labels[i] = 1
		default:
			labels[i] = 2
		}
	}
	r, err := Probe(context.Background(), flat, labels, nil)
	if err != nil {
		t.Fatal(err)
	}
	if r.Accuracy != 0.5 || !r.Converged {
		t.Errorf("constant sample: accuracy %v, converged %v; want 0.5 (every point predicted as class 0), converged", r.Accuracy, r.Converged)
	}
}

// TestSoftmaxLoss checks the probe's objective and gradient against the
// textbook formulas evaluated term by term (Bishop, Pattern Recognition
// and Machine Learning, §4.3.4, eq. 4.109 for the gradient of the
// cross-entropy), and that an evaluation allocates nothing.
func TestSoftmaxLoss(t *testing.T) {
	const n, d, k = 37, 5, 4
	o, theta := benchLoss(n, d, k)
	xs := slices.Clone(o.x.Data)
	grad := make([]float64, len(theta))
	f := o.eval(grad, theta)
	var want float64
	wantGrad := make([]float64, len(theta))
	copy(wantGrad, theta[:k*d])
	for c := k * d; c < len(wantGrad); c++ {
		wantGrad[c] = 0
	}
	for _, v := range theta[:k*d] {
		want += 0.5 * v * v
	}
	for a := range n {
		z := make([]float64, k)
		var sum float64
		for c := range k {
			z[c] = theta[k*d+c]
			for j := range d {
				z[c] += theta[c*d+j] * xs[a*d+j]
			}
			sum += math.Exp(z[c])
		}
		want += math.Log(sum) - z[o.y[a]]
		for c := range k {
			r := math.Exp(z[c]) / sum
			if c == o.y[a] {
				r--
			}
			for j := range d {
				wantGrad[c*d+j] += r * xs[a*d+j]
			}
			wantGrad[k*d+c] += r
		}
	}
	if math.Abs(f-want) > 1e-12*want {
		t.Errorf("objective %v, want %v", f, want)
	}
	for i := range grad {
		if math.Abs(grad[i]-wantGrad[i]) > 1e-12*(1+math.Abs(wantGrad[i])) {
			t.Errorf("gradient[%d] = %v, want %v", i, grad[i], wantGrad[i])
		}
	}
	if allocs := testing.AllocsPerRun(10, func() { o.eval(grad, theta) }); allocs != 0 {
		t.Errorf("an evaluation allocates %v times, want 0", allocs)
	}
}
