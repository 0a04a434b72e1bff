// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"context"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/trace/overlap"
)

// overlapMeasures runs overlap.Measure on one stage's output and puts
// the stage-level values into stage and the per-class values into the
// class groups (see the README schema for the names).
//
// The Voronoi test runs on softmax stages when units matches the classes
// to the output units (units[c] is class c's); the columns are put in
// class order first.
func overlapMeasures(ctx context.Context, st *Stage, out *mat.Dense, labels []int, units []int, rs Settings, stage, class func(c int, name string, v float64)) error {
	set := &overlap.Settings{
		K:         rs.OverlapK,
		SkipProbe: rs.SkipProbe,
		Probe:     overlap.ProbeSettings{Seed: rs.Seed},
		Softmax:   st.Kind == KindSoftmax && units != nil,
	}
	if set.Softmax {
		out = unitColumns(out, units)
	}
	r, err := overlap.Measure(ctx, out, labels, set)
	if err != nil {
		return err
	}
	put := func(name string, v float64) { stage(-1, name, v) }
	if r.KNN != nil {
		put("knn.k", float64(r.KNN.K))
		put("knn.accuracy", r.KNN.Accuracy)
		put("knn.share", r.KNN.Share)
		for c, v := range r.KNN.ClassAccuracy {
			class(c, "knn.accuracy", v)
		}
	}
	if r.Margin != nil {
		put("margin.cross", r.Margin.Cross)
		put("margin.within", r.Margin.Within)
		put("margin.ratio", r.Margin.Ratio)
	}
	if r.Fisher != nil {
		put("fisher.between", r.Fisher.Between)
		put("fisher.within", r.Fisher.Within)
		put("fisher.ratio", r.Fisher.Ratio)
	}
	if r.Silhouette != nil {
		put("silhouette.score", r.Silhouette.Score)
		for c, v := range r.Silhouette.Class {
			class(c, "silhouette.score", v)
		}
	}
	if r.NC1 != nil {
		put("nc1.value", r.NC1.Value)
		put("nc1.rank", float64(r.NC1.Rank))
	}
	if r.Probe != nil {
		put("probe.accuracy", r.Probe.Accuracy)
		put("probe.converged", b2f(r.Probe.Converged))
	}
	if r.Voronoi != nil {
		put("voronoi.inside", r.Voronoi.InsideAll)
		for c, v := range r.Voronoi.Inside {
			class(c, "voronoi.inside", v)
		}
		for c, s := range r.Voronoi.Own {
			class(c, "voronoi.own_min", s.Min)
			class(c, "voronoi.own_median", s.Median)
		}
	}
	if r.TwoNN != nil {
		put("twonn.dim", r.TwoNN.MLE)
	}
	if r.PCA != nil {
		put("pca.dim90", float64(r.PCA.Dim90))
		put("pca.dim95", float64(r.PCA.Dim95))
	}
	return nil
}
