// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"cmp"
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// sparseMatrix returns the full matrix of a sparse list (+Inf off the list).
func sparseMatrix(s *Sparse) [][]float64 {
	m := make([][]float64, s.N)
	for i := range m {
		m[i] = make([]float64, s.N)
		for j := range m[i] {
			if i != j {
				m[i][j] = math.Inf(1)
			}
		}
	}
	for _, e := range s.Edges {
		m[e.I][e.J], m[e.J][e.I] = e.D, e.D
	}
	return m
}

// checkCollapse compares the barcode of the collapsed list with the plain
// engine and, for small clouds, both with the brute-force boundary
// reduction (Edelsbrunner–Letscher–Zomorodian 2002) of bruteRips.
func checkCollapse(t *testing.T, pts [][]float64, maxDim int, thr float64, p int) {
	t.Helper()
	ctx := context.Background()
	want, err := RipsPoints(ctx, pts, &Settings{MaxDim: maxDim, Threshold: thr, Field: p})
	if err != nil {
		t.Fatal(err)
	}
	full := bruteDistances(pts)
	lt, err := NewFullDistances(full)
	if err != nil {
		t.Fatal(err)
	}
	s, err := CollapseEdges(ctx, lt, want.Threshold)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := NewSparse(s.N, s.Edges); err != nil {
		t.Fatalf("collapse output invalid: %v", err)
	}
	got, err := RipsDistances(ctx, s, &Settings{MaxDim: maxDim, Threshold: want.Threshold, Field: p})
	if err != nil {
		t.Fatal(err)
	}
	var brute [][]Bar
	if len(pts) <= 9 {
		brute = bruteRips(sparseMatrix(s), maxDim, want.Threshold, p)
	}
	for d := 0; d <= maxDim; d++ {
		if !engBarsEqual(got.Bars[d], want.Bars[d], 1e-12) {
			t.Fatalf("n=%d thr=%v p=%d: H%d after collapse (%d edges)\n got %v\nwant %v\npoints %v", len(pts), thr, p, d, len(s.Edges), got.Bars[d], want.Bars[d], pts)
		}
		if brute != nil && !engBarsEqual(brute[d], want.Bars[d], 1e-12) {
			t.Fatalf("n=%d thr=%v: brute force on the collapsed list H%d\n got %v\nwant %v\npoints %v", len(pts), thr, d, brute[d], want.Bars[d], pts)
		}
	}
}

func TestCollapseRandom(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := 0; trial < 400; trial++ {
		n := 3 + rng.IntN(30)
		if trial%4 == 0 {
			n = 3 + rng.IntN(7) // small enough for the brute force
		}
		dim := 1 + rng.IntN(3)
		pts := make([][]float64, n)
		for i := range pts {
			pts[i] = make([]float64, dim)
			for k := range pts[i] {
				if trial%3 == 0 {
					pts[i][k] = float64(rng.IntN(4)) // many ties
				} else {
					pts[i][k] = rng.Float64()
				}
			}
		}
		thr := 0.0
		if trial%2 == 0 {
			thr = 0.2 + rng.Float64()
		}
		checkCollapse(t, pts, 2, thr, []int{2, 3}[trial%2])
	}
}

// TestCollapseSparseTable runs random clouds through the hash-table
// edge index used for large clouds.
func TestCollapseSparseTable(t *testing.T) {
	defer func(l int) { denseLimit = l }(denseLimit)
	denseLimit = 0
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 60; trial++ {
		pts := make([][]float64, 4+rng.IntN(25))
		for i := range pts {
			pts[i] = []float64{rng.Float64(), rng.Float64(), float64(rng.IntN(2))}
		}
		checkCollapse(t, pts, 2, 0.3+rng.Float64(), 2)
	}
}

// TestCollapseDenseMatchesLists checks that the bitset collapse of
// clouds of up to denseLimit points gives exactly (bit for bit) the edges
// and filtration values of the list-based collapser, on random clouds
// with and without ties and on the committed sphere600 benchmark cloud
// (testdata/gen/homology_clouds.py) at threshold 1.0, where GUDHI 3.7.1's
// collapse path was timed against it.
func TestCollapseDenseMatchesLists(t *testing.T) {
	ctx := context.Background()
	collapseBoth := func(lt Distances, thr float64) (dense, lists *Sparse) {
		t.Helper()
		defer func(l int) { denseLimit = l }(denseLimit)
		var err error
		if dense, err = CollapseEdges(ctx, lt, thr); err != nil {
			t.Fatal(err)
		}
		denseLimit = 0
		if lists, err = CollapseEdges(ctx, lt, thr); err != nil {
			t.Fatal(err)
		}
		return dense, lists
	}
	same := func(name string, dense, lists *Sparse) {
		t.Helper()
		if len(dense.Edges) != len(lists.Edges) {
			t.Fatalf("%s: bitset collapse kept %d edges, lists %d", name, len(dense.Edges), len(lists.Edges))
		}
		for i, e := range dense.Edges {
			if f := lists.Edges[i]; e.I != f.I || e.J != f.J || math.Float64bits(e.D) != math.Float64bits(f.D) {
				t.Fatalf("%s: edge %d is %v with bitsets, %v with lists", name, i, e, f)
			}
		}
	}
	rng := rand.New(rand.NewPCG(21, 22))
	for trial := 0; trial < 100; trial++ {
		pts := make([][]float64, 3+rng.IntN(70))
		for i := range pts {
			pts[i] = make([]float64, 2)
			for k := range pts[i] {
				if trial%2 == 0 {
					pts[i][k] = float64(rng.IntN(5)) // many ties
				} else {
					pts[i][k] = rng.Float64()
				}
			}
		}
		lt, err := NewFullDistances(bruteDistances(pts))
		if err != nil {
			t.Fatal(err)
		}
		thr := []float64{0, 0.3 + rng.Float64()}[trial%3%2]
		d, l := collapseBoth(lt, thr)
		same("random", d, l)
	}
	x := gudhiLoadCloud(t, "bench/sphere600.csv")
	lt, err := PointDistances(ctx, x, nil)
	if err != nil {
		t.Fatal(err)
	}
	d, l := collapseBoth(lt, 1.0)
	same("sphere600", d, l)
}

// TestCollapseShrinks checks that the collapse removes edges where a
// flag complex is far from minimal: on a dense cloud at the enclosing
// radius, the complex is a cone, and nearly every edge is dominated.
func TestCollapseShrinks(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	pts := make([][]float64, 60)
	for i := range pts {
		pts[i] = []float64{rng.Float64(), rng.Float64()}
	}
	lt, _ := NewFullDistances(bruteDistances(pts))
	s, err := CollapseEdges(context.Background(), lt, 0)
	if err != nil {
		t.Fatal(err)
	}
	all := 60 * 59 / 2
	if len(s.Edges) > all/4 {
		t.Errorf("collapse kept %d of %d edges", len(s.Edges), all)
	}
}

// TestCollapseGUDHI runs every cloud of testdata/homology/gudhi.json
// through the collapse of its distances, through PointEdges and through
// the collapse of PointEdges, and compares the barcodes with GUDHI 3.7.1
// (Debian python3-gudhi, RipsComplex + persistence; generator
// testdata/gen/homology_clouds.py) and with the plain engine.
func TestCollapseGUDHI(t *testing.T) {
	var fix gudhiFixture
	gudhiRead(t, "gudhi.json", &fix)
	for _, c := range fix.Cases {
		t.Run(c.Name, func(t *testing.T) {
			t.Parallel()
			ctx := context.Background()
			x := gudhiLoadCloud(t, c.File)
			lt, err := PointDistances(ctx, x, nil)
			if err != nil {
				t.Fatal(err)
			}
			set := &Settings{MaxDim: c.MaxDim, Threshold: c.Threshold, Field: c.Field}
			plain, err := RipsDistances(ctx, lt, set)
			if err != nil {
				t.Fatal(err)
			}
			pe, err := PointEdges(ctx, x, set)
			if err != nil {
				t.Fatal(err)
			}
			for _, path := range []struct {
				name     string
				d        Distances
				collapse bool
			}{
				{"collapse of the distances", lt, true},
				{"PointEdges", pe, false},
				{"collapse of PointEdges", pe, true},
			} {
				d := path.d
				if path.collapse {
					if d, err = CollapseEdges(ctx, d, plain.Threshold); err != nil {
						t.Fatal(err)
					}
				}
				bc, err := RipsDistances(ctx, d, &Settings{MaxDim: c.MaxDim, Threshold: plain.Threshold, Field: c.Field})
				if err != nil {
					t.Fatal(err)
				}
				for dim := range c.Bars {
					if msg := gudhiMatch(gudhiBars(c.Bars[dim]), bc.Bars[dim]); msg != "" {
						t.Errorf("%s: H%d (Z/%d, threshold %v): %s", path.name, dim, c.Field, plain.Threshold, msg)
					}
					if !engBarsEqual(bc.Bars[dim], plain.Bars[dim], 0) {
						t.Errorf("%s: H%d differs from the plain engine", path.name, dim)
					}
				}
			}
		})
	}
}

func TestCollapseErrors(t *testing.T) {
	ctx := context.Background()
	good, _ := NewSparse(3, []Edge{{0, 1, 1}, {1, 2, 1}})
	for _, tc := range []struct {
		name string
		d    Distances
		thr  float64
		want error
	}{
		{"nil", nil, 1, ErrDistances},
		{"negative threshold", good, -1, ErrSettings},
		{"NaN threshold", good, math.NaN(), ErrSettings},
		{"NaN edge", &Sparse{N: 2, Edges: []Edge{{0, 1, math.NaN()}}}, 1, ErrDistances},
		{"repeated edge", &Sparse{N: 2, Edges: []Edge{{0, 1, 1}, {1, 0, 1}}}, 1, ErrDistances},
		{"repeated edge, other length", &Sparse{N: 3, Edges: []Edge{{0, 1, 1}, {1, 2, 3}, {1, 0, 2}}}, 1, ErrDistances},
		{"index out of range", &Sparse{N: 2, Edges: []Edge{{0, 2, 1}}}, 1, ErrDistances},
		{"negative index", &Sparse{N: 2, Edges: []Edge{{-1, 1, 1}}}, 1, ErrDistances},
		{"loop", &Sparse{N: 2, Edges: []Edge{{1, 1, 1}}}, 1, ErrDistances},
		{"negative edge", &Sparse{N: 2, Edges: []Edge{{0, 1, -1}}}, 1, ErrDistances},
		{"negative count", &Sparse{N: -1}, 1, ErrDistances},
		{"short triangle", &LowerTriangular{N: 3, Data: []float64{1}}, 1, ErrDistances},
		{"negative entry", &LowerTriangular{N: 2, Data: []float64{-1}}, 1, ErrDistances},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if _, err := CollapseEdges(ctx, tc.d, tc.thr); !errors.Is(err, tc.want) {
				t.Errorf("err = %v, want %v", err, tc.want)
			}
			// The same through the checks for clouds over denseLimit.
			defer func(l int) { denseLimit = l }(denseLimit)
			denseLimit = 0
			if _, err := CollapseEdges(ctx, tc.d, tc.thr); !errors.Is(err, tc.want) {
				t.Errorf("over denseLimit: err = %v, want %v", err, tc.want)
			}
		})
	}
	ctx2, cancel := context.WithCancel(ctx)
	cancel()
	if _, err := CollapseEdges(ctx2, good, 1); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: err = %v", err)
	}
}

// FuzzCollapse compares the barcode after collapse with the plain engine
// and the brute-force reduction on small clouds from the fuzzer's bytes.
func FuzzCollapse(f *testing.F) {
	f.Add([]byte{0, 0, 10, 0, 10, 10, 0, 10}, uint8(10))
	f.Add([]byte{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12}, uint8(0))
	f.Add([]byte{0, 0, 0, 3, 0, 0, 0, 3, 0, 0, 0, 3, 3, 3, 3, 1, 1, 1}, uint8(5))
	f.Fuzz(func(t *testing.T, data []byte, th uint8) {
		// Each byte is a point of the 4×4 grid (many ties and symmetric
		// configurations, where domination is most frequent).
		if len(data) < 2 || len(data) > 9 {
			t.Skip()
		}
		pts := make([][]float64, len(data))
		for i, c := range data {
			pts[i] = []float64{float64(c & 3), float64(c >> 2 & 3)}
		}
		checkCollapse(t, pts, 2, float64(th%16)/2, 2)
	})
}

// BenchmarkCollapse times the distances, the edge collapse and the
// reduction of the collapsed list ("collapse") against the distances and
// the plain reduction ("plain") on the committed clouds of
// testdata/homology/bench: 600 points of S² with H≤2 at threshold 1.0 and
// the 2000-point torus in R³ with H≤1 at threshold 1.5. It reports the
// edges of length ≤ threshold and the edges kept by the collapse.
func BenchmarkCollapse(b *testing.B) {
	cases := []struct {
		name, file string
		set        Settings
	}{
		{"sphere600/H2/thr1.0", "sphere600.csv", Settings{MaxDim: 2, Threshold: 1.0}},
		{"torus2000/thr1.5", "torus2000.csv", Settings{MaxDim: 1, Threshold: 1.5}},
	}
	for _, c := range cases {
		x := gudhiLoadCloud(b, "bench/"+c.file)
		ctx := context.Background()
		b.Run(c.name+"/plain", func(b *testing.B) {
			for b.Loop() {
				lt, err := PointDistances(ctx, x, nil)
				if err != nil {
					b.Fatal(err)
				}
				bc, err := RipsDistances(ctx, lt, &c.set)
				if err != nil {
					b.Fatal(err)
				}
				cloudBenchSink = bc
			}
			b.ReportMetric(float64(cloudBenchSink.Stats.Edges), "edges")
		})
		b.Run(c.name+"/collapse", func(b *testing.B) {
			var before, after int
			for b.Loop() {
				lt, err := PointDistances(ctx, x, nil)
				if err != nil {
					b.Fatal(err)
				}
				s, err := CollapseEdges(ctx, lt, c.set.Threshold)
				if err != nil {
					b.Fatal(err)
				}
				bc, err := RipsDistances(ctx, s, &c.set)
				if err != nil {
					b.Fatal(err)
				}
				cloudBenchSink = bc
				after = len(s.Edges)
				before = 0
				for _, v := range lt.Data {
					if v <= c.set.Threshold {
						before++
					}
				}
			}
			b.ReportMetric(float64(before), "edges")
			b.ReportMetric(float64(after), "kept")
		})
	}
}

// TestSortEdges checks the bucket sort of the collapse input against
// the comparison sort of Go's standard library (slices.SortFunc), bit
// for bit, with many ties, −0 next to +0, and sizes below and above
// bucketMin.
func TestSortEdges(t *testing.T) {
	rng := rand.New(rand.NewPCG(41, 42))
	for _, m := range []int{0, 1, 7, bucketMin - 1, bucketMin, 3 * bucketMin} {
		for _, pool := range []int{3, 100, 1 << 30} {
			edges := make([]cEdge, m)
			seen := map[[2]int32]bool{}
			for k := range edges {
				var a, b int32
				for {
					a, b = rng.Int32N(1000), rng.Int32N(1000)
					if a < b && !seen[[2]int32{a, b}] {
						break
					}
				}
				seen[[2]int32{a, b}] = true
				d := float64(rng.IntN(pool)) / 7
				if d == 0 && rng.IntN(2) == 0 {
					d = math.Copysign(0, -1)
				}
				edges[k] = cEdge{a, b, d}
			}
			want := slices.Clone(edges)
			slices.SortFunc(want, func(x, y cEdge) int {
				if c := cmp.Compare(x.d, y.d); c != 0 && !(x.d == 0 && y.d == 0) {
					return c
				}
				if c := cmp.Compare(x.a, y.a); c != 0 {
					return c
				}
				return cmp.Compare(x.b, y.b)
			})
			if err := sortEdges(context.Background(), edges); err != nil {
				t.Fatal(err)
			}
			for k, e := range edges {
				if w := want[k]; e.a != w.a || e.b != w.b || math.Float64bits(e.d) != math.Float64bits(w.d) {
					t.Fatalf("m=%d pool=%d: edge %d is %v, want %v", m, pool, k, e, w)
				}
			}
		}
	}
}
