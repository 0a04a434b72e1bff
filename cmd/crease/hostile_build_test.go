// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

// This file builds the hostile-input corpus of hostile_test.go: ONNX
// models written field by field with protowire, NPY files written byte
// by byte, CSV files and damaged traces. Small files are committed in
// testdata/hostile (go test -run TestHostileCorpus -update-hostile
// rewrites them); large ones are made at test time only, as sparse
// files or by streaming a repeated unit, so that none is committed.

import (
	"bufio"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strings"

	"google.golang.org/protobuf/encoding/protowire"
)

// A chunk is part of a file: raw bytes, a unit repeated many times, or a
// length-delimited protobuf field around other chunks. Sizes are known
// before anything is written, so a 250 MiB field streams from a unit of
// a few bytes.
type chunk interface {
	size() int64
	writeTo(w *bufio.Writer) error
}

type raw []byte

func (r raw) size() int64 { return int64(len(r)) }
func (r raw) writeTo(w *bufio.Writer) error {
	_, err := w.Write(r)
	return err
}

type rep struct {
	unit []byte
	n    int64
}

func (r rep) size() int64 { return int64(len(r.unit)) * r.n }
func (r rep) writeTo(w *bufio.Writer) error {
	for range r.n {
		if _, err := w.Write(r.unit); err != nil {
			return err
		}
	}
	return nil
}

// field is the length-delimited protobuf field num holding parts.
type field struct {
	num   protowire.Number
	parts []chunk
}

func (f field) body() int64 {
	var n int64
	for _, p := range f.parts {
		n += p.size()
	}
	return n
}

func (f field) head() []byte {
	b := protowire.AppendTag(nil, f.num, protowire.BytesType)
	return protowire.AppendVarint(b, uint64(f.body()))
}

func (f field) size() int64 { return int64(len(f.head())) + f.body() }
func (f field) writeTo(w *bufio.Writer) error {
	if _, err := w.Write(f.head()); err != nil {
		return err
	}
	for _, p := range f.parts {
		if err := p.writeTo(w); err != nil {
			return err
		}
	}
	return nil
}

// flatten returns the bytes of small chunks.
func flatten(parts ...chunk) []byte {
	var sb strings.Builder
	w := bufio.NewWriter(&sb)
	for _, p := range parts {
		p.writeTo(w)
	}
	w.Flush()
	return []byte(sb.String())
}

// writeChunks writes parts to path.
func writeChunks(path string, parts ...chunk) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	w := bufio.NewWriterSize(f, 1<<20)
	for _, p := range parts {
		if err := p.writeTo(w); err != nil {
			f.Close()
			return err
		}
	}
	if err := w.Flush(); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}

// Protobuf fields of ONNX's onnx.proto (ModelProto, GraphProto,
// NodeProto, AttributeProto, TensorProto, ValueInfoProto, TypeProto).
func pbStr(num protowire.Number, s string) chunk { return field{num, []chunk{raw(s)}} }
func pbMsg(num protowire.Number, parts ...chunk) chunk {
	return field{num, parts}
}
func pbInt(num protowire.Number, v int64) chunk {
	b := protowire.AppendTag(nil, num, protowire.VarintType)
	return raw(protowire.AppendVarint(b, uint64(v)))
}

// onnxModel is a ModelProto of IR version 7 and opset 13 around graph
// fields.
func onnxModel(graph ...chunk) []chunk {
	return []chunk{pbInt(1, 7), pbMsg(8, pbInt(2, 13)), pbMsg(7, graph...)}
}

// onnxNode is a NodeProto.
func onnxNode(op, name string, ins, outs []string, attrs ...chunk) chunk {
	var parts []chunk
	for _, in := range ins {
		parts = append(parts, pbStr(1, in))
	}
	for _, out := range outs {
		parts = append(parts, pbStr(2, out))
	}
	parts = append(parts, pbStr(3, name), pbStr(4, op))
	for _, a := range attrs {
		parts = append(parts, pbMsg(5, a))
	}
	return pbMsg(1, parts...)
}

// onnxValue is a ValueInfoProto (graph field num: 11 input, 12 output)
// of a tensor of elem type elem (1 float, 11 double); a dimension of −1
// is the symbolic batch "n".
func onnxValue(num protowire.Number, name string, elem int64, dims ...int64) chunk {
	var ds []chunk
	for _, d := range dims {
		if d < 0 {
			ds = append(ds, pbMsg(1, pbStr(2, "n")))
		} else {
			ds = append(ds, pbMsg(1, pbInt(1, d)))
		}
	}
	tensor := pbMsg(1, pbInt(1, elem), pbMsg(2, ds...))
	return pbMsg(num, pbStr(1, name), pbMsg(2, tensor))
}

// onnxDoubles is an initializer (graph field 5) of float64 values.
func onnxDoubles(name string, dims []int64, vals []float64) chunk {
	var parts []chunk
	for _, d := range dims {
		parts = append(parts, pbInt(1, d))
	}
	var data []byte
	for _, v := range vals {
		data = binary.LittleEndian.AppendUint64(data, math.Float64bits(v))
	}
	parts = append(parts, pbInt(2, 11), pbStr(8, name), field{9, []chunk{raw(data)}})
	return pbMsg(5, parts...)
}

// mlpGraph is y = Gemm(Relu(Gemm(x, W1, b1)), W2, b2) in float64, x of
// width in, hidden width h, out outputs, with weights w(i, j).
func mlpGraph(in, h, out int, w func(layer, i, j int) float64) []chunk {
	mat := func(layer, rows, cols int) []float64 {
		v := make([]float64, rows*cols)
		for i := range rows {
			for j := range cols {
				v[i*cols+j] = w(layer, i, j)
			}
		}
		return v
	}
	return []chunk{
		onnxNode("Gemm", "/fc1/Gemm", []string{"x", "W1", "b1"}, []string{"h"}),
		onnxNode("Relu", "/act/Relu", []string{"h"}, []string{"r"}),
		onnxNode("Gemm", "/fc2/Gemm", []string{"r", "W2", "b2"}, []string{"y"}),
		pbStr(2, "hostile"),
		onnxDoubles("W1", []int64{int64(in), int64(h)}, mat(0, in, h)),
		onnxDoubles("b1", []int64{int64(h)}, make([]float64, h)),
		onnxDoubles("W2", []int64{int64(h), int64(out)}, mat(1, h, out)),
		onnxDoubles("b2", []int64{int64(out)}, make([]float64, out)),
		onnxValue(11, "x", 11, -1, int64(in)),
		onnxValue(12, "y", 11, -1, int64(out)),
	}
}

// smallWeights are fixed pseudo-random weights of order one.
func smallWeights(layer, i, j int) float64 {
	return math.Sin(float64(1+layer*97+i*13+j*7)) * 0.8
}

// opChain is a graph named name of n nodes of type op in a chain from x
// to y, each taking the one before and the inputs extra.
func opChain(name, op string, n int, extra ...string) []chunk {
	g := []chunk{pbStr(2, name)}
	prev := "x"
	for k := range n {
		out := fmt.Sprintf("h%d", k)
		if k == n-1 {
			out = "y"
		}
		g = append(g, onnxNode(op, fmt.Sprintf("/%s%d/%s", strings.ToLower(op), k, op), append([]string{prev}, extra...), []string{out}))
		prev = out
	}
	return g
}

// addChain is a graph of adds Add nodes on width w, each adding a
// broadcast bias of w values, a chain that becomes one w×w affine
// stage per Add.
func addChain(w, adds int) []chunk {
	return append(opChain("adds", "Add", adds, "c"),
		onnxDoubles("c", []int64{int64(w)}, make([]float64, w)),
		onnxValue(11, "x", 11, -1, int64(w)),
		onnxValue(12, "y", 11, -1, int64(w)))
}

// reluChain is a graph of n Relu nodes in a chain on width 2.
func reluChain(n int) []chunk {
	return append(opChain("relus", "Relu", n), onnxValue(11, "x", 11, -1, 2), onnxValue(12, "y", 11, -1, 2))
}

// reluGraphWith is a one-Relu graph of width 2 followed by extra
// (possibly huge) graph fields.
func reluGraphWith(extra ...chunk) []chunk {
	g := []chunk{
		onnxNode("Relu", "/act/Relu", []string{"x"}, []string{"y"}),
		pbStr(2, "relu"),
		onnxValue(11, "x", 11, -1, 2),
		onnxValue(12, "y", 11, -1, 2),
	}
	return append(g, extra...)
}

// npyFile is an NPY version 1.0 file with the header dict hdr (padded
// as numpy pads it) and data; headerLen, if not −1, replaces the header
// length field, and cut, if positive, keeps only that many bytes.
func npyFile(hdr string, data []byte, headerLen, cut int) []byte {
	pad := 64 - (10+len(hdr)+1)%64
	if pad == 64 {
		pad = 0
	}
	h := hdr + strings.Repeat(" ", pad) + "\n"
	n := len(h)
	if headerLen >= 0 {
		n = headerLen
	}
	b := append([]byte("\x93NUMPY\x01\x00"), byte(n), byte(n>>8))
	b = append(append(b, h...), data...)
	if cut > 0 {
		b = b[:cut]
	}
	return b
}

// npyFloats is an NPY file of float64 rows × cols from f(i, j).
func npyFloats(rows, cols int, f func(i, j int) float64) []byte {
	var data []byte
	for i := range rows {
		for j := range cols {
			data = binary.LittleEndian.AppendUint64(data, math.Float64bits(f(i, j)))
		}
	}
	return npyFile(fmt.Sprintf("{'descr': '<f8', 'fortran_order': False, 'shape': (%d, %d), }", rows, cols), data, -1, 0)
}

// npyLabels is an NPY file of n int64 labels i mod 2.
func npyLabels(n int) []byte {
	var data []byte
	for i := range n {
		data = binary.LittleEndian.AppendUint64(data, uint64(i%2))
	}
	return npyFile(fmt.Sprintf("{'descr': '<i8', 'fortran_order': False, 'shape': (%d,), }", n), data, -1, 0)
}

// blobs returns the points of two small blobs in dimension d, labeled
// "a" and "b", row i of class i mod 2.
func blobs(i, j int) float64 {
	c := float64(i%2) * 3
	return c + 0.3*math.Sin(float64(1+i*7+j*3))
}

// labeledCSV is a labeled CSV of rows × cols features from f and a
// label column.
func labeledCSV(rows, cols int, f func(i, j int) float64, label func(i int) string) []byte {
	var sb strings.Builder
	for j := range cols {
		fmt.Fprintf(&sb, "x%d,", j)
	}
	sb.WriteString("label\n")
	for i := range rows {
		for j := range cols {
			fmt.Fprintf(&sb, "%v,", f(i, j))
		}
		sb.WriteString(label(i) + "\n")
	}
	return []byte(sb.String())
}

// classesCSV streams a labeled CSV of n classes of three points each in
// the plane.
type classesCSV int

func (c classesCSV) lines() []byte {
	var sb strings.Builder
	sb.WriteString("x,y,label\n")
	for k := range int(c) {
		for p := range 3 {
			fmt.Fprintf(&sb, "%d.%d,%d,c%d\n", k, p, p, k)
		}
	}
	return []byte(sb.String())
}

// damageTrace returns base (a trace's JSON) with edit applied to its
// generic form.
func damageTrace(base []byte, edit func(t map[string]any)) ([]byte, error) {
	var t map[string]any
	if err := json.Unmarshal(base, &t); err != nil {
		return nil, err
	}
	edit(t)
	return json.MarshalIndent(t, "", " ")
}

// firstStage returns stage 1 of a generic trace.
func firstStage(t map[string]any) map[string]any {
	return t["stages"].([]any)[1].(map[string]any)
}

// manyBars sets the H1 bars of every group of every stage to n noisy
// bars (most short, a few long), as a large noisy sample gives.
func manyBars(n int, seed uint64) func(t map[string]any) {
	return func(t map[string]any) {
		rng := rand.New(rand.NewPCG(seed, 7))
		bars := func() []any {
			out := make([]any, n)
			for i := range out {
				b := rng.Float64()
				l := rng.ExpFloat64() * 0.01
				if i%500 == 0 {
					l = 0.5 + rng.Float64()
				}
				out[i] = []any{b, b + l}
			}
			return out
		}
		for _, s := range t["stages"].([]any) {
			st := s.(map[string]any)
			groups := []any{st["whole"]}
			if cs, ok := st["classes"].([]any); ok {
				groups = append(groups, cs...)
			}
			for _, g := range groups {
				gm, ok := g.(map[string]any)
				if !ok || gm == nil {
					continue
				}
				if bs, ok := gm["bars"].([]any); ok && len(bs) > 1 {
					bs[1] = bars()
				}
			}
		}
	}
}

// sparse makes a file of size bytes that holds no data (a hole).
func sparse(path string, size int64) error {
	f, err := os.Create(path)
	if err != nil {
		return err
	}
	if err := f.Truncate(size); err != nil {
		f.Close()
		return err
	}
	return f.Close()
}
