// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"bytes"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"testing/iotest"

	"google.golang.org/protobuf/encoding/protowire"

	"crease.dev/crease/onnxload"
)

// pb builds protobuf messages field by field, following the ONNX .proto
// field numbers (onnx/onnx.proto3 of ONNX 1.12).
type pb []byte

func (b pb) varint(num protowire.Number, v int64) pb {
	b = protowire.AppendTag(b, num, protowire.VarintType)
	return protowire.AppendVarint(b, uint64(v))
}

func (b pb) bytes(num protowire.Number, v []byte) pb {
	b = protowire.AppendTag(b, num, protowire.BytesType)
	return protowire.AppendBytes(b, v)
}

func (b pb) str(num protowire.Number, s string) pb { return b.bytes(num, []byte(s)) }

func (b pb) fixed32(num protowire.Number, f float32) pb {
	b = protowire.AppendTag(b, num, protowire.Fixed32Type)
	return protowire.AppendFixed32(b, math.Float32bits(f))
}

func packedVarints(vs ...int64) []byte {
	var b []byte
	for _, v := range vs {
		b = protowire.AppendVarint(b, uint64(v))
	}
	return b
}

func packedFloats(vs ...float32) []byte {
	var b []byte
	for _, v := range vs {
		b = protowire.AppendFixed32(b, math.Float32bits(v))
	}
	return b
}

// valueInfo is a ValueInfoProto of a float tensor; a dim < 0 is
// symbolic ("n").
func valueInfo(name string, dims ...int64) pb {
	var shape pb
	for _, d := range dims {
		var dim pb
		if d < 0 {
			dim = dim.str(2, "n")
		} else {
			dim = dim.varint(1, d)
		}
		shape = shape.bytes(1, dim)
	}
	tt := pb{}.varint(1, 1).bytes(2, shape)
	return pb{}.str(1, name).bytes(2, pb{}.bytes(1, tt))
}

// tinyModel encodes y = LeakyRelu(x·Wᵀ + b, 0.25) with x of shape (n, 2),
// W = [[1, 2], [3, 4]] stored as unpacked float_data, b = [0.5, -0.5]
// stored as packed float_data, and dims of W unpacked, of b packed.
func tinyModel() []byte {
	w := pb{}.varint(1, 2).varint(1, 2).varint(2, 1).str(8, "W")
	for _, v := range []float32{1, 2, 3, 4} {
		w = w.fixed32(4, v)
	}
	b := pb{}.bytes(1, packedVarints(2)).varint(2, 1).str(8, "b").bytes(4, packedFloats(0.5, -0.5))
	gemm := pb{}.str(1, "x").str(1, "W").str(1, "b").str(2, "h").str(3, "/fc/Gemm").str(4, "Gemm").
		bytes(5, pb{}.str(1, "transB").varint(20, 2).varint(3, 1))
	// The attribute type is left out: the decoder infers it.
	act := pb{}.str(1, "h").str(2, "y").str(3, "/act/LeakyRelu").str(4, "LeakyRelu").
		bytes(5, pb{}.str(1, "alpha").fixed32(2, 0.25))
	g := pb{}.bytes(1, act).bytes(1, gemm).str(2, "tiny").bytes(5, w).bytes(5, b).
		bytes(11, valueInfo("x", -1, 2)).bytes(12, valueInfo("y", -1, 2))
	return pb{}.varint(1, 7).str(2, "hand").str(3, "1").bytes(7, g).bytes(8, pb{}.str(1, "").varint(2, 13))
}

func TestDecodeTiny(t *testing.T) {
	for _, c := range []struct {
		name   string
		reader func([]byte) *bytes.Reader
	}{
		{"whole", bytes.NewReader},
	} {
		t.Run(c.name, func(t *testing.T) {
			m, err := onnxload.Decode(c.reader(tinyModel()), nil)
			if err != nil {
				t.Fatal(err)
			}
			checkTiny(t, m)
		})
	}
	// One byte at a time, as iotest.OneByteReader gives it.
	m, err := onnxload.Decode(iotest.OneByteReader(bytes.NewReader(tinyModel())), nil)
	if err != nil {
		t.Fatal(err)
	}
	checkTiny(t, m)
	// A reader error comes back unchanged.
	_, err = onnxload.Decode(iotest.DataErrReader(iotest.ErrReader(iotest.ErrTimeout)), nil)
	if !errors.Is(err, iotest.ErrTimeout) {
		t.Errorf("reader error: got %v, want %v", err, iotest.ErrTimeout)
	}
}

func checkTiny(t *testing.T, m *onnxload.Model) {
	t.Helper()
	if m.IRVersion != 7 || m.Opset != 13 || m.ProducerName != "hand" || m.GraphName != "tiny" {
		t.Errorf("header: %+v", m)
	}
	// The nodes were stored out of order; Decode sorts them.
	if len(m.Nodes) != 2 || m.Nodes[0].OpType != "Gemm" || m.Nodes[1].OpType != "LeakyRelu" {
		t.Fatalf("nodes not sorted: %v, %v", m.Nodes[0].OpType, m.Nodes[1].OpType)
	}
	if a := m.Nodes[1].Attr("alpha"); a == nil || a.Type != onnxload.AttrFloat || a.F != 0.25 {
		t.Errorf("alpha attribute: %+v", a)
	}
	if len(m.Inputs) != 1 || m.Inputs[0].Shape[0].Param != "n" || m.Inputs[0].Shape[1].Value != 2 {
		t.Errorf("inputs: %+v", m.Inputs)
	}
	w := m.Initializer("W")
	if w == nil || len(w.Dims) != 2 || w.Float64[3] != 4 {
		t.Errorf("W: %+v", w)
	}
	st, err := m.Stages(nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(st) != 2 || st[0].Kind != onnxload.Affine || st[1].Kind != onnxload.LeakyReLU || st[1].Alpha != 0.25 {
		t.Fatalf("stages: %+v", st)
	}
	// W·(1, 1) + b = (3.5, 6.5); W·(-1, 0) + b = (-0.5, -3.5) → leaky (-0.125, -0.875).
	if got := st[0].W.At(1, 0); got != 3 {
		t.Errorf("W[1,0] = %v, want 3", got)
	}
}

func TestLimits(t *testing.T) {
	data := tinyModel()
	for _, c := range []struct {
		name  string
		lim   onnxload.Limits
		limit string
	}{
		{"file", onnxload.Limits{MaxFileBytes: int64(len(data)) - 1}, "MaxFileBytes"},
		{"elements", onnxload.Limits{MaxElements: 5}, "MaxElements"},
		{"dim", onnxload.Limits{MaxDim: 1}, "MaxDim"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := onnxload.Decode(bytes.NewReader(data), &c.lim)
			var le *onnxload.LimitError
			if !errors.As(err, &le) || le.Limit != c.limit {
				t.Fatalf("got %v, want a LimitError on %s", err, c.limit)
			}
			if !strings.Contains(err.Error(), c.limit) {
				t.Errorf("error %q does not name the limit", err)
			}
		})
	}
	// At the limits, the model decodes: the tiny model has 6 elements,
	// dims of at most 2.
	if _, err := onnxload.Decode(bytes.NewReader(data), &onnxload.Limits{MaxFileBytes: int64(len(data)), MaxElements: 6, MaxDim: 2}); err != nil {
		t.Errorf("at the limits: %v", err)
	}
}

func TestDecodeConfig(t *testing.T) {
	f, err := os.Open(filepath.Join(fixtureDir, "dynamic_batch.onnx"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	c, err := onnxload.DecodeConfig(f, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Values recorded by testdata/gen/onnx_models.py (torch export with
	// dynamic_axes {0: "batch"} and opset 13).
	if c.Opset != 13 || c.ProducerName != "pytorch" || len(c.Inputs) != 1 || c.Inputs[0].Name != "x" {
		t.Fatalf("config: %+v", c)
	}
	if d := c.Inputs[0].Shape; len(d) != 3 || d[0].Param != "batch" || d[1].Value != 2 || d[2].Value != 4 {
		t.Errorf("input shape %+v, want (batch, 2, 4)", d)
	}
	// DecodeConfig skips the data, so a file whose only fault is in a
	// tensor still gives its header.
	f2, err := os.Open(filepath.Join(malformedDir, "short_raw_data.onnx"))
	if err != nil {
		t.Fatal(err)
	}
	defer f2.Close()
	if _, err := onnxload.DecodeConfig(f2, nil); err != nil {
		t.Errorf("header of a model with bad tensor data: %v", err)
	}
}

func TestDecodeTensorRejects(t *testing.T) {
	for _, c := range []struct {
		name, class string
		b           pb
	}{
		{"bool raw", "", pb{}.varint(1, 3).varint(2, 9).bytes(9, []byte{1, 0, 1})},
		{"int64 packed", "", pb{}.varint(1, 2).varint(2, 7).bytes(7, packedVarints(-1, 5))},
		{"double raw short", "format", pb{}.varint(1, 2).varint(2, 11).bytes(9, make([]byte, 15))},
		{"truncated packed varint", "format", pb{}.varint(1, 1).varint(2, 7).bytes(7, []byte{0x80})},
		{"float data odd bytes", "format", pb{}.varint(1, 1).varint(2, 1).bytes(4, []byte{1, 2, 3})},
		{"uint8", "unsupported", pb{}.varint(1, 1).varint(2, 2).bytes(9, []byte{1})},
		{"segment", "unsupported", pb{}.varint(1, 1).varint(2, 1).bytes(3, nil)},
		{"no data type", "format", pb{}.varint(1, 1)},
		{"dims wire type", "format", append(protowire.AppendTag(nil, 1, protowire.Fixed64Type), make([]byte, 8)...)},
	} {
		t.Run(c.name, func(t *testing.T) {
			x, err := onnxload.DecodeTensor(bytes.NewReader(c.b), nil)
			if c.class == "" {
				if err != nil {
					t.Fatal(err)
				}
				if x.Len() != len(x.Int64) {
					t.Errorf("%d values for dims %v", len(x.Int64), x.Dims)
				}
				return
			}
			if got := errClass(err); got != c.class {
				t.Errorf("got %v (class %q), want class %q", err, got, c.class)
			}
		})
	}
}
