// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestBadInput checks that every measure rejects bad data with an *Error
// naming what is wrong, and never panics.
func TestBadInput(t *testing.T) {
	good := mat.NewDense(4, 2, []float64{0, 0, 1, 0, 0, 1, 1, 1})
	nan := mat.NewDense(4, 2, []float64{0, 0, 1, 0, 0, math.NaN(), 1, 1})
	inf := mat.NewDense(4, 2, []float64{0, 0, 1, math.Inf(1), 0, 1, 1, 1})
	var empty mat.Dense
	labels := []int{0, 0, 1, 1}
	ctx := context.Background()
	measures := map[string]func(x mat.Matrix, l []int) error{
		"knn":        func(x mat.Matrix, l []int) error { _, err := KNNAgreement(ctx, x, l, 1); return err },
		"margin":     func(x mat.Matrix, l []int) error { _, err := Margin(ctx, x, l); return err },
		"fisher":     func(x mat.Matrix, l []int) error { _, err := Fisher(x, l); return err },
		"silhouette": func(x mat.Matrix, l []int) error { _, err := Silhouette(ctx, x, l); return err },
		"nc1":        func(x mat.Matrix, l []int) error { _, err := NC1(x, l); return err },
		"probe":      func(x mat.Matrix, l []int) error { _, err := Probe(ctx, x, l, &ProbeSettings{Folds: 2}); return err },
		"measure":    func(x mat.Matrix, l []int) error { _, err := Measure(ctx, x, l, nil); return err },
	}
	for _, test := range []struct {
		name   string
		x      mat.Matrix
		labels []int
		want   string // in the message
		reason string
	}{
		{"nil", nil, labels, "nil matrix", "no sample at all"},
		{"empty", &empty, nil, "empty sample", "zero-size matrix"},
		{"nan", nan, labels, "row 3, column 2: value NaN is not finite", "NaN cell named by row and column"},
		{"inf", inf, labels, "row 2, column 2: value +Inf is not finite", "Inf cell named by row and column"},
		{"short labels", good, []int{0, 1, 0}, "3 labels for 4 rows", "labels of the wrong length"},
		{"long labels", good, []int{0, 1, 0, 1, 0}, "5 labels for 4 rows", "labels of the wrong length"},
		{"negative", good, []int{0, 1, -1, 1}, "row 3: label -1 is negative", "labels are class indices"},
		{"one class", good, []int{2, 2, 2, 2}, "only one class (2)", "overlap needs two classes"},
	} {
		for name, f := range measures {
			t.Run(test.name+"/"+name, func(t *testing.T) {
				err := f(test.x, test.labels)
				var e *Error
				if !errors.As(err, &e) {
					t.Fatalf("error %v (%T), want *Error: %s", err, err, test.reason)
				}
				if !strings.Contains(err.Error(), test.want) || !strings.HasPrefix(err.Error(), "overlap: ") {
					t.Errorf("error %q, want it to contain %q: %s", err, test.want, test.reason)
				}
			})
		}
	}
	for _, x := range []mat.Matrix{nil, &empty, nan} {
		if _, err := TwoNN(ctx, x, nil); err == nil {
			t.Errorf("TwoNN accepted a bad sample")
		}
		if _, err := PCADim(x); err == nil {
			t.Errorf("PCADim accepted a bad sample")
		}
	}
}

// TestBadSettings checks the settings that are out of range.
func TestBadSettings(t *testing.T) {
	x := mat.NewDense(4, 2, []float64{0, 0, 1, 0, 0, 1, 1, 1})
	labels := []int{0, 0, 1, 1}
	ctx := context.Background()
	for _, test := range []struct {
		name string
		run  func() error
		want string
	}{
		{"k too large", func() error { _, err := KNNAgreement(ctx, x, labels, 4); return err }, "k = 4 out of range 1..3"},
		{"folds too many", func() error { _, err := Probe(ctx, x, labels, &ProbeSettings{Folds: 5}); return err }, "5 folds for 4 rows"},
		{"one fold", func() error { _, err := Folds(labels, 1, 1); return err }, "1 folds for 4 points"},
		{"negative C", func() error { _, err := Probe(ctx, x, labels, &ProbeSettings{Folds: 2, C: -1}); return err }, "C = -1 is not a positive number"},
		{"discard", func() error { _, err := TwoNN(ctx, x, &TwoNNSettings{Discard: 1.5}); return err }, "discard fraction 1.5"},
		{"twonn tiny", func() error { _, err := TwoNN(ctx, mat.NewDense(2, 1, []float64{0, 1}), nil); return err }, "2 rows; need at least 3"},
		{"silhouette singletons", func() error { _, err := Silhouette(ctx, x, []int{0, 1, 2, 3}); return err }, "4 classes for 4 rows"},
		{"not probabilities", func() error { _, err := Voronoi(x, labels, nil); return err }, "row 1: row sums to 0, not 1"},
		{"label beyond width", func() error {
			_, err := Voronoi(mat.NewDense(2, 2, []float64{0.5, 0.5, 1, 0}), []int{0, 2}, nil)
			return err
		}, "row 2: label 2 is not a column"},
		{"negative probability", func() error {
			_, err := Voronoi(mat.NewDense(2, 2, []float64{1.5, -0.5, 1, 0}), []int{0, 1}, nil)
			return err
		}, "row 1, column 1: value 1.5 is not a probability"},
	} {
		t.Run(test.name, func(t *testing.T) {
			err := test.run()
			if err == nil || !strings.Contains(err.Error(), test.want) {
				t.Errorf("error %v, want it to contain %q", err, test.want)
			}
		})
	}
}

// TestCancel checks that a cancelled context stops the long measures.
func TestCancel(t *testing.T) {
	x := mat.NewDense(50, 2, nil)
	labels := make([]int, 50)
	for i := range labels {
		x.Set(i, 0, float64(i))
		x.Set(i, 1, float64(i%7))
		labels[i] = i % 2
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Silhouette(ctx, x, labels); !errors.Is(err, context.Canceled) {
		t.Errorf("Silhouette: %v, want context.Canceled", err)
	}
	if _, err := Margin(ctx, x, labels); !errors.Is(err, context.Canceled) {
		t.Errorf("Margin: %v, want context.Canceled", err)
	}
	if _, err := Probe(ctx, x, labels, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("Probe: %v, want context.Canceled", err)
	}
	if _, err := Measure(ctx, x, labels, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("Measure: %v, want context.Canceled", err)
	}
}
