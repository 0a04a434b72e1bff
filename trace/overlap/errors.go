// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Error reports bad input to a measure. Row and Col are 0-based and are
// −1 when they do not apply; the message gives them 1-based, as every
// crease message does.
type Error struct {
	Measure  string // e.g. "silhouette"
	Row, Col int
	Reason   string
}

func (e *Error) Error() string {
	switch {
	case e.Row >= 0 && e.Col >= 0:
		return fmt.Sprintf("overlap: %s: row %d, column %d: %s", e.Measure, e.Row+1, e.Col+1, e.Reason)
	case e.Row >= 0:
		return fmt.Sprintf("overlap: %s: row %d: %s", e.Measure, e.Row+1, e.Reason)
	}
	return fmt.Sprintf("overlap: %s: %s", e.Measure, e.Reason)
}

func errorf(measure string, row, col int, format string, args ...any) *Error {
	return &Error{Measure: measure, Row: row, Col: col, Reason: fmt.Sprintf(format, args...)}
}

// sample is a validated row-major copy of the points with their labels.
type sample struct {
	n, d    int
	x       []float64 // n×d row-major
	labels  []int     // nil when the measure needs none
	classes int       // max label + 1
	count   []int     // members per class index
	present int       // classes with at least one member
}

func (s *sample) row(i int) []float64 { return s.x[i*s.d : (i+1)*s.d] }

// newSample validates x (non-empty, finite) and, if withLabels, the labels
// (one per row, non-negative, at least two classes present).
func newSample(measure string, x mat.Matrix, labels []int, withLabels bool) (*sample, error) {
	if x == nil {
		return nil, errorf(measure, -1, -1, "no sample (nil matrix)")
	}
	if m, ok := x.(interface{ IsEmpty() bool }); ok && m.IsEmpty() {
		return nil, errorf(measure, -1, -1, "empty sample (0 rows)")
	}
	n, d := x.Dims()
	if n == 0 || d == 0 {
		return nil, errorf(measure, -1, -1, "empty sample (%d rows, %d columns)", n, d)
	}
	s := &sample{n: n, d: d, x: make([]float64, n*d)}
	for i := 0; i < n; i++ {
		for j := 0; j < d; j++ {
			v := x.At(i, j)
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return nil, errorf(measure, i, j, "value %v is not finite", v)
			}
			s.x[i*d+j] = v
		}
	}
	if !withLabels {
		return s, nil
	}
	if len(labels) != n {
		return nil, errorf(measure, -1, -1, "%d labels for %d rows", len(labels), n)
	}
	max := 0
	for i, c := range labels {
		if c < 0 {
			return nil, errorf(measure, i, -1, "label %d is negative", c)
		}
		if c > max {
			max = c
		}
	}
	if max >= n+1<<20 {
		return nil, errorf(measure, -1, -1, "label %d is far above the %d rows", max, n)
	}
	s.labels = labels
	s.classes = max + 1
	s.count = make([]int, s.classes)
	for _, c := range labels {
		s.count[c]++
	}
	for _, k := range s.count {
		if k > 0 {
			s.present++
		}
	}
	if s.present < 2 {
		return nil, errorf(measure, -1, -1, "only one class (%d) in the labels; need at least two", labels[0])
	}
	return s, nil
}
