// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"math"
	"sort"

	"gonum.org/v1/gonum/mat"
)

// DefaultSumTol is the tolerance on a probability row's sum when the
// setting is zero.
const DefaultSumTol = 1e-6

// Summary holds order statistics of a set of values. Quantiles use
// linear interpolation between order statistics (numpy's default
// method). All fields are NaN for an empty set.
type Summary struct {
	N                          int
	Min, P10, Median, P90, Max float64
	Mean                       float64
}

func summarize(v []float64) Summary {
	s := Summary{N: len(v)}
	if len(v) == 0 {
		nan := math.NaN()
		s.Min, s.P10, s.Median, s.P90, s.Max, s.Mean = nan, nan, nan, nan, nan, nan
		return s
	}
	w := append([]float64(nil), v...)
	sort.Float64s(w)
	q := func(p float64) float64 {
		h := p * float64(len(w)-1)
		lo := int(math.Floor(h))
		if lo+1 >= len(w) {
			return w[len(w)-1]
		}
		return w[lo] + (h-float64(lo))*(w[lo+1]-w[lo])
	}
	s.Min, s.Max = w[0], w[len(w)-1]
	s.P10, s.Median, s.P90 = q(0.1), q(0.5), q(0.9)
	for _, x := range w {
		s.Mean += x
	}
	s.Mean /= float64(len(w))
	return s
}

// VoronoiSettings control [Voronoi]. The zero value means the defaults.
type VoronoiSettings struct {
	// SumTol bounds |Σ_j p_ij − 1| for every row, and how far an entry
	// may fall below 0 or above 1; 0 means DefaultSumTol.
	SumTol float64
}

// VoronoiResult is the softmax Voronoi test. The Voronoi cell of vertex
// e_c of the probability simplex (nearest vertex in the Euclidean
// distance) is where p_c is the largest probability, so a point lies in
// the interior of its own vertex's cell exactly when its own-class
// probability is strictly greater than every other: argmax accuracy with
// ties counted as failures.
type VoronoiResult struct {
	// Inside[c] is the fraction of class c's points in the interior of
	// the cell of vertex c (NaN for an absent class); InsideAll the
	// fraction of all points.
	Inside    []float64
	InsideAll float64
	// Gap[c] summarises, over class c's points, the difference between
	// the two largest probabilities of a row (0 on a cell boundary).
	Gap []Summary
	// Own[c] summarises p_c − max_{j≠c} p_j over class c's points: the
	// signed distance in probability to leaving the own cell (positive
	// inside).
	Own []Summary
	// SumTol is the tolerance actually used.
	SumTol float64
}

// Voronoi runs the softmax Voronoi test on p, whose rows are probability
// vectors (a softmax output), with labels indexing its columns. Rows that
// are not probability vectors within SumTol, and labels not below the
// width of p, are errors.
func Voronoi(p mat.Matrix, labels []int, set *VoronoiSettings) (*VoronoiResult, error) {
	const name = "voronoi"
	s, err := newSample(name, p, labels, true)
	if err != nil {
		return nil, err
	}
	tol := DefaultSumTol
	if set != nil && set.SumTol != 0 {
		tol = set.SumTol
	}
	if !(tol > 0) {
		return nil, errorf(name, -1, -1, "sum tolerance %v is not positive", tol)
	}
	if s.d < 2 {
		return nil, errorf(name, -1, -1, "%d column; probability rows need at least 2", s.d)
	}
	if s.classes > s.d {
		for i, c := range s.labels {
			if c >= s.d {
				return nil, errorf(name, i, -1, "label %d is not a column of the %d-wide probability rows", c, s.d)
			}
		}
	}
	for i := 0; i < s.n; i++ {
		var sum float64
		for j, v := range s.row(i) {
			if v < -tol || v > 1+tol {
				return nil, errorf(name, i, j, "value %v is not a probability", v)
			}
			sum += v
		}
		if math.Abs(sum-1) > tol {
			return nil, errorf(name, i, -1, "row sums to %v, not 1 (tolerance %v): not a probability vector", sum, tol)
		}
	}
	res := &VoronoiResult{
		Inside: make([]float64, s.classes),
		Gap:    make([]Summary, s.classes),
		Own:    make([]Summary, s.classes),
		SumTol: tol,
	}
	gaps := make([][]float64, s.classes)
	own := make([][]float64, s.classes)
	var inside int
	for i := 0; i < s.n; i++ {
		c := s.labels[i]
		row := s.row(i)
		top1, top2 := math.Inf(-1), math.Inf(-1)
		other := math.Inf(-1)
		for j, v := range row {
			if v > top1 {
				top1, top2 = v, top1
			} else if v > top2 {
				top2 = v
			}
			if j != c && v > other {
				other = v
			}
		}
		gaps[c] = append(gaps[c], top1-top2)
		own[c] = append(own[c], row[c]-other)
		if row[c] > other {
			inside++
			res.Inside[c]++
		}
	}
	res.InsideAll = float64(inside) / float64(s.n)
	for c := range res.Inside {
		res.Inside[c] /= float64(s.count[c])
		res.Gap[c] = summarize(gaps[c])
		res.Own[c] = summarize(own[c])
	}
	return res, nil
}
