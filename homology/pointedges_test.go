// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"strconv"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// edgesWithin lists the pairs of lt within min(thr, enclosing radius)
// (0 meaning the enclosing radius) in the order PointEdges promises.
func edgesWithin(lt *LowerTriangular, thr float64) []Edge {
	if enc, _ := enclosingRadius(lt); thr == 0 || enc < thr {
		thr = enc
	}
	var out []Edge
	for i := 1; i < lt.N; i++ {
		for j, v := range lt.Data[i*(i-1)/2 : i*(i-1)/2+i] {
			if v <= thr && !math.IsInf(v, 1) {
				out = append(out, Edge{I: i, J: j, D: v})
			}
		}
	}
	return out
}

// sameEdges reports the first difference of two edge lists, bit for bit.
func sameEdges(t *testing.T, name string, got, want []Edge) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: %d edges, want %d", name, len(got), len(want))
	}
	for k, e := range got {
		if w := want[k]; e.I != w.I || e.J != w.J || math.Float64bits(e.D) != math.Float64bits(w.D) {
			t.Fatalf("%s: edge %d is %v, want %v", name, k, e, w)
		}
	}
}

func TestPointEdges(t *testing.T) {
	// Hand-checked: the unit square has sides 1 and diagonals √2, its
	// enclosing radius is √2; the cosine dissimilarity of e₁ and e₂ is
	// 1, of e₁ or e₂ and (1,1) is 1 − 1/√2, which is the enclosing
	// radius.
	square := [][]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}
	sides := []Edge{{1, 0, 1}, {2, 1, 1}, {3, 0, 1}, {3, 2, 1}}
	all := []Edge{{1, 0, 1}, {2, 0, math.Sqrt2}, {2, 1, 1}, {3, 0, 1}, {3, 1, math.Sqrt2}, {3, 2, 1}}
	angles := [][]float64{{1, 0}, {0, 1}, {1, 1}}
	half := 1 - 1/math.Sqrt2
	for _, test := range []struct {
		name string
		pts  [][]float64
		set  Settings
		want []Edge
	}{
		{"square sides", square, Settings{Threshold: 1}, sides},
		{"square below the sides", square, Settings{Threshold: 0.999}, nil},
		{"square at the enclosing radius", square, Settings{}, all},
		{"square above the enclosing radius", square, Settings{Threshold: 5}, all},
		{"cosine half", angles, Settings{Metric: Cosine, Threshold: 0.5}, []Edge{{2, 0, half}, {2, 1, half}}},
		{"cosine below", angles, Settings{Metric: Cosine, Threshold: 0.29}, nil},
		{"cosine at the enclosing radius", angles, Settings{Metric: Cosine}, []Edge{{2, 0, half}, {2, 1, half}}},
	} {
		t.Run(test.name, func(t *testing.T) {
			s, err := PointEdges(context.Background(), pointsMatrix(test.pts), &test.set)
			if err != nil {
				t.Fatal(err)
			}
			if s.N != len(test.pts) {
				t.Errorf("N = %d, want %d", s.N, len(test.pts))
			}
			if len(s.Edges) != len(test.want) {
				t.Fatalf("%d edges %v, want %v", len(s.Edges), s.Edges, test.want)
			}
			for k, e := range s.Edges {
				if w := test.want[k]; e.I != w.I || e.J != w.J || math.Abs(e.D-w.D) > 1e-15 {
					t.Errorf("edge %d is %v, want %v", k, e, w)
				}
			}
		})
	}
}

func pointsMatrix(pts [][]float64) *mat.Dense {
	x := mat.NewDense(len(pts), len(pts[0]), nil)
	for i, p := range pts {
		x.SetRow(i, p)
	}
	return x
}

// The barcodes of PointEdges, with and without collapse, are compared
// with GUDHI 3.7.1 in TestCollapseGUDHI.

// TestPointEdgesMatchesDistances checks PointEdges against filtering
// PointDistances, bit for bit, on random clouds large enough for several
// workers and blocks, with ties, and at thresholds equal to a distance.
func TestPointEdgesMatchesDistances(t *testing.T) {
	ctx := context.Background()
	rng := rand.New(rand.NewPCG(31, 32))
	for trial := 0; trial < 40; trial++ {
		n := 2 + rng.IntN(300)
		dim := 1 + rng.IntN(9)
		x := mat.NewDense(n, dim, nil)
		for i := 0; i < n; i++ {
			for k := 0; k < dim; k++ {
				v := rng.NormFloat64()
				if trial%4 == 0 {
					v = float64(rng.IntN(3)) // ties
					if k == 0 {
						v++ // and no zero vector
					}
				}
				x.Set(i, k, v)
			}
		}
		for _, m := range []Metric{Euclidean, Cosine} {
			lt, err := PointDistances(ctx, x, &Settings{Metric: m})
			if err != nil {
				t.Fatal(err)
			}
			for _, thr := range []float64{0, lt.Data[rng.IntN(len(lt.Data))], rng.Float64() * 3, 100} {
				s, err := PointEdges(ctx, x, &Settings{Metric: m, Threshold: thr})
				if err != nil {
					t.Fatal(err)
				}
				sameEdges(t, m.String(), s.Edges, edgesWithin(lt, thr))
			}
		}
	}
}

// TestPointEdgesCollapse checks that the collapse of PointEdges is the
// collapse of PointDistances, bit for bit, on the committed sphere600
// benchmark cloud (testdata/gen/homology_clouds.py) at threshold 1.0,
// where GUDHI 3.7.1's collapse path was timed against it, and on the
// torus2000 cloud at 1.0.
func TestPointEdgesCollapse(t *testing.T) {
	ctx := context.Background()
	for _, file := range []string{"sphere600.csv", "torus2000.csv"} {
		x := gudhiLoadCloud(t, "bench/"+file)
		lt, err := PointDistances(ctx, x, nil)
		if err != nil {
			t.Fatal(err)
		}
		want, err := CollapseEdges(ctx, lt, 1)
		if err != nil {
			t.Fatal(err)
		}
		s, err := PointEdges(ctx, x, &Settings{Threshold: 1})
		if err != nil {
			t.Fatal(err)
		}
		got, err := CollapseEdges(ctx, s, 1)
		if err != nil {
			t.Fatal(err)
		}
		sameEdges(t, file, got.Edges, want.Edges)
	}
}

func TestPointEdgesErrors(t *testing.T) {
	good := pointsMatrix([][]float64{{0, 0}, {1, 0}, {0, 1}})
	var memErr *MemoryError
	for _, test := range []struct {
		name string
		x    mat.Matrix
		set  *Settings
		want error // nil: a *MemoryError
	}{
		{"knn", good, &Settings{Metric: KNNGeodesic, K: 1, Threshold: 1}, ErrSettings},
		{"negative threshold", good, &Settings{Threshold: -1}, ErrSettings},
		{"NaN threshold", good, &Settings{Threshold: math.NaN()}, ErrSettings},
		{"one point", pointsMatrix([][]float64{{1, 2}}), nil, ErrTooFewPoints},
		{"NaN coordinate", pointsMatrix([][]float64{{0, 0}, {math.NaN(), 1}}), nil, ErrNonFinite},
		// Norms of 1e200 overflow (float64 ends near 1.8e308, IEEE 754).
		{"huge cosine", pointsMatrix([][]float64{{1e200, 1e200}, {1e200, 0}}), &Settings{Metric: Cosine}, ErrMagnitude},
		{"budget", good, &Settings{MaxBytes: 100}, nil},
	} {
		t.Run(test.name, func(t *testing.T) {
			_, err := PointEdges(context.Background(), test.x, test.set)
			if test.want == nil {
				if !errors.As(err, &memErr) {
					t.Errorf("err = %v, want a *MemoryError", err)
				}
			} else if !errors.Is(err, test.want) {
				t.Errorf("err = %v, want %v", err, test.want)
			}
		})
	}
	zero := pointsMatrix([][]float64{{0, 0}, {1, 0}})
	if _, err := PointEdges(context.Background(), zero, &Settings{Metric: Cosine}); err == nil {
		t.Error("cosine of the zero vector: no error")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := PointEdges(ctx, good, nil); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: err = %v", err)
	}
}

// TestSqBound checks that sqBound(t) is the largest float whose square
// root is at most t.
func TestSqBound(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, tv := range []float64{0, 1, 1.5, math.Sqrt2, 1e-300, 1e154, 1e300, math.MaxFloat64, 5e-324} {
		checkSqBound(t, tv)
	}
	for range 1000 {
		checkSqBound(t, math.Sqrt(rng.Float64()*10))
	}
	if b := sqBound(math.Inf(1)); !math.IsInf(b, 1) {
		t.Errorf("sqBound(+Inf) = %v", b)
	}
}

func checkSqBound(t *testing.T, tv float64) {
	t.Helper()
	b := sqBound(tv)
	if math.Sqrt(b) > tv || math.Sqrt(math.Nextafter(b, math.Inf(1))) <= tv {
		t.Errorf("sqBound(%v) = %v", tv, b)
	}
}

// BenchmarkPointEdges times PointEdges against PointDistances on the
// committed 2000-point torus in R³ at thresholds 1.0 and 1.5 (4.9 % and
// 11.7 % of the pairs).
func BenchmarkPointEdges(b *testing.B) {
	x := gudhiLoadCloud(b, "bench/torus2000.csv")
	ctx := context.Background()
	for _, thr := range []float64{1.0, 1.5} {
		set := &Settings{Threshold: thr}
		b.Run("edges/thr"+strconv.FormatFloat(thr, 'f', 1, 64), func(b *testing.B) {
			var s *Sparse
			for b.Loop() {
				var err error
				if s, err = PointEdges(ctx, x, set); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(s.Edges)), "edges")
		})
	}
	b.Run("distances", func(b *testing.B) {
		for b.Loop() {
			if _, err := PointDistances(ctx, x, nil); err != nil {
				b.Fatal(err)
			}
		}
	})
}
