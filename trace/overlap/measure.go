// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/knn"
)

// Settings control [Measure]. The zero value means the defaults.
type Settings struct {
	// K is the number of neighbours of the k-NN agreement; 0 means
	// DefaultK. It is lowered to n−1 on samples of n ≤ K points.
	K int
	// Probe sets the linear probe; SkipProbe leaves it out (Report.Probe
	// is then nil).
	Probe     ProbeSettings
	SkipProbe bool
	// Softmax says x is a softmax output: the Voronoi test is run
	// (Report.Voronoi is nil otherwise) and rows that are not
	// probability vectors are an error.
	Softmax bool
	Voronoi VoronoiSettings
	TwoNN   TwoNNSettings
	// Progress, if not nil, is called after each measure.
	Progress func(Progress)
}

// Progress reports that a measure of [Measure] has finished.
type Progress struct {
	Measure     string
	Done, Total int
}

// Report holds every measure of one labeled sample.
type Report struct {
	N, D, Classes int // rows, columns, classes present
	KNN           *KNNResult
	Margin        *MarginResult
	Fisher        *FisherResult
	Silhouette    *SilhouetteResult
	NC1           *NC1Result
	Probe         *ProbeResult   // nil if Settings.SkipProbe
	Voronoi       *VoronoiResult // nil unless Settings.Softmax
	TwoNN         *TwoNNResult   // nil if fewer than 3 distinct points
	PCA           *PCAResult
	// Settings are the settings used, with defaults filled in.
	Settings Settings
}

// Measure computes every measure of the package on the labeled sample x,
// sharing one nearest-neighbour graph between the k-NN agreement and
// TwoNN, and one pass over the pairwise distances between the margin and
// the silhouette. It stops with ctx.Err() when ctx is cancelled.
func Measure(ctx context.Context, x mat.Matrix, labels []int, set *Settings) (*Report, error) {
	s, err := newSample("measure", x, labels, true)
	if err != nil {
		return nil, err
	}
	var r Settings
	if set != nil {
		r = *set
	}
	if r.K == 0 {
		r.K = DefaultK
	}
	if r.K < 1 {
		return nil, errorf("measure", -1, -1, "k = %d is not positive", r.K)
	}
	r.K = min(r.K, s.n-1)
	r.Probe = r.Probe.resolvedValue()
	if r.TwoNN.Discard == 0 {
		r.TwoNN.Discard = DefaultDiscard
	}
	if r.Voronoi.SumTol == 0 {
		r.Voronoi.SumTol = DefaultSumTol
	}
	rep := &Report{N: s.n, D: s.d, Classes: s.present, Settings: r}
	total := 7
	if !r.SkipProbe {
		total++
	}
	if r.Softmax {
		total++
	}
	done := 0
	step := func(name string) error {
		done++
		if r.Progress != nil {
			r.Progress(Progress{Measure: name, Done: done, Total: total})
		}
		return ctx.Err()
	}
	if r.Softmax {
		if rep.Voronoi, err = Voronoi(x, labels, &r.Voronoi); err != nil {
			return nil, err
		}
		if err := step("voronoi"); err != nil {
			return nil, err
		}
	}
	g, err := knn.Search(ctx, x, max(r.K, min(2, s.n-1)))
	if err != nil {
		return nil, err
	}
	rep.KNN = knnAgreement(g, s, r.K)
	if err := step("knn agreement"); err != nil {
		return nil, err
	}
	if g.K >= 2 {
		// Duplicate-heavy samples may leave too few points: no estimate.
		if t, err := twoNN(g, &r.TwoNN); err == nil {
			rep.TwoNN = t
		}
	}
	if err := step("twonn"); err != nil {
		return nil, err
	}
	// The margin and the silhouette read one pass over the distances.
	mp := newMarginPass(s)
	var sp *silhouettePass
	if s.present < s.n {
		if sp, err = newSilhouettePass(s); err != nil {
			return nil, err
		}
	}
	err = s.distBlocks(ctx, func(i0, i1 int, d []float64) {
		mp.rows(i0, i1, d)
		if sp != nil {
			sp.rows(i0, i1, d)
		}
	})
	if err != nil {
		return nil, err
	}
	rep.Margin = mp.result()
	if err := step("margin"); err != nil {
		return nil, err
	}
	rep.Fisher = fisher(s)
	if err := step("fisher"); err != nil {
		return nil, err
	}
	if sp != nil {
		rep.Silhouette = sp.result()
	}
	if err := step("silhouette"); err != nil {
		return nil, err
	}
	if rep.NC1, err = nc1(s); err != nil {
		return nil, err
	}
	if err := step("nc1"); err != nil {
		return nil, err
	}
	if !r.SkipProbe {
		if rep.Probe, err = probe(ctx, s, &r.Probe); err != nil {
			return nil, err
		}
		if err := step("probe"); err != nil {
			return nil, err
		}
	}
	if rep.PCA, err = pcaDim(s); err != nil {
		return nil, err
	}
	if err := step("pca"); err != nil {
		return nil, err
	}
	return rep, nil
}
