// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/knn"
)

// DefaultDiscard is the fraction of the largest ratios μ = r₂/r₁ left out
// of the TwoNN line fit when the setting is zero; Facco et al. (2017)
// discard 10 %.
const DefaultDiscard = 0.1

// TwoNNSettings control [TwoNN]. The zero value means the defaults.
type TwoNNSettings struct {
	// Discard is the fraction, in [0, 1), of the largest ratios left out
	// of the line fit; 0 means DefaultDiscard. Use a tiny positive value
	// to keep nearly all points.
	Discard float64
}

// TwoNNResult is the TwoNN intrinsic-dimension estimate of Facco,
// d'Errico, Rodriguez and Laio (Estimating the intrinsic dimension of
// datasets by a minimal neighborhood information, Scientific Reports 7,
// 12140, 2017). With r₁ ≤ r₂ the distances of a point to its two nearest
// neighbours, μ = r₂/r₁ follows the Pareto law F(μ) = 1 − μ^(−d).
type TwoNNResult struct {
	// MLE is the maximum-likelihood estimate N / Σ log μ_i.
	MLE float64
	// Fit is the slope of the least-squares line through the origin of
	// −log(1 − F_emp(μ)) against log μ, with F_emp(μ_(i)) = i/N over the
	// sorted ratios, after leaving out the largest Discard fraction.
	Fit float64
	// N is the number of points used; Duplicates the points left out
	// because their nearest neighbour is at distance 0 (μ undefined).
	N, Duplicates int
	// FitPoints is the number of ratios in the line fit.
	FitPoints int
	// Discard is the fraction actually used.
	Discard float64
}

// TwoNN returns the TwoNN intrinsic dimension of the sample x (rows are
// points; at least three distinct points are needed).
func TwoNN(ctx context.Context, x mat.Matrix, set *TwoNNSettings) (*TwoNNResult, error) {
	s, err := newSample("twonn", x, nil, false)
	if err != nil {
		return nil, err
	}
	if s.n < 3 {
		return nil, errorf("twonn", -1, -1, "%d rows; need at least 3", s.n)
	}
	g, err := knn.Search(ctx, x, 2)
	if err != nil {
		return nil, err
	}
	return twoNN(g, set)
}

func twoNN(g *knn.Graph, set *TwoNNSettings) (*TwoNNResult, error) {
	discard := DefaultDiscard
	if set != nil && set.Discard != 0 {
		discard = set.Discard
	}
	if !(discard > 0 && discard < 1) {
		return nil, errorf("twonn", -1, -1, "discard fraction %v not in (0, 1)", discard)
	}
	res := &TwoNNResult{Discard: discard}
	logmu := make([]float64, 0, len(g.Dist))
	for _, d := range g.Dist {
		if d[0] == 0 {
			res.Duplicates++
			continue
		}
		logmu = append(logmu, math.Log(d[1]/d[0]))
	}
	n := len(logmu)
	res.N = n
	if n < 2 {
		return nil, errorf("twonn", -1, -1, "%d points with a non-zero nearest-neighbour distance; need at least 2", n)
	}
	var sum float64
	for _, v := range logmu {
		sum += v
	}
	res.MLE = float64(n) / sum
	sort.Float64s(logmu)
	keep := int(math.Floor(float64(n) * (1 - discard)))
	if keep >= n {
		keep = n - 1 // F_emp = 1 at the largest ratio
	}
	var sxy, sxx float64
	for i := 0; i < keep; i++ {
		x := logmu[i]
		y := -math.Log(1 - float64(i+1)/float64(n))
		sxy += x * y
		sxx += x * x
	}
	res.FitPoints = keep
	res.Fit = sxy / sxx
	return res, nil
}

// PCAResult is the explained-variance profile of a sample.
type PCAResult struct {
	// Ratios are the explained-variance ratios of the min(n, d) principal
	// components, largest first (they sum to 1 unless the sample is a
	// single point repeated, when all are 0).
	Ratios []float64
	// Dim90 and Dim95 are the smallest numbers of components whose
	// cumulative ratio exceeds 0.90 and 0.95 (the rule of scikit-learn's
	// PCA with a fractional n_components).
	Dim90, Dim95 int
}

// PCADim returns the explained-variance ratios of the sample x and the
// PCA dimension for 90 % and 95 % of the variance. The eigenvalues come
// from the d×d scatter matrix of the centred sample, or from the n×n Gram
// matrix when d > n.
func PCADim(x mat.Matrix) (*PCAResult, error) {
	s, err := newSample("pca", x, nil, false)
	if err != nil {
		return nil, err
	}
	return pcaDim(s)
}

func pcaDim(s *sample) (*PCAResult, error) {
	c, _ := s.centred()
	xc := mat.NewDense(s.n, s.d, c)
	var sym mat.SymDense
	if s.d <= s.n {
		sym.SymOuterK(1, xc.T())
	} else {
		sym.SymOuterK(1, xc)
	}
	var eig mat.EigenSym
	if !eig.Factorize(&sym, false) {
		return nil, errorf("pca", -1, -1, "eigendecomposition of the scatter matrix failed")
	}
	vals := eig.Values(nil)
	sort.Sort(sort.Reverse(sort.Float64Slice(vals)))
	vals = vals[:min(s.n, s.d)]
	var total float64
	for i, v := range vals {
		if v < 0 {
			vals[i] = 0
		}
		total += vals[i]
	}
	res := &PCAResult{Ratios: vals}
	if total > 0 {
		for i := range vals {
			vals[i] /= total
		}
	}
	res.Dim90 = dimFor(vals, 0.90)
	res.Dim95 = dimFor(vals, 0.95)
	return res, nil
}

// dimFor is the number of leading ratios whose cumulative sum first
// exceeds q (all of them if it never does).
func dimFor(ratios []float64, q float64) int {
	var cum float64
	for i, r := range ratios {
		cum += r
		if cum > q {
			return i + 1
		}
	}
	return len(ratios)
}
