// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package relu

import (
	"context"
	"fmt"
	"math"

	"crease.dev/crease/internal/knn"
	"gonum.org/v1/gonum/mat"
)

// DistortSettings control [Distort]. A nil *DistortSettings means defaults.
type DistortSettings struct {
	// K is the number of nearest neighbours (before the stage) of each
	// point whose distances are compared. Zero means 10, reduced to n−1
	// for smaller samples.
	K int
}

// DistortReport summarises the ratios d_out(i, j)/d_in(i, j) over each
// point i and its K nearest input neighbours j. A median below 1 says the
// stage squeezes neighbourhoods.
type DistortReport struct {
	Median, P10, P90 float64
	// Pairs is the number of ratios; Skipped counts neighbour pairs at
	// input distance 0 (duplicate points), which have no ratio.
	Pairs, Skipped int
	Settings       DistortSettings // K as used
}

// Distort measures how a stage stretches the neighbourhoods of a sample:
// in and out are the stage's input and output rows. Percentiles use linear
// interpolation (numpy.percentile's default). It returns an error on bad
// input, fewer than two points, a negative K, or ctx.Err() if cancelled.
func Distort(ctx context.Context, in, out mat.Matrix, set *DistortSettings) (*DistortReport, error) {
	var s DistortSettings
	if set != nil {
		s = *set
	}
	if s.K < 0 {
		return nil, fmt.Errorf("relu: distortion needs K ≥ 0, got %d", s.K)
	}
	n, _, _, err := checkPair(in, out)
	if err != nil {
		return nil, err
	}
	if n < 2 {
		return nil, fmt.Errorf("relu: distortion needs at least 2 points, got %d", n)
	}
	if s.K == 0 {
		s.K = min(10, n-1)
	}
	if s.K >= n {
		return nil, fmt.Errorf("relu: distortion with K = %d needs more than %d points, got %d", s.K, s.K, n)
	}
	g, err := knn.Search(ctx, in, s.K)
	if err != nil {
		return nil, err
	}
	co, err := knn.NewCloud(out)
	if err != nil {
		return nil, err
	}
	r := &DistortReport{Settings: s}
	ratios := make([]float64, 0, n*s.K)
	for i, nb := range g.Index {
		for q, j := range nb {
			if g.Dist[i][q] == 0 {
				r.Skipped++
				continue
			}
			ratios = append(ratios, co.Dist(i, j)/g.Dist[i][q])
		}
	}
	r.Pairs = len(ratios)
	if r.Pairs == 0 {
		r.Median, r.P10, r.P90 = math.NaN(), math.NaN(), math.NaN()
		return r, nil
	}
	r.P10 = percentile(ratios, 10)
	r.Median = percentile(ratios, 50)
	r.P90 = percentile(ratios, 90)
	return r, nil
}
