// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package homology computes Vietoris–Rips persistence barcodes of point
// clouds and distance matrices, Betti numbers at a scale, bottleneck
// distances between barcodes, and landmark subsamples.
//
// # Conventions
//
// The filtration value of a simplex is its diameter: the length of its
// longest edge (not half of it). A bar [Birth, Death) is half-open: the
// class exists at scales ε with Birth ≤ ε < Death, which is what
// [Barcode.Betti] counts. Death is +Inf for an essential class, and for
// a class still alive at the threshold when the computation was
// truncated ([Barcode.Truncated]). Bars of zero length are not reported.
//
// Coefficients are in the field Z/p for a prime p ([Settings.Field],
// default 2); the result records p.
//
// The default threshold is the enclosing radius, min over points of the
// largest distance to another point: from there on the complex is a
// cone and nothing changes. Edges of length +Inf (disconnected k-NN
// graphs, pairs missing from a sparse list) never enter the complex.
//
// Bars of each dimension are returned in canonical order: by Birth, then
// by Death, +Inf last.
//
// # Algorithm
//
// The engine follows U. Bauer, "Ripser: efficient computation of
// Vietoris–Rips persistence barcodes", J. Appl. Comput. Topology 5
// (2021): H0 by union–find over the edges in filtration order; higher
// dimensions by persistent cohomology, reducing coboundary columns in
// reverse filtration order, with clearing, implicit coboundaries
// enumerated from the neighbour lists of the vertices (simplices are
// never stored as vertex lists, only as indices in the combinatorial
// number system, checked for overflow), the zero-persistence apparent
// pair and emergent pair shortcuts. The filtration is refined to a total
// order by (diameter, dimension, reverse index), so results are
// deterministic.
//
// Distances are kept in compressed lower-triangular storage
// ([LowerTriangular]); the edges within the threshold become sorted
// neighbour lists. The zero-persistence apparent pairs of edges are
// found during the union–find pass with bit rows of the graph (a few
// word operations per edge), and the filtration is bucket-sorted by
// length. A working column is a radix heap of one-word entries: the
// pivots of a column only grow, so entries far above them are appended
// once and never sifted.
//
// [CollapseEdges] shrinks the edge list first by the edge collapse of
// J.-D. Boissonnat and S. Pritam, "Edge collapse and persistence of flag
// complexes" (SoCG 2020), without changing the barcode; it pays off for
// H2 and up, planar clouds and low thresholds. [PointEdges] lists the
// edges within a threshold without storing all n(n−1)/2 distances, for
// RipsDistances or CollapseEdges.
//
// # Errors and limits
//
// Bad input (fewer than two points, NaN or ±Inf coordinates, ragged
// rows, invalid settings) gives an error wrapping one of the Err values;
// nothing panics on bad data. Memory is estimated before allocation and
// bounded by [Settings.MaxBytes] (*MemoryError). Long computations check
// their context every few milliseconds.
package homology
