// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"fmt"
	"math"
)

// evalNode evaluates one node of a supported operator on whole tensors,
// following the ONNX operator definitions at the given opset, with no
// notion of samples or stages: Gemm (every attribute, C broadcast to the
// output), 2-D MatMul, Add with NumPy broadcasting, the element-wise
// activations (Clip, PRelu with its slope broadcast to the input, and
// the others of opTable), Softmax and LogSoftmax on any axis, Flatten on
// any axis, Identity, inference-mode Dropout (with its mask) and
// inference-mode BatchNormalization. Inputs are float tensors (nil for
// an omitted optional input); missing attributes take their ONNX
// defaults.
//
// evalNode is a reference for checking a single operator against the
// ONNX backend test cases (conformance_test.go); [Model.Stages] and
// [Forward] are the path models take. Errors are an *UnsupportedError
// for other operators or modes and a *FormatError for shapes that do not
// fit the operator.
func evalNode(n *Node, opset int64, inputs []*Tensor) ([]*Tensor, error) {
	where := nodeWhere(n, 0)
	e := &evalCtx{n: n, opset: opset, inputs: inputs}
	e.bad = func(format string, args ...any) error {
		return &FormatError{Node: n.Name, Where: where, Reason: fmt.Sprintf(format, args...)}
	}
	e.unsup = func(format string, args ...any) error {
		return &UnsupportedError{Node: n.Name, Op: n.OpType, Where: where, Reason: fmt.Sprintf(format, args...)}
	}
	x := e.in(0)
	if x == nil {
		return nil, e.bad("missing input 0")
	}
	for k, t := range inputs {
		if t != nil && !t.DataType.isFloat() && !(n.OpType == "Dropout" && k == 2) {
			return nil, e.unsup("input %d has element type %v", k, t.DataType)
		}
	}
	d, err := checkOp(n, opset, e.unsup, e.bad)
	if err != nil {
		return nil, err
	}
	if d.eval == nil {
		return nil, e.unsup("operator %s is not evaluated", n.OpType)
	}
	e.x = x
	e.rank = int64(len(x.Dims))
	e.out = &Tensor{DataType: x.DataType, Dims: append([]int64(nil), x.Dims...), Float64: append([]float64(nil), x.Float64...)}
	return d.eval(e)
}

// evalCtx is the node evalNode evaluates, with its inputs.
type evalCtx struct {
	n      *Node
	opset  int64
	inputs []*Tensor
	// x is input 0, rank its rank, and out a copy of it to work on.
	x, out     *Tensor
	rank       int64
	bad, unsup func(format string, args ...any) error
}

// in returns input k, or nil if it is absent.
func (e *evalCtx) in(k int) *Tensor {
	if k < len(e.inputs) {
		return e.inputs[k]
	}
	return nil
}

// axis returns the axis attribute, normalised to [0, rank); Flatten
// also allows rank.
func (e *evalCtx) axis(def int64) (int64, error) {
	a := intAttr(e.n, "axis", def)
	if a < -e.rank || a >= e.rank+boolInt(e.n.OpType == "Flatten") {
		return 0, e.bad("axis %d out of range for rank %d", a, e.rank)
	}
	if a < 0 {
		a += e.rank
	}
	return a, nil
}

func evalIdentity(e *evalCtx) ([]*Tensor, error) {
	return []*Tensor{e.out}, nil
}

func evalDropout(e *evalCtx) ([]*Tensor, error) {
	if tm := e.in(2); tm != nil && (len(tm.Int64) != 1 || tm.Int64[0] != 0) {
		return nil, e.unsup("training_mode is not false")
	}
	mask := &Tensor{DataType: Bool, Dims: e.out.Dims, Int64: make([]int64, len(e.out.Float64))}
	for i := range mask.Int64 {
		mask.Int64[i] = 1
	}
	return []*Tensor{e.out, mask}, nil
}

func evalSoftmax(e *evalCtx) ([]*Tensor, error) {
	x, out := e.x, e.out
	def := int64(1)
	if e.opset >= 13 {
		def = -1
	}
	axis, err := e.axis(def)
	if err != nil {
		return nil, err
	}
	outer, mid, inner := prod(x.Dims[:axis]), prod(x.Dims[axis:axis+1]), prod(x.Dims[axis+1:])
	if e.opset < 13 {
		mid, inner = prod(x.Dims[axis:]), 1
	}
	s := &Stage{Kind: Softmax}
	if e.n.OpType == "LogSoftmax" {
		s.Kind = LogSoftmax
	}
	buf := make([]float64, mid)
	for o := 0; o < outer; o++ {
		for i := 0; i < inner; i++ {
			for j := range buf {
				buf[j] = out.Float64[(o*mid+j)*inner+i]
			}
			applyRow(s, buf)
			for j, v := range buf {
				out.Float64[(o*mid+j)*inner+i] = v
			}
		}
	}
	return []*Tensor{out}, nil
}

func evalFlatten(e *evalCtx) ([]*Tensor, error) {
	axis, err := e.axis(1)
	if err != nil {
		return nil, err
	}
	e.out.Dims = []int64{int64(prod(e.x.Dims[:axis])), int64(prod(e.x.Dims[axis:]))}
	return []*Tensor{e.out}, nil
}

func evalAdd(e *evalCtx) ([]*Tensor, error) {
	y := e.in(1)
	if y == nil {
		return nil, e.bad("missing input 1")
	}
	return broadcastAdd(e.x, y, 1, e.bad)
}

func evalMatMul(e *evalCtx) ([]*Tensor, error) {
	x, y := e.x, e.in(1)
	if y == nil || len(x.Dims) != 2 || len(y.Dims) != 2 {
		return nil, e.unsup("only 2-D MatMul is evaluated")
	}
	if x.Dims[1] != y.Dims[0] {
		return nil, e.bad("MatMul of %v by %v", x.Dims, y.Dims)
	}
	return []*Tensor{matmul(x, y, false, false, 1)}, nil
}

func evalGemm(e *evalCtx) ([]*Tensor, error) {
	n, x, y := e.n, e.x, e.in(1)
	if y == nil || len(x.Dims) != 2 || len(y.Dims) != 2 {
		return nil, e.bad("Gemm needs 2-D A and B")
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
		return nil, e.bad("Gemm of %v by %v (transA=%v, transB=%v)", x.Dims, y.Dims, ta, tb)
	}
	p := matmul(x, y, ta, tb, floatAttr(n, "alpha", 1))
	c := e.in(2)
	if c == nil {
		return []*Tensor{p}, nil
	}
	return broadcastAdd(p, c, floatAttr(n, "beta", 1), e.bad)
}

func evalBatchNorm(e *evalCtx) ([]*Tensor, error) {
	n, x, out := e.n, e.x, e.out
	if intAttr(n, "training_mode", 0) != 0 || len(n.Outputs) > 1 && n.Outputs[1] != "" {
		return nil, e.unsup("training mode is not evaluated")
	}
	if e.rank < 2 {
		return nil, e.bad("input of rank %d", e.rank)
	}
	ch, inner := int(x.Dims[1]), prod(x.Dims[2:])
	var p [4][]float64
	for k := range p {
		t := e.in(k + 1)
		if t == nil || t.Len() != ch {
			return nil, e.bad("parameter %d does not have %d values", k+1, ch)
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
