// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package knn finds exact Euclidean nearest neighbours and close pairs in a
// point cloud without holding an n×n distance matrix.
//
// # Method
//
// Rows of the input are points. The points are copied once and centred on
// their mean; squared distances between a block of rows and a block of
// columns are then computed with one BLAS matrix product,
//
//	‖xᵢ − xⱼ‖² = ‖xᵢ‖² + ‖xⱼ‖² − 2 xᵢ·xⱼ,
//
// which is fast but can lose digits to cancellation. The blocked values are
// therefore used only to choose candidates, with a rounding slack that
// bounds the error of the formula, and every candidate's distance is
// recomputed directly as the square root of Σₖ (xᵢₖ − xⱼₖ)² on the
// original coordinates. Reported distances are those direct values, so the
// results do not depend on block sizes, worker counts or scheduling.
//
// Memory beyond the copies of the input (two n×d float64 matrices) is one
// block of row-by-column products per worker plus, for [Search], the result
// itself (n·k indices and distances).
//
// # Ties
//
// Neighbours are sorted by distance, then by index; the k nearest are the
// first k in that order. A point is never its own neighbour, but a distinct
// row with identical coordinates is a neighbour at distance 0.
//
// # Concurrency
//
// [Search] and [Pairs] use the context's worker budget (internal/budget;
// GOMAXPROCS goroutines without one), stop early
// when the context is cancelled and return the context's error.
//
// # Errors
//
// Empty input, NaN or ±Inf coordinates (named by row and column), and k
// outside 1..n−1 are reported as errors; nothing panics on bad data.
package knn
