// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace_test

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/trace"
)

// TestLinearCKA checks LinearCKA against numpy 1.24.2 evaluating the
// published formula (Kornblith et al., ICML 2019) on the cases of
// testdata/compare/cka.json (generator: testdata/gen/compare_models.py):
// random, linearly related and rotated matrices, and the first hidden
// layers of two trained networks.
func TestLinearCKA(t *testing.T) {
	raw, err := os.ReadFile("../testdata/compare/cka.json")
	if err != nil {
		t.Fatal(err)
	}
	var fx struct {
		Numpy string
		Cases []struct {
			Name string
			X, Y [][]float64
			CKA  float64
		}
	}
	if err := json.Unmarshal(raw, &fx); err != nil {
		t.Fatal(err)
	}
	if len(fx.Cases) < 4 {
		t.Fatalf("%d cases in cka.json, want 4", len(fx.Cases))
	}
	dense := func(rows [][]float64) *mat.Dense {
		m := mat.NewDense(len(rows), len(rows[0]), nil)
		for i, r := range rows {
			m.SetRow(i, r)
		}
		return m
	}
	for _, c := range fx.Cases {
		got, err := trace.LinearCKA(dense(c.X), dense(c.Y))
		if err != nil {
			t.Errorf("%s: %v", c.Name, err)
			continue
		}
		if math.Abs(got-c.CKA) > 1e-9 {
			t.Errorf("%s: CKA %.17g, numpy %s gives %.17g", c.Name, got, fx.Numpy, c.CKA)
		}
		// CKA is symmetric in its arguments.
		if back, _ := trace.LinearCKA(dense(c.Y), dense(c.X)); math.Abs(back-got) > 1e-12 {
			t.Errorf("%s: CKA(Y, X) = %v, CKA(X, Y) = %v", c.Name, back, got)
		}
	}
}

func TestLinearCKAErrors(t *testing.T) {
	tests := []struct {
		name string
		x, y *mat.Dense
		want string
	}{
		{"rows differ", mat.NewDense(3, 2, []float64{1, 2, 3, 4, 5, 6}), mat.NewDense(2, 2, []float64{1, 2, 3, 4}), "3 and 2 rows"},
		{"one row", mat.NewDense(1, 2, []float64{1, 2}), mat.NewDense(1, 2, []float64{1, 2}), "at least 2 rows"},
		{"no spread", mat.NewDense(2, 1, []float64{1, 1}), mat.NewDense(2, 1, []float64{1, 2}), "no spread"},
	}
	for _, tc := range tests {
		if _, err := trace.LinearCKA(tc.x, tc.y); err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, err, tc.want)
		}
	}
}

// TestCompareModelsFixtures compares the three-ring classifier of
// testdata/compare (torch 1.13, generator testdata/gen/compare_models.py)
// with its variants: the float16-rounded copy must compare alike; the
// 50 %-pruned copy (82 % accurate) and the 2→1 narrow model (54 %) must
// differ, at the first stage (the pruned and the narrowed first layer).
// The retrained and int8 copies are logged; the README reports them.
func TestCompareModelsFixtures(t *testing.T) {
	f, err := os.Open("../testdata/compare/rings3.csv")
	if err != nil {
		t.Fatal(err)
	}
	s, err := trace.ReadCSV(f, "rings3.csv", nil)
	f.Close()
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		model string
		alike bool
		stage int // the first differing stage of A, or −1 (not checked)
	}{
		{"fp16", true, -1},
		{"pruned", false, 1},
		{"narrow", false, 1},
		{"int8", true, -1},
		{"retrained", false, -1},
	}
	for _, tc := range tests {
		c, err := trace.CompareFiles(context.Background(), "../testdata/compare/base.onnx", "../testdata/compare/"+tc.model+".onnx", s, nil, nil)
		if err != nil {
			t.Fatalf("%s: %v", tc.model, err)
		}
		t.Logf("%s: %s", tc.model, c.Reason())
		if c.Alike() != tc.alike {
			t.Errorf("%s: alike %v, want %v: %s", tc.model, c.Alike(), tc.alike, c.Reason())
		}
		if tc.stage >= 0 && c.First != nil && !strings.HasPrefix(c.First.Stage, fmt.Sprintf("stage %d /", tc.stage)) {
			t.Errorf("%s: first difference at %s, want stage %d", tc.model, c.First.Stage, tc.stage)
		}
		if len(c.Pairs) != 6 || len(c.Unmatched) != 0 {
			t.Errorf("%s: %d stage pairs and unmatched %v, want 6 and none", tc.model, len(c.Pairs), c.Unmatched)
		}
	}
}
