// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"fmt"
	"math"
	"os"
	"path/filepath"
	"testing"

	onnxgo "github.com/owulveryck/onnx-go"
	"gonum.org/v1/gonum/graph"
	"gonum.org/v1/gonum/graph/simple"
	"gorgonia.org/tensor"

	"crease.dev/crease/onnxload"
)

// refGraph is an onnx-go backend that records what onnx-go v0.5.0
// decodes: the operation applied to each output value, and the tensor
// carried by each named value (initializers, as gorgonia tensors).
type refGraph struct {
	*simple.WeightedDirectedGraph
	ops map[string]onnxgo.Operation
}

type refNode struct {
	id   int64
	name string
	t    tensor.Tensor
}

func (n *refNode) ID() int64                       { return n.id }
func (n *refNode) SetName(s string)                { n.name = s }
func (n *refNode) GetName() string                 { return n.name }
func (n *refNode) SetTensor(t tensor.Tensor) error { n.t = t; return nil }
func (n *refNode) GetTensor() tensor.Tensor        { return n.t }

var (
	_ onnxgo.Backend     = (*refGraph)(nil)
	_ onnxgo.Namer       = (*refNode)(nil)
	_ onnxgo.DataCarrier = (*refNode)(nil)
)

func (g *refGraph) NewNode() graph.Node {
	return &refNode{id: g.WeightedDirectedGraph.NewNode().ID()}
}

func (g *refGraph) ApplyOperation(op onnxgo.Operation, outs ...graph.Node) error {
	if len(outs) > 0 {
		g.ops[outs[0].(*refNode).name] = op
	}
	return nil
}

// refValues returns a gorgonia tensor's values as float64 (float32
// converted exactly) or int64, and its shape.
func refValues(t tensor.Tensor) (f []float64, i []int64, err error) {
	switch d := t.Data().(type) {
	case []float32:
		for _, v := range d {
			f = append(f, float64(v))
		}
	case float32:
		f = []float64{float64(d)}
	case []float64:
		f = d
	case float64:
		f = []float64{d}
	case []int64:
		i = d
	case int64:
		i = []int64{d}
	case []int32:
		for _, v := range d {
			i = append(i, int64(v))
		}
	case []bool:
		for _, v := range d {
			i = append(i, int64(boolToInt(v)))
		}
	case bool:
		i = []int64{int64(boolToInt(d))}
	default:
		err = fmt.Errorf("unexpected gorgonia data %T", d)
	}
	return f, i, err
}

func boolToInt(b bool) int {
	if b {
		return 1
	}
	return 0
}

func sameFloats(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for k := range a {
		if a[k] != b[k] && !(math.IsNaN(a[k]) && math.IsNaN(b[k])) {
			return false
		}
	}
	return true
}

func sameInts(a, b []int64) bool {
	if len(a) != len(b) {
		return false
	}
	for k := range a {
		if a[k] != b[k] {
			return false
		}
	}
	return true
}

func checkTensor(t *testing.T, what string, got *onnxload.Tensor, ref tensor.Tensor) {
	t.Helper()
	f, i, err := refValues(ref)
	if err != nil {
		t.Errorf("%s: %v", what, err)
		return
	}
	if got.Len() != ref.Shape().TotalSize() && !(len(got.Dims) == 0 && ref.Shape().TotalSize() <= 1) {
		t.Errorf("%s: %d elements, onnx-go has shape %v", what, got.Len(), ref.Shape())
	}
	if !sameFloats(got.Float64, f) || !sameInts(got.Int64, i) {
		t.Errorf("%s: values differ from onnx-go's", what)
	}
}

// TestAgreesWithOnnxGo decodes every fixture with onnx-go v0.5.0 (a test
// reference only) and checks that op types, attributes and initializer
// values agree exactly with onnxload's decoding.
func TestAgreesWithOnnxGo(t *testing.T) {
	for _, path := range fixtures(t) {
		t.Run(filepath.Base(path), func(t *testing.T) {
			data, err := os.ReadFile(path)
			if err != nil {
				t.Fatal(err)
			}
			g := &refGraph{WeightedDirectedGraph: simple.NewWeightedDirectedGraph(math.MaxFloat64, -1), ops: map[string]onnxgo.Operation{}}
			ref := onnxgo.NewModel(g)
			if err := ref.UnmarshalBinary(data); err != nil {
				t.Fatalf("onnx-go: %v", err)
			}
			m, err := onnxload.DecodeBytes(data, nil)
			if err != nil {
				t.Fatal(err)
			}
			if len(g.ops) != len(m.Nodes) {
				t.Errorf("onnx-go applied %d operations, onnxload has %d nodes", len(g.ops), len(m.Nodes))
			}
			attrs := 0
			for _, n := range m.Nodes {
				op, ok := g.ops[n.Outputs[0]]
				if !ok {
					t.Errorf("onnx-go has no operation producing %q", n.Outputs[0])
					continue
				}
				if op.Name != n.OpType {
					t.Errorf("node %q: op %s, onnx-go %s", n.Name, n.OpType, op.Name)
				}
				if len(op.Attributes) != len(n.Attributes) {
					t.Errorf("node %q: %d attributes, onnx-go %d", n.Name, len(n.Attributes), len(op.Attributes))
				}
				for _, a := range n.Attributes {
					attrs++
					rv, ok := op.Attributes[a.Name]
					if !ok {
						t.Errorf("node %q: onnx-go lacks attribute %q", n.Name, a.Name)
						continue
					}
					what := fmt.Sprintf("node %q attribute %q", n.Name, a.Name)
					switch v := rv.(type) {
					case float32:
						if float64(v) != a.F {
							t.Errorf("%s: %v, onnx-go %v", what, a.F, v)
						}
					case int64:
						if v != a.I {
							t.Errorf("%s: %v, onnx-go %v", what, a.I, v)
						}
					case string:
						if v != a.S {
							t.Errorf("%s: %q, onnx-go %q", what, a.S, v)
						}
					case []float32:
						f := make([]float64, len(v))
						for k := range v {
							f[k] = float64(v[k])
						}
						if !sameFloats(f, a.Floats) {
							t.Errorf("%s: %v, onnx-go %v", what, a.Floats, v)
						}
					case []int64:
						if !sameInts(v, a.Ints) {
							t.Errorf("%s: %v, onnx-go %v", what, a.Ints, v)
						}
					case tensor.Tensor:
						checkTensor(t, what, a.T, v)
					default:
						t.Errorf("%s: unexpected onnx-go attribute %T", what, rv)
					}
				}
			}
			for _, init := range m.Initializers {
				n, ok := ref.GetNodeByName(init.Name)
				if !ok || n.(*refNode).t == nil {
					t.Errorf("onnx-go has no tensor for initializer %q", init.Name)
					continue
				}
				checkTensor(t, fmt.Sprintf("initializer %q", init.Name), init, n.(*refNode).t)
			}
			t.Logf("%d nodes, %d attributes, %d initializers agree with onnx-go", len(m.Nodes), attrs, len(m.Initializers))
		})
	}
}
