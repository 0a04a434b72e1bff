// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// twoNNPoints is the sample size of the TwoNN tests: large enough that
// the estimator's spread (about d/√N for the MLE, from its Gamma law) is
// a small fraction of the tolerance.
const twoNNPoints = 4000

// TestTwoNN checks the TwoNN estimates on manifolds of known dimension.
// The target dimensions are those of Facco et al., Scientific Reports 7
// (2017); the tolerances (±0.1 on a circle, ±0.15 on a sphere, 10 % on a
// d-cube) are common practice, as the issue states. On the cube the
// estimate falls below d as d grows (points near the faces see
// one-sided neighbourhoods): at 4000 points it came out 4–9 % low for d = 5
// on the samples tried, close to the tolerance.
func TestTwoNN(t *testing.T) {
	var rng *rand.Rand // reseeded for each case, so cases do not depend on each other
	circle := func() []float64 {
		a := 2 * math.Pi * rng.Float64()
		return []float64{math.Cos(a), math.Sin(a)}
	}
	sphere := func() []float64 {
		// Normalised Gaussian vectors are uniform on S² (Muller, CACM 1959).
		v := []float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
		r := math.Hypot(math.Hypot(v[0], v[1]), v[2])
		return []float64{v[0] / r, v[1] / r, v[2] / r}
	}
	cube := func(d int) func() []float64 {
		return func() []float64 {
			v := make([]float64, d)
			for i := range v {
				v[i] = rng.Float64()
			}
			return v
		}
	}
	for i, test := range []struct {
		name string
		gen  func() []float64
		want float64
		tol  float64
	}{
		{"circle", circle, 1, 0.1},
		{"sphere", sphere, 2, 0.15},
		{"cube1", cube(1), 1, 0.1},
		{"cube2", cube(2), 2, 0.2},
		{"cube3", cube(3), 3, 0.3},
		{"cube4", cube(4), 4, 0.4},
		{"cube5", cube(5), 5, 0.5},
	} {
		t.Run(test.name, func(t *testing.T) {
			rng = rand.New(rand.NewPCG(1, uint64(i)))
			first := test.gen()
			x := mat.NewDense(twoNNPoints, len(first), nil)
			x.SetRow(0, first)
			for i := 1; i < twoNNPoints; i++ {
				x.SetRow(i, test.gen())
			}
			got, err := TwoNN(context.Background(), x, nil)
			if err != nil {
				t.Fatal(err)
			}
			if math.Abs(got.MLE-test.want) > test.tol {
				t.Errorf("MLE %v, want %v ± %v", got.MLE, test.want, test.tol)
			}
			if math.Abs(got.Fit-test.want) > test.tol {
				t.Errorf("line fit %v, want %v ± %v", got.Fit, test.want, test.tol)
			}
			if got.Discard != DefaultDiscard || got.FitPoints != int(float64(twoNNPoints)*(1-DefaultDiscard)) {
				t.Errorf("discard %v over %d points, want %v over %d", got.Discard, got.FitPoints, DefaultDiscard, int(float64(twoNNPoints)*(1-DefaultDiscard)))
			}
			t.Logf("%s: MLE %.4f fit %.4f", test.name, got.MLE, got.Fit)
		})
	}
}

// TestTwoNNDuplicates checks that points whose nearest neighbour is at
// distance 0 are counted and left out.
func TestTwoNNDuplicates(t *testing.T) {
	x := mat.NewDense(5, 1, []float64{0, 0, 1, 3, 7})
	got, err := TwoNN(context.Background(), x, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Rows 0 and 1 coincide (r₁ = 0). For the others μ = r₂/r₁ by hand:
	// 1 has both zeros at distance 1 → μ = 1; 3 has 1 at 2 and 0 at 3 →
	// μ = 3/2; 7 has 3 at 4 and 1 at 6 → μ = 3/2.
	if got.Duplicates != 2 || got.N != 3 {
		t.Fatalf("duplicates %d, N %d; want 2, 3", got.Duplicates, got.N)
	}
	want := 3 / (math.Log(1) + math.Log(1.5) + math.Log(1.5))
	if math.Abs(got.MLE-want) > 1e-12 {
		t.Errorf("MLE %v, want %v", got.MLE, want)
	}
}

// TestPCADimHand checks PCADim on a sample with known variances: points
// ±a e₁, ±b e₂ give variances a²/2 and b²/2 along the axes (mean zero).
func TestPCADimHand(t *testing.T) {
	x := mat.NewDense(4, 3, []float64{
		3, 0, 0,
		-3, 0, 0,
		0, 1, 0,
		0, -1, 0,
	})
	got, err := PCADim(x)
	if err != nil {
		t.Fatal(err)
	}
	want := []float64{0.9, 0.1, 0}
	for i, r := range got.Ratios {
		if math.Abs(r-want[i]) > 1e-15 {
			t.Errorf("ratio %d = %v, want %v", i, r, want[i])
		}
	}
	// Cumulative 0.9 is not above 0.90, so 2 components are needed.
	if got.Dim90 != 2 || got.Dim95 != 2 {
		t.Errorf("dims %d, %d; want 2, 2", got.Dim90, got.Dim95)
	}
}
