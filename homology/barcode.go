// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"cmp"
	"math"
	"slices"
)

// Bar is one persistence interval [Birth, Death). Death is +Inf for an
// essential class, or for a class still alive at the threshold of a
// truncated computation.
type Bar struct {
	Birth, Death float64
}

// Persistence returns Death − Birth (+Inf for infinite bars).
func (b Bar) Persistence() float64 { return b.Death - b.Birth }

// Barcode is the result of a Vietoris–Rips computation. It is immutable
// once returned and safe for concurrent reads.
type Barcode struct {
	// Bars[d] holds the bars of dimension d, d = 0..MaxDim, in canonical
	// order: by Birth, then by Death (+Inf last). Bars of length zero are
	// never reported.
	Bars [][]Bar
	// Threshold is the largest edge length admitted to the complex.
	Threshold float64
	// EnclosingRadius is min over points of the largest distance to
	// another point (+Inf when some distances are +Inf).
	EnclosingRadius float64
	// Truncated is true when Threshold is below the scale at which the
	// complex stops changing; bars alive at Threshold then have Death +Inf.
	Truncated bool
	// Field is the prime p of the coefficients Z/p.
	Field int
	// Metric is the metric the distances came from (Euclidean for
	// RipsDistances).
	Metric Metric
	// K is the neighbour count of the KNNGeodesic metric, else 0.
	K int
	// MaxDim is the highest dimension computed.
	MaxDim int
	// Points is the number of points (vertices).
	Points int
	// Stats counts the work done.
	Stats Stats
}

// Stats counts the work of a computation, per dimension.
type Stats struct {
	// Edges is the number of edges within the threshold.
	Edges int64
	// Columns[d] is the number of d-simplices whose coboundary was reduced.
	Columns []int64
	// Apparent[d] counts d-simplices skipped as members (facet or
	// cofacet) of zero-persistence apparent pairs; Emergent[d] counts
	// columns settled by the emergent pair shortcut; Cleared[d] counts
	// d-simplices skipped because they were pivots of dimension d−1.
	Apparent, Emergent, Cleared []int64
}

// Betti returns, for each dimension 0..MaxDim, the number of bars with
// Birth ≤ eps < Death.
func (b *Barcode) Betti(eps float64) []int {
	out := make([]int, len(b.Bars))
	for d, bars := range b.Bars {
		for _, bar := range bars {
			if bar.Birth <= eps && eps < bar.Death {
				out[d]++
			}
		}
	}
	return out
}

// compareBars orders bars by Birth then Death.
func compareBars(x, y Bar) int {
	if c := cmp.Compare(x.Birth, y.Birth); c != 0 {
		return c
	}
	return cmp.Compare(x.Death, y.Death)
}

// SortBars puts bars in canonical order: by Birth, then by Death.
func SortBars(bars []Bar) { slices.SortFunc(bars, compareBars) }

func isInf(x float64) bool { return math.IsInf(x, 1) }
