// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"fmt"
	"slices"
	"strings"
)

// Where a measure is defined.
const (
	ScopeEvery      = "every stage"
	ScopeAfterInput = "every stage after the input"
	ScopeAffine     = "affine stages"
	ScopeFlat       = "activations with flat pieces (relu, relu6, hardtanh, hardsigmoid)"
	ScopePiecewise  = "piecewise-linear activations (those, and leaky-relu, prelu)"
	ScopeSoftmax    = "softmax stages (when the classes match the output units)"
)

// MeasureInfo describes one named measure of a trace: the name the
// JSON, the long CSV, Trace.Value, the test helpers and the report use.
type MeasureInfo struct {
	// Name is the measure's name, such as "knn.accuracy".
	Name string
	// Label is a short label for tables and plots.
	Label string
	// Meaning says what it measures.
	Meaning string
	// Range is its range or unit, such as "[0, 1]" or "count".
	Range string
	// Better is "higher" or "lower" when one direction means better
	// separated (or less collapsed) classes, else empty.
	Better string
	// Scope says at which stages it is defined (the Scope constants).
	Scope string
	// Stage and Class say whether it is recorded for the stage (the
	// whole sample) and for each class.
	Stage, Class bool
	// Ratio marks a ratio, compared on a log scale.
	Ratio bool
	// Share marks a share of points, whose resolution is one point.
	Share bool
}

// measureTable is the one table of measure names. Order: topology,
// collapse, overlap.
var measureTable = []MeasureInfo{
	{Name: "betti.<d>", Label: "β_d", Meaning: "best reading of the Betti number in dimension d (see betti_confident)", Range: "count", Scope: ScopeEvery, Stage: true, Class: true},
	{Name: "bars.<d>", Label: "bars in H_d", Meaning: "number of bars of dimension d", Range: "count", Scope: ScopeEvery, Stage: true, Class: true},
	{Name: "count", Label: "points", Meaning: "number of points of the group", Range: "count", Scope: ScopeEvery, Stage: true, Class: true},
	{Name: "diameter", Label: "diameter", Meaning: "largest distance between two points of the group", Range: "distance", Scope: ScopeEvery, Stage: true, Class: true},
	{Name: "scale", Label: "scale", Meaning: "scale the Betti numbers were read at (ratio rule: the sampling scale)", Range: "distance", Scope: ScopeEvery, Stage: true, Class: true},
	{Name: "threshold", Label: "threshold", Meaning: "largest edge length of the barcode computation", Range: "distance", Scope: ScopeEvery, Stage: true, Class: true},

	{Name: "glued.total", Label: "glued", Meaning: "pairs of points distinct before the stage and identified after it", Range: "count", Better: "lower", Scope: ScopeAfterInput, Stage: true},
	{Name: "glued.within", Label: "glued within", Meaning: "glued pairs of the same class", Range: "count", Scope: ScopeAfterInput, Stage: true},
	{Name: "glued.cross", Label: "glued cross", Meaning: "glued pairs of different classes", Range: "count", Better: "lower", Scope: ScopeAfterInput, Stage: true},
	{Name: "glue.scale_in", Label: "glue scale in", Meaning: "median nearest-neighbour distance of the stage's input", Range: "distance", Scope: ScopeAfterInput, Stage: true},
	{Name: "glue.scale_out", Label: "glue scale out", Meaning: "median nearest-neighbour distance of the stage's output", Range: "distance", Scope: ScopeAfterInput, Stage: true},
	{Name: "distort.median", Label: "distortion", Meaning: "median ratio of output to input distance over neighbour pairs", Range: "ratio ≥ 0", Scope: ScopeAfterInput, Stage: true, Ratio: true},
	{Name: "distort.p10", Label: "distortion p10", Meaning: "10th percentile of that ratio", Range: "ratio ≥ 0", Scope: ScopeAfterInput, Stage: true, Ratio: true},
	{Name: "distort.p90", Label: "distortion p90", Meaning: "90th percentile of that ratio", Range: "ratio ≥ 0", Scope: ScopeAfterInput, Stage: true, Ratio: true},
	{Name: "affine.rank", Label: "rank", Meaning: "numerical rank of the weight matrix", Range: "count", Scope: ScopeAffine, Stage: true},
	{Name: "affine.kernel", Label: "kernel", Meaning: "input width minus rank: directions the map sends to zero", Range: "count", Scope: ScopeAffine, Stage: true},
	{Name: "affine.cond", Label: "condition", Meaning: "largest over smallest singular value of the weights (+Inf absent)", Range: "ratio ≥ 1", Scope: ScopeAffine, Stage: true, Ratio: true},
	{Name: "affine.rank_in", Label: "rank in", Meaning: "numerical rank of the centred input sample", Range: "count", Scope: ScopeAffine, Stage: true},
	{Name: "affine.rank_out", Label: "rank out", Meaning: "numerical rank of the centred output sample", Range: "count", Scope: ScopeAffine, Stage: true},
	{Name: "affine.identified", Label: "identified", Meaning: "pairs of points the map sends to one point", Range: "count", Better: "lower", Scope: ScopeAffine, Stage: true},
	{Name: "affine.forces_identifications", Label: "forces identifications", Meaning: "1 when the output is narrower than the rank of the input sample", Range: "0 or 1", Better: "lower", Scope: ScopeAffine, Stage: true},
	{Name: "fold.untouched", Label: "untouched", Meaning: "share of points the activation leaves on its identity piece in every unit", Range: "[0, 1]", Scope: ScopeFlat, Stage: true, Share: true},
	{Name: "fold.face", Label: "on a face", Meaning: "share of points sent to a face (some units flattened, not all)", Range: "[0, 1]", Scope: ScopeFlat, Stage: true, Share: true},
	{Name: "fold.origin", Label: "at the origin", Meaning: "share of points with every unit flattened", Range: "[0, 1]", Better: "lower", Scope: ScopeFlat, Stage: true, Share: true},
	{Name: "fold.dead", Label: "dead units", Meaning: "units flattened on every point", Range: "count", Better: "lower", Scope: ScopeFlat, Stage: true},
	{Name: "fold.always_active", Label: "always active", Meaning: "units on the same non-flat piece on every point", Range: "count", Scope: ScopePiecewise, Stage: true},
	{Name: "fold.patterns", Label: "patterns", Meaning: "distinct activation patterns", Range: "count", Scope: ScopePiecewise, Stage: true},
	{Name: "fold.entropy", Label: "pattern entropy", Meaning: "entropy of the histogram of activation patterns", Range: "bits", Scope: ScopePiecewise, Stage: true},
	{Name: "fold.shared_patterns", Label: "shared patterns", Meaning: "activation patterns held by points of two or more classes", Range: "count", Better: "lower", Scope: ScopePiecewise, Stage: true},
	{Name: "fold.shared_points", Label: "points in shared patterns", Meaning: "points whose activation pattern is shared with another class", Range: "count", Better: "lower", Scope: ScopePiecewise, Stage: true},

	{Name: "knn.k", Label: "k", Meaning: "neighbour count of the k-NN agreement", Range: "count", Scope: ScopeEvery, Stage: true},
	{Name: "knn.accuracy", Label: "k-NN accuracy", Meaning: "share of points whose k nearest neighbours vote for their class", Range: "[0, 1]", Better: "higher", Scope: ScopeEvery, Stage: true, Class: true, Share: true},
	{Name: "knn.share", Label: "neighbour share", Meaning: "mean share of a point's k nearest neighbours in its class", Range: "[0, 1]", Better: "higher", Scope: ScopeEvery, Stage: true},
	{Name: "margin.cross", Label: "cross distance", Meaning: "smallest distance between points of different classes", Range: "distance", Better: "higher", Scope: ScopeEvery, Stage: true},
	{Name: "margin.within", Label: "within distance", Meaning: "mean distance from a point to its nearest classmate", Range: "distance", Scope: ScopeEvery, Stage: true},
	{Name: "margin.ratio", Label: "margin", Meaning: "cross distance over within distance: above 1 the classes lie further apart than their own spacing", Range: "ratio ≥ 0", Better: "higher", Scope: ScopeEvery, Stage: true, Ratio: true},
	{Name: "fisher.between", Label: "between scatter", Meaning: "trace of the between-class scatter", Range: "distance²", Scope: ScopeEvery, Stage: true},
	{Name: "fisher.within", Label: "within scatter", Meaning: "trace of the within-class scatter", Range: "distance²", Scope: ScopeEvery, Stage: true},
	{Name: "fisher.ratio", Label: "Fisher ratio", Meaning: "between over within scatter", Range: "ratio ≥ 0", Better: "higher", Scope: ScopeEvery, Stage: true, Ratio: true},
	{Name: "silhouette.score", Label: "silhouette", Meaning: "mean silhouette width of the classes", Range: "[-1, 1]", Better: "higher", Scope: ScopeEvery, Stage: true, Class: true},
	{Name: "nc1.value", Label: "NC1", Meaning: "within-class variability relative to the between-class spread, tr(Σ_W Σ_B⁺)/C (neural collapse)", Range: "≥ 0", Better: "lower", Scope: ScopeEvery, Stage: true},
	{Name: "nc1.rank", Label: "NC1 rank", Meaning: "eigenvalues of Σ_B kept in its pseudo-inverse", Range: "count", Scope: ScopeEvery, Stage: true},
	{Name: "probe.accuracy", Label: "linear-probe accuracy", Meaning: "cross-validated accuracy of a linear classifier (multinomial logistic regression)", Range: "[0, 1]", Better: "higher", Scope: ScopeEvery, Stage: true, Share: true},
	{Name: "probe.converged", Label: "probe converged", Meaning: "1 when every fold of the probe converged", Range: "0 or 1", Scope: ScopeEvery, Stage: true},
	{Name: "twonn.dim", Label: "intrinsic dimension", Meaning: "TwoNN intrinsic-dimension estimate (Facco et al., 2017)", Range: "≥ 0", Scope: ScopeEvery, Stage: true},
	{Name: "pca.dim90", Label: "PCA dim 90 %", Meaning: "principal components that carry 90 % of the variance", Range: "count", Scope: ScopeEvery, Stage: true},
	{Name: "pca.dim95", Label: "PCA dim 95 %", Meaning: "principal components that carry 95 % of the variance", Range: "count", Scope: ScopeEvery, Stage: true},
	{Name: "voronoi.inside", Label: "inside own cell", Meaning: "share of points in the interior of their own vertex's Voronoi cell of the softmax simplex", Range: "[0, 1]", Better: "higher", Scope: ScopeSoftmax, Stage: true, Class: true, Share: true},
	{Name: "voronoi.own_min", Label: "own probability min", Meaning: "smallest probability a class's points give their own class", Range: "[0, 1]", Better: "higher", Scope: ScopeSoftmax, Class: true},
	{Name: "voronoi.own_median", Label: "own probability median", Meaning: "median probability a class's points give their own class", Range: "[0, 1]", Better: "higher", Scope: ScopeSoftmax, Class: true},
}

// Measures returns the table of every measure a trace can record, in a
// fixed order: topology, collapse, overlap. Names with "<d>" stand for
// one name per homology dimension ("betti.0", "betti.1", ...).
func Measures() []MeasureInfo { return slices.Clone(measureTable) }

// LookupMeasure returns the table entry of the measure name (for
// "betti.1", the entry "betti.<d>").
func LookupMeasure(name string) (MeasureInfo, bool) {
	key := name
	for _, p := range []string{"betti.", "bars."} {
		if rest, ok := strings.CutPrefix(name, p); ok && rest != "" && strings.Trim(rest, "0123456789") == "" {
			key = p + "<d>"
		}
	}
	for _, m := range measureTable {
		if m.Name == key {
			return m, true
		}
	}
	return MeasureInfo{}, false
}

// CheckMeasure returns an error naming the measure when the table does
// not know it, with the closest known names.
func CheckMeasure(name string) error {
	if _, ok := LookupMeasure(name); ok {
		return nil
	}
	prefix, _, _ := strings.Cut(name, ".")
	var near []string
	for _, m := range measureTable {
		if strings.HasPrefix(m.Name, prefix+".") {
			near = append(near, m.Name)
		}
	}
	if len(near) == 0 {
		return fmt.Errorf("trace: unknown measure %q (see trace.Measures)", name)
	}
	return fmt.Errorf("trace: unknown measure %q; known %s measures: %s", name, prefix, strings.Join(near, ", "))
}
