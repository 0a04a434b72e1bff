// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package relu

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Fixtures are written by testdata/gen/relu_fixtures.py with numpy 1.24.2
// and scikit-learn 1.2.1 (Debian); the versions are checked below.

func readFixture(t *testing.T, name string, v any) {
	t.Helper()
	b, err := os.ReadFile("../testdata/relu/" + name)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatal(err)
	}
	var ver struct{ Versions map[string]string }
	if err := json.Unmarshal(b, &ver); err != nil {
		t.Fatal(err)
	}
	if ver.Versions["numpy"] != "1.24.2" || ver.Versions["sklearn"] != "1.2.1" {
		t.Fatalf("%s made with %v, want numpy 1.24.2 and scikit-learn 1.2.1", name, ver.Versions)
	}
}

// TestRankNumpy compares the rank and singular values with
// numpy.linalg.matrix_rank and numpy.linalg.svd, including the centred
// UCI 8×8 digits (first 300 rows of scikit-learn's load_digits).
func TestRankNumpy(t *testing.T) {
	t.Parallel()
	var fix struct {
		Cases []struct {
			Name       string
			Centred    bool
			Rows, Cols int
			Data       []float64
			Singular   []float64
			Rank       int
		}
	}
	readFixture(t, "rank.json", &fix)
	for _, c := range fix.Cases {
		a := mat.NewDense(c.Rows, c.Cols, c.Data)
		var (
			rk  int
			sv  []float64
			err error
		)
		if c.Centred {
			rk, _, sv, err = CentredRank(a)
		} else {
			sv, _, rk, err = rank(a)
		}
		if err != nil {
			t.Fatal(err)
		}
		if rk != c.Rank {
			t.Errorf("%s: rank %d, numpy %d", c.Name, rk, c.Rank)
		}
		if len(sv) != len(c.Singular) {
			t.Fatalf("%s: %d singular values, numpy %d", c.Name, len(sv), len(c.Singular))
		}
		for i := range sv {
			if math.Abs(sv[i]-c.Singular[i]) > 1e-9 {
				t.Errorf("%s: σ%d = %v, numpy %v", c.Name, i, sv[i], c.Singular[i])
			}
		}
	}
}

// TestStageReference compares Fold, Glue and Distort on a ReLU stage with
// the values of a brute-force numpy computation (scales from scikit-learn
// NearestNeighbors, percentiles from numpy.percentile).
func TestStageReference(t *testing.T) {
	t.Parallel()
	var fix struct {
		Cases []struct {
			Name         string
			Rows, In, K  int
			Labels       []int
			Pre, Post    []float64
			Tau          float64
			ScaleIn      float64 `json:"scale_in"`
			ScaleOut     float64 `json:"scale_out"`
			GluedTotal   int     `json:"glued_total"`
			GluedWithin  int     `json:"glued_within"`
			GluedCross   int     `json:"glued_cross"`
			P10          float64 `json:"distort_p10"`
			Median       float64 `json:"distort_median"`
			P90          float64 `json:"distort_p90"`
			Pairs        int     `json:"distort_pairs"`
			Patterns     int
			Entropy      float64 `json:"entropy_bits"`
			Dead, Always []int
		}
	}
	readFixture(t, "stage.json", &fix)
	near := func(a, b float64) bool { return math.Abs(a-b) <= 1e-9 }
	for _, c := range fix.Cases {
		pre := mat.NewDense(c.Rows, c.In, c.Pre)
		post := mat.NewDense(c.Rows, c.In, c.Post)
		f, err := Fold(pre, post, c.Labels, nil)
		if err != nil {
			t.Fatal(err)
		}
		if f.Patterns != c.Patterns || !near(f.Entropy, c.Entropy) || f.Mismatch != 0 {
			t.Errorf("%s: fold patterns %d entropy %v mismatch %d, want %d %v 0", c.Name, f.Patterns, f.Entropy, f.Mismatch, c.Patterns, c.Entropy)
		}
		if !slices.Equal(f.Dead, c.Dead) || len(f.AlwaysActive) != len(c.Always) {
			t.Errorf("%s: dead %v always %v, want %v %v", c.Name, f.Dead, f.AlwaysActive, c.Dead, c.Always)
		}
		g, err := Glue(context.Background(), pre, post, c.Labels, &GlueSettings{Tau: c.Tau})
		if err != nil {
			t.Fatal(err)
		}
		if !near(g.ScaleIn, c.ScaleIn) || !near(g.ScaleOut, c.ScaleOut) {
			t.Errorf("%s: scales %v %v, want %v %v", c.Name, g.ScaleIn, g.ScaleOut, c.ScaleIn, c.ScaleOut)
		}
		if g.Total != c.GluedTotal || g.Within != c.GluedWithin || g.Cross != c.GluedCross {
			t.Errorf("%s: glued %d/%d/%d, want %d/%d/%d", c.Name, g.Total, g.Within, g.Cross, c.GluedTotal, c.GluedWithin, c.GluedCross)
		}
		d, err := Distort(context.Background(), pre, post, &DistortSettings{K: c.K})
		if err != nil {
			t.Fatal(err)
		}
		if d.Pairs != c.Pairs || !near(d.P10, c.P10) || !near(d.Median, c.Median) || !near(d.P90, c.P90) {
			t.Errorf("%s: distortion %d %v %v %v, want %d %v %v %v", c.Name, d.Pairs, d.P10, d.Median, d.P90, c.Pairs, c.P10, c.Median, c.P90)
		}
	}
}
