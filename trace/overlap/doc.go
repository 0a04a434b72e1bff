// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package overlap measures how far apart the classes of a labeled sample
// are at one stage of a network, and how many dimensions the sample
// really uses.
//
// # Inputs
//
// Every measure takes a sample x as a [mat.Matrix] whose rows are points
// and, where classes matter, labels as class indices 0..C−1, one per row.
// Absent class indices are allowed; a measure of classes uses the classes
// present. At least two classes must be present. Bad data (empty sample,
// labels of the wrong length, a negative label, NaN or ±Inf, one class
// only) is returned as an [*Error] naming the measure, the row and the
// column; the functions do not panic on data.
//
// # Measures
//
//	KNNAgreement  leave-one-out k-NN accuracy and mean neighbour label share
//	Margin        smallest cross-class distance / mean within-class NN distance
//	Fisher        tr(S_B)/tr(S_W)
//	Silhouette    mean Euclidean silhouette coefficient
//	NC1           tr(Σ_W Σ_B⁺)/C (Papyan, Han and Donoho, PNAS 2020)
//	Probe         cross-validated multinomial logistic-regression accuracy
//	Voronoi       on probability rows: argmax interior fraction and top-two gap
//	TwoNN         intrinsic dimension (Facco et al., Scientific Reports 7, 2017)
//	PCADim        explained-variance ratios and the 90 % / 95 % dimensions
//
// [Measure] computes all of them and shares one nearest-neighbour graph.
// Every result carries the settings that produced it.
//
// # Cost
//
// Distances are computed in blocks of rows against the whole sample with
// gonum's BLAS, so Margin and Silhouette take O(n²·d) time and
// O(n·block) memory; [Measure] computes both from one pass. The probe
// costs O(iterations·n·d·C) per fold, where d counts the columns that
// are not constant on the fold's training points; its folds, and the
// nearest-neighbour search, use the context's worker budget
// (internal/budget), and nothing else starts goroutines.
//
// Results are deterministic for the same inputs and settings. All
// functions are safe for concurrent use; they keep no state.
package overlap
