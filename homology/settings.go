// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"errors"
	"fmt"
	"math"

	"crease.dev/crease/internal/budget"
)

// Metric selects how distances between the points of a cloud are computed.
type Metric int

const (
	// Euclidean is the straight-line distance ‖x−y‖₂. It is the zero value.
	Euclidean Metric = iota
	// Cosine is the cosine dissimilarity 1 − ⟨x,y⟩/(‖x‖‖y‖), clamped at 0.
	// Rows of norm zero are rejected.
	Cosine
	// KNNGeodesic is the hop count on the symmetrised k-nearest-neighbour
	// graph (Euclidean neighbours; i~j when either is among the other's K
	// nearest). Points in different components are at distance +Inf.
	KNNGeodesic
)

// String returns "euclidean", "cosine" or "knn".
func (m Metric) String() string {
	switch m {
	case Euclidean:
		return "euclidean"
	case Cosine:
		return "cosine"
	case KNNGeodesic:
		return "knn"
	}
	return fmt.Sprintf("Metric(%d)", int(m))
}

// ParseMetric returns the Metric named by s ("euclidean", "cosine", "knn").
func ParseMetric(s string) (Metric, error) {
	switch s {
	case "euclidean":
		return Euclidean, nil
	case "cosine":
		return Cosine, nil
	case "knn":
		return KNNGeodesic, nil
	}
	return 0, fmt.Errorf("homology: unknown metric %q (want euclidean, cosine or knn)", s)
}

// MaxField is the largest prime accepted as Settings.Field.
const MaxField = 251

// DefaultMaxBytes is the memory budget used when Settings.MaxBytes is 0.
const DefaultMaxBytes = 4 << 30

// Settings control a barcode computation. A nil *Settings means
// DefaultSettings().
type Settings struct {
	// MaxDim is the highest homology dimension computed, 0..3.
	// The zero value computes H0 only; DefaultSettings gives 1.
	MaxDim int
	// Threshold is the largest edge length admitted to the complex.
	// Zero (or +Inf) means the enclosing radius, beyond which the Rips
	// complex is a cone and the barcode no longer changes. A positive
	// value below the enclosing radius truncates the filtration: classes
	// alive at Threshold are reported with Death = +Inf and the
	// Barcode is marked Truncated. Negative values and NaN are errors.
	Threshold float64
	// Metric selects the distance for point clouds; ignored by
	// RipsDistances. The zero value is Euclidean.
	Metric Metric
	// K is the number of neighbours of the KNNGeodesic metric,
	// 1 ≤ K < number of points. Ignored by the other metrics.
	K int
	// Field is the prime p of the coefficient field Z/p, 2..MaxField.
	// Zero means 2.
	Field int
	// MaxBytes bounds the memory the computation may allocate. Zero
	// means DefaultMaxBytes. Exceeding it gives a *MemoryError.
	MaxBytes int64
	// Workers bounds the goroutines of the computation; zero means the
	// budget of the context (set by a caller such as a trace, so that
	// pools do not nest) or, without one, GOMAXPROCS.
	Workers int
	// Progress, if not nil, is called from the computing goroutine at
	// the start of each phase and then about every 100 ms.
	Progress func(Progress)
}

// DefaultSettings returns the settings used for a nil *Settings:
// H0 and H1, enclosing-radius threshold, Euclidean metric, Z/2.
func DefaultSettings() *Settings {
	return &Settings{MaxDim: 1}
}

// Progress reports how far a computation has got.
type Progress struct {
	// Phase is "distances", "edges", "reduce" or "assemble".
	Phase string
	// Dim is the homology dimension being worked on (0 for distances and edges).
	Dim int
	// Done and Total count the units of the phase (points, edges or
	// columns); Total is 0 when unknown.
	Done, Total int64
}

// Errors returned for bad input. They are wrapped with details; test with
// errors.Is.
var (
	// ErrTooFewPoints is returned for clouds with fewer than two points.
	// A single point has the trivial barcode (one essential H0 bar
	// [0,+Inf)); it is refused because no scale can be derived from it
	// and it almost always means a mis-selected sample.
	ErrTooFewPoints = errors.New("homology: need at least 2 points")
	// ErrNonFinite is returned for a NaN or ±Inf coordinate.
	ErrNonFinite = errors.New("homology: non-finite coordinate")
	// ErrRagged is returned for rows of different lengths.
	ErrRagged = errors.New("homology: rows of different lengths")
	// ErrSettings is returned for invalid settings.
	ErrSettings = errors.New("homology: invalid settings")
	// ErrDistances is returned for an invalid distance matrix or edge list.
	ErrDistances = errors.New("homology: invalid distances")
	// ErrOverflow is returned when simplex indices of the requested
	// dimension do not fit in 55 bits for this many points.
	ErrOverflow = errors.New("homology: simplex index overflow")
	// ErrMagnitude is returned for a coordinate larger in magnitude
	// than MaxCoordinate.
	ErrMagnitude = errors.New("homology: coordinate too large")
)

// MaxCoordinate is the largest coordinate magnitude accepted. Squared
// differences of larger values, summed over the coordinates, can
// overflow float64 (whose largest value is about 1.8e308): a cloud of
// such points would read as infinitely far apart.
const MaxCoordinate = 1e150

// MemoryError is returned when the estimated memory of a computation
// exceeds the budget Settings.MaxBytes.
type MemoryError struct {
	Estimate int64 // estimated bytes
	Budget   int64 // allowed bytes
	Points   int   // number of points
	What     string
}

// Error names the estimate and the budget and suggests remedies.
func (e *MemoryError) Error() string {
	return fmt.Sprintf("homology: %s: about %s needed, over the budget of %s for %d points; "+
		"subsample with Landmarks (crease barcode --landmarks M), lower the threshold, "+
		"lower the maximal dimension, or raise the memory budget",
		e.What, fmtBytes(e.Estimate), fmtBytes(e.Budget), e.Points)
}

func fmtBytes(b int64) string {
	switch {
	case b >= 1<<30:
		return fmt.Sprintf("%.1f GiB", float64(b)/(1<<30))
	case b >= 1<<20:
		return fmt.Sprintf("%.1f MiB", float64(b)/(1<<20))
	case b >= 1<<10:
		return fmt.Sprintf("%.1f KiB", float64(b)/(1<<10))
	}
	return fmt.Sprintf("%d B", b)
}

// resolved holds validated settings with defaults filled in.
type resolved struct {
	maxDim    int
	threshold float64 // +Inf when unset
	metric    Metric
	k         int
	p         int
	maxBytes  int64
	progress  func(Progress)
}

func resolve(set *Settings) (resolved, error) {
	if set == nil {
		set = DefaultSettings()
	}
	r := resolved{
		maxDim:    set.MaxDim,
		threshold: set.Threshold,
		metric:    set.Metric,
		k:         set.K,
		p:         set.Field,
		maxBytes:  set.MaxBytes,
		progress:  set.Progress,
	}
	if r.maxDim < 0 || r.maxDim > 3 {
		return r, fmt.Errorf("%w: maximal dimension %d outside 0..3", ErrSettings, r.maxDim)
	}
	if math.IsNaN(r.threshold) || r.threshold < 0 {
		return r, fmt.Errorf("%w: threshold %v is negative or NaN", ErrSettings, r.threshold)
	}
	if r.threshold == 0 {
		r.threshold = math.Inf(1)
	}
	if r.metric < Euclidean || r.metric > KNNGeodesic {
		return r, fmt.Errorf("%w: unknown metric %d", ErrSettings, int(r.metric))
	}
	if r.p == 0 {
		r.p = 2
	}
	if r.p < 2 || r.p > MaxField || !isPrime(r.p) {
		return r, fmt.Errorf("%w: field %d is not a prime in 2..%d", ErrSettings, r.p, MaxField)
	}
	if r.maxBytes < 0 {
		return r, fmt.Errorf("%w: negative memory budget %d", ErrSettings, r.maxBytes)
	}
	if r.maxBytes == 0 {
		r.maxBytes = DefaultMaxBytes
	}
	return r, nil
}

func isPrime(p int) bool {
	if p < 2 {
		return false
	}
	for q := 2; q*q <= p; q++ {
		if p%q == 0 {
			return false
		}
	}
	return true
}

// withWorkers returns ctx with set's worker bound, if it has one.
func withWorkers(ctx context.Context, set *Settings) context.Context {
	if set == nil || set.Workers <= 0 {
		return ctx
	}
	return budget.WithWorkers(ctx, set.Workers)
}
