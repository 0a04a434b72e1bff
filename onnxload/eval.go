// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"fmt"
	"math"
)

// EvalNode evaluates one node of a supported operator on whole tensors,
// following the ONNX operator definitions at the given opset, with no
// notion of samples or stages: Gemm (every attribute, C broadcast to the
// output), 2-D MatMul, Add with NumPy broadcasting, the element-wise
// activations, Softmax and LogSoftmax on any axis, Flatten on any axis,
// Identity, inference-mode Dropout (with its mask) and inference-mode
// BatchNormalization. Inputs are float tensors (nil for an omitted
// optional input); missing attributes take their ONNX defaults.
//
// EvalNode is a reference for checking a single operator, such as the
// ONNX backend test cases; [Model.Stages] and [Forward] are the fast path
// for whole models. Errors are an *UnsupportedError for other operators
// or modes and a *FormatError for shapes that do not fit the operator.
func EvalNode(n *Node, opset int64, inputs []*Tensor) ([]*Tensor, error) {
	where := nodeWhere(n, 0)
	bad := func(format string, args ...any) error {
		return &FormatError{Node: n.Name, Where: where, Reason: fmt.Sprintf(format, args...)}
	}
	unsup := func(format string, args ...any) error {
		return &UnsupportedError{Node: n.Name, Op: n.OpType, Where: where, Reason: fmt.Sprintf(format, args...)}
	}
	in := func(k int) *Tensor {
		if k < len(inputs) {
			return inputs[k]
		}
		return nil
	}
	x := in(0)
	if x == nil {
		return nil, bad("missing input 0")
	}
	for k, t := range inputs {
		if t != nil && !t.DataType.isFloat() && !(n.OpType == "Dropout" && k == 2) {
			return nil, unsup("input %d has element type %v", k, t.DataType)
		}
	}
	rank := int64(len(x.Dims))
	axisOf := func(def int64) (int64, error) {
		a := intAttr(n, "axis", def)
		if a < -rank || a >= rank+boolInt(n.OpType == "Flatten") {
			return 0, bad("axis %d out of range for rank %d", a, rank)
		}
		if a < 0 {
			a += rank
		}
		return a, nil
	}
	out := &Tensor{DataType: x.DataType, Dims: append([]int64(nil), x.Dims...), Float64: append([]float64(nil), x.Float64...)}
	switch n.OpType {
	case "Identity":
		return []*Tensor{out}, nil
	case "Dropout":
		if tm := in(2); tm != nil && (len(tm.Int64) != 1 || tm.Int64[0] != 0) {
			return nil, unsup("training_mode is not false")
		}
		mask := &Tensor{DataType: Bool, Dims: out.Dims, Int64: make([]int64, len(out.Float64))}
		for i := range mask.Int64 {
			mask.Int64[i] = 1
		}
		return []*Tensor{out, mask}, nil
	case "Relu", "LeakyRelu", "Elu", "Softplus", "Sigmoid", "Tanh":
		k := map[string]Kind{"Relu": ReLU, "LeakyRelu": LeakyReLU, "Elu": ELU, "Softplus": Softplus, "Sigmoid": Sigmoid, "Tanh": Tanh}[n.OpType]
		alpha := floatAttr(n, "alpha", map[string]float64{"LeakyRelu": 0.01, "Elu": 1}[n.OpType])
		applyRow(k, alpha, out.Float64)
		return []*Tensor{out}, nil
	case "Softmax", "LogSoftmax":
		def := int64(1)
		if opset >= 13 {
			def = -1
		}
		axis, err := axisOf(def)
		if err != nil {
			return nil, err
		}
		outer, mid, inner := prod(x.Dims[:axis]), prod(x.Dims[axis:axis+1]), prod(x.Dims[axis+1:])
		if opset < 13 {
			mid, inner = prod(x.Dims[axis:]), 1
		}
		k := Softmax
		if n.OpType == "LogSoftmax" {
			k = LogSoftmax
		}
		buf := make([]float64, mid)
		for o := 0; o < outer; o++ {
			for i := 0; i < inner; i++ {
				for j := range buf {
					buf[j] = out.Float64[(o*mid+j)*inner+i]
				}
				applyRow(k, 0, buf)
				for j, v := range buf {
					out.Float64[(o*mid+j)*inner+i] = v
				}
			}
		}
		return []*Tensor{out}, nil
	case "Flatten":
		axis, err := axisOf(1)
		if err != nil {
			return nil, err
		}
		out.Dims = []int64{int64(prod(x.Dims[:axis])), int64(prod(x.Dims[axis:]))}
		return []*Tensor{out}, nil
	case "Add":
		y := in(1)
		if y == nil {
			return nil, bad("missing input 1")
		}
		return broadcastAdd(x, y, 1, bad)
	case "MatMul":
		y := in(1)
		if y == nil || len(x.Dims) != 2 || len(y.Dims) != 2 {
			return nil, unsup("only 2-D MatMul is evaluated")
		}
		if x.Dims[1] != y.Dims[0] {
			return nil, bad("MatMul of %v by %v", x.Dims, y.Dims)
		}
		return []*Tensor{matmul(x, y, false, false, 1)}, nil
	case "Gemm":
		y := in(1)
		if y == nil || len(x.Dims) != 2 || len(y.Dims) != 2 {
			return nil, bad("Gemm needs 2-D A and B")
		}
		ta, tb := intAttr(n, "transA", 0) != 0, intAttr(n, "transB", 0) != 0
		ka, kb := x.Dims[1], y.Dims[0]
		if ta {
			ka = x.Dims[0]
		}
		if tb {
			kb = y.Dims[1]
		}
		if ka != kb {
			return nil, bad("Gemm of %v by %v (transA=%v, transB=%v)", x.Dims, y.Dims, ta, tb)
		}
		p := matmul(x, y, ta, tb, floatAttr(n, "alpha", 1))
		c := in(2)
		if c == nil {
			return []*Tensor{p}, nil
		}
		return broadcastAdd(p, c, floatAttr(n, "beta", 1), bad)
	case "BatchNormalization":
		if intAttr(n, "training_mode", 0) != 0 || len(n.Outputs) > 1 && n.Outputs[1] != "" {
			return nil, unsup("training mode is not evaluated")
		}
		if rank < 2 {
			return nil, bad("input of rank %d", rank)
		}
		ch, inner := int(x.Dims[1]), prod(x.Dims[2:])
		var p [4][]float64
		for k := range p {
			t := in(k + 1)
			if t == nil || t.Len() != ch {
				return nil, bad("parameter %d does not have %d values", k+1, ch)
			}
			p[k] = t.Float64
		}
		eps := floatAttr(n, "epsilon", 1e-5)
		for i := range out.Float64 {
			c := (i / inner) % ch
			out.Float64[i] = p[0][c]*(out.Float64[i]-p[2][c])/math.Sqrt(p[3][c]+eps) + p[1][c]
		}
		return []*Tensor{out}, nil
	}
	return nil, unsup("operator %s is not evaluated", n.OpType)
}

func boolInt(v bool) int64 {
	if v {
		return 1
	}
	return 0
}

func prod(d []int64) int {
	p := 1
	for _, v := range d {
		p *= int(v)
	}
	return p
}

// matmul returns alpha·op(a)·op(b) for 2-D a and b.
func matmul(a, b *Tensor, ta, tb bool, alpha float64) *Tensor {
	m, k := int(a.Dims[0]), int(a.Dims[1])
	if ta {
		m, k = k, m
	}
	nn := int(b.Dims[1])
	if tb {
		nn = int(b.Dims[0])
	}
	at := func(i, j int) float64 {
		if ta {
			return a.Float64[j*m+i]
		}
		return a.Float64[i*k+j]
	}
	bt := func(i, j int) float64 {
		if tb {
			return b.Float64[j*k+i]
		}
		return b.Float64[i*nn+j]
	}
	out := &Tensor{DataType: a.DataType, Dims: []int64{int64(m), int64(nn)}, Float64: make([]float64, m*nn)}
	for i := 0; i < m; i++ {
		for j := 0; j < nn; j++ {
			var s float64
			for l := 0; l < k; l++ {
				s += at(i, l) * bt(l, j)
			}
			out.Float64[i*nn+j] = alpha * s
		}
	}
	return out
}

// broadcastAdd returns a + scale·b with NumPy broadcasting.
func broadcastAdd(a, b *Tensor, scale float64, bad func(string, ...any) error) ([]*Tensor, error) {
	r := max(len(a.Dims), len(b.Dims))
	pad := func(d []int64) []int64 {
		p := make([]int64, r)
		for k := range p {
			p[k] = 1
		}
		copy(p[r-len(d):], d)
		return p
	}
	da, db := pad(a.Dims), pad(b.Dims)
	dims := make([]int64, r)
	for k := range dims {
		switch {
		case da[k] == db[k], db[k] == 1:
			dims[k] = da[k]
		case da[k] == 1:
			dims[k] = db[k]
		default:
			return nil, bad("shapes %v and %v do not broadcast", a.Dims, b.Dims)
		}
	}
	out := &Tensor{DataType: a.DataType, Dims: dims, Float64: make([]float64, prod(dims))}
	idx := make([]int64, r)
	offset := func(d []int64) int64 {
		var off, stride int64 = 0, 1
		for k := r - 1; k >= 0; k-- {
			if d[k] != 1 {
				off += idx[k] * stride
			}
			stride *= d[k]
		}
		return off
	}
	for i := range out.Float64 {
		out.Float64[i] = a.Float64[offset(da)] + scale*b.Float64[offset(db)]
		for k := r - 1; k >= 0; k-- {
			idx[k]++
			if idx[k] < dims[k] {
				break
			}
			idx[k] = 0
		}
	}
	return []*Tensor{out}, nil
}
