// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"
	"math"

	"gonum.org/v1/gonum/mat"
)

// MarginResult is the separation margin of a labeled sample.
type MarginResult struct {
	// Cross is the smallest distance between two points of different
	// classes, and CrossPair the two row indices that attain it.
	Cross     float64
	CrossPair [2]int
	// Within is the mean, over the points that have a classmate, of the
	// distance to the nearest other point of the same class.
	Within float64
	// Ratio is Cross/Within: above 1 the classes are further apart than
	// the typical within-class spacing. It is +Inf when Within is 0 and
	// Cross is not, and NaN when both are 0.
	Ratio float64
}

// Margin returns the separation margin of the labeled sample x under the
// Euclidean distance: the smallest cross-class distance over the mean
// within-class nearest-neighbour distance. It takes O(n²·d) time and
// O(n·block) memory; the two attaining distances are recomputed directly
// from the coordinates.
func Margin(ctx context.Context, x mat.Matrix, labels []int) (*MarginResult, error) {
	s, err := newSample("margin", x, labels, true)
	if err != nil {
		return nil, err
	}
	return margin(ctx, s)
}

func margin(ctx context.Context, s *sample) (*MarginResult, error) {
	p := newMarginPass(s)
	if err := s.distBlocks(ctx, p.rows); err != nil {
		return nil, err
	}
	return p.result(), nil
}

// marginPass accumulates the margin over the blocks of distances of
// [sample.distBlocks], so that [Measure] can share one pass with the
// silhouette.
type marginPass struct {
	s        *sample
	res      *MarginResult
	nearSame []int // nearest other point of the same class, −1 if none
}

func newMarginPass(s *sample) *marginPass {
	return &marginPass{
		s:        s,
		res:      &MarginResult{Cross: math.Inf(1), CrossPair: [2]int{-1, -1}},
		nearSame: make([]int, s.n),
	}
}

// rows takes the distances of rows [i0,i1) to every point.
func (p *marginPass) rows(i0, i1 int, d []float64) {
	s, res := p.s, p.res
	for r := 0; r < i1-i0; r++ {
		i := i0 + r
		row := d[r*s.n : (r+1)*s.n]
		own := s.labels[i]
		bs, js := math.Inf(1), -1
		for j, v := range row {
			if j == i {
				continue
			}
			if s.labels[j] == own {
				if v < bs {
					bs, js = v, j
				}
			} else if v < res.Cross {
				res.Cross, res.CrossPair = v, [2]int{i, j}
			}
		}
		p.nearSame[i] = js
	}
}

// result recomputes the attaining distances from the coordinates.
func (p *marginPass) result() *MarginResult {
	s, res := p.s, p.res
	res.Cross = s.exactDist(res.CrossPair[0], res.CrossPair[1])
	var sum float64
	var m int
	for i, j := range p.nearSame {
		if j >= 0 {
			sum += s.exactDist(i, j)
			m++
		}
	}
	if m > 0 {
		res.Within = sum / float64(m)
	}
	res.Ratio = res.Cross / res.Within
	return res
}
