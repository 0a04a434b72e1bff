// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"

	"gonum.org/v1/gonum/mat"
)

// SilhouetteResult is the Euclidean silhouette coefficient of a labeled
// sample (Rousseeuw, J. Comput. Appl. Math. 20, 1987).
type SilhouetteResult struct {
	// Score is the mean over all points of s(i) = (b−a)/max(a, b), where
	// a is the mean distance from i to the other points of its class and
	// b the smallest mean distance from i to the points of another class;
	// s(i) = 0 for a point alone in its class.
	Score float64
	// Class[c] is the mean of s(i) over the points of class c (NaN for an
	// absent class).
	Class []float64
}

// Silhouette returns the silhouette coefficient of the labeled sample x
// under the Euclidean distance. It needs at least two classes and fewer
// classes than points. It takes O(n²·d) time and O(n·block) memory.
func Silhouette(ctx context.Context, x mat.Matrix, labels []int) (*SilhouetteResult, error) {
	s, err := newSample("silhouette", x, labels, true)
	if err != nil {
		return nil, err
	}
	return silhouette(ctx, s)
}

func silhouette(ctx context.Context, s *sample) (*SilhouetteResult, error) {
	p, err := newSilhouettePass(s)
	if err != nil {
		return nil, err
	}
	if err := s.distBlocks(ctx, p.rows); err != nil {
		return nil, err
	}
	return p.result(), nil
}

// silhouettePass accumulates the silhouette over the blocks of distances
// of [sample.distBlocks], so that [Measure] can share one pass with the
// margin.
type silhouettePass struct {
	s    *sample
	sil  []float64 // s(i)
	sums []float64 // per class, for the current row
}

func newSilhouettePass(s *sample) (*silhouettePass, error) {
	if s.present >= s.n {
		return nil, errorf("silhouette", -1, -1, "%d classes for %d rows; need fewer classes than rows", s.present, s.n)
	}
	return &silhouettePass{s: s, sil: make([]float64, s.n), sums: make([]float64, s.classes)}, nil
}

// rows takes the distances of rows [i0,i1) to every point.
func (p *silhouettePass) rows(i0, i1 int, d []float64) {
	s, sums := p.s, p.sums
	for r := 0; r < i1-i0; r++ {
		i := i0 + r
		for c := range sums {
			sums[c] = 0
		}
		for j, v := range d[r*s.n : (r+1)*s.n] {
			sums[s.labels[j]] += v
		}
		own := s.labels[i]
		if s.count[own] == 1 {
			p.sil[i] = 0
			continue
		}
		a := sums[own] / float64(s.count[own]-1)
		b := math.Inf(1)
		for c, t := range sums {
			if c != own && s.count[c] > 0 {
				b = math.Min(b, t/float64(s.count[c]))
			}
		}
		if m := math.Max(a, b); m > 0 {
			p.sil[i] = (b - a) / m
		}
	}
}

func (p *silhouettePass) result() *SilhouetteResult {
	s := p.s
	res := &SilhouetteResult{Class: make([]float64, s.classes)}
	for i, v := range p.sil {
		res.Score += v
		res.Class[s.labels[i]] += v
	}
	res.Score /= float64(s.n)
	for c := range res.Class {
		res.Class[c] /= float64(s.count[c])
	}
	return res
}
