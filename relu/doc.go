// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package relu measures what one stage of a network does to a labelled
// sample: how much rank an affine map throws away, how a ReLU folds the
// sample onto faces of the positive orthant, which distinct points a stage
// glues together and how it stretches or squeezes neighbourhoods.
//
// Every function takes plain matrices whose rows are sample points (the
// stage's input and output activations) and, where classes matter, labels
// as class indices 0..C−1. Nothing here knows about models.
//
// # Measures
//
//   - [Affine]: numerical rank, singular values, kernel dimension and
//     condition number of W; rank of the centred sample before and after;
//     whether the map is injective on the sample.
//   - [Fold]: per-point zeroed coordinates, the split into untouched, face
//     and origin points, dead and always-active units, activation patterns,
//     their entropy in bits, and patterns shared by classes.
//   - [Glue]: pairs distinct before the stage and identified after it,
//     counted within and across classes, without O(n²) memory.
//   - [Distort]: the ratio of distances after/before over each point's k
//     nearest neighbours before the stage.
//
// # Tolerances
//
// Numerical rank uses the cut-off max(m, n)·σ_max·ε (ε = 2⁻⁵², the float64
// machine epsilon), the rule of numpy.linalg.matrix_rank; this is common
// practice, not a theorem. The same rule is applied to the centred sample,
// relative to its own largest singular value.
//
// # Errors and classes
//
// Mismatched row counts, widths that disagree with W, labels of the wrong
// length or negative, empty samples and NaN or ±Inf entries are returned as
// errors naming the argument, row and column. A sample with a single class
// is accepted: cross-class counts are then zero, which is the correct
// answer, not a failure.
//
// Reports carry the settings that produced them. All functions are
// deterministic and safe for concurrent use; the ones taking a context use
// all cores and stop when it is cancelled.
package relu
