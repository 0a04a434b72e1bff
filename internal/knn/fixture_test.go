// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package knn

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSklearnFixture compares Search with scikit-learn's NearestNeighbors
// (algorithm="brute", kneighbors() without query points, which excludes
// each point itself); see testdata/gen/relu_fixtures.py for the versions.
// Distances must agree within 1e-9; indices must agree wherever the
// reference distances have no tie (scikit-learn's order among equal
// distances is not specified).
func TestSklearnFixture(t *testing.T) {
	t.Parallel()
	b, err := os.ReadFile("../../testdata/relu/knn.json")
	if err != nil {
		t.Fatal(err)
	}
	var fix struct {
		Versions map[string]string
		Cases    []struct {
			Name          string
			Rows, Cols, K int
			Data, Dist    []float64
			Index         []int
		}
	}
	if err := json.Unmarshal(b, &fix); err != nil {
		t.Fatal(err)
	}
	if fix.Versions["sklearn"] != "1.2.1" {
		t.Fatalf("fixture made with scikit-learn %q, want 1.2.1", fix.Versions["sklearn"])
	}
	for _, c := range fix.Cases {
		g, err := Search(context.Background(), mat.NewDense(c.Rows, c.Cols, c.Data), c.K)
		if err != nil {
			t.Fatal(err)
		}
		checkedIdx := 0
		for i := 0; i < c.Rows; i++ {
			for q := 0; q < c.K; q++ {
				wd := c.Dist[i*c.K+q]
				if math.Abs(g.Dist[i][q]-wd) > 1e-9 {
					t.Fatalf("%s: row %d rank %d: distance %v, want %v", c.Name, i, q, g.Dist[i][q], wd)
				}
				tied := (q > 0 && math.Abs(c.Dist[i*c.K+q-1]-wd) < 1e-9) || (q+1 < c.K && math.Abs(c.Dist[i*c.K+q+1]-wd) < 1e-9)
				if !tied {
					checkedIdx++
					if g.Index[i][q] != c.Index[i*c.K+q] {
						t.Fatalf("%s: row %d rank %d: index %d, want %d", c.Name, i, q, g.Index[i][q], c.Index[i*c.K+q])
					}
				}
			}
		}
		if checkedIdx < c.Rows {
			t.Errorf("%s: only %d untied neighbours checked", c.Name, checkedIdx)
		}
	}
}
