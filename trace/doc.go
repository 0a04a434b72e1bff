// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package trace pushes a labeled sample through every stage of a model
// and records, per stage, the topology of each class and of the whole
// sample, what the stage collapsed, and how far apart the classes are.
//
// # Overview
//
// Run takes the stages of a model (from onnxload), a Sample and Settings
// and returns a *Trace. Stage 0 of a trace is the input itself (kind
// "input"); stage i ≥ 1 is the output of model stage i−1. For every
// stage and for the whole sample and every class (a Group), the trace
// holds the Vietoris–Rips barcode up to Settings.MaxDim and the Betti
// numbers read from it by the scale rule, plus flat named measures
// (see trace/schema.json and MeasureNames).
//
// # Samples
//
// A Sample holds the points (rows), a class index per row and the class
// names. ReadCSV reads a CSV with a label column (by header name or
// 1-based number; labels may be strings or integers), ReadNPY a pair of
// NPY files, NewSample and NewSampleInts Go matrices. Every class needs at
// least MinClassPoints rows. Run keeps at most Settings.Cap rows per class
// (Sample.Cap, a seeded stratified subsample) and records the rows used.
//
// # Measures
//
// Besides the barcodes and Betti numbers of each group, every stage holds
// named scalar measures: what the stage collapsed (package relu: glued
// pairs, distortion, affine rank, ReLU folds) and how far apart the
// classes are (package trace/overlap: k-NN agreement, margins, Fisher
// ratio, silhouette, NC1, linear probe, softmax Voronoi test, intrinsic
// dimension). Stage.Value and Trace.Series read any of them by name;
// Trace.MeasureNames lists those present; trace/schema.json documents them
// all.
//
// # Queries
//
// Stage, StagesOfKind and StageOfNode find stages; Series gives one
// measure of one class at every stage; First finds the first stage where a
// predicate such as AllSimple or CrossGlued holds; Summaries digests every
// stage; Compare compares two traces. Package trace/tracecheck turns these
// into test assertions.
//
// # Scale rules
//
// ScaleRelative reads Betti numbers at ε = Scale × the group's diameter
// and computes barcodes only up to that ε. ScalePersistence counts bars
// whose persistence is at least Persistence × the diameter, computing
// barcodes up to the enclosing radius (or MaxThreshold × diameter when
// set). ScaleHops uses the hop count on the k-nearest-neighbour graph as
// the metric and reads Betti numbers at ε = Hops, which does not depend
// on how a stage stretches the data. Each group records the ε used, its
// diameter and the barcode threshold.
//
// # Immutability
//
// A Trace is built once by Run (or decoded by ReadJSON) and never
// changed by this package afterwards; all methods only read, so a Trace
// is safe for concurrent reads. Callers must not modify its fields.
//
// # Determinism
//
// For the same stages, sample and settings (including Seed) Run gives
// the same Trace and WriteJSON gives byte-identical output. Timings are
// recorded only when Settings.Timing is set, because they differ
// between runs.
package trace
