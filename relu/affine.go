// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package relu

import (
	"context"
	"errors"
	"fmt"
	"math"
	"sync"

	"crease.dev/crease/internal/knn"
	"gonum.org/v1/gonum/mat"
)

// eps is the float64 machine epsilon, 2⁻⁵².
const eps = 0x1p-52

// AffineSettings control [Affine]. A nil *AffineSettings means defaults.
type AffineSettings struct {
	// Identify is the relative tolerance of the injectivity test: two
	// sample points count as distinct when their input distance exceeds
	// Identify·R_in and as sent to the same point when their output
	// distance is at most Identify·R_out, where R is the largest distance
	// of a point from the centroid of its cloud. Zero means 1e-9.
	Identify float64
}

// AffineReport describes an affine stage x ↦ Wx + b on a sample.
type AffineReport struct {
	In, Out int // widths: W is Out×In

	// Singular holds the singular values of W in decreasing order.
	Singular []float64
	// Tol is the rank cut-off max(Out, In)·Singular[0]·ε.
	Tol float64
	// Rank is the number of singular values above Tol; Kernel = In − Rank.
	Rank, Kernel int
	// Cond is Singular[0]/Singular[min(In,Out)−1], +Inf if the last is 0.
	Cond float64

	// RankIn and RankOut are the numerical ranks of the centred input and
	// output samples, each with the cut-off max(n, d)·σ_max·ε of its own
	// singular values (TolIn, TolOut).
	RankIn, RankOut int
	TolIn, TolOut   float64

	// ForcesIdentifications is true when Out < RankIn: no map into
	// fewer dimensions than the sample spans can be injective on the
	// sample's affine hull.
	ForcesIdentifications bool
	// Identified counts pairs of sample points distinct before the map
	// and sent to the same point (see AffineSettings.Identify); Injective
	// is Identified == 0.
	Identified int
	Injective  bool

	Settings AffineSettings // with defaults filled in
}

// Affine describes the affine map with matrix w (Out×In) applied to the
// sample in (n×In) giving out (n×Out). The bias does not enter any of the
// measures, so only w is passed; out must be the map's output on in. It
// returns an error on mismatched shapes, empty matrices or non-finite
// entries, naming the argument, row and column.
func Affine(w mat.Matrix, in, out mat.Matrix, set *AffineSettings) (*AffineReport, error) {
	return AffineContext(context.Background(), w, in, out, set)
}

// AffineContext is [Affine] with a context for cancelling the
// injectivity test on large samples.
func AffineContext(ctx context.Context, w mat.Matrix, in, out mat.Matrix, set *AffineSettings) (*AffineReport, error) {
	var s AffineSettings
	if set != nil {
		s = *set
	}
	if s.Identify == 0 {
		s.Identify = 1e-9
	}
	if !(s.Identify > 0) || math.IsInf(s.Identify, 0) {
		return nil, fmt.Errorf("relu: identify tolerance %v is not a positive number", s.Identify)
	}
	wo, wi, err := checkMatrix("weights", w)
	if err != nil {
		return nil, err
	}
	n, din, dout, err := checkPair(in, out)
	if err != nil {
		return nil, err
	}
	if din != wi || dout != wo {
		return nil, fmt.Errorf("relu: weights are %d×%d but input has %d columns and output %d", wo, wi, din, dout)
	}
	r := &AffineReport{In: wi, Out: wo, Settings: s}
	r.Singular, r.Tol, r.Rank, err = rank(w)
	if err != nil {
		return nil, fmt.Errorf("relu: weights: %w", err)
	}
	r.Kernel = wi - r.Rank
	last := r.Singular[len(r.Singular)-1]
	r.Cond = math.Inf(1)
	if last > 0 {
		r.Cond = r.Singular[0] / last
	}
	if r.RankIn, r.TolIn, err = centredRank(in); err != nil {
		return nil, fmt.Errorf("relu: input: %w", err)
	}
	if r.RankOut, r.TolOut, err = centredRank(out); err != nil {
		return nil, fmt.Errorf("relu: output: %w", err)
	}
	r.ForcesIdentifications = wo < r.RankIn
	if n > 1 {
		r.Identified, err = identified(ctx, in, out, s.Identify*radius(in), s.Identify*radius(out))
		if err != nil {
			return nil, err
		}
	}
	r.Injective = r.Identified == 0
	return r, nil
}

// rank returns the singular values of a, the numpy.linalg.matrix_rank
// cut-off and the numerical rank.
func rank(a mat.Matrix) (sv []float64, tol float64, rk int, err error) {
	var svd mat.SVD
	if !svd.Factorize(a, mat.SVDNone) {
		return nil, 0, 0, errors.New("singular value decomposition did not converge")
	}
	sv = svd.Values(nil)
	m, n := a.Dims()
	tol = float64(max(m, n)) * sv[0] * eps
	for _, v := range sv {
		if v > tol {
			rk++
		}
	}
	return sv, tol, rk, nil
}

// CentredRank returns the numerical rank of x after subtracting its column
// means, with the cut-off tol = max(n, d)·σ_max·ε, and its singular values.
func CentredRank(x mat.Matrix) (rk int, tol float64, singular []float64, err error) {
	if _, _, err := checkMatrix("sample", x); err != nil {
		return 0, 0, nil, err
	}
	sv, tol, rk, err := rank(centre(x))
	return rk, tol, sv, err
}

func centredRank(x mat.Matrix) (int, float64, error) {
	_, tol, rk, err := rank(centre(x))
	return rk, tol, err
}

// centre returns x minus its column means.
func centre(x mat.Matrix) *mat.Dense {
	n, d := x.Dims()
	c := mat.DenseCopyOf(x)
	for j := 0; j < d; j++ {
		var m float64
		for i := 0; i < n; i++ {
			m += c.At(i, j)
		}
		m /= float64(n)
		for i := 0; i < n; i++ {
			c.Set(i, j, c.At(i, j)-m)
		}
	}
	return c
}

// radius is the largest distance of a row of x from the centroid.
func radius(x mat.Matrix) float64 {
	c := centre(x)
	n, _ := c.Dims()
	var r float64
	for i := 0; i < n; i++ {
		r = max(r, mat.Norm(c.RowView(i), 2))
	}
	return r
}

// identified counts pairs with output distance ≤ tout and input distance
// > tin.
func identified(ctx context.Context, in, out mat.Matrix, tin, tout float64) (int, error) {
	ci, err := knn.NewCloud(in)
	if err != nil {
		return 0, err
	}
	co, err := knn.NewCloud(out)
	if err != nil {
		return 0, err
	}
	var (
		mu    sync.Mutex
		count int
	)
	err = co.Pairs(ctx, tout, func(b []knn.Pair) error {
		c := 0
		for _, p := range b {
			if ci.Dist(p.I, p.J) > tin {
				c++
			}
		}
		mu.Lock()
		count += c
		mu.Unlock()
		return nil
	})
	return count, err
}
