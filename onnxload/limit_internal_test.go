// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"bytes"
	"errors"
	"fmt"
	"runtime"
	"strings"
	"testing"

	"google.golang.org/protobuf/encoding/protowire"
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

// pb helpers build protobuf messages field by field.
func pbBytes(b []byte, num protowire.Number, payload []byte) []byte {
	b = protowire.AppendTag(b, num, protowire.BytesType)
	return protowire.AppendBytes(b, payload)
}

func pbVarint(b []byte, num protowire.Number, v uint64) []byte {
	b = protowire.AppendTag(b, num, protowire.VarintType)
	return protowire.AppendVarint(b, v)
}

// pbModel wraps a graph's fields in a ModelProto of IR 7, opset 13.
func pbModel(graph []byte) []byte {
	m := pbVarint(nil, 1, 7)
	m = pbBytes(m, 8, pbVarint(nil, 2, 13))
	return pbBytes(m, 7, graph)
}

// repeat returns n copies of unit.
func repeat(unit []byte, n int) []byte {
	return bytes.Repeat(unit, n)
}

// TestDecoderBounds checks the decoder's limits on what a small file can
// make it store: every case is refused with the LimitError naming the
// limit, having allocated no more than decodePerByte per input byte (the
// bound the fuzz target checks) plus a fixed 1 MiB. Several of these
// once grew memory a hundred times faster than the file.
func TestDecoderBounds(t *testing.T) {
	const perByte, fixed = 64, 1 << 20
	identity := pbBytes(nil, 1, append(append(pbBytes(nil, 1, []byte("x")), pbBytes(nil, 2, []byte("x"))...), pbBytes(nil, 4, []byte("Identity"))...))
	packedDims := pbBytes(nil, 1, repeat([]byte{1}, 1<<20))
	for _, test := range []struct {
		name  string
		data  []byte
		limit string
	}{
		// An empty ValueInfo is two bytes; each once cost a hundred.
		{name: "empty graph outputs", data: pbModel(repeat([]byte{0x62, 0x00}, 1<<20)), limit: "MaxNodes"},
		{name: "empty graph inputs", data: pbModel(repeat([]byte{0x5a, 0x00}, 1<<20)), limit: "MaxNodes"},
		{name: "identity nodes", data: pbModel(repeat(identity, 1<<17)), limit: "MaxNodes"},
		{name: "node inputs", data: pbModel(pbBytes(nil, 1, append(repeat([]byte{0x0a, 0x00}, 1<<20), pbBytes(nil, 4, []byte("Concat"))...))), limit: "MaxNodes"},
		// A packed dims field of a million ones: refused by the rank
		// check before it is stored.
		{name: "packed dims", data: pbModel(pbBytes(nil, 5, append(packedDims, pbVarint(nil, 2, 1)...))), limit: "rank"},
		// Attribute lists count against MaxElements (set low here).
		{name: "attribute ints", data: pbModel(pbBytes(nil, 1, append(pbBytes(nil, 4, []byte("Constant")), pbBytes(nil, 5, append(pbBytes(nil, 1, []byte("value_ints")), pbBytes(nil, 8, repeat([]byte{1}, 1<<20))...))...))), limit: "MaxElements"},
		{name: "attribute floats", data: pbModel(pbBytes(nil, 1, append(pbBytes(nil, 4, []byte("Constant")), pbBytes(nil, 5, append(pbBytes(nil, 1, []byte("value_floats")), pbBytes(nil, 7, make([]byte, 4<<18))...))...))), limit: "MaxElements"},
	} {
		t.Run(test.name, func(t *testing.T) {
			lim := &Limits{MaxElements: 1 << 16}
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			_, err := DecodeBytes(test.data, lim)
			runtime.ReadMemStats(&after)
			var le *LimitError
			var ue *UnsupportedError
			switch {
			case test.limit == "rank":
				if !errors.As(err, &ue) || !strings.Contains(err.Error(), "rank above") {
					t.Fatalf("err = %v, want the rank refused", err)
				}
			case !errors.As(err, &le) || le.Limit != test.limit:
				t.Fatalf("err = %v, want a %s LimitError", err, test.limit)
			case !strings.Contains(err.Error(), "onnxload.Limits."+test.limit+" raises it"):
				t.Errorf("err = %v does not say how to raise the limit", err)
			}
			if got, bound := after.TotalAlloc-before.TotalAlloc, uint64(perByte*len(test.data)+fixed); got > bound {
				t.Errorf("%d bytes of input allocated %d bytes, above %d", len(test.data), got, bound)
			}
			t.Logf("%d bytes: %v (allocated %d)", len(test.data), err, after.TotalAlloc-before.TotalAlloc)
		})
	}
}
