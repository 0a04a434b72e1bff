// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"bytes"
	"fmt"
	"io"
	"io/fs"
	"math"
	"os"

	"google.golang.org/protobuf/encoding/protowire"
)

// Limits bound what Decode accepts from an untrusted file. A nil *Limits
// or a zero field means the default for that field.
type Limits struct {
	// MaxFileBytes bounds the size of the encoded model.
	// Zero means DefaultMaxFileBytes.
	MaxFileBytes int64
	// MaxElements bounds the total number of tensor elements over all
	// initializers and constants, and the element count of any declared
	// input or output shape. Model.Stages applies it again to the
	// weights of all stages together (a shared initializer or a
	// broadcast bias counts once per stage that holds it), and bounds
	// the multiply-adds of fusing by 64 times it. Zero means
	// DefaultMaxElements.
	MaxElements int64
	// MaxDim bounds any single dimension of a tensor or declared shape.
	// Zero means DefaultMaxDim.
	MaxDim int64
	// MaxNodes bounds the number of nodes of the graph, and separately
	// the number of its initializers, its declared inputs and outputs,
	// and the inputs, outputs and attributes of any one node. Each is
	// counted while reading, before anything is stored for it. Zero
	// means DefaultMaxNodes.
	MaxNodes int64
}

// Default limits, used for zero fields of Limits.
const (
	DefaultMaxFileBytes = 256 << 20 // 256 MiB
	DefaultMaxElements  = 64 << 20  // 64 Mi elements (512 MiB as float64)
	DefaultMaxDim       = 1 << 24
	// DefaultMaxNodes is far above what an exported MLP needs (a few
	// nodes per layer), and keeps the stage builder's work small.
	DefaultMaxNodes = 4096
)

func (l *Limits) resolve() Limits {
	r := Limits{DefaultMaxFileBytes, DefaultMaxElements, DefaultMaxDim, DefaultMaxNodes}
	if l == nil {
		return r
	}
	if l.MaxFileBytes > 0 {
		r.MaxFileBytes = l.MaxFileBytes
	}
	if l.MaxElements > 0 {
		r.MaxElements = l.MaxElements
	}
	if l.MaxDim > 0 {
		r.MaxDim = l.MaxDim
	}
	if l.MaxNodes > 0 {
		r.MaxNodes = l.MaxNodes
	}
	return r
}

// Decode reads an ONNX model from r, checks it and sorts its nodes
// topologically. It reads r to the end (at most lim.MaxFileBytes+1
// bytes). A nil lim means the default limits.
//
// Errors are a *FormatError for malformed input, an *UnsupportedError for
// valid input using a feature this package lacks, a *LimitError when a
// limit is exceeded, or the error from r.
func Decode(r io.Reader, lim *Limits) (*Model, error) {
	l := lim.resolve()
	data, err := readAll(r, l.MaxFileBytes)
	if err != nil {
		return nil, err
	}
	return DecodeBytes(data, lim)
}

// DecodeBytes is like [Decode] on an encoded model held in memory. The
// model does not keep a reference to data.
func DecodeBytes(data []byte, lim *Limits) (*Model, error) {
	l := lim.resolve()
	if int64(len(data)) > l.MaxFileBytes {
		return nil, &LimitError{Limit: "MaxFileBytes", Where: "file", Value: int64(len(data)), Max: l.MaxFileBytes}
	}
	d := &decoder{lim: l}
	m, err := d.model(data, false)
	if err != nil {
		return nil, err
	}
	if err := validate(m); err != nil {
		return nil, err
	}
	m.lim = l
	return m, nil
}

// Open decodes the ONNX model in the named file. Errors are wrapped in an
// *fs.PathError naming the file; errors.As still finds the typed error
// inside.
func Open(path string, lim *Limits) (*Model, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	m, err := Decode(f, lim)
	if err != nil {
		return nil, &fs.PathError{Op: "decode", Path: path, Err: err}
	}
	return m, nil
}

// Config is the header of a model: what [DecodeConfig] reads without
// decoding nodes or tensor data.
type Config struct {
	IRVersion                     int64
	Opset                         int64
	OpsetImports                  []OpsetID
	ProducerName, ProducerVersion string
	GraphName                     string
	// Inputs are the graph inputs that are not initializers.
	Inputs  []ValueInfo
	Outputs []ValueInfo
}

// DecodeConfig reads the header of an ONNX model: versions, producer and
// the declared inputs and outputs. It skips nodes and tensor data, and
// does not validate the graph. Errors are as for [Decode].
func DecodeConfig(r io.Reader, lim *Limits) (*Config, error) {
	l := lim.resolve()
	data, err := readAll(r, l.MaxFileBytes)
	if err != nil {
		return nil, err
	}
	d := &decoder{lim: l}
	m, err := d.model(data, true)
	if err != nil {
		return nil, err
	}
	return &Config{
		IRVersion: m.IRVersion, Opset: m.Opset, OpsetImports: m.OpsetImports,
		ProducerName: m.ProducerName, ProducerVersion: m.ProducerVersion,
		GraphName: m.GraphName, Inputs: m.Inputs, Outputs: m.Outputs,
	}, nil
}

// DecodeTensor decodes one serialized TensorProto, such as the input_0.pb
// files of the ONNX conformance cases. Errors are as for [Decode].
func DecodeTensor(r io.Reader, lim *Limits) (*Tensor, error) {
	l := lim.resolve()
	data, err := readAll(r, l.MaxFileBytes)
	if err != nil {
		return nil, err
	}
	d := &decoder{lim: l}
	return d.tensor(data, "tensor")
}

// isTagByte reports whether b can start a protobuf field tag: a field
// number of at least 1 and a wire type other than the groups' (3, 4) and
// the undefined 6 and 7.
func isTagByte(b byte) bool {
	wt := b & 7
	return (wt <= 2 || wt == 5) && (b&0x80 != 0 || b>>3 != 0)
}

// readAll reads r to the end, refusing more than max bytes. A regular
// file (anything with a Stat method reporting one) is refused by its size
// before reading and read into a buffer of that size; a stream is read
// in chunks, so that refusing one costs at most max bytes.
func readAll(r io.Reader, max int64) ([]byte, error) {
	if st, ok := r.(interface{ Stat() (fs.FileInfo, error) }); ok {
		if fi, err := st.Stat(); err == nil && fi.Mode().IsRegular() {
			if fi.Size() > max {
				return nil, &LimitError{Limit: "MaxFileBytes", Where: "file", Value: fi.Size(), Max: max}
			}
			var buf bytes.Buffer
			buf.Grow(int(fi.Size()) + bytes.MinRead)
			n, err := buf.ReadFrom(io.LimitReader(r, max+1))
			if err != nil {
				return nil, err
			}
			if n > max {
				return nil, &LimitError{Limit: "MaxFileBytes", Where: "file", Value: n, Max: max}
			}
			return buf.Bytes(), nil
		}
	}
	if l, ok := r.(interface{ Len() int }); ok && int64(l.Len()) > max {
		// An in-memory reader (bytes.Reader, strings.Reader) knows its length.
		return nil, &LimitError{Limit: "MaxFileBytes", Where: "file", Value: int64(l.Len()), Max: max}
	}
	// Chunks grow from 4 KiB to 1 MiB, so a small stream costs little
	// and a large one few copies.
	chunk := 4 << 10
	var chunks [][]byte
	var n int64
	for {
		c := make([]byte, chunk)
		chunk = min(2*chunk, 1<<20)
		k, err := io.ReadFull(r, c)
		n += int64(k)
		if n > max {
			return nil, &LimitError{Limit: "MaxFileBytes", Where: "file", Value: n, Max: max}
		}
		if len(chunks) == 0 && k > 0 && !isTagByte(c[0]) {
			// A stream that does not start with a protobuf field tag
			// (/dev/zero, a text file) is refused before it is read on.
			return nil, &FormatError{Where: "file", Reason: fmt.Sprintf("first byte %#02x is not a protobuf field tag: not an ONNX file", c[0])}
		}
		chunks = append(chunks, c[:k])
		if err == io.EOF || err == io.ErrUnexpectedEOF {
			break
		}
		if err != nil {
			return nil, err
		}
	}
	if len(chunks) == 1 {
		return chunks[0], nil
	}
	return bytes.Join(chunks, nil), nil
}

// decoder holds the limits and the running element count.
type decoder struct {
	lim      Limits
	elements int64
}

func formatf(where, format string, args ...any) error {
	return &FormatError{Where: where, Reason: fmt.Sprintf(format, args...)}
}

// field is one decoded protobuf field.
type field struct {
	num protowire.Number
	typ protowire.Type
	// v holds the value of varint, fixed32 and fixed64 fields.
	v uint64
	// b holds the payload of length-delimited fields.
	b []byte
}

// fields walks the fields of a message, calling fn for each.
func fields(b []byte, where string, fn func(f field) error) error {
	for len(b) > 0 {
		num, typ, n := protowire.ConsumeTag(b)
		if n < 0 {
			return formatf(where, "bad field tag: %v", protowire.ParseError(n))
		}
		b = b[n:]
		f := field{num: num, typ: typ}
		switch typ {
		case protowire.VarintType:
			f.v, n = protowire.ConsumeVarint(b)
		case protowire.Fixed32Type:
			var v uint32
			v, n = protowire.ConsumeFixed32(b)
			f.v = uint64(v)
		case protowire.Fixed64Type:
			f.v, n = protowire.ConsumeFixed64(b)
		case protowire.BytesType:
			f.b, n = protowire.ConsumeBytes(b)
		default:
			n = protowire.ConsumeFieldValue(num, typ, b)
		}
		if n < 0 {
			return formatf(where, "field %d: %v", num, protowire.ParseError(n))
		}
		b = b[n:]
		if typ == protowire.StartGroupType || typ == protowire.EndGroupType {
			continue // groups are not used by ONNX; skip them
		}
		if err := fn(f); err != nil {
			return err
		}
	}
	return nil
}

func (f field) want(t protowire.Type, where, name string) error {
	if f.typ != t {
		return formatf(where, "field %s (%d) has wire type %d, want %d", name, f.num, f.typ, t)
	}
	return nil
}

func (f field) int64(where, name string) (int64, error) {
	if err := f.want(protowire.VarintType, where, name); err != nil {
		return 0, err
	}
	return int64(f.v), nil
}

func (f field) int32(where, name string) (int32, error) {
	v, err := f.int64(where, name)
	if err != nil {
		return 0, err
	}
	if v < math.MinInt32 || v > math.MaxInt32 {
		return 0, formatf(where, "field %s: %d overflows int32", name, v)
	}
	return int32(v), nil
}

func (f field) str(where, name string) (string, error) {
	if err := f.want(protowire.BytesType, where, name); err != nil {
		return "", err
	}
	return string(f.b), nil
}

func (f field) msg(where, name string) ([]byte, error) {
	if err := f.want(protowire.BytesType, where, name); err != nil {
		return nil, err
	}
	return f.b, nil
}

// countVarints counts the varints in a packed payload and checks that it
// ends on a varint boundary.
func countVarints(b []byte, where, name string) (int, error) {
	n := 0
	for _, c := range b {
		if c < 0x80 {
			n++
		}
	}
	if len(b) > 0 && b[len(b)-1] >= 0x80 {
		return 0, formatf(where, "packed field %s is truncated", name)
	}
	return n, nil
}

// appendVarints appends a repeated varint field, packed or not.
func appendVarints(dst []int64, f field, where, name string) ([]int64, error) {
	switch f.typ {
	case protowire.VarintType:
		return append(dst, int64(f.v)), nil
	case protowire.BytesType:
		n, err := countVarints(f.b, where, name)
		if err != nil {
			return nil, err
		}
		dst = growInt64(dst, n)
		b := f.b
		for len(b) > 0 {
			v, k := protowire.ConsumeVarint(b)
			if k < 0 {
				return nil, formatf(where, "packed field %s: %v", name, protowire.ParseError(k))
			}
			dst = append(dst, int64(v))
			b = b[k:]
		}
		return dst, nil
	}
	return nil, formatf(where, "field %s (%d) has wire type %d, want varint or packed", name, f.num, f.typ)
}

// growInt64 makes room for n more elements, at least doubling the
// capacity so that many small repeated fields cost linear time.
func growInt64(s []int64, n int) []int64 {
	if cap(s)-len(s) < n {
		t := make([]int64, len(s), max(len(s)+n, 2*cap(s)))
		copy(t, s)
		s = t
	}
	return s
}

// growFloat64 is growInt64 for float64.
func growFloat64(s []float64, n int) []float64 {
	if cap(s)-len(s) < n {
		t := make([]float64, len(s), max(len(s)+n, 2*cap(s)))
		copy(t, s)
		s = t
	}
	return s
}

// appendFixed appends a repeated float (size 4) or double (size 8) field,
// packed or not.
func appendFixed(dst []float64, f field, size int, where, name string) ([]float64, error) {
	single := protowire.Fixed32Type
	if size == 8 {
		single = protowire.Fixed64Type
	}
	switch f.typ {
	case single:
		return append(dst, fixedValue(f.v, size)), nil
	case protowire.BytesType:
		if len(f.b)%size != 0 {
			return nil, formatf(where, "packed field %s has %d bytes, not a multiple of %d", name, len(f.b), size)
		}
		dst = growFloat64(dst, len(f.b)/size)
		return appendRaw(dst, f.b, size), nil
	}
	return nil, formatf(where, "field %s (%d) has wire type %d, want fixed%d or packed", name, f.num, f.typ, size*8)
}

func fixedValue(v uint64, size int) float64 {
	if size == 4 {
		return float64(math.Float32frombits(uint32(v)))
	}
	return math.Float64frombits(v)
}

// appendRaw appends little-endian floats of the given size from b.
func appendRaw(dst []float64, b []byte, size int) []float64 {
	for i := 0; i+size <= len(b); i += size {
		if size == 4 {
			u := uint32(b[i]) | uint32(b[i+1])<<8 | uint32(b[i+2])<<16 | uint32(b[i+3])<<24
			dst = append(dst, float64(math.Float32frombits(u)))
		} else {
			var u uint64
			for k := 7; k >= 0; k-- {
				u = u<<8 | uint64(b[i+k])
			}
			dst = append(dst, math.Float64frombits(u))
		}
	}
	return dst
}

// model decodes a ModelProto. With header set, nodes and tensor data are
// skipped.
func (d *decoder) model(b []byte, header bool) (*Model, error) {
	if len(b) == 0 {
		return nil, formatf("file", "empty file")
	}
	m := &Model{}
	var graph []byte
	var sawGraph bool
	err := fields(b, "model", func(f field) error {
		var err error
		switch f.num {
		case 1:
			m.IRVersion, err = f.int64("model", "ir_version")
		case 2:
			m.ProducerName, err = f.str("model", "producer_name")
		case 3:
			m.ProducerVersion, err = f.str("model", "producer_version")
		case 4:
			m.Domain, err = f.str("model", "domain")
		case 5:
			m.ModelVersion, err = f.int64("model", "model_version")
		case 7:
			if sawGraph {
				return formatf("model", "more than one graph")
			}
			sawGraph = true
			graph, err = f.msg("model", "graph")
		case 8:
			var p []byte
			if p, err = f.msg("model", "opset_import"); err != nil {
				return err
			}
			var id OpsetID
			if id, err = opsetID(p); err != nil {
				return err
			}
			m.OpsetImports = append(m.OpsetImports, id)
		}
		return err
	})
	if err != nil {
		return nil, err
	}
	if !sawGraph {
		return nil, formatf("model", "no graph (is this an ONNX model?)")
	}
	if m.IRVersion <= 0 {
		return nil, formatf("model", "ir_version is %d, want a positive version", m.IRVersion)
	}
	for _, id := range m.OpsetImports {
		if id.Domain == "" || id.Domain == "ai.onnx" {
			m.Opset = id.Version
		}
	}
	if err := d.graph(m, graph, header); err != nil {
		return nil, err
	}
	return m, nil
}

func opsetID(b []byte) (OpsetID, error) {
	var id OpsetID
	err := fields(b, "opset_import", func(f field) error {
		var err error
		switch f.num {
		case 1:
			id.Domain, err = f.str("opset_import", "domain")
		case 2:
			id.Version, err = f.int64("opset_import", "version")
		}
		return err
	})
	if err == nil && id.Version < 0 {
		err = formatf("opset_import", "domain %q has negative version %d", id.Domain, id.Version)
	}
	return id, err
}

func (d *decoder) graph(m *Model, b []byte, header bool) error {
	var inputs []ValueInfo
	inits := map[string]bool{}
	var nodeBufs [][]byte
	var nodes, initializers [1]int64
	var declared [2]int64
	err := fields(b, "graph", func(f field) error {
		var err error
		switch f.num {
		case 1:
			if err = d.count(&nodes[0], "graph nodes"); err != nil {
				return err
			}
			var p []byte
			if p, err = f.msg("graph", "node"); err == nil && !header {
				nodeBufs = append(nodeBufs, p)
			}
		case 2:
			m.GraphName, err = f.str("graph", "name")
		case 5:
			if err = d.count(&initializers[0], "graph initializers"); err != nil {
				return err
			}
			var p []byte
			if p, err = f.msg("graph", "initializer"); err != nil {
				return err
			}
			if header {
				name, err := tensorName(p)
				inits[name] = true
				return err
			}
			var t *Tensor
			if t, err = d.tensor(p, "initializer"); err != nil {
				return err
			}
			if inits[t.Name] {
				return formatf(fmt.Sprintf("initializer %q", t.Name), "duplicate initializer name")
			}
			inits[t.Name] = true
			m.Initializers = append(m.Initializers, t)
		case 11, 12:
			var p []byte
			if p, err = f.msg("graph", "input/output"); err != nil {
				return err
			}
			kind := "input"
			if f.num == 12 {
				kind = "output"
			}
			if err = d.count(&declared[f.num-11], "graph "+kind+"s"); err != nil {
				return err
			}
			var v ValueInfo
			if v, err = d.valueInfo(p, kind); err != nil {
				return err
			}
			if f.num == 11 {
				inputs = append(inputs, v)
			} else {
				m.Outputs = append(m.Outputs, v)
			}
		case 15:
			return &UnsupportedError{Where: "graph", Reason: "sparse initializers are not supported"}
		}
		return err
	})
	if err != nil {
		return err
	}
	for _, v := range inputs {
		if !inits[v.Name] {
			m.Inputs = append(m.Inputs, v)
		}
	}
	m.Nodes = make([]*Node, 0, len(nodeBufs))
	for i, p := range nodeBufs {
		n, err := d.node(p, i)
		if err != nil {
			return err
		}
		m.Nodes = append(m.Nodes, n)
	}
	return nil
}

func tensorName(b []byte) (string, error) {
	var name string
	err := fields(b, "initializer", func(f field) error {
		var err error
		if f.num == 8 {
			name, err = f.str("initializer", "name")
		}
		return err
	})
	return name, err
}

func (d *decoder) valueInfo(b []byte, kind string) (ValueInfo, error) {
	v := ValueInfo{}
	var typ []byte
	err := fields(b, kind, func(f field) error {
		var err error
		switch f.num {
		case 1:
			v.Name, err = f.str(kind, "name")
		case 2:
			typ, err = f.msg(kind, "type")
		}
		return err
	})
	if err != nil {
		return v, err
	}
	where := fmt.Sprintf("%s %q", kind, v.Name)
	if typ == nil {
		return v, nil
	}
	var tensorType []byte
	other := false
	err = fields(typ, where, func(f field) error {
		var err error
		switch f.num {
		case 1:
			tensorType, err = f.msg(where, "tensor_type")
		case 4, 5, 8, 9:
			other = true
		}
		return err
	})
	if err != nil {
		return v, err
	}
	if other || tensorType == nil {
		v.nonTensor = other
		return v, nil
	}
	var shape []byte
	err = fields(tensorType, where, func(f field) error {
		var err error
		switch f.num {
		case 1:
			var t int32
			t, err = f.int32(where, "elem_type")
			v.Elem = DataType(t)
		case 2:
			shape, err = f.msg(where, "shape")
			v.HasShape = true
		}
		return err
	})
	if err != nil || shape == nil {
		return v, err
	}
	elems := int64(1)
	err = fields(shape, where, func(f field) error {
		if f.num != 1 {
			return nil
		}
		p, err := f.msg(where, "dim")
		if err != nil {
			return err
		}
		dim := Dim{Value: -1}
		err = fields(p, where, func(f field) error {
			var err error
			switch f.num {
			case 1:
				dim.Value, err = f.int64(where, "dim_value")
				if err == nil && dim.Value < 0 {
					err = formatf(where, "negative dimension %d", dim.Value)
				}
			case 2:
				dim.Param, err = f.str(where, "dim_param")
			}
			return err
		})
		if err != nil {
			return err
		}
		if dim.Value > d.lim.MaxDim {
			return &LimitError{Limit: "MaxDim", Where: where, Value: dim.Value, Max: d.lim.MaxDim}
		}
		if dim.Value > 0 {
			elems, err = mulLimit(elems, dim.Value, d.lim.MaxElements, where)
			if err != nil {
				return err
			}
		}
		if len(v.Shape) >= maxRank {
			return &UnsupportedError{Where: where, Reason: fmt.Sprintf("rank above %d", maxRank)}
		}
		v.Shape = append(v.Shape, dim)
		return nil
	})
	return v, err
}

// maxRank bounds the rank of any tensor or declared shape.
const maxRank = 32

// mulLimit returns a·b, or a LimitError on MaxElements if it exceeds max.
func mulLimit(a, b, max int64, where string) (int64, error) {
	if b != 0 && a > max/b {
		v := a
		if b > 1 && a <= math.MaxInt64/b {
			v = a * b
		}
		return 0, &LimitError{Limit: "MaxElements", Where: where, Value: v, Max: max}
	}
	return a * b, nil
}

// count adds one to *n and returns a LimitError on MaxNodes once *n
// passes it; what names the things counted.
func (d *decoder) count(n *int64, what string) error {
	*n++
	if *n > d.lim.MaxNodes {
		return &LimitError{Limit: "MaxNodes", Where: what, Value: *n, Max: d.lim.MaxNodes}
	}
	return nil
}

// countElements adds k elements to the running total and returns a
// LimitError on MaxElements once it passes the limit.
func (d *decoder) countElements(k int64, where string) error {
	if k > d.lim.MaxElements-d.elements {
		return &LimitError{Limit: "MaxElements", Where: where, Value: d.elements + k, Max: d.lim.MaxElements}
	}
	d.elements += k
	return nil
}

func (d *decoder) node(b []byte, index int) (*Node, error) {
	n := &Node{}
	pre := fmt.Sprintf("node #%d", index)
	var attrs [][]byte
	var ins, outs, nattrs int64
	err := fields(b, pre, func(f field) error {
		var err error
		var s string
		switch f.num {
		case 1:
			if err = d.count(&ins, pre+" inputs"); err != nil {
				return err
			}
			if s, err = f.str(pre, "input"); err == nil {
				n.Inputs = append(n.Inputs, s)
			}
		case 2:
			if err = d.count(&outs, pre+" outputs"); err != nil {
				return err
			}
			if s, err = f.str(pre, "output"); err == nil {
				n.Outputs = append(n.Outputs, s)
			}
		case 3:
			n.Name, err = f.str(pre, "name")
		case 4:
			n.OpType, err = f.str(pre, "op_type")
		case 5:
			if err = d.count(&nattrs, pre+" attributes"); err != nil {
				return err
			}
			var p []byte
			if p, err = f.msg(pre, "attribute"); err == nil {
				attrs = append(attrs, p)
			}
		case 7:
			n.Domain, err = f.str(pre, "domain")
		}
		return err
	})
	if err != nil {
		return nil, err
	}
	where := nodeWhere(n, index)
	if n.OpType == "" {
		return nil, &FormatError{Node: n.Name, Where: where, Reason: "empty op_type"}
	}
	seen := make(map[string]bool, len(attrs))
	for _, p := range attrs {
		a, err := d.attribute(p, n, where)
		if err != nil {
			return nil, err
		}
		if seen[a.Name] {
			return nil, &FormatError{Node: n.Name, Where: where, Reason: fmt.Sprintf("duplicate attribute %q", a.Name)}
		}
		seen[a.Name] = true
		n.Attributes = append(n.Attributes, a)
	}
	return n, nil
}

func (d *decoder) attribute(b []byte, n *Node, where string) (Attribute, error) {
	a := Attribute{}
	var inferred AttrType
	var sub string
	var tensors [][]byte
	var ntensors int64
	err := fields(b, where, func(f field) error {
		var err error
		switch f.num {
		case 1:
			a.Name, err = f.str(where, "attribute name")
		case 20:
			var t int32
			t, err = f.int32(where, "attribute type")
			a.Type = AttrType(t)
		case 2:
			if err = f.want(protowire.Fixed32Type, where, "attribute f"); err == nil {
				a.F = fixedValue(f.v, 4)
				inferred = AttrFloat
			}
		case 3:
			a.I, err = f.int64(where, "attribute i")
			inferred = AttrInt
		case 4:
			a.S, err = f.str(where, "attribute s")
			inferred = AttrString
		case 5:
			var p []byte
			p, err = f.msg(where, "attribute t")
			tensors = append(tensors[:0], p)
			inferred = AttrTensor
		case 6, 11:
			sub = "a subgraph"
		case 22, 23:
			sub = "a sparse tensor"
		case 14, 15:
			sub = "a type"
		case 7:
			// Lists count against MaxElements like tensor data, before
			// they are stored.
			k := int64(1)
			if f.typ == protowire.BytesType {
				k = int64(len(f.b) / 4)
			}
			if err = d.countElements(k, where+" attribute floats"); err != nil {
				return err
			}
			a.Floats, err = appendFixed(a.Floats, f, 4, where, "attribute floats")
			inferred = AttrFloats
		case 8:
			k := 1
			if f.typ == protowire.BytesType {
				if k, err = countVarints(f.b, where, "attribute ints"); err != nil {
					return err
				}
			}
			if err = d.countElements(int64(k), where+" attribute ints"); err != nil {
				return err
			}
			a.Ints, err = appendVarints(a.Ints, f, where, "attribute ints")
			inferred = AttrInts
		case 9:
			if err = d.countElements(1, where+" attribute strings"); err != nil {
				return err
			}
			var s string
			if s, err = f.str(where, "attribute strings"); err == nil {
				a.Strings = append(a.Strings, s)
			}
			inferred = AttrStrings
		case 10:
			if err = d.count(&ntensors, where+" attribute tensors"); err != nil {
				return err
			}
			var p []byte
			if p, err = f.msg(where, "attribute tensors"); err == nil {
				tensors = append(tensors, p)
			}
			inferred = AttrTensors
		}
		return err
	})
	if err != nil {
		return a, err
	}
	if sub != "" || a.Type == AttrGraph || a.Type == AttrGraphs || a.Type > AttrGraphs {
		if sub == "" {
			sub = "an attribute of type " + itoa(int64(a.Type))
		}
		reason := fmt.Sprintf("attribute %q holds %s", a.Name, sub)
		if sub == "a subgraph" {
			reason += " (control flow such as If or Loop is not supported)"
		}
		return a, &UnsupportedError{Node: n.Name, Op: n.OpType, Where: where, Reason: reason}
	}
	if a.Type == 0 {
		a.Type = inferred
	}
	for _, p := range tensors {
		t, err := d.tensor(p, where+" attribute "+a.Name)
		if err != nil {
			var fe *FormatError
			var ue *UnsupportedError
			switch {
			case asFormat(err, &fe):
				fe.Node = n.Name
			case asUnsupported(err, &ue):
				ue.Node, ue.Op = n.Name, n.OpType
			}
			return a, err
		}
		if a.Type == AttrTensor {
			a.T = t
		} else {
			a.Tensors = append(a.Tensors, t)
		}
	}
	return a, nil
}

func asFormat(err error, p **FormatError) bool {
	e, ok := err.(*FormatError)
	*p = e
	return ok
}

func asUnsupported(err error, p **UnsupportedError) bool {
	e, ok := err.(*UnsupportedError)
	*p = e
	return ok
}

// tensor decodes a TensorProto. kind names the context for errors. A
// first pass over the fields reads the header and counts the values of
// each typed data field; values are stored in a second pass, once the
// count matches the dims and fits the limits, so a tensor's memory is
// bounded by what its dims declare.
func (d *decoder) tensor(b []byte, kind string) (*Tensor, error) {
	t := &Tensor{}
	var raw []byte
	var hasRaw, external bool
	// counts of float_data (4), int32_data (5), int64_data (7) and
	// double_data (10) values.
	counts := map[protowire.Number]int64{}
	err := fields(b, kind, func(f field) error {
		var err error
		switch f.num {
		case 1:
			k := 1
			if f.typ == protowire.BytesType {
				if k, err = countVarints(f.b, kind, "dims"); err != nil {
					return err
				}
			}
			if len(t.Dims)+k > maxRank {
				return &UnsupportedError{Where: kind, Reason: fmt.Sprintf("tensor rank above %d", maxRank)}
			}
			t.Dims, err = appendVarints(t.Dims, f, kind, "dims")
		case 2:
			var v int32
			v, err = f.int32(kind, "data_type")
			t.DataType = DataType(v)
		case 3:
			return &UnsupportedError{Where: kind, Reason: "segmented tensors are not supported"}
		case 4, 10:
			size := 4
			if f.num == 10 {
				size = 8
			}
			switch f.typ {
			case protowire.BytesType:
				counts[f.num] += int64(len(f.b) / size)
			default:
				counts[f.num]++
			}
		case 5, 7:
			k := 1
			if f.typ == protowire.BytesType {
				if k, err = countVarints(f.b, kind, "int data"); err != nil {
					return err
				}
			}
			counts[f.num] += int64(k)
		case 8:
			t.Name, err = f.str(kind, "name")
		case 9:
			raw, err = f.msg(kind, "raw_data")
			hasRaw = true
		case 13:
			external = true
		case 14:
			var v int64
			v, err = f.int64(kind, "data_location")
			if v != 0 {
				external = true
			}
		}
		return err
	})
	if err != nil {
		return nil, err
	}
	if t.Name != "" {
		kind = fmt.Sprintf("%s %q", kind, t.Name)
	}
	n := int64(1)
	for _, dim := range t.Dims {
		if dim < 0 {
			return nil, formatf(kind, "negative dimension %d in dims %v", dim, t.Dims)
		}
		if dim > d.lim.MaxDim {
			return nil, &LimitError{Limit: "MaxDim", Where: kind, Value: dim, Max: d.lim.MaxDim}
		}
		if n, err = mulLimit(n, dim, d.lim.MaxElements, kind); err != nil {
			return nil, err
		}
	}
	if err := d.countElements(n, kind); err != nil {
		return nil, err
	}
	if external {
		return nil, &UnsupportedError{Where: kind, Reason: "tensor data stored outside the file (external data) is not supported"}
	}
	if t.DataType == Undefined {
		return nil, formatf(kind, "data_type is not set")
	}
	if !t.DataType.isFloat() && !t.DataType.isInt() {
		return nil, &UnsupportedError{Where: kind, Reason: fmt.Sprintf("element type %v is not supported (want float32 or float64)", t.DataType)}
	}
	count := int(n)
	if hasRaw {
		size := map[DataType]int{Float: 4, Double: 8, Int32: 4, Int64: 8, Bool: 1}[t.DataType]
		if int64(len(raw)) != n*int64(size) {
			return nil, formatf(kind, "raw_data has %d bytes, dims %v of %v need %d", len(raw), t.Dims, t.DataType, n*int64(size))
		}
		switch t.DataType {
		case Float, Double:
			t.Float64 = appendRaw(make([]float64, 0, count), raw, size)
		default:
			t.Int64 = make([]int64, count)
			for i := range t.Int64 {
				switch size {
				case 1:
					t.Int64[i] = int64(raw[i])
				case 4:
					t.Int64[i] = int64(int32(uint32(raw[4*i]) | uint32(raw[4*i+1])<<8 | uint32(raw[4*i+2])<<16 | uint32(raw[4*i+3])<<24))
				case 8:
					var u uint64
					for k := 7; k >= 0; k-- {
						u = u<<8 | uint64(raw[8*i+k])
					}
					t.Int64[i] = int64(u)
				}
			}
		}
		return t, nil
	}
	// Typed fields: the count was taken in the first pass.
	var num protowire.Number
	var name string
	switch t.DataType {
	case Float:
		num, name = 4, "float_data"
	case Double:
		num, name = 10, "double_data"
	case Int32, Bool:
		num, name = 5, "int32_data"
	case Int64:
		num, name = 7, "int64_data"
	}
	if counts[num] != n {
		return nil, formatf(kind, "%s has %d values, dims %v need %d", name, counts[num], t.Dims, n)
	}
	if t.DataType.isFloat() {
		t.Float64 = make([]float64, 0, count)
	} else {
		t.Int64 = make([]int64, 0, count)
	}
	err = fields(b, kind, func(f field) error {
		if f.num != num {
			return nil
		}
		var err error
		switch t.DataType {
		case Float:
			t.Float64, err = appendFixed(t.Float64, f, 4, kind, name)
		case Double:
			t.Float64, err = appendFixed(t.Float64, f, 8, kind, name)
		default:
			t.Int64, err = appendVarints(t.Int64, f, kind, name)
		}
		return err
	})
	if err != nil {
		return nil, err
	}
	if t.DataType == Int32 || t.DataType == Bool {
		for i, v := range t.Int64 {
			t.Int64[i] = int64(int32(v))
		}
	}
	if len(t.Float64)+len(t.Int64) != count {
		return nil, formatf(kind, "%s has %d values, dims %v need %d", name, len(t.Float64)+len(t.Int64), t.Dims, n)
	}
	return t, nil
}
