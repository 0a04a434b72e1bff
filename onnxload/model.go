// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

// DataType is an ONNX tensor element type (TensorProto.DataType).
type DataType int32

// Element types. Only Float, Double, Int32, Int64 and Bool tensors can be
// decoded; the others are named so that errors can say what was found.
const (
	Undefined  DataType = 0
	Float      DataType = 1
	Uint8      DataType = 2
	Int8       DataType = 3
	Uint16     DataType = 4
	Int16      DataType = 5
	Int32      DataType = 6
	Int64      DataType = 7
	String     DataType = 8
	Bool       DataType = 9
	Float16    DataType = 10
	Double     DataType = 11
	Uint32     DataType = 12
	Uint64     DataType = 13
	Complex64  DataType = 14
	Complex128 DataType = 15
	BFloat16   DataType = 16
)

var dataTypeNames = [...]string{
	"undefined", "float32", "uint8", "int8", "uint16", "int16", "int32", "int64",
	"string", "bool", "float16", "float64", "uint32", "uint64", "complex64",
	"complex128", "bfloat16",
}

// String returns the element type's name, such as "float32".
func (t DataType) String() string {
	if t >= 0 && int(t) < len(dataTypeNames) {
		return dataTypeNames[t]
	}
	return "type(" + itoa(int64(t)) + ")"
}

func (t DataType) isFloat() bool { return t == Float || t == Double }

func (t DataType) isInt() bool { return t == Int32 || t == Int64 || t == Bool }

// Model is a decoded ONNX model. Nodes are in topological order. A Model
// is not changed by any method and is safe for concurrent reads.
type Model struct {
	// IRVersion is the ONNX IR version of the file.
	IRVersion int64
	// Opset is the operator set version of the default ("ai.onnx")
	// domain, 0 if the file imports none.
	Opset int64
	// OpsetImports lists every imported operator set.
	OpsetImports []OpsetID
	// ProducerName and ProducerVersion name the exporting tool.
	ProducerName, ProducerVersion string
	// Domain and ModelVersion are the model's own.
	Domain       string
	ModelVersion int64
	// GraphName is the name of the main graph.
	GraphName string

	// Nodes are the graph's nodes, sorted topologically.
	Nodes []*Node
	// Inputs are the graph inputs that are not initializers.
	Inputs []ValueInfo
	// Outputs are the graph outputs.
	Outputs []ValueInfo
	// Initializers are the graph's constant tensors, in file order.
	Initializers []*Tensor

	// lim holds the limits the model was decoded with; Stages applies
	// MaxElements to the matrices it builds.
	lim Limits
}

// Initializer returns the initializer with the given name, or nil.
func (m *Model) Initializer(name string) *Tensor {
	for _, t := range m.Initializers {
		if t.Name == name {
			return t
		}
	}
	return nil
}

// OpsetID is an imported operator set.
type OpsetID struct {
	Domain  string
	Version int64
}

// Node is one ONNX node.
type Node struct {
	Name, OpType, Domain string
	// Inputs and Outputs are value names; an empty name marks an
	// omitted optional input or output.
	Inputs, Outputs []string
	Attributes      []Attribute
}

// Attr returns the attribute with the given name, or nil.
func (n *Node) Attr(name string) *Attribute {
	for i := range n.Attributes {
		if n.Attributes[i].Name == name {
			return &n.Attributes[i]
		}
	}
	return nil
}

// AttrType is an ONNX attribute type (AttributeProto.AttributeType).
type AttrType int32

// Attribute types that can be decoded. Graph, sparse-tensor and type
// attributes are rejected with an [UnsupportedError].
const (
	AttrFloat   AttrType = 1
	AttrInt     AttrType = 2
	AttrString  AttrType = 3
	AttrTensor  AttrType = 4
	AttrGraph   AttrType = 5
	AttrFloats  AttrType = 6
	AttrInts    AttrType = 7
	AttrStrings AttrType = 8
	AttrTensors AttrType = 9
	AttrGraphs  AttrType = 10
)

// Attribute is a node attribute. Only the field matching Type is set.
type Attribute struct {
	Name    string
	Type    AttrType
	F       float64 // float32 on the wire, converted exactly
	I       int64
	S       string
	T       *Tensor
	Floats  []float64
	Ints    []int64
	Strings []string
	Tensors []*Tensor
}

// Tensor is a dense ONNX tensor. Float and double tensors have their
// values in Float64 (float32 values are converted exactly); int32, int64
// and bool tensors in Int64. Values are in row-major order.
type Tensor struct {
	Name     string
	DataType DataType
	Dims     []int64
	Float64  []float64
	Int64    []int64
}

// Len returns the number of elements, the product of Dims.
func (t *Tensor) Len() int {
	n := 1
	for _, d := range t.Dims {
		n *= int(d)
	}
	return n
}

// ValueInfo describes a graph input or output.
type ValueInfo struct {
	Name string
	// Elem is the element type; Undefined if the type is not given or is
	// not a tensor type.
	Elem DataType
	// Shape is the tensor shape; nil if unknown.
	Shape []Dim
	// HasShape reports whether a shape was given (a scalar has an empty
	// Shape and HasShape true).
	HasShape bool

	nonTensor bool // declared with a sequence, map or optional type
}

// Dim is one dimension of a declared shape: a fixed size, a symbolic
// name such as "batch", or unknown (Value < 0 and Param empty).
type Dim struct {
	Value int64  // -1 unless fixed
	Param string // symbolic name, if any
}

// Fixed reports whether the dimension has a fixed size.
func (d Dim) Fixed() bool { return d.Value >= 0 }

func itoa(v int64) string {
	var b [24]byte
	i := len(b)
	neg := v < 0
	u := uint64(v)
	if neg {
		u = -u
	}
	for {
		i--
		b[i] = byte('0' + u%10)
		u /= 10
		if u == 0 {
			break
		}
	}
	if neg {
		i--
		b[i] = '-'
	}
	return string(b[i:])
}
