// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package relu

import (
	"context"
	"fmt"
	"math"
	"sort"
	"sync"

	"crease.dev/crease/internal/knn"
	"gonum.org/v1/gonum/mat"
)

// GlueSettings control [Glue]. A nil *GlueSettings means defaults.
type GlueSettings struct {
	// Tau is the gluing threshold relative to the scales: a pair is
	// distinct before the stage when its input distance exceeds
	// Tau·ScaleIn and identified after it when its output distance is at
	// most Tau·ScaleOut. Zero means 0.5.
	Tau float64
	// Examples is the number of example pairs kept; zero means 10 and a
	// negative value keeps none.
	Examples int
	// Progress, if not nil, is called as the work advances with the
	// number of steps done and the total (three passes over the rows in
	// blocks: two nearest-neighbour searches and the pair enumeration).
	// Calls never overlap.
	Progress func(done, total int) `json:"-"`
}

// GluePair is a glued pair of sample rows I < J with its distances before
// and after the stage.
type GluePair struct {
	I, J    int
	In, Out float64
	Cross   bool // the two points have different labels
}

// GlueReport counts the pairs a stage glues together.
type GlueReport struct {
	// ScaleIn and ScaleOut are the median nearest-neighbour distances of
	// the input and output samples.
	ScaleIn, ScaleOut float64
	// Total pairs glued, of which Within have equal labels and Cross
	// different ones (both 0 without labels).
	Total, Within, Cross int
	Labeled              bool
	// Examples holds the glued pairs that come first in (I, J) order, at
	// most Settings.Examples of them.
	Examples []GluePair

	Settings GlueSettings
}

// Glue finds the pairs of sample points that are distinct before a stage
// (input rows in) and identified after it (output rows out). The scale of
// each side is its own median nearest-neighbour distance, so a map that
// only rescales the sample glues nothing. labels may be nil.
//
// Memory does not grow with n²: pairs are enumerated in blocks (see
// internal/knn) and only counts and the first examples are kept. Glue
// returns an error on bad input (see the package documentation), fewer
// than two points, or ctx.Err() if ctx is cancelled.
func Glue(ctx context.Context, in, out mat.Matrix, labels []int, set *GlueSettings) (*GlueReport, error) {
	s := GlueSettings{Tau: 0.5, Examples: 10}
	if set != nil {
		s = *set
		if s.Tau == 0 {
			s.Tau = 0.5
		}
		if s.Examples == 0 {
			s.Examples = 10
		}
	}
	if !(s.Tau > 0) || math.IsInf(s.Tau, 0) {
		return nil, fmt.Errorf("relu: gluing threshold %v is not a positive number", s.Tau)
	}
	n, _, _, err := checkPair(in, out)
	if err != nil {
		return nil, err
	}
	if n < 2 {
		return nil, fmt.Errorf("relu: gluing needs at least 2 points, got %d", n)
	}
	if err := checkLabels(labels, n); err != nil {
		return nil, err
	}
	ci, err := knn.NewCloud(in)
	if err != nil {
		return nil, err
	}
	co, err := knn.NewCloud(out)
	if err != nil {
		return nil, err
	}
	if s.Progress != nil {
		ci = ci.WithProgress(phase(s.Progress, 0))
		co = co.WithProgress(phase(s.Progress, 1))
	}
	r := &GlueReport{Labeled: labels != nil, Settings: s}
	if r.ScaleIn, err = medianNN(ctx, ci); err != nil {
		return nil, err
	}
	if r.ScaleOut, err = medianNN(ctx, co); err != nil {
		return nil, err
	}
	tin, tout := s.Tau*r.ScaleIn, s.Tau*r.ScaleOut
	if s.Progress != nil {
		co = co.WithProgress(phase(s.Progress, 2))
	}
	keep := max(s.Examples, 0)
	var mu sync.Mutex
	err = co.Pairs(ctx, tout, func(b []knn.Pair) error {
		var total, within int
		var ex []GluePair
		for _, p := range b {
			din := ci.Dist(p.I, p.J)
			if din <= tin {
				continue
			}
			total++
			cross := labels != nil && labels[p.I] != labels[p.J]
			if labels != nil && !cross {
				within++
			}
			if len(ex) < keep {
				ex = append(ex, GluePair{p.I, p.J, din, p.D, cross})
			}
		}
		if total == 0 {
			return nil
		}
		mu.Lock()
		defer mu.Unlock()
		r.Total += total
		r.Within += within
		if labels != nil {
			r.Cross += total - within
		}
		r.Examples = firstPairs(append(r.Examples, ex...), keep)
		return nil
	})
	if err != nil {
		return nil, err
	}
	if r.Examples == nil {
		r.Examples = []GluePair{}
	}
	return r, nil
}

// phase maps the progress of pass p (0, 1 or 2) of three equal passes to
// overall progress.
func phase(f func(done, total int), p int) func(done, total int) {
	return func(done, total int) { f(p*total+done, 3*total) }
}

// firstPairs sorts p by (I, J) and truncates it to m entries.
func firstPairs(p []GluePair, m int) []GluePair {
	sort.Slice(p, func(a, b int) bool {
		if p[a].I != p[b].I {
			return p[a].I < p[b].I
		}
		return p[a].J < p[b].J
	})
	return p[:min(len(p), m)]
}

// medianNN is the median of the nearest-neighbour distances (the mean of
// the two middle values for even n).
func medianNN(ctx context.Context, c *knn.Cloud) (float64, error) {
	g, err := c.Search(ctx, 1)
	if err != nil {
		return 0, err
	}
	d := make([]float64, len(g.Dist))
	for i, v := range g.Dist {
		d[i] = v[0]
	}
	return percentile(d, 50), nil
}

// percentile sorts v and returns its p-th percentile with linear
// interpolation between order statistics (numpy.percentile's default
// "linear" method).
func percentile(v []float64, p float64) float64 {
	sort.Float64s(v)
	h := (float64(len(v)) - 1) * p / 100
	lo := math.Floor(h)
	i := int(lo)
	if i+1 >= len(v) {
		return v[len(v)-1]
	}
	return v[i] + (h-lo)*(v[i+1]-v[i])
}
