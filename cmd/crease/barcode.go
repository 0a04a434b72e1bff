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
	"math/rand/v2"
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
	collapse := fs.Bool("edge-collapse", false, "edge-collapse the flag filtration first (same barcode, often much faster for H2, planar clouds or low thresholds, slower on dense clouds in higher dimensions); on by default when --top-dim is 2 or more, and for H≤1 on planar clouds and where a sample of the edges shows nearly all of them dominated after trying few vertices; --edge-collapse=false turns it off")
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
	density := 1.0 // the fraction of pairs within the threshold, estimated
	explicit := false
	fs.Visit(func(f *flag.Flag) { explicit = explicit || f.Name == "edge-collapse" || f.Name == "collapse" })
	if !explicit {
		var gate bool
		gate, density = collapseGate(x, m, *threshold)
		useCollapse = *maxDim >= 2 || gate
	}
	bc, err := barcodeOf(ctx, x, set, useCollapse, density <= sparseDensity)
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

// sparseDensity is the largest estimated fraction of pairs within a
// given threshold at which the plain path lists only those pairs
// (homology.PointEdges) instead of holding all the distances. Measured
// at H≤1, whole process, all distances vs listed pairs: digits at a
// quarter of the diameter (0.4 % of the pairs) 0.07 s / 29 MB vs
// 0.08 s / 13 MB, the R¹⁶ clusters at a quarter (2 %) 0.06 s / 25 MB vs
// 0.05 s / 13 MB, but digits at half (10 %) 0.16 s / 39 MB vs 0.22 s /
// 32 MB and the clusters at half (37 %) 0.21 s / 53 MB vs 0.41 s / 56 MB.
const sparseDensity = 0.05

// barcodeOf computes the barcode of x, through the edge collapse of
// homology.CollapseEdges when collapse is set. At a given finite
// threshold the collapse starts from homology.PointEdges, the pairs
// within it, rather than from all the distances (torus2000 in R³ at
// threshold 1.5: 12 % of the pairs); so does the plain path when sparse
// is set.
func barcodeOf(ctx context.Context, x mat.Matrix, set *homology.Settings, collapse, sparse bool) (*homology.Barcode, error) {
	finite := set.Threshold > 0 && !math.IsInf(set.Threshold, 1)
	if !collapse {
		if sparse && finite && set.Metric != homology.KNNGeodesic {
			d, err := homology.PointEdges(ctx, x, set)
			if err != nil {
				return nil, err
			}
			return homology.RipsDistances(ctx, d, set)
		}
		return homology.Rips(ctx, x, set)
	}
	var d homology.Distances
	var err error
	if finite && set.Metric != homology.KNNGeodesic {
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

// The edge collapse pays where most edges are dominated by one of the
// first few common neighbours of their ends that it tries: its time goes
// into the search for a dominating vertex (Boissonnat and Pritam), which
// for an edge that is not dominated runs through all the common
// neighbours, while what it saves is the reduction of the edges it
// removes. collapseGate estimates both from a sample of the edges within
// the threshold: the fraction dominated in the graph of the edges no
// longer than each (the collapse's first test of that edge) and the
// candidates tried per edge, in the collapse's order. Measured with
// bench/homology.sh at H≤1, RUNS=1, whole process, plain vs collapsed
// (2026-12-03), with the sampled fraction and candidates per edge:
//
//	cloud, threshold           plain    collapsed  dominated  candidates
//	relu_circle3000, quarter    1.64 s    0.53 s     0.99        1
//	relu_circle3000, half      14.8 s     0.81 s     1.00        1
//	relu_circle3000, enclosing 50.3 s     1.91 s     1.00        5
//	torus2000, 1.0              0.11 s    0.10 s     0.97        3
//	torus2000, quarter (1.51)   0.69 s    0.15 s     0.98        3
//	torus2000, half (2.99)      3.18 s   12.0 s      0.89       32
//	torus2000, enclosing        4.39 s   11.8 s      0.95       22
//	sphere600, half             0.035 s   0.031 s    0.98        3
//	sphere600, enclosing        0.082 s   2.87 s     0.66      144
//	digits1797, quarter         0.077 s   0.068 s    0.59        1
//	digits1797, half            0.132 s   0.755 s    0.74       20
//	digits1797, enclosing       0.457 s  20.9 s      0.66      195
//	clusters1500_r16, quarter   0.057 s   0.070 s    0.43        4
//	clusters1500_r16, half      0.250 s   1.26 s     0.72       40
//
// So the collapse is chosen when at least collapseDominated of the
// sampled edges are dominated and at most collapseCandidates candidates
// are tried per edge on average (between the 5 of the ReLU circle at the
// enclosing radius and the 20 of digits at half the diameter), and for
// every cloud in the plane (the noisy circle: 0.30 s collapsed, 3.4 s
// plain at the enclosing radius).
const (
	collapseSamples    = 96
	collapseDominated  = 0.9
	collapseCandidates = 12
)

// collapseGate reports whether the edge collapse pays for H≤1 on the
// Euclidean cloud x at the threshold (0 or +Inf: the enclosing radius);
// see collapseSamples. Other metrics were not measured and keep the
// plain path. It also returns the fraction of the pairs it drew that lie
// within the threshold (1 where it drew none). The estimate reads
// O(collapseSamples·n) distances, the sample is drawn from a fixed seed,
// so the choice is repeatable.
func collapseGate(x mat.Matrix, m homology.Metric, threshold float64) (collapse bool, density float64) {
	if m != homology.Euclidean {
		return false, 1
	}
	n, dim := x.Dims()
	if dim <= 2 {
		return true, 1
	}
	if n < 3 || math.IsNaN(threshold) {
		return false, 1
	}
	flat := make([]float64, n*dim)
	for i := 0; i < n; i++ {
		mat.Row(flat[i*dim:(i+1)*dim], i, x)
	}
	d2 := func(i, j int) float64 {
		a, b := flat[i*dim:(i+1)*dim], flat[j*dim:(j+1)*dim]
		s := 0.0
		for c, v := range a {
			e := v - b[c]
			s += e * e
		}
		return s
	}
	rng := rand.New(rand.NewPCG(0x636f6c6c, 0x61707365))
	t2 := threshold * threshold
	if !(threshold > 0) || math.IsInf(threshold, 1) {
		// An upper bound on the enclosing radius: the least farthest
		// distance over a few points.
		t2 = math.Inf(1)
		for range 32 {
			i, far := rng.IntN(n), 0.0
			for j := range n {
				far = max(far, d2(i, j))
			}
			t2 = min(t2, far)
		}
	}
	var common []int
	got, missed, tried, tries := 0, 0, 0, 0
	frac := func() float64 { return float64(got) / float64(max(tries, 1)) }
	for got < collapseSamples && tries < 1<<16 {
		tries++
		a, b := rng.IntN(n), rng.IntN(n)
		l := d2(a, b)
		if a == b || l > t2 {
			continue
		}
		got++
		common = common[:0]
		for j := range n {
			if j != a && j != b && d2(a, j) <= l && d2(b, j) <= l {
				common = append(common, j)
			}
		}
		dominated := false
		for _, w := range common {
			if tried++; tried > collapseCandidates*collapseSamples {
				return false, frac()
			}
			dominated = true
			for _, v := range common {
				if v != w && d2(w, v) > l {
					dominated = false
					break
				}
			}
			if dominated {
				break
			}
		}
		if !dominated {
			if missed++; float64(missed) > (1-collapseDominated)*collapseSamples {
				return false, frac()
			}
		}
	}
	// A threshold within which so few pairs lie that the sample stays
	// small leaves little for either path to do.
	return got > 0 && float64(missed) <= (1-collapseDominated)*float64(got) && tried <= collapseCandidates*got, frac()
}
