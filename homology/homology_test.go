// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"
	"time"

	"gonum.org/v1/gonum/mat"
)

var pinf = math.Inf(1) // shorthand for infinite deaths

func engRips(t *testing.T, pts [][]float64, set *Settings) *Barcode {
	t.Helper()
	b, err := RipsPoints(context.Background(), pts, set)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// TestHandChecked compares with diagrams worked out by hand from the
// definition of the Rips filtration (diameter convention).
func TestHandChecked(t *testing.T) {
	const tol = 1e-12
	hex := make([][]float64, 6)
	for i := range hex {
		a := float64(i) * math.Pi / 3
		hex[i] = []float64{math.Cos(a), math.Sin(a)}
	}
	s3 := math.Sqrt(3)
	for _, test := range []struct {
		name   string
		pts    [][]float64
		maxDim int
		want   [][]Bar
		reason string
	}{
		{"two points", [][]float64{{0, 0}, {3, 4}}, 1,
			[][]Bar{{{0, 5}, {0, pinf}}, nil},
			"one component dies when the edge of length 5 enters"},
		{"equilateral triangle", [][]float64{{0, 0}, {1, 0}, {0.5, s3 / 2}}, 1,
			[][]Bar{{{0, 1}, {0, 1}, {0, pinf}}, nil},
			"the three edges and the triangle enter at 1 together: no H1 bar of positive length"},
		{"unit square", [][]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}, 2,
			[][]Bar{{{0, 1}, {0, 1}, {0, 1}, {0, pinf}}, {{1, math.Sqrt2}}, nil},
			"the 4-cycle of sides appears at 1 and is filled when the diagonals enter at √2"},
		{"regular hexagon", hex, 2,
			[][]Bar{{{0, 1}, {0, 1}, {0, 1}, {0, 1}, {0, 1}, {0, pinf}}, {{1, s3}}, {{s3, 2}}},
			"at √3 the complex is the boundary of an octahedron (two triangles of short diagonals " +
				"plus the band), a 2-sphere that the long diagonals (length 2) fill"},
	} {
		t.Run(test.name, func(t *testing.T) {
			b := engRips(t, test.pts, &Settings{MaxDim: test.maxDim})
			for d := range test.want {
				if !engBarsEqual(b.Bars[d], test.want[d], tol) {
					t.Errorf("H%d = %v, want %v (%s)", d, b.Bars[d], test.want[d], test.reason)
				}
			}
		})
	}
}

func transform(pts [][]float64, f func(x []float64) []float64) [][]float64 {
	out := make([][]float64, len(pts))
	for i, p := range pts {
		out[i] = f(slices.Clone(p))
	}
	return out
}

func engRandom(rng *rand.Rand, n, d int) [][]float64 {
	pts := make([][]float64, n)
	for i := range pts {
		pts[i] = make([]float64, d)
		for k := range pts[i] {
			pts[i][k] = rng.NormFloat64()
		}
	}
	return pts
}

// TestInvariance checks properties that hold by definition of the Rips
// filtration: it depends only on pairwise distances, so permuting points
// or applying an isometry leaves the barcode unchanged, and scaling all
// distances by c scales every bar by c.
func TestInvariance(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	pts := engRandom(rng, 60, 3)
	set := &Settings{MaxDim: 2}
	base := engRips(t, pts, set)

	perm := rng.Perm(len(pts))
	permuted := make([][]float64, len(pts))
	for i, j := range perm {
		permuted[i] = pts[j]
	}
	// A rotation about z by 0.7 rad, then a translation.
	c, s := math.Cos(0.7), math.Sin(0.7)
	moved := transform(pts, func(x []float64) []float64 {
		return []float64{c*x[0] - s*x[1] + 5, s*x[0] + c*x[1] - 2, x[2] + 1}
	})
	const scale = 2.5
	scaled := transform(pts, func(x []float64) []float64 {
		for k := range x {
			x[k] *= scale
		}
		return x
	})
	for d := 0; d <= 2; d++ {
		if got := engRips(t, permuted, set).Bars[d]; !engBarsEqual(got, base.Bars[d], 1e-12) {
			t.Errorf("permutation changed H%d", d)
		}
		if got := engRips(t, moved, set).Bars[d]; !engBarsEqual(got, base.Bars[d], 1e-9) {
			t.Errorf("isometry changed H%d", d)
		}
		sb := make([]Bar, len(base.Bars[d]))
		for i, b := range base.Bars[d] {
			sb[i] = Bar{b.Birth * scale, b.Death * scale}
		}
		if got := engRips(t, scaled, set).Bars[d]; !engBarsEqual(got, sb, 1e-9) {
			t.Errorf("scaling by %v: H%d = %v, want %v", scale, d, got, sb)
		}
	}
}

// TestStability checks the stability theorem (Chazal, de Silva, Oudot,
// "Persistence stability for geometric complexes", 2014): moving each
// point by at most δ moves each Rips barcode by at most 2δ in
// bottleneck distance (diameter convention).
func TestStability(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := 0; trial < 5; trial++ {
		pts := engCircle(80, 0.05, uint64(trial))
		delta := 0.01 + 0.05*rng.Float64()
		moved := transform(pts, func(x []float64) []float64 {
			// A random direction of length ≤ δ.
			a, r := 2*math.Pi*rng.Float64(), delta*rng.Float64()
			return []float64{x[0] + r*math.Cos(a), x[1] + r*math.Sin(a)}
		})
		a := engRips(t, pts, nil)
		b := engRips(t, moved, nil)
		for d := 0; d <= 1; d++ {
			if bd := Bottleneck(a.Bars[d], b.Bars[d]); bd > 2*delta+1e-12 {
				t.Errorf("trial %d: H%d bottleneck %v > 2δ = %v", trial, d, bd, 2*delta)
			}
		}
	}
}

func TestBottleneck(t *testing.T) {
	for _, test := range []struct {
		name string
		a, b []Bar
		want float64
	}{
		// Values worked out by hand from the definition.
		{"empty", nil, nil, 0},
		{"one bar to diagonal", []Bar{{0, 2}}, nil, 1},
		{"shifted bar", []Bar{{0, 2}}, []Bar{{0.25, 2.5}}, 0.5},
		{"cheaper to diagonal", []Bar{{0, 1}}, []Bar{{5, 6}}, 0.5},
		{"two against one", []Bar{{0, 4}, {1, 1.2}}, []Bar{{0, 4.1}}, 0.1},
		{"essential match", []Bar{{0, pinf}, {0, 1}}, []Bar{{0.3, pinf}, {0, 1}}, 0.3},
		{"essential count differs", []Bar{{0, pinf}}, []Bar{{0, 3}}, pinf},
		{"zero-length bars ignored", []Bar{{1, 1}}, nil, 0},
	} {
		t.Run(test.name, func(t *testing.T) {
			if got := Bottleneck(test.a, test.b); math.Abs(got-test.want) > 1e-12 && got != test.want {
				t.Errorf("got %v, want %v", got, test.want)
			}
			if got := Bottleneck(test.b, test.a); math.Abs(got-test.want) > 1e-12 && got != test.want {
				t.Errorf("swapped: got %v, want %v", got, test.want)
			}
		})
	}
}

// TestBottleneckBrute compares with a brute-force minimum over all
// assignments on tiny diagrams.
func TestBottleneckBrute(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 9))
	for trial := 0; trial < 200; trial++ {
		gen := func() []Bar {
			bars := make([]Bar, rng.IntN(4))
			for i := range bars {
				b := rng.Float64()
				bars[i] = Bar{b, b + rng.Float64()}
			}
			return bars
		}
		a, b := gen(), gen()
		// Brute force: extend both sides with diagonal slots and try every
		// permutation.
		n := len(a) + len(b)
		best := pinf
		perm := make([]int, n)
		for i := range perm {
			perm[i] = i
		}
		var try func(k int)
		try = func(k int) {
			if k == n {
				cost := 0.0
				for i, j := range perm {
					var c float64
					switch {
					case i < len(a) && j < len(b):
						c = linf(a[i], b[j])
					case i < len(a):
						c = half(a[i])
					case j < len(b):
						c = half(b[j])
					}
					cost = math.Max(cost, c)
				}
				best = math.Min(best, cost)
				return
			}
			for s := k; s < n; s++ {
				perm[k], perm[s] = perm[s], perm[k]
				try(k + 1)
				perm[k], perm[s] = perm[s], perm[k]
			}
		}
		try(0)
		if n == 0 {
			best = 0
		}
		if got := Bottleneck(a, b); got != best {
			t.Fatalf("a=%v b=%v: got %v, brute force %v", a, b, got, best)
		}
	}
}

func TestBadInput(t *testing.T) {
	ctx := context.Background()
	ok := [][]float64{{0, 0}, {1, 0}, {0, 1}}
	for _, test := range []struct {
		name string
		pts  [][]float64
		set  *Settings
		want error
	}{
		{"empty cloud", nil, nil, ErrTooFewPoints},
		{"one point", [][]float64{{1, 2}}, nil, ErrTooFewPoints},
		{"NaN", [][]float64{{0, 0}, {math.NaN(), 1}}, nil, ErrNonFinite},
		{"Inf", [][]float64{{0, 0}, {1, math.Inf(-1)}}, nil, ErrNonFinite},
		// 1e155 squared overflows float64 (largest ≈ 1.8e308, IEEE 754).
		{"1e155", [][]float64{{0, 0}, {1e155, 0}, {2e155, 0}}, nil, ErrMagnitude},
		{"-1e151", [][]float64{{0, 0}, {0, -1e151}}, nil, ErrMagnitude},
		{"ragged", [][]float64{{0, 0}, {1, 2, 3}}, nil, ErrRagged},
		{"maxdim 4", ok, &Settings{MaxDim: 4}, ErrSettings},
		{"maxdim -1", ok, &Settings{MaxDim: -1}, ErrSettings},
		{"field 4", ok, &Settings{Field: 4}, ErrSettings},
		{"field 1", ok, &Settings{Field: 1}, ErrSettings},
		{"threshold < 0", ok, &Settings{Threshold: -0.5}, ErrSettings},
		{"threshold NaN", ok, &Settings{Threshold: math.NaN()}, ErrSettings},
		{"k = n", ok, &Settings{Metric: KNNGeodesic, K: 3}, ErrSettings},
		{"k = 0", ok, &Settings{Metric: KNNGeodesic}, ErrSettings},
		{"metric", ok, &Settings{Metric: 7}, ErrSettings},
	} {
		t.Run(test.name, func(t *testing.T) {
			b, err := RipsPoints(ctx, test.pts, test.set)
			if !errors.Is(err, test.want) {
				t.Fatalf("got %v, %v; want error %v", b, err, test.want)
			}
			t.Log(err)
		})
	}
	if _, err := Rips(ctx, mat.NewDense(1, 2, nil), nil); !errors.Is(err, ErrTooFewPoints) {
		t.Errorf("one-row matrix: %v", err)
	}
	if _, err := Rips(ctx, mat.NewDense(2, 2, []float64{0, 0, 0, 0}), &Settings{Metric: Cosine}); err == nil {
		t.Error("cosine of zero vectors: no error")
	}
	if _, err := NewFullDistances([][]float64{{0, 1}, {2, 0}}); !errors.Is(err, ErrDistances) {
		t.Errorf("asymmetric: %v", err)
	}
	if _, err := NewLowerTriangular(3, []float64{1, -1, 2}); !errors.Is(err, ErrDistances) {
		t.Errorf("negative: %v", err)
	}
	if _, err := NewSparse(3, []Edge{{0, 1, 1}, {1, 0, 2}}); !errors.Is(err, ErrDistances) {
		t.Errorf("duplicate edge: %v", err)
	}
	if _, err := NewSparse(3, []Edge{{0, 3, 1}}); !errors.Is(err, ErrDistances) {
		t.Errorf("index out of range: %v", err)
	}
	// Index overflow: 200000 vertices in dimension 3 need C(200000, 5) > 2⁵⁵.
	s, _ := NewSparse(200000, []Edge{{0, 1, 1}})
	if _, err := RipsDistances(ctx, s, &Settings{MaxDim: 3}); !errors.Is(err, ErrOverflow) {
		t.Errorf("overflow: %v", err)
	}
	// A billion vertices are refused before any allocation.
	var me *MemoryError
	if _, err := RipsDistances(ctx, &Sparse{N: 1 << 30}, nil); !errors.As(err, &me) {
		t.Errorf("huge sparse: %v", err)
	}
	// The same vertex count is fine in dimension 1.
	if b, err := RipsDistances(ctx, s, &Settings{MaxDim: 1}); err != nil || len(b.Bars[0]) != 200000 {
		t.Errorf("sparse 200000 points: %v", err)
	}
}

func TestMemoryBudget(t *testing.T) {
	pts := engCircle(300, 0.1, 1)
	_, err := RipsPoints(context.Background(), pts, &Settings{MaxDim: 1, MaxBytes: 1 << 20})
	var me *MemoryError
	if !errors.As(err, &me) {
		t.Fatalf("got %v, want *MemoryError", err)
	}
	if me.Estimate <= me.Budget || me.Points != 300 {
		t.Errorf("error %+v", me)
	}
	t.Log(err)
}

func TestCancel(t *testing.T) {
	pts := engCircle(1000, 0.1, 1)
	ctx, cancel := context.WithCancel(context.Background())
	var start time.Time
	calls := 0
	set := &Settings{MaxDim: 1, Progress: func(p Progress) {
		calls++
		if p.Phase == "reduce" && start.IsZero() {
			start = time.Now()
			cancel()
		}
	}}
	_, err := RipsPoints(ctx, pts, set)
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("got %v, want context.Canceled", err)
	}
	if d := time.Since(start); d > 100*time.Millisecond {
		t.Errorf("stopped %v after cancel, want ≤ 100 ms", d)
	}
}

func TestThreshold(t *testing.T) {
	sq := [][]float64{{0, 0}, {1, 0}, {1, 1}, {0, 1}}
	b := engRips(t, sq, &Settings{MaxDim: 1, Threshold: 1.2})
	if !b.Truncated || b.Threshold != 1.2 || !engBarsEqual(b.Bars[1], []Bar{{1, pinf}}, 0) {
		t.Errorf("truncated square: %+v", b)
	}
	b = engRips(t, sq, &Settings{MaxDim: 1, Threshold: 10})
	if b.Truncated || b.Threshold != math.Sqrt2 || b.EnclosingRadius != math.Sqrt2 {
		t.Errorf("threshold above the enclosing radius: %+v", b)
	}
}

// TestKNNGeodesic checks the hop-count metric on two far-apart clusters:
// with few neighbours the graph has two components, which stay separate
// (two essential H0 bars) as in Naitzat, Zhitnikov and Lim (2020).
func TestKNNGeodesic(t *testing.T) {
	var pts [][]float64
	for i := 0; i < 10; i++ {
		a := 2 * math.Pi * float64(i) / 10
		pts = append(pts, []float64{math.Cos(a), math.Sin(a)})
		pts = append(pts, []float64{100 + math.Cos(a), math.Sin(a)})
	}
	b := engRips(t, pts, &Settings{MaxDim: 1, Metric: KNNGeodesic, K: 2})
	ess := 0
	for _, bar := range b.Bars[0] {
		if isInf(bar.Death) {
			ess++
		} else if bar.Death != 1 {
			t.Errorf("H0 bar %v: hop distances are integers and neighbours are 1 hop apart", bar)
		}
	}
	if ess != 2 || b.Truncated || b.K != 2 || b.Metric != KNNGeodesic {
		t.Errorf("essential H0 = %d, want 2; %+v", ess, b)
	}
	// Each 10-cycle (k=2 gives the cycle graph) is a loop born at 1.
	if len(b.Bars[1]) != 2 || b.Bars[1][0].Birth != 1 {
		t.Errorf("H1 = %v, want two loops born at 1", b.Bars[1])
	}
}

func TestCosine(t *testing.T) {
	// Points on the same ray are at cosine distance 0; orthogonal ones at 1.
	b := engRips(t, [][]float64{{1, 0}, {2, 0}, {0, 3}}, &Settings{Metric: Cosine})
	if !engBarsEqual(b.Bars[0], []Bar{{0, 1}, {0, pinf}}, 1e-15) {
		t.Errorf("H0 = %v", b.Bars[0])
	}
}

// TestDistanceInputs checks that the three distance inputs agree with
// the point cloud.
func TestDistanceInputs(t *testing.T) {
	pts := engCircle(40, 0.1, 2)
	ctx := context.Background()
	set := &Settings{MaxDim: 2}
	want := engRips(t, pts, set)
	full, err := NewFullDistances(bruteDistances(pts))
	if err != nil {
		t.Fatal(err)
	}
	var edges []Edge
	for i := range pts {
		for j := 0; j < i; j++ {
			edges = append(edges, Edge{i, j, full.Dist(i, j)})
		}
	}
	sp, err := NewSparse(len(pts), edges)
	if err != nil {
		t.Fatal(err)
	}
	for name, d := range map[string]Distances{"full": full, "sparse": sp} {
		got, err := RipsDistances(ctx, d, set)
		if err != nil {
			t.Fatal(err)
		}
		for k := range want.Bars {
			if !engBarsEqual(got.Bars[k], want.Bars[k], 1e-12) {
				t.Errorf("%s: H%d differs", name, k)
			}
		}
	}
}

func TestLandmarks(t *testing.T) {
	pts := engCircle(500, 0, 1)
	m := mat.NewDense(len(pts), 2, nil)
	for i, p := range pts {
		m.SetRow(i, p)
	}
	idx, r := Landmarks(m, 20, 7)
	idx2, r2 := Landmarks(m, 20, 7)
	if !slices.Equal(idx, idx2) || r != r2 {
		t.Error("not deterministic")
	}
	if len(idx) != 20 {
		t.Fatalf("%d landmarks", len(idx))
	}
	// Check the covering radius by brute force.
	worst := 0.0
	for i := range pts {
		best := pinf
		for _, j := range idx {
			best = math.Min(best, math.Hypot(pts[i][0]-pts[j][0], pts[i][1]-pts[j][1]))
		}
		worst = math.Max(worst, best)
	}
	if math.Abs(worst-r) > 1e-12 {
		t.Errorf("radius %v, brute force %v", r, worst)
	}
	// Stability: the landmark barcode is within 2r of the full one.
	sub := make([][]float64, len(idx))
	for i, j := range idx {
		sub[i] = pts[j]
	}
	a, b := engRips(t, pts, nil), engRips(t, sub, nil)
	if bd := Bottleneck(a.Bars[1], b.Bars[1]); bd > 2*r {
		t.Errorf("H1 bottleneck %v > 2r = %v", bd, 2*r)
	}
}

// TestWorkersBound checks that a worker bound, set in the settings or by
// a caller's budget in the context, does not change the barcode (the
// engine is deterministic whatever its parallelism).
func TestWorkersBound(t *testing.T) {
	pts := mat.NewDense(300, 3, nil)
	r := rand.New(rand.NewPCG(5, 6))
	for i := range 300 {
		for j := range 3 {
			pts.Set(i, j, r.NormFloat64())
		}
	}
	want, err := Rips(context.Background(), pts, &Settings{MaxDim: 2, Threshold: 1.2})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range []int{1, 2, 7} {
		got, err := Rips(context.Background(), pts, &Settings{MaxDim: 2, Threshold: 1.2, Workers: w})
		if err != nil {
			t.Fatal(err)
		}
		if fmt.Sprint(got.Bars) != fmt.Sprint(want.Bars) {
			t.Errorf("Workers %d: the barcode differs from the default's", w)
		}
	}
}
