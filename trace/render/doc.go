// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package render draws a trace (crease.dev/crease/trace): SVG plots of
// Betti numbers, gluing and folding, class separation and barcodes
// across stages, and a self-contained HTML report. It stands apart from
// package trace, as image/png stands apart from image, so that code that
// traces models or asserts on traces does not pull in the plotting
// dependencies.
package render
