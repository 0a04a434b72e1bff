// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bufio"
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/homology"
)

func init() {
	register(&command{
		name:    "barcode",
		summary: "Vietoris–Rips persistence barcode of a point cloud",
		run:     runBarcode,
	})
}

const barcodeSynopsis = "POINTS.csv [--top-dim D] [--stop-at T] [--metric euclidean|cosine|knn] [--graph-k K] [--prime P] [--landmarks M --seed S] [--edge-collapse]"

// runBarcode reads one point per line (comma-separated; "-" is stdin) and
// writes a header line "dim<TAB>lo<TAB>hi" and then one bar per line:
// its dimension, the scale at which it starts and the one at which it
// ends ("inf" for a bar that never ends), numbers as %.17g, dimensions
// in increasing order and bars in the canonical order of package
// homology. lo and hi are the names the trace JSON gives a scale range.
func runBarcode(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("barcode", barcodeSynopsis, stderr)
	labelCol := fs.String("labels", "", "read the labeled CSV of crease trace and drop this label column (header name or 1-based number)")
	headerMode := fs.String("header", "auto", "with --labels: is the first record a header: auto, yes or no")
	maxDim := fs.Int("top-dim", 1, "highest homology dimension, 0..3")
	threshold := fs.Float64("stop-at", 0, "the filtration stops at this edge length (the barcode's threshold); 0 means the enclosing radius")
	metric := fs.String("metric", "euclidean", "distance: euclidean, cosine or knn (hop count on the k-NN graph)")
	k := fs.Int("graph-k", 0, "neighbours of the k-NN graph of --metric knn")
	field := fs.Int("prime", 2, "prime p of the coefficients Z/p")
	landmarks := fs.Int("landmarks", 0, "if > 0, compute on this many max–min landmarks")
	seed := fs.Uint64("seed", 1, "seed of the first landmark")
	collapse := fs.Bool("edge-collapse", false, "edge-collapse the flag filtration first (same barcode, often much faster for H2, planar clouds or low thresholds, slower on dense clouds in higher dimensions); on by default when --top-dim is 2 or more, and for H≤1 on planar clouds or at a threshold within which at most a quarter of the pairs lie; --edge-collapse=false turns it off")
	for old, new := range map[string]string{"maxdim": "top-dim", "threshold": "stop-at", "k": "graph-k", "field": "prime", "collapse": "edge-collapse"} {
		deprecate(fs, old, new, stderr)
	}
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		fs.Usage()
		return fmt.Errorf("usage: want one POINTS.csv argument, got %d", len(pos))
	}
	m, err := homology.ParseMetric(*metric)
	if err != nil {
		return err
	}
	if *landmarks < 0 {
		return fmt.Errorf("--landmarks %d is negative", *landmarks)
	}
	pts, name, err := readPoints(pos[0], stdin, *labelCol, *headerMode)
	if err != nil {
		return err
	}
	n, width := pts.Dims()
	var x mat.Matrix = pts
	if *landmarks > 0 && *landmarks < n {
		idx, radius := homology.Landmarks(pts, *landmarks, *seed)
		sub := mat.NewDense(len(idx), width, nil)
		for i, j := range idx {
			sub.SetRow(i, pts.RawRowView(j))
		}
		x = sub
		fmt.Fprintf(stderr, "crease barcode: %d landmarks of %d points, covering radius %.6g\n", len(idx), n, radius)
	}
	set := &homology.Settings{MaxDim: *maxDim, Threshold: *threshold, Metric: m, K: *k, Field: *field}
	// Edge collapse pays off where the reduction of triangles and
	// tetrahedra dominates (H2 and up: 600 points on S² at threshold 1.0
	// took 1.2 s plain and 0.03 s collapsed, bench/homology.sh), and for
	// H≤1 where collapseGate says so; --edge-collapse or --edge-collapse=false
	// overrides the choice.
	useCollapse := *collapse
	explicit := false
	fs.Visit(func(f *flag.Flag) { explicit = explicit || f.Name == "edge-collapse" || f.Name == "collapse" })
	if !explicit {
		useCollapse = *maxDim >= 2 || collapseGate(x, m, *threshold)
	}
	bc, err := barcodeOf(ctx, x, set, useCollapse)
	if err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	w := bufio.NewWriter(stdout)
	fmt.Fprintln(w, "dim\tlo\thi")
	for d, bars := range bc.Bars {
		for _, b := range bars {
			death := "inf"
			if !math.IsInf(b.Death, 1) {
				death = strconv.FormatFloat(b.Death, 'g', 17, 64)
			}
			fmt.Fprintf(w, "%d\t%s\t%s\n", d, strconv.FormatFloat(b.Birth, 'g', 17, 64), death)
		}
	}
	return w.Flush()
}

// barcodeOf computes the barcode of x, through the edge collapse of
// homology.CollapseEdges when collapse is set. At a given finite
// threshold the collapse starts from homology.PointEdges, the pairs
// within it, rather than from all the distances (torus2000 in R³ at
// threshold 1.5: 12 % of the pairs).
func barcodeOf(ctx context.Context, x mat.Matrix, set *homology.Settings, collapse bool) (*homology.Barcode, error) {
	if !collapse {
		return homology.Rips(ctx, x, set)
	}
	var d homology.Distances
	var err error
	if t := set.Threshold; t > 0 && !math.IsInf(t, 1) && set.Metric != homology.KNNGeodesic {
		d, err = homology.PointEdges(ctx, x, set)
	} else {
		d, err = homology.PointDistances(ctx, x, set)
	}
	if err != nil {
		return nil, err
	}
	s, err := homology.CollapseEdges(ctx, d, set.Threshold)
	if err != nil {
		return nil, err
	}
	return homology.RipsDistances(ctx, s, set)
}

// collapseDensity is the largest fraction of point pairs within the
// threshold at which collapseGate chooses the edge collapse for H≤1.
const collapseDensity = 0.25

// collapseGate reports whether the edge collapse pays for H≤1 on the
// Euclidean cloud x at the threshold (0: the enclosing radius). Measured
// with `crease barcode --collapse=false` and `--collapse` (whole process,
// H≤1, the clouds of bench/homology.sh), plain vs collapsed: torus2000 in
// R³ at thr 1.0 (4.9 % of pairs are edges) 0.22 vs 0.15 s, thr 1.5
// (11.7 %) 1.13 vs 0.27 s, but thr 3.0 (55 %) 5.2 vs 24 s and the
// enclosing radius (80 %) 7.1 vs 21.5 s; at the enclosing radius the
// R¹⁶ clusters (78 %) took 0.70 vs 3.1 s and the R⁶⁴ digits (82 %) 0.8 vs
// 40 s, while the planar noisy circle (84 %) took 3.4 vs 0.30 s. So: a
// given threshold with at most collapseDensity of the pairs within it,
// or a cloud in the plane. Other metrics were not measured and keep the
// plain path.
func collapseGate(x mat.Matrix, m homology.Metric, threshold float64) bool {
	if m != homology.Euclidean {
		return false
	}
	n, dim := x.Dims()
	if dim <= 2 {
		return true
	}
	if !(threshold > 0) || math.IsInf(threshold, 1) || n < 2 {
		return false
	}
	limit := collapseDensity * float64(n) * float64(n-1) / 2
	t2 := threshold * threshold
	flat := make([]float64, n*dim)
	for i := 0; i < n; i++ {
		mat.Row(flat[i*dim:(i+1)*dim], i, x)
	}
	count := 0.0
	for i := 1; i < n; i++ {
		row := flat[i*dim : (i+1)*dim]
		for j := 0; j < i; j++ {
			d2 := 0.0
			for c, v := range flat[j*dim : (j+1)*dim] {
				e := v - row[c]
				d2 += e * e
			}
			if d2 <= t2 {
				if count++; count > limit {
					return false
				}
			}
		}
	}
	return true
}
