// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
)

func TestApplyActivations(t *testing.T) {
	ln2 := math.Ln2
	for _, c := range []struct {
		name   string
		kind   onnxload.Kind
		alpha  float64
		in     []float64
		want   []float64
		reason string
	}{
		{"relu", onnxload.ReLU, 0, []float64{-2, 0, 3}, []float64{0, 0, 3}, "definition max(x, 0)"},
		{"leaky", onnxload.LeakyReLU, 0.1, []float64{-2, 0, 3}, []float64{-0.2, 0, 3}, "definition"},
		{"elu", onnxload.ELU, 2, []float64{-1000, 0, 3}, []float64{-2, 0, 3}, "α(e^x − 1) → −α as x → −∞"},
		{"sigmoid", onnxload.Sigmoid, 0, []float64{0, -1000, 1000}, []float64{0.5, 0, 1}, "σ(0) = 1/2, limits 0 and 1, no overflow"},
		{"softplus", onnxload.Softplus, 0, []float64{0, -1000, 1000}, []float64{ln2, 0, 1000}, "log(1+e⁰) = ln 2; stable at ±1000"},
		{"tanh", onnxload.Tanh, 0, []float64{0, 20}, []float64{0, 1}, "tanh 0 = 0, tanh 20 = 1 in float64"},
		{"softmax equal", onnxload.Softmax, 0, []float64{1000, 1000, 1000, 1000}, []float64{0.25, 0.25, 0.25, 0.25}, "equal logits give the uniform distribution, even when e^x overflows"},
		{"softmax two", onnxload.Softmax, 0, []float64{0, math.Ln2}, []float64{1.0 / 3, 2.0 / 3}, "e^0 : e^ln2 = 1 : 2"},
		{"log-softmax two", onnxload.LogSoftmax, 0, []float64{0, math.Ln2}, []float64{math.Log(1.0 / 3), math.Log(2.0 / 3)}, "log of the softmax above"},
		{"reshape", onnxload.Reshape, 0, []float64{1, -2}, []float64{1, -2}, "rows unchanged"},
	} {
		t.Run(c.name, func(t *testing.T) {
			s := onnxload.Stage{Kind: c.kind, In: len(c.in), Out: len(c.in), Alpha: c.alpha}
			var dst mat.Dense
			s.Apply(&dst, mat.NewDense(1, len(c.in), c.in))
			for j, w := range c.want {
				if g := dst.At(0, j); math.Abs(g-w) > 1e-15*math.Max(1, math.Abs(w)) {
					t.Errorf("%s: column %d: got %v, want %v (%s)", c.kind, j, g, w, c.reason)
				}
			}
		})
	}
}

func randomRows(n, d int, seed uint64) *mat.Dense {
	rnd := rand.New(rand.NewPCG(seed, seed))
	x := mat.NewDense(n, d, nil)
	for i := 0; i < n; i++ {
		for j := 0; j < d; j++ {
			x.Set(i, j, rnd.Float64())
		}
	}
	return x
}

func digitsStages(t testing.TB, set *onnxload.StageSettings) []onnxload.Stage {
	m, err := onnxload.Open(fixtureDir+"/digits.onnx", nil)
	if err != nil {
		t.Fatal(err)
	}
	st, err := m.Stages(set)
	if err != nil {
		t.Fatal(err)
	}
	return st
}

func TestForwardDeterministic(t *testing.T) {
	st := digitsStages(t, nil)
	x := randomRows(500, 64, 1)
	a, err := onnxload.Forward(t.Context(), st, x, &onnxload.ForwardSettings{Workers: 1})
	if err != nil {
		t.Fatal(err)
	}
	b, err := onnxload.Forward(t.Context(), st, x, &onnxload.ForwardSettings{Workers: 7})
	if err != nil {
		t.Fatal(err)
	}
	for k := range a {
		if !mat.Equal(a[k], b[k]) {
			t.Errorf("stage %d differs between 1 and 7 workers", k)
		}
	}
	// Row i of the batched output equals the output for row i alone.
	one, err := onnxload.Forward(t.Context(), st, x.Slice(123, 124, 0, 64), nil)
	if err != nil {
		t.Fatal(err)
	}
	last := len(st) - 1
	if !mat.EqualApprox(one[last], a[last].Slice(123, 124, 0, 10), 1e-13) {
		t.Errorf("row 123 alone differs from the batched row")
	}
}

func TestForwardErrors(t *testing.T) {
	st := digitsStages(t, nil)
	_, err := onnxload.Forward(t.Context(), st, randomRows(3, 63, 2), nil)
	if err == nil || !strings.Contains(err.Error(), "63") || !strings.Contains(err.Error(), "64") {
		t.Errorf("width mismatch: %v does not name both widths 63 and 64", err)
	}
	bad := append([]onnxload.Stage(nil), st...)
	bad[2].In = 5
	if _, err := onnxload.Forward(t.Context(), bad, randomRows(3, 64, 2), nil); err == nil || !strings.Contains(err.Error(), "input width 5") {
		t.Errorf("stage chain mismatch: %v", err)
	}
	ctx, cancel := context.WithCancel(t.Context())
	cancel()
	if _, err := onnxload.Forward(ctx, st, randomRows(3, 64, 2), nil); !errors.Is(err, context.Canceled) {
		t.Errorf("cancelled: got %v", err)
	}
	var done []int
	_, err = onnxload.Forward(t.Context(), st, randomRows(3, 64, 2), &onnxload.ForwardSettings{Progress: func(d, n int) { done = append(done, d) }})
	if err != nil || len(done) != len(st) || done[len(done)-1] != len(st) {
		t.Errorf("progress: %v, %v", done, err)
	}
}

// TestFuseAffine checks that the fused (layer) view computes the same
// final output and has no two affine stages in a row.
func TestFuseAffine(t *testing.T) {
	for _, path := range fixtures(t) {
		m, err := onnxload.Open(path, nil)
		if err != nil {
			t.Fatal(err)
		}
		plain, err := m.Stages(nil)
		if err != nil {
			t.Fatal(err)
		}
		fused, err := m.Stages(&onnxload.StageSettings{FuseAffine: true})
		if err != nil {
			t.Fatal(err)
		}
		for k := 1; k < len(fused); k++ {
			if fused[k].Kind == onnxload.Affine && fused[k-1].Kind == onnxload.Affine {
				t.Errorf("%s: fused stages %d and %d are both affine", path, k-1, k)
			}
		}
		x := randomRows(20, plain[0].In, 3)
		a, err := onnxload.Forward(t.Context(), plain, x, nil)
		if err != nil {
			t.Fatal(err)
		}
		b, err := onnxload.Forward(t.Context(), fused, x, nil)
		if err != nil {
			t.Fatal(err)
		}
		if !mat.EqualApprox(a[len(a)-1], b[len(b)-1], 1e-12) {
			t.Errorf("%s: fused output differs", path)
		}
	}
}

// chain builds a model by hand: x of shape (n, 2), W 2×2 and c (2).
func chain(nodes ...*onnxload.Node) *onnxload.Model {
	return &onnxload.Model{
		IRVersion: 7, Opset: 13,
		Nodes:   nodes,
		Inputs:  []onnxload.ValueInfo{{Name: "x", Elem: onnxload.Float, HasShape: true, Shape: []onnxload.Dim{{Value: -1, Param: "n"}, {Value: 2}}}},
		Outputs: []onnxload.ValueInfo{{Name: "y"}},
		Initializers: []*onnxload.Tensor{
			{Name: "W", DataType: onnxload.Float, Dims: []int64{2, 2}, Float64: []float64{1, 2, 3, 4}},
			{Name: "c", DataType: onnxload.Float, Dims: []int64{2}, Float64: []float64{1, -1}},
			{Name: "C", DataType: onnxload.Float, Dims: []int64{3, 2}, Float64: make([]float64, 6)},
		},
	}
}

func node(op, name string, in []string, out string, attrs ...onnxload.Attribute) *onnxload.Node {
	return &onnxload.Node{Name: name, OpType: op, Inputs: in, Outputs: []string{out}, Attributes: attrs}
}

func TestStagesUnsupported(t *testing.T) {
	for _, c := range []struct {
		name, node, want string
		m                *onnxload.Model
	}{
		{"branch", "/b/Sigmoid", "branches are not supported", chain(
			node("Gemm", "/fc/Gemm", []string{"x", "W", "c"}, "h"),
			node("Relu", "/act/Relu", []string{"h"}, "r"),
			node("Sigmoid", "/b/Sigmoid", []string{"h"}, "y"))},
		{"residual", "/res/Add", "only chains of stages", chain(
			node("Gemm", "/fc/Gemm", []string{"x", "W", "c"}, "h"),
			node("Relu", "/act/Relu", []string{"h"}, "r"),
			node("Add", "/res/Add", []string{"r", "h"}, "y"))},
		{"transA", "/fc/Gemm", "transA=1", chain(
			node("Gemm", "/fc/Gemm", []string{"x", "W"}, "y", onnxload.Attribute{Name: "transA", Type: onnxload.AttrInt, I: 1}))},
		{"per-sample bias", "/fc/Gemm", "per-sample addend", chain(
			node("Gemm", "/fc/Gemm", []string{"x", "W", "C"}, "y"))},
		{"weights left", "/fc/MatMul", "weights are on the left", chain(
			node("MatMul", "/fc/MatMul", []string{"W", "x"}, "y"))},
		{"softmax batch", "/sm/Softmax", "axis 0", chain(
			node("Softmax", "/sm/Softmax", []string{"x"}, "y", onnxload.Attribute{Name: "axis", Type: onnxload.AttrInt, I: 0}))},
		{"gelu", "/act/Erf", "supported operators: Add, BatchNormalization", chain(
			node("Erf", "/act/Erf", []string{"x"}, "y"))},
		{"output off chain", "", "not the end of the chain", chain(
			node("Relu", "/a/Relu", []string{"x"}, "z"),
			node("Identity", "/id/Identity", []string{"W"}, "y"))},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.m.Stages(nil)
			var ue *onnxload.UnsupportedError
			if !errors.As(err, &ue) {
				t.Fatalf("got %v, want an UnsupportedError", err)
			}
			if ue.Node != c.node || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q (node %q) does not name node %q and %q", err, ue.Node, c.node, c.want)
			}
		})
	}
	two := chain(node("Relu", "/a/Relu", []string{"x"}, "y"))
	two.Inputs = append(two.Inputs, two.Inputs[0])
	two.Inputs[1].Name = "x2"
	if _, err := two.Stages(nil); err == nil || !strings.Contains(err.Error(), "exactly one") {
		t.Errorf("two inputs: %v", err)
	}
}

// TestStagesBoundMatrices checks that a wide declared input cannot make
// the stage builder allocate a huge diagonal matrix: an Add on 10⁵
// features would need a 10⁵×10⁵ weight matrix, above the default
// MaxElements.
func TestStagesBoundMatrices(t *testing.T) {
	m := chain(node("Add", "/wide/Add", []string{"x", "s"}, "y"))
	m.Inputs[0].Shape[1].Value = 100000
	m.Initializers = append(m.Initializers, &onnxload.Tensor{Name: "s", DataType: onnxload.Float, Float64: []float64{1}})
	_, err := m.Stages(nil)
	var le *onnxload.LimitError
	if !errors.As(err, &le) || le.Limit != "MaxElements" {
		t.Fatalf("got %v, want a LimitError on MaxElements", err)
	}
}

// TestStagePieces checks the pieces of each piecewise-linear kind: the
// breakpoints are where the definitions of the functions (ONNX operator
// specifications of Relu, LeakyRelu, PRelu, Clip and HardSigmoid) switch
// formula, and the flat pieces those where the output is constant.
func TestStagePieces(t *testing.T) {
	for _, tc := range []struct {
		name   string
		s      onnxload.Stage
		breaks []float64
		flat   []bool
		ok     bool
	}{
		{"relu", onnxload.Stage{Kind: onnxload.ReLU}, []float64{0}, []bool{true, false}, true},
		{"leaky", onnxload.Stage{Kind: onnxload.LeakyReLU, Alpha: 0.2}, []float64{0}, []bool{false, false}, true},
		{"prelu", onnxload.Stage{Kind: onnxload.PReLU, Slope: []float64{0.1}}, []float64{0}, []bool{false, false}, true},
		{"relu6", onnxload.Stage{Kind: onnxload.ReLU6}, []float64{0, 6}, []bool{true, false, true}, true},
		{"hardtanh", onnxload.Stage{Kind: onnxload.Hardtanh, Alpha: -0.5, Beta: 1.25}, []float64{-0.5, 1.25}, []bool{true, false, true}, true},
		{"clip above only", onnxload.Stage{Kind: onnxload.Hardtanh, Alpha: math.Inf(-1), Beta: 2}, []float64{2}, []bool{false, true}, true},
		// max(0, min(1, x/6 + 1/2)) is 0 below −3 and 1 above 3.
		{"hardsigmoid", onnxload.Stage{Kind: onnxload.HardSigmoid, Alpha: 1.0 / 6, Beta: 0.5}, []float64{-3, 3}, []bool{true, false, true}, true},
		{"hardsigmoid flat", onnxload.Stage{Kind: onnxload.HardSigmoid, Alpha: 0, Beta: 0.5}, nil, nil, false},
		{"empty clip", onnxload.Stage{Kind: onnxload.Hardtanh, Alpha: 1, Beta: 1}, nil, nil, false},
		{"tanh", onnxload.Stage{Kind: onnxload.Tanh}, nil, nil, false},
	} {
		breaks, flat, ok := tc.s.Pieces()
		if ok != tc.ok || !slices.EqualFunc(breaks, tc.breaks, func(a, b float64) bool { return math.Abs(a-b) < 1e-12 }) || !slices.Equal(flat, tc.flat) {
			t.Errorf("%s: Pieces() = %v, %v, %v; want %v, %v, %v", tc.name, breaks, flat, ok, tc.breaks, tc.flat, tc.ok)
		}
	}
}
