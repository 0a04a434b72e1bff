// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/csvnum"
)

// gudhiFixture is testdata/homology/gudhi.json, written by
// testdata/gen/homology_clouds.py.
type gudhiFixture struct {
	Versions map[string]string `json:"versions"`
	Command  string            `json:"command"`
	Cases    []gudhiCase       `json:"cases"`
}

type gudhiCase struct {
	Name      string  `json:"name"`
	File      string  `json:"file"`
	Points    int     `json:"points"`
	Dim       int     `json:"dim"`
	MaxDim    int     `json:"maxdim"`
	Field     int     `json:"field"`
	Mode      string  `json:"mode"` // "enclosing" or "truncated"
	Threshold float64 `json:"threshold"`
	Enclosing float64 `json:"enclosing_radius"`
	// Bars[d] lists [birth, death] pairs; a null death is +Inf.
	Bars [][][2]*float64 `json:"bars"`
}

const gudhiTol = 1e-9

// gudhiRead decodes testdata/homology/<file> into v and checks that the
// fixture records GUDHI 3.7.1.
func gudhiRead(t *testing.T, file string, v any) {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("..", "testdata", "homology", file))
	if err != nil {
		t.Fatal(err)
	}
	var head struct {
		Versions map[string]string `json:"versions"`
	}
	if err := json.Unmarshal(b, &head); err != nil {
		t.Fatal(err)
	}
	if got := head.Versions["gudhi"]; got != "3.7.1" {
		t.Fatalf("%s made with GUDHI %q, want 3.7.1", file, got)
	}
	if err := json.Unmarshal(b, v); err != nil {
		t.Fatal(err)
	}
}

// gudhiBars converts fixture pairs [birth, death] (death null = +Inf).
func gudhiBars(ps [][2]*float64) []Bar {
	out := make([]Bar, len(ps))
	for i, p := range ps {
		out[i] = Bar{Birth: *p[0], Death: math.Inf(1)}
		if p[1] != nil {
			out[i].Death = *p[1]
		}
	}
	return out
}

// gudhiLoadCloud reads a fixture cloud with the project's CSV reader.
func gudhiLoadCloud(t testing.TB, file string) *mat.Dense {
	t.Helper()
	f, err := os.Open(filepath.Join("..", "testdata", "homology", file))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	data, width, err := csvnum.Read(f, file, nil)
	if err != nil {
		t.Fatal(err)
	}
	return mat.NewDense(len(data)/width, width, data)
}

// gudhiMatch reports the first difference between two multisets of bars,
// matching each wanted bar with an unused bar whose birth and death are
// both within gudhiTol (infinite deaths must both be infinite). It
// returns "" when the multisets agree.
func gudhiMatch(want, got []Bar) string {
	if len(want) != len(got) {
		return fmt.Sprintf("%d bars, want %d", len(got), len(want))
	}
	close := func(a, b float64) bool {
		if math.IsInf(a, 1) || math.IsInf(b, 1) {
			return math.IsInf(a, 1) && math.IsInf(b, 1)
		}
		return math.Abs(a-b) <= gudhiTol
	}
	used := make([]bool, len(got))
	for _, w := range want {
		found := false
		for j, g := range got {
			if !used[j] && close(w.Birth, g.Birth) && close(w.Death, g.Death) {
				used[j], found = true, true
				break
			}
		}
		if !found {
			return fmt.Sprintf("no bar matches GUDHI bar [%.17g, %.17g)", w.Birth, w.Death)
		}
	}
	return ""
}

// TestGUDHI compares Rips with GUDHI 3.7.1 (Debian python3-gudhi:
// RipsComplex(points, max_edge_length).create_simplex_tree(max_dimension=
// maxdim+1).persistence(homology_coeff_field=p, min_persistence=0)) on
// every cloud of testdata/homology/gudhi.json: tori in R³, Gaussian
// clusters in R¹⁶, a Gaussian cloud and UCI digits (scikit-learn 1.2.1
// load_digits) in R⁶⁴, S² with H2, circles, a wedge of circles, a cube,
// a lattice with duplicate points, a hexagon, and RP² over Z/2 and Z/3.
// Barcodes must agree per dimension as multisets within 1e-9. Both sides
// drop zero-length bars. No case is skipped.
func TestGUDHI(t *testing.T) {
	t.Parallel()
	var fix gudhiFixture
	gudhiRead(t, "gudhi.json", &fix)
	if len(fix.Cases) < 12 {
		t.Fatalf("fixture has %d cases, want at least 12", len(fix.Cases))
	}
	seen := map[string]bool{}
	for _, c := range fix.Cases {
		if seen[c.Name] {
			t.Fatalf("case %q repeated", c.Name)
		}
		seen[c.Name] = true
		t.Run(c.Name, func(t *testing.T) {
			t.Parallel()
			x := gudhiLoadCloud(t, c.File)
			if r, d := x.Dims(); r != c.Points || d != c.Dim {
				t.Fatalf("cloud is %d×%d, fixture says %d×%d", r, d, c.Points, c.Dim)
			}
			set := &Settings{MaxDim: c.MaxDim, Threshold: c.Threshold, Field: c.Field}
			bc, err := Rips(context.Background(), x, set)
			if err != nil {
				t.Fatal(err)
			}
			switch c.Mode {
			case "enclosing":
				if bc.Truncated {
					t.Errorf("Truncated = true at the default threshold")
				}
				if math.Abs(bc.Threshold-c.Enclosing) > gudhiTol {
					t.Errorf("Threshold = %.17g, want the enclosing radius %.17g", bc.Threshold, c.Enclosing)
				}
			case "truncated":
				if !bc.Truncated {
					t.Errorf("Truncated = false at threshold %v below the enclosing radius %v", c.Threshold, c.Enclosing)
				}
				if bc.Threshold != c.Threshold {
					t.Errorf("Threshold = %.17g, want %.17g", bc.Threshold, c.Threshold)
				}
			default:
				t.Fatalf("unknown mode %q", c.Mode)
			}
			if len(bc.Bars) != c.MaxDim+1 || len(c.Bars) != c.MaxDim+1 {
				t.Fatalf("got %d dimensions, fixture %d, want %d", len(bc.Bars), len(c.Bars), c.MaxDim+1)
			}
			for d := range c.Bars {
				if msg := gudhiMatch(gudhiBars(c.Bars[d]), bc.Bars[d]); msg != "" {
					t.Errorf("H%d (Z/%d, threshold %v): %s", d, c.Field, bc.Threshold, msg)
				}
			}
		})
	}
}

// TestGUDHIBottleneck compares Bottleneck with GUDHI 3.7.1's exact
// bottleneck_distance(a, b, e=0) on the pairs of
// testdata/homology/bottleneck.json (testdata/gen/homology_bottleneck.py):
// barcodes of the fixture clouds and random diagrams, some with many tied
// costs, some with different numbers of infinite bars (distance +Inf).
// The distance must agree within 1e-9 and be symmetric.
func TestGUDHIBottleneck(t *testing.T) {
	t.Parallel()
	var fix struct {
		Pairs []struct {
			Name     string        `json:"name"`
			A        [][2]*float64 `json:"a"`
			B        [][2]*float64 `json:"b"`
			Distance *float64      `json:"distance"` // null: +Inf
		} `json:"pairs"`
	}
	gudhiRead(t, "bottleneck.json", &fix)
	if len(fix.Pairs) < 20 {
		t.Fatalf("fixture has %d pairs, want at least 20", len(fix.Pairs))
	}
	for _, p := range fix.Pairs {
		x, y := gudhiBars(p.A), gudhiBars(p.B)
		want := math.Inf(1)
		if p.Distance != nil {
			want = *p.Distance
		}
		got, back := Bottleneck(x, y), Bottleneck(y, x)
		if math.IsInf(want, 1) {
			if !math.IsInf(got, 1) || !math.IsInf(back, 1) {
				t.Errorf("%s: Bottleneck = %v (reversed %v), want +Inf", p.Name, got, back)
			}
			continue
		}
		if math.Abs(got-want) > gudhiTol || math.Abs(back-want) > gudhiTol {
			t.Errorf("%s: Bottleneck = %.17g (reversed %.17g), want %.17g", p.Name, got, back, want)
		}
	}
}
