// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package relu

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// checkMatrix returns the dimensions of x, or an error naming the argument
// and the first non-finite entry.
func checkMatrix(name string, x mat.Matrix) (n, d int, err error) {
	if x == nil {
		return 0, 0, fmt.Errorf("relu: %s: nil matrix", name)
	}
	n, d = x.Dims()
	if n == 0 || d == 0 {
		return 0, 0, fmt.Errorf("relu: %s: empty matrix (%d×%d)", name, n, d)
	}
	for i := 0; i < n; i++ {
		for j := 0; j < d; j++ {
			if v := x.At(i, j); math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, 0, fmt.Errorf("relu: %s: row %d, column %d: non-finite value %v", name, i+1, j+1, v)
			}
		}
	}
	return n, d, nil
}

// checkPair validates a stage's input and output samples.
func checkPair(in, out mat.Matrix) (n, din, dout int, err error) {
	n, din, err = checkMatrix("input", in)
	if err != nil {
		return 0, 0, 0, err
	}
	m, dout, err := checkMatrix("output", out)
	if err != nil {
		return 0, 0, 0, err
	}
	if m != n {
		return 0, 0, 0, fmt.Errorf("relu: input has %d rows but output has %d", n, m)
	}
	return n, din, dout, nil
}

// checkLabels accepts nil or n non-negative class indices.
func checkLabels(labels []int, n int) error {
	if labels == nil {
		return nil
	}
	if len(labels) != n {
		return fmt.Errorf("relu: %d labels for %d sample rows", len(labels), n)
	}
	for i, c := range labels {
		if c < 0 {
			return fmt.Errorf("relu: label of row %d is %d, want a class index ≥ 0", i+1, c)
		}
	}
	return nil
}
