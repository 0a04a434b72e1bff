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
	"crease.dev/crease/internal/csvnum"
)

func init() {
	register(&command{
		name:    "barcode",
		summary: "Vietoris–Rips persistence barcode of a point cloud",
		run:     runBarcode,
	})
}

const barcodeSynopsis = "POINTS.csv [--maxdim D] [--threshold T] [--metric euclidean|cosine|knn] [--k K] [--field P] [--landmarks M --seed S] [--collapse]"

// runBarcode reads one point per line (comma-separated; "-" is stdin) and
// writes one bar per line: dim<TAB>birth<TAB>death, death "inf" for
// infinite bars, numbers as %.17g, dimensions in increasing order and
// bars in the canonical order of package homology.
func runBarcode(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("barcode", barcodeSynopsis, stderr)
	maxDim := fs.Int("maxdim", 1, "highest homology dimension, 0..3")
	threshold := fs.Float64("threshold", 0, "largest edge length; 0 means the enclosing radius")
	metric := fs.String("metric", "euclidean", "distance: euclidean, cosine or knn (hop count on the k-NN graph)")
	k := fs.Int("k", 0, "neighbours for --metric knn")
	field := fs.Int("field", 2, "prime p of the coefficients Z/p")
	landmarks := fs.Int("landmarks", 0, "if > 0, compute on this many max–min landmarks")
	seed := fs.Uint64("seed", 1, "seed of the first landmark")
	collapse := fs.Bool("collapse", false, "edge-collapse the flag filtration first (same barcode, often much faster for H2 or dense clouds); on by default when --maxdim is 2 or more, --collapse=false turns it off")
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
	r, closeIn, name, err := openInput(pos[0], stdin)
	if err != nil {
		return err
	}
	rows, width, err := csvnum.Read(r, name, nil)
	closeIn()
	if err != nil {
		return err
	}
	pts := mat.NewDense(len(rows), width, nil)
	for i, row := range rows {
		pts.SetRow(i, row)
	}
	var x mat.Matrix = pts
	if *landmarks > 0 && *landmarks < len(rows) {
		idx, radius := homology.Landmarks(pts, *landmarks, *seed)
		sub := mat.NewDense(len(idx), width, nil)
		for i, j := range idx {
			sub.SetRow(i, rows[j])
		}
		x = sub
		fmt.Fprintf(stderr, "crease barcode: %d landmarks of %d points, covering radius %.6g\n", len(idx), len(rows), radius)
	}
	set := &homology.Settings{MaxDim: *maxDim, Threshold: *threshold, Metric: m, K: *k, Field: *field}
	// Edge collapse pays off where the reduction of triangles and
	// tetrahedra dominates (H2 and up: 600 points on S² at threshold 1.0
	// took 1.4 s plain and 0.16 s collapsed, bench/homology.sh); for H≤1
	// its domination checks cost about what they save, so it is opt-in.
	useCollapse := *collapse
	explicit := false
	fs.Visit(func(f *flag.Flag) { explicit = explicit || f.Name == "collapse" })
	if !explicit && *maxDim >= 2 {
		useCollapse = true
	}
	bc, err := barcodeOf(ctx, x, set, useCollapse)
	if err != nil {
		return fmt.Errorf("%s: %w", name, err)
	}
	w := bufio.NewWriter(stdout)
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
// homology.CollapseEdges when collapse is set.
func barcodeOf(ctx context.Context, x mat.Matrix, set *homology.Settings, collapse bool) (*homology.Barcode, error) {
	if !collapse {
		return homology.Rips(ctx, x, set)
	}
	d, err := homology.PointDistances(ctx, x, set)
	if err != nil {
		return nil, err
	}
	s, err := homology.CollapseEdges(ctx, d, set.Threshold)
	if err != nil {
		return nil, err
	}
	return homology.RipsDistances(ctx, s, set)
}
