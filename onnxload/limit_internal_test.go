// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"errors"
	"fmt"
	"runtime"
	"strings"
	"testing"
)

// TestTotalWeightLimit checks that MaxElements bounds the weights of
// all stages together: a chain of broadcast biases, each of which
// becomes a w×w identity, is refused once the total passes the limit,
// having allocated no more than the limit (a 487-byte model of 16 such
// Adds on width 8192 once needed 8 GiB).
func TestTotalWeightLimit(t *testing.T) {
	const w, adds = 256, 40 // 40 × 65 536 elements against a limit of 2^20
	m := &Model{IRVersion: 7, Opset: 13, lim: Limits{MaxElements: 1 << 20}}
	m.Inputs = []ValueInfo{{Name: "x", Elem: Float, HasShape: true, Shape: []Dim{{Value: -1, Param: "n"}, {Value: w}}}}
	m.Initializers = []*Tensor{{Name: "c", DataType: Float, Dims: []int64{w}, Float64: make([]float64, w)}}
	prev := "x"
	for k := range adds {
		out := fmt.Sprintf("h%d", k)
		if k == adds-1 {
			out = "y"
		}
		m.Nodes = append(m.Nodes, &Node{Name: fmt.Sprintf("/add%d/Add", k), OpType: "Add", Inputs: []string{prev, "c"}, Outputs: []string{out}})
		prev = out
	}
	m.Outputs = []ValueInfo{{Name: "y"}}
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	_, err := m.Stages(nil)
	runtime.ReadMemStats(&after)
	var le *LimitError
	if !errors.As(err, &le) || le.Limit != "MaxElements" || !strings.Contains(err.Error(), "with the stages' weights before it") {
		t.Fatalf("err = %v, want a MaxElements LimitError on the total", err)
	}
	// The limit is 2^20 elements (8 MiB); allow the bookkeeping twice over.
	if got := after.TotalAlloc - before.TotalAlloc; got > 3*(8<<20) {
		t.Errorf("allocated %d bytes before refusing", got)
	}
}
