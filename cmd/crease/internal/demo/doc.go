// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package demo holds crease's embedded demo: a labeled sample of
// configurations of a planar two-joint robot arm and two trained
// classifiers, so that "crease demo" needs no files.
//
// # Scenario
//
// The arm has two revolute joints: link 1 (length 1.0) turns about the
// base at the origin by θ₁ and link 2 (length 0.7) turns about the elbow
// by θ₂. Its configuration space is the torus S¹ × S¹ of the joint angles
// (standard in robotics; K. M. Lynch and F. C. Park, Modern Robotics,
// 2017, chapter 2). A configuration is encoded as
//
//	(cos θ₁, sin θ₁, cos θ₂, sin θ₂)
//
// which embeds the torus in R⁴. A disc obstacle (centre at distance 0.9
// from the base, radius 0.3) sits in the workspace; a configuration is
// "contact" when a link touches it, "near" when the clearance is at
// most 0.5 and "clear" otherwise. Because link 1 can reach the obstacle,
// "contact" is a band around the torus (β = (1, 1)), "near" the two bands
// beside it (β = (2, 2)) and "clear" the remaining band (β = (1, 1)); the
// generator testdata/gen/demo_arm.py checks these numbers on a fine grid
// and records them, with GUDHI's Rips Betti numbers of the sample, in
// data/arm.json (see [Meta]).
//
// The two models, trained by the same generator with PyTorch and
// exported to ONNX with a softmax output, are [Wide] (4→16→16→3) and
// [Narrow] (4→2→16→3, whose 2-unit first layer cannot keep the classes
// apart).
package demo
