// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strings"

	"gonum.org/v1/gonum/mat"
)

// StageSettings control [Model.Stages]. The zero value (or nil) keeps
// every affine map as its own stage.
type StageSettings struct {
	// FuseAffine fuses each run of consecutive affine and reshape stages
	// that holds an affine stage into one affine stage, giving the
	// "layer" view: affine map, then fold.
	FuseAffine bool
}

// batchDim marks the batch size in the int64 tensors that Shape of the
// data produces; the stage builder follows it through Gather, Unsqueeze
// and Concat into a Reshape.
const batchDim = math.MinInt64

// value is what the stage builder knows about a named value: either a
// constant tensor, or the data flowing through the chain.
type value struct {
	konst *Tensor
	// origin lists the nodes that computed a constant (Constant,
	// Transpose, shape arithmetic); they join the stage that uses it.
	origin []string
	// For data: the trailing shape (all dims but the batch) and the
	// index of the stage that produced it (-1 for the graph input).
	shape []int64
	stage int
}

func (v *value) width() int {
	w := 1
	for _, d := range v.shape {
		w *= int(d)
	}
	return w
}

type builder struct {
	m      *Model
	vals   map[string]*value
	uses   map[string]int
	stages []Stage
	// cur is the data value at the end of the chain.
	cur *value
	// pending holds names of pass-through nodes seen before any stage.
	pending []string
	// fused holds, for a node standing for a pattern (patterns), the
	// labels of the nodes it replaces.
	fused map[*Node][]string
	// maxElements bounds the weight elements of all stages built, and
	// built counts them.
	maxElements, built int64
	// matmul marks affine stages made by a bias-free MatMul that an
	// Add may still give a bias.
	matmul map[int]bool
}

// Stages turns the model into an ordered chain of stages. The model must
// have one data input of shape (batch, d₁, …, dₖ) with fixed dᵢ (its
// width is their product) and the graph must be a chain from that input
// to the first output. A nil set means the zero StageSettings.
//
// A graph whose output is its input (or only Identity and Dropout of
// it) has no stages: Stages returns an empty list and no error.
//
// An operator outside [SupportedOps], or a supported one used in a way
// that is not a row-wise map (softmax over the batch, a per-row bias,
// branching), gives an *UnsupportedError naming the node.
func (m *Model) Stages(set *StageSettings) ([]Stage, error) {
	if set == nil {
		set = &StageSettings{}
	}
	b := &builder{m: m, vals: map[string]*value{}, uses: map[string]int{}, matmul: map[int]bool{}}
	b.maxElements = m.lim.resolve().MaxElements
	for _, t := range m.Initializers {
		b.vals[t.Name] = &value{konst: t}
	}
	if len(m.Inputs) != 1 {
		names := make([]string, len(m.Inputs))
		for i, v := range m.Inputs {
			names[i] = v.Name
		}
		return nil, &UnsupportedError{Where: "graph", Reason: fmt.Sprintf("the model has %d data inputs %q; stages need exactly one", len(m.Inputs), names)}
	}
	in := m.Inputs[0]
	where := fmt.Sprintf("input %q", in.Name)
	if !in.HasShape || len(in.Shape) < 2 {
		return nil, &UnsupportedError{Where: where, Reason: "the input must have a declared shape (batch, width, ...)"}
	}
	if in.Elem != Undefined && !in.Elem.isFloat() {
		return nil, &UnsupportedError{Where: where, Reason: fmt.Sprintf("input element type %v is not float32 or float64", in.Elem)}
	}
	shape := make([]int64, len(in.Shape)-1)
	for i, d := range in.Shape[1:] {
		if !d.Fixed() || d.Value == 0 {
			return nil, &UnsupportedError{Where: where, Reason: fmt.Sprintf("dimension %d is %s; all but the batch dimension must be fixed and positive", i+1, dimString(d))}
		}
		shape[i] = d.Value
	}
	b.cur = &value{shape: shape, stage: -1}
	b.vals[in.Name] = b.cur
	nodes, fused := patterns(m, m.Nodes)
	b.fused = fused
	for _, n := range nodes {
		for _, name := range n.Inputs {
			b.uses[name]++
		}
	}
	for _, v := range m.Outputs {
		b.uses[v.Name]++
	}
	for i, n := range nodes {
		if err := b.node(n, i); err != nil {
			return nil, err
		}
	}
	out := m.Outputs[0]
	if v := b.vals[out.Name]; v != b.cur {
		return nil, &UnsupportedError{Where: fmt.Sprintf("output %q", out.Name), Reason: "the first graph output is not the end of the chain of stages"}
	}
	// List each stage's nodes once, in graph order.
	pos := make(map[string]int, len(m.Nodes))
	for i, n := range m.Nodes {
		pos[nodeLabel(n, i)] = i
	}
	for k := range b.stages {
		nodes := b.stages[k].Nodes
		sort.SliceStable(nodes, func(a, c int) bool { return pos[nodes[a]] < pos[nodes[c]] })
		b.stages[k].Nodes = slices.Compact(nodes)
	}
	stages := b.stages
	if set.FuseAffine {
		var err error
		if stages, err = fuse(stages, b.maxElements); err != nil {
			return nil, err
		}
	}
	return stages, nil
}

func dimString(d Dim) string {
	if d.Param != "" {
		return fmt.Sprintf("symbolic %q", d.Param)
	}
	if d.Value < 0 {
		return "unknown"
	}
	return itoa(d.Value)
}

// joinNames joins stage names with "+", dropping repeats.
func joinNames(names []string) string {
	var out []string
	for _, n := range names {
		if len(out) == 0 || out[len(out)-1] != n {
			out = append(out, n)
		}
	}
	return strings.Join(out, "+")
}

// stageName derives a module name from node names such as
// "/layers/0/Gemm" (giving "layers.0").
func stageName(nodes []string) string {
	var names []string
	for _, n := range nodes {
		name := n
		if strings.HasPrefix(n, "/") {
			// PyTorch (1.13 and later) names a node by its module
			// scopes and op, e.g. "/layers/layers.0/Gemm", each scope
			// the module's full dotted name: the innermost is the name
			// named_modules() gives.
			parts := strings.Split(strings.Trim(n, "/"), "/")
			if len(parts) > 1 {
				name = parts[len(parts)-2]
			}
		}
		if len(names) == 0 || names[len(names)-1] != name {
			names = append(names, name)
		}
	}
	return strings.Join(names, "+")
}

// functional reports whether a PyTorch node name has no module scope
// ("/Relu", "/Softmax").
func functional(label string) bool {
	return strings.HasPrefix(label, "/") && !strings.Contains(label[1:], "/")
}

func nodeLabel(n *Node, i int) string {
	if n.Name != "" {
		return n.Name
	}
	return fmt.Sprintf("#%d:%s", i, n.OpType)
}

func (b *builder) unsupported(n *Node, i int, format string, args ...any) error {
	return &UnsupportedError{Node: n.Name, Op: n.OpType, Where: nodeWhere(n, i), Reason: fmt.Sprintf(format, args...)}
}

func (b *builder) malformed(n *Node, i int, format string, args ...any) error {
	return &FormatError{Node: n.Name, Where: nodeWhere(n, i), Reason: fmt.Sprintf(format, args...)}
}

// input returns the value of input k of n, or nil if it is absent.
func (b *builder) input(n *Node, k int) *value {
	if k >= len(n.Inputs) || n.Inputs[k] == "" {
		return nil
	}
	return b.vals[n.Inputs[k]]
}

func (b *builder) setOutput(n *Node, v *value) {
	if len(n.Outputs) > 0 && n.Outputs[0] != "" {
		b.vals[n.Outputs[0]] = v
	}
}

// constOrigins returns the nodes behind the constant inputs of n.
func (b *builder) constOrigins(n *Node) []string {
	var o []string
	for _, name := range n.Inputs {
		if v := b.vals[name]; v != nil && v.konst != nil {
			o = append(o, v.origin...)
		}
	}
	return o
}

// checkSize returns a LimitError if a rows×cols weight matrix would
// exceed MaxElements, alone or with the weights of the stages built so
// far (a small file can reuse one large initializer, or add broadcast
// biases that become identity matrices, many times); otherwise it counts
// the matrix against that total.
func (b *builder) checkSize(n *Node, i int, rows, cols int) error {
	if int64(rows) > b.maxElements/max(int64(cols), 1) {
		return &LimitError{Limit: "MaxElements", Where: nodeWhere(n, i) + " weight matrix", Value: int64(rows) * int64(cols), Max: b.maxElements}
	}
	size := int64(rows) * int64(cols)
	if b.built+size > b.maxElements {
		return &LimitError{Limit: "MaxElements", Where: nodeWhere(n, i) + " weight matrix, with the stages' weights before it", Value: b.built + size, Max: b.maxElements}
	}
	b.built += size
	return nil
}

// push appends a stage fed by the current data value.
func (b *builder) push(n *Node, i int, s Stage, shape []int64) {
	s.Nodes = append(append(b.pending, b.constOrigins(n)...), nodeLabel(n, i))
	if labels := b.fused[n]; labels != nil {
		s.Nodes = append(s.Nodes[:len(s.Nodes)-1], labels...)
	}
	s.Name = stageName([]string{nodeLabel(n, i)})
	if functional(nodeLabel(n, i)) && len(b.stages) > 0 && s.Kind != Affine {
		// A functional activation (F.relu, torch.softmax) belongs to no
		// module: name it after the module it follows.
		s.Name = b.stages[len(b.stages)-1].Name + ":" + s.Kind.String()
	}
	b.pending = nil
	b.stages = append(b.stages, s)
	b.cur = &value{shape: shape, stage: len(b.stages) - 1}
	b.setOutput(n, b.cur)
}

func intAttr(n *Node, name string, def int64) int64 {
	if a := n.Attr(name); a != nil {
		return a.I
	}
	return def
}

func floatAttr(n *Node, name string, def float64) float64 {
	if a := n.Attr(name); a != nil {
		return a.F
	}
	return def
}

func (b *builder) node(n *Node, i int) error {
	d, err := checkOp(n, b.m.Opset,
		func(format string, args ...any) error { return b.unsupported(n, i, format, args...) },
		func(format string, args ...any) error { return b.malformed(n, i, format, args...) })
	if err != nil {
		return err
	}
	if len(n.Outputs) == 0 {
		return b.malformed(n, i, "no outputs")
	}
	// Every non-optional input must be known by now (validation has
	// checked that it is defined and sorted the nodes).
	var data *value
	for k, name := range n.Inputs {
		if name == "" {
			continue
		}
		v := b.vals[name]
		if v == nil {
			return b.unsupported(n, i, "input %q is not a constant or the data chain", name)
		}
		if v.konst == nil {
			if data != nil {
				return b.unsupported(n, i, "more than one input depends on the data; only chains of stages are supported")
			}
			if v != b.cur {
				return b.unsupported(n, i, "input %q is not the end of the chain of stages (branches are not supported)", name)
			}
			if k != 0 && !d.dataIn {
				return b.unsupported(n, i, "input %d of %s depends on the data; only input 0 may", k, n.OpType)
			}
			data = v
		}
	}
	if data == nil {
		// Every input is a constant.
		if d.minIn > 0 && b.input(n, 0) == nil {
			return b.malformed(n, i, "missing input")
		}
		if d.fold == nil {
			return b.unsupported(n, i, "%s of constants is not supported (only %s are folded)", n.OpType, foldedList())
		}
		return d.fold(b, n, i)
	}
	if d.stage == nil {
		return b.unsupported(n, i, "operator %s is not supported on the data", n.OpType)
	}
	return d.stage(b, n, i, data)
}

// constant records the tensor of a Constant node.
func (b *builder) constant(n *Node, i int) error {
	t, err := constantValue(n)
	if err != nil {
		return b.unsupported(n, i, "%v", err)
	}
	b.setOutput(n, &value{konst: t, origin: []string{nodeLabel(n, i)}})
	return nil
}

// shapeOf folds Shape of the data into an int64 constant holding
// batchDim for the batch.
func (b *builder) shapeOf(n *Node, i int, data *value) error {
	full := append([]int64{batchDim}, data.shape...)
	r := int64(len(full))
	start, end := intAttr(n, "start", 0), intAttr(n, "end", r)
	if start < 0 {
		start += r
	}
	if end < 0 {
		end += r
	}
	start, end = min(max(start, 0), r), min(max(end, 0), r)
	if end < start {
		end = start
	}
	vals := append([]int64(nil), full[start:end]...)
	b.setOutput(n, &value{konst: &Tensor{Name: n.Outputs[0], DataType: Int64, Dims: []int64{int64(len(vals))}, Int64: vals}, origin: []string{nodeLabel(n, i)}})
	return nil
}

// passThrough handles Identity and inference-mode Dropout of the data:
// no stage, the node joins the stage that produced its input.
func (b *builder) passThrough(n *Node, i int, data *value) error {
	if n.OpType == "Dropout" {
		if len(n.Outputs) > 1 && n.Outputs[1] != "" && b.uses[n.Outputs[1]] > 0 {
			return b.unsupported(n, i, "the dropout mask output is used; only inference-mode dropout is supported")
		}
		if tm := b.input(n, 2); tm != nil && (len(tm.konst.Int64) != 1 || tm.konst.Int64[0] != 0) {
			return b.unsupported(n, i, "training_mode is not a constant false; only inference-mode dropout is supported")
		}
		if intAttr(n, "is_test", 1) == 0 && b.m.Opset > 0 && b.m.Opset < 7 {
			return b.unsupported(n, i, "is_test=0 (training mode) is not supported")
		}
	}
	if data.stage >= 0 {
		s := &b.stages[data.stage]
		s.Nodes = append(append(s.Nodes, b.constOrigins(n)...), nodeLabel(n, i))
	} else {
		b.pending = append(append(b.pending, b.constOrigins(n)...), nodeLabel(n, i))
	}
	b.setOutput(n, data)
	return nil
}

// softmax handles Softmax and LogSoftmax over the feature axis.
func (b *builder) softmax(n *Node, i int, data *value) error {
	w := data.width()
	rank := int64(len(data.shape) + 1)
	var axis int64
	if b.m.Opset >= 13 {
		axis = intAttr(n, "axis", -1)
	} else {
		axis = intAttr(n, "axis", 1)
	}
	if axis < -rank || axis >= rank {
		return b.malformed(n, i, "axis %d is out of range for rank %d", axis, rank)
	}
	if axis < 0 {
		axis += rank
	}
	rowWise := axis == 1 && (rank == 2 || b.m.Opset < 13)
	if !rowWise {
		return b.unsupported(n, i, "axis %d on data of rank %d is not a map of each sample's row (need axis 1 on 2-D data)", axis, rank)
	}
	k := Softmax
	if n.OpType == "LogSoftmax" {
		k = LogSoftmax
	}
	b.push(n, i, Stage{Kind: k, In: w, Out: w}, []int64{int64(w)})
	return nil
}

func (b *builder) flatten(n *Node, i int, data *value) error {
	w := data.width()
	rank := int64(len(data.shape) + 1)
	axis := intAttr(n, "axis", 1)
	if axis < -rank || axis > rank {
		return b.malformed(n, i, "axis %d is out of range for rank %d", axis, rank)
	}
	if axis < 0 {
		axis += rank
	}
	if axis != 1 && !(axis == rank && rank == 1) {
		return b.unsupported(n, i, "flatten with axis %d merges samples; only axis 1 is supported", axis)
	}
	b.push(n, i, Stage{Kind: Reshape, In: w, Out: w}, []int64{int64(w)})
	return nil
}

func (b *builder) reshapeStage(n *Node, i int, data *value) error {
	w := data.width()
	shape, err := b.reshape(n, i, data)
	if err != nil {
		return err
	}
	b.push(n, i, Stage{Kind: Reshape, In: w, Out: w}, shape)
	return nil
}

func (b *builder) matMul(n *Node, i int, data *value) error {
	w := data.width()
	if b.input(n, 0) != data {
		return b.unsupported(n, i, "the weights are on the left of the data; only x·W is supported")
	}
	if len(data.shape) != 1 {
		return b.unsupported(n, i, "matmul on data of rank %d; only 2-D data is supported", len(data.shape)+1)
	}
	wv := b.input(n, 1)
	if wv == nil {
		return b.malformed(n, i, "missing weight")
	}
	wt := wv.konst
	if len(wt.Dims) != 2 || !wt.DataType.isFloat() {
		return b.unsupported(n, i, "weight %q has dims %v of %v; want a 2-D float matrix", wt.Name, wt.Dims, wt.DataType)
	}
	if int(wt.Dims[0]) != w {
		return b.malformed(n, i, "weight %q has dims %v, but the input width is %d", wt.Name, wt.Dims, w)
	}
	out := int(wt.Dims[1])
	if out == 0 {
		return b.unsupported(n, i, "output width 0")
	}
	if err := b.checkSize(n, i, out, w); err != nil {
		return err
	}
	W := mat.NewDense(out, w, nil)
	W.Copy(mat.NewDense(w, out, wt.Float64).T())
	b.push(n, i, Stage{Kind: Affine, In: w, Out: out, W: W, B: make([]float64, out)}, []int64{int64(out)})
	b.matmul[len(b.stages)-1] = true
	return nil
}

// add folds an Add of a constant into the MatMul stage before it, or
// makes it an affine stage of its own.
func (b *builder) add(n *Node, i int, data *value) error {
	w := data.width()
	v := b.input(n, 0)
	if v == data {
		v = b.input(n, 1)
	}
	if v == nil {
		return b.malformed(n, i, "missing addend")
	}
	c := v.konst
	bias, err := rowBias(c, data.shape, 1)
	if err != nil {
		return b.unsupported(n, i, "%v", err)
	}
	dataName := n.Inputs[0]
	if b.input(n, 0) != data {
		dataName = n.Inputs[1]
	}
	// Fold the bias into the MatMul stage that produced the data,
	// when nothing else reads the MatMul's output.
	if k := data.stage; k >= 0 && k == len(b.stages)-1 && b.uses[dataName] == 1 && b.matmul[k] {
		s := &b.stages[k]
		for j := range s.B {
			s.B[j] += bias[j]
		}
		s.Nodes = append(append(s.Nodes, b.constOrigins(n)...), nodeLabel(n, i))
		b.matmul[k] = false
		b.setOutput(n, data)
		return nil
	}
	if err := b.checkSize(n, i, w, w); err != nil {
		return err
	}
	W := mat.NewDense(w, w, nil)
	for j := 0; j < w; j++ {
		W.Set(j, j, 1)
	}
	b.push(n, i, Stage{Kind: Affine, In: w, Out: w, W: W, B: bias}, data.shape)
	return nil
}

// transposeData refuses a transpose of the data.
func (b *builder) transposeData(n *Node, i int, _ *value) error {
	return b.unsupported(n, i, "transpose of the data mixes samples; only transposes of constants are supported")
}

// rowBias returns scale·c broadcast (NumPy rules, aligned on the right)
// to one sample of trailing shape shape, flattened row-major. A
// dimension of c aligned with the batch must be 1.
func rowBias(c *Tensor, shape []int64, scale float64) ([]float64, error) {
	if !c.DataType.isFloat() {
		return nil, fmt.Errorf("addend %q has element type %v, want float", c.Name, c.DataType)
	}
	out, ok := broadcastTo(c, shape, scale)
	if !ok {
		return nil, fmt.Errorf("addend %q has dims %v, which do not broadcast to one sample of shape %v (a per-sample addend is not a map of each row)", c.Name, c.Dims, shape)
	}
	return out, nil
}

// broadcastTo returns scale·c broadcast (NumPy rules, aligned on the
// right) to shape, flattened row-major, or false if c does not
// broadcast to it. c may have one more dimension than shape, of size 1
// (the batch, for one sample's shape). c must hold floats.
func broadcastTo(c *Tensor, shape []int64, scale float64) ([]float64, bool) {
	if !c.DataType.isFloat() || len(c.Float64) != c.Len() {
		return nil, false
	}
	r := len(shape)
	if len(c.Dims) > r+1 {
		return nil, false
	}
	// cd is c's shape padded on the left to rank r+1.
	cd := make([]int64, r+1)
	for k := range cd {
		cd[k] = 1
	}
	copy(cd[r+1-len(c.Dims):], c.Dims)
	if cd[0] != 1 {
		return nil, false
	}
	cd = cd[1:]
	w := 1
	for k, d := range shape {
		if cd[k] != 1 && cd[k] != d {
			return nil, false
		}
		w *= int(d)
	}
	out := make([]float64, w)
	idx := make([]int64, r)
	for j := range out {
		// Offset of idx in c, with broadcast dimensions fixed at 0.
		off, stride := int64(0), int64(1)
		for k := r - 1; k >= 0; k-- {
			if cd[k] != 1 {
				off += idx[k] * stride
			}
			stride *= cd[k]
		}
		out[j] = scale * c.Float64[off]
		for k := r - 1; k >= 0; k-- {
			idx[k]++
			if idx[k] < shape[k] {
				break
			}
			idx[k] = 0
		}
	}
	return out, true
}

func (b *builder) gemm(n *Node, i int, data *value) error {
	if b.input(n, 0) != data {
		return b.unsupported(n, i, "the data is not input A; only A·B with A the data is supported")
	}
	if len(data.shape) != 1 {
		return b.unsupported(n, i, "gemm on data of rank %d", len(data.shape)+1)
	}
	if intAttr(n, "transA", 0) != 0 {
		return b.unsupported(n, i, "transA=1 on the data would mix samples")
	}
	alpha := floatAttr(n, "alpha", 1)
	beta := floatAttr(n, "beta", 1)
	transB := intAttr(n, "transB", 0) != 0
	w := data.width()
	bt := b.input(n, 1).konst
	if len(bt.Dims) != 2 || !bt.DataType.isFloat() {
		return b.unsupported(n, i, "B %q has dims %v of %v; want a 2-D float matrix", bt.Name, bt.Dims, bt.DataType)
	}
	r, c := int(bt.Dims[0]), int(bt.Dims[1])
	in, out := r, c
	if transB {
		in, out = c, r
	}
	if in != w {
		return b.malformed(n, i, "B %q has dims %v (transB=%v), but the input width is %d", bt.Name, bt.Dims, transB, w)
	}
	if out == 0 {
		return b.unsupported(n, i, "output width 0")
	}
	if err := b.checkSize(n, i, out, in); err != nil {
		return err
	}
	W := mat.NewDense(out, in, nil)
	src := mat.NewDense(r, c, bt.Float64)
	if transB {
		W.Copy(src)
	} else {
		W.Copy(src.T())
	}
	W.Scale(alpha, W)
	bias := make([]float64, out)
	if cv := b.input(n, 2); cv != nil {
		var err error
		if bias, err = rowBias(cv.konst, []int64{int64(out)}, beta); err != nil {
			return b.unsupported(n, i, "%v", err)
		}
	}
	b.push(n, i, Stage{Kind: Affine, In: in, Out: out, W: W, B: bias}, []int64{int64(out)})
	return nil
}

func (b *builder) batchNorm(n *Node, i int, data *value) error {
	if intAttr(n, "training_mode", 0) != 0 {
		return b.unsupported(n, i, "training_mode=1; only inference-mode batch normalization is supported")
	}
	for _, o := range n.Outputs[1:] {
		if o != "" && b.uses[o] > 0 {
			return b.unsupported(n, i, "the running statistics outputs are used (training mode)")
		}
	}
	if intAttr(n, "spatial", 1) == 0 {
		return b.unsupported(n, i, "spatial=0 is not supported")
	}
	eps := floatAttr(n, "epsilon", 1e-5)
	ch := int(data.shape[0])
	inner := data.width() / ch
	var p [4][]float64
	for k := range p {
		t := b.input(n, k+1).konst
		if !t.DataType.isFloat() || t.Len() != ch || len(t.Dims) != 1 {
			return b.malformed(n, i, "%s %q has dims %v of %v, want (%d) floats", []string{"scale", "B", "mean", "var"}[k], t.Name, t.Dims, t.DataType, ch)
		}
		p[k] = t.Float64
	}
	w := data.width()
	if err := b.checkSize(n, i, w, w); err != nil {
		return err
	}
	W := mat.NewDense(w, w, nil)
	bias := make([]float64, w)
	for c := 0; c < ch; c++ {
		g := p[0][c] / math.Sqrt(p[3][c]+eps)
		for k := 0; k < inner; k++ {
			j := c*inner + k
			W.Set(j, j, g)
			bias[j] = p[1][c] - p[2][c]*g
		}
	}
	b.push(n, i, Stage{Kind: Affine, In: w, Out: w, W: W, B: bias}, data.shape)
	return nil
}

// reshape returns the trailing shape after a Reshape of the data, which
// must keep the batch as the first dimension.
func (b *builder) reshape(n *Node, i int, data *value) ([]int64, error) {
	st := b.input(n, 1).konst
	if st.DataType != Int64 || len(st.Dims) != 1 || len(st.Int64) < 1 {
		return nil, b.unsupported(n, i, "shape %q must be a 1-D int64 constant", st.Name)
	}
	if intAttr(n, "allowzero", 0) != 0 {
		for _, v := range st.Int64 {
			if v == 0 {
				return nil, b.unsupported(n, i, "allowzero=1 with a zero in the shape")
			}
		}
	}
	s := append([]int64(nil), st.Int64...)
	if s[0] == batchDim {
		s[0] = 0
	}
	w := int64(data.width())
	rest := append([]int64(nil), s[1:]...)
	for _, v := range rest {
		if v == batchDim {
			return nil, b.unsupported(n, i, "the shape moves the batch dimension")
		}
	}
	known := int64(1)
	infer := -1
	for k, v := range rest {
		switch {
		case v == -1 && infer < 0:
			infer = k
		case v == 0:
			if k+1 < len(data.shape)+1 {
				rest[k] = data.shape[k]
				known *= rest[k]
			} else {
				return nil, b.malformed(n, i, "shape %v copies dimension %d, which the data lacks", s, k+1)
			}
		case v <= 0:
			return nil, b.malformed(n, i, "shape %v has a bad entry %d", s, v)
		default:
			if known > math.MaxInt32 || v > math.MaxInt32 {
				return nil, b.malformed(n, i, "shape %v is too large", s)
			}
			known *= v
		}
	}
	if s[0] == -1 && infer >= 0 {
		return nil, b.malformed(n, i, "shape %v has two -1 entries", s)
	}
	if s[0] < -1 {
		return nil, b.malformed(n, i, "shape %v has a bad entry %d", s, s[0])
	}
	if infer >= 0 {
		if known == 0 || w%known != 0 {
			return nil, b.malformed(n, i, "shape %v does not fit a row of width %d", s, w)
		}
		rest[infer] = w / known
	} else if known != w {
		return nil, b.unsupported(n, i, "shape %v changes the row width %d; only reshapes that keep the batch as the first dimension are supported", s, w)
	}
	if len(rest) == 0 {
		return nil, b.unsupported(n, i, "shape %v drops the feature dimensions", s)
	}
	return rest, nil
}

// foldIdentity folds Identity and Dropout of a constant.
func (b *builder) foldIdentity(n *Node, i int) error {
	t := b.input(n, 0).konst
	b.setOutput(n, &value{konst: t, origin: append(b.constOrigins(n), nodeLabel(n, i))})
	return nil
}

// foldTranspose folds the transpose of a constant matrix.
func (b *builder) foldTranspose(n *Node, i int) error {
	t := b.input(n, 0).konst
	if len(t.Dims) != 2 || !t.DataType.isFloat() {
		return b.unsupported(n, i, "transpose of a constant with dims %v of %v; only 2-D float matrices", t.Dims, t.DataType)
	}
	if a := n.Attr("perm"); a != nil && !(len(a.Ints) == 2 && a.Ints[0] == 1 && a.Ints[1] == 0) {
		if len(a.Ints) == 2 && a.Ints[0] == 0 && a.Ints[1] == 1 {
			b.setOutput(n, &value{konst: t, origin: append(b.constOrigins(n), nodeLabel(n, i))})
			return nil
		}
		return b.malformed(n, i, "perm %v is not a permutation of 2 axes", a.Ints)
	}
	r, c := int(t.Dims[0]), int(t.Dims[1])
	var d mat.Dense
	if r*c > 0 {
		d.CloneFrom(mat.NewDense(r, c, t.Float64).T())
	}
	out := &Tensor{Name: n.Outputs[0], DataType: t.DataType, Dims: []int64{int64(c), int64(r)}, Float64: make([]float64, 0, r*c)}
	for k := 0; k < c && r > 0; k++ {
		out.Float64 = append(out.Float64, d.RawRowView(k)...)
	}
	b.setOutput(n, &value{konst: out, origin: append(b.constOrigins(n), nodeLabel(n, i))})
	return nil
}

// foldShape folds Gather, Unsqueeze and Concat of shape arithmetic.
func (b *builder) foldShape(n *Node, i int) error {
	out, err := foldShapeOp(n, b, i)
	if err != nil {
		return err
	}
	b.setOutput(n, &value{konst: out, origin: append(b.constOrigins(n), nodeLabel(n, i))})
	return nil
}

// foldShapeOp folds Gather, Unsqueeze and Concat on small int64 tensors,
// the shape arithmetic exporters emit around Reshape.
func foldShapeOp(n *Node, b *builder, i int) (*Tensor, error) {
	in := b.input(n, 0).konst
	if in.DataType != Int64 || len(in.Dims) > 1 {
		return nil, b.unsupported(n, i, "%s of a %v tensor of rank %d; only shape arithmetic on 1-D int64 tensors is folded", n.OpType, in.DataType, len(in.Dims))
	}
	out := &Tensor{Name: n.Outputs[0], DataType: Int64}
	switch n.OpType {
	case "Gather":
		idx := b.input(n, 1).konst
		if idx.DataType != Int64 || len(idx.Dims) > 1 || intAttr(n, "axis", 0) != 0 || len(in.Dims) != 1 {
			return nil, b.unsupported(n, i, "only Gather of 1-D int64 values along axis 0 by int64 indices is folded")
		}
		for _, k := range idx.Int64 {
			if k < 0 {
				k += int64(len(in.Int64))
			}
			if k < 0 || k >= int64(len(in.Int64)) {
				return nil, b.malformed(n, i, "index %d out of range for %d values", k, len(in.Int64))
			}
			out.Int64 = append(out.Int64, in.Int64[k])
		}
		out.Dims = append([]int64(nil), idx.Dims...)
	case "Unsqueeze":
		axes := []int64(nil)
		if a := n.Attr("axes"); a != nil {
			axes = a.Ints
		} else if ax := b.input(n, 1); ax != nil && ax.konst.DataType == Int64 {
			axes = ax.konst.Int64
		}
		if len(in.Dims) != 0 || len(axes) != 1 || (axes[0] != 0 && axes[0] != -1) {
			return nil, b.unsupported(n, i, "only Unsqueeze of a scalar to a 1-D tensor is folded")
		}
		out.Dims, out.Int64 = []int64{1}, append([]int64(nil), in.Int64...)
	case "Concat":
		if a := intAttr(n, "axis", 0); a != 0 && a != -1 {
			return nil, b.unsupported(n, i, "only Concat along axis 0 is folded")
		}
		for k := range n.Inputs {
			t := b.input(n, k)
			if t == nil || t.konst.DataType != Int64 || len(t.konst.Dims) != 1 {
				return nil, b.unsupported(n, i, "only Concat of 1-D int64 tensors is folded")
			}
			out.Int64 = append(out.Int64, t.konst.Int64...)
		}
		out.Dims = []int64{int64(len(out.Int64))}
	}
	return out, nil
}

// constantValue returns the tensor held by a Constant node.
func constantValue(n *Node) (*Tensor, error) {
	if len(n.Attributes) != 1 {
		return nil, fmt.Errorf("constant has %d attributes, want 1", len(n.Attributes))
	}
	a := n.Attributes[0]
	t := &Tensor{Name: n.Outputs[0]}
	switch a.Name {
	case "value":
		if a.T == nil {
			return nil, fmt.Errorf("constant value is not a tensor")
		}
		c := *a.T
		c.Name = t.Name
		return &c, nil
	case "value_float":
		t.DataType, t.Float64 = Float, []float64{a.F}
	case "value_floats":
		t.DataType, t.Dims, t.Float64 = Float, []int64{int64(len(a.Floats))}, a.Floats
	case "value_int":
		t.DataType, t.Int64 = Int64, []int64{a.I}
	case "value_ints":
		t.DataType, t.Dims, t.Int64 = Int64, []int64{int64(len(a.Ints))}, a.Ints
	default:
		return nil, fmt.Errorf("constant attribute %q is not supported", a.Name)
	}
	return t, nil
}

// fuse merges runs of affine and reshape stages holding an affine stage.
// fuseWork bounds the multiply-adds of fusing, in units of MaxElements
// (ours: 64 × 64 Mi ≈ 4·10⁹, a few seconds on one core).
const fuseWork = 64

// A fused matrix above maxElements is a LimitError.
func fuse(in []Stage, maxElements int64) ([]Stage, error) {
	var out []Stage
	for k := 0; k < len(in); {
		if in[k].Kind != Affine && in[k].Kind != Reshape {
			out = append(out, in[k])
			k++
			continue
		}
		e := k
		hasAffine := false
		for e < len(in) && (in[e].Kind == Affine || in[e].Kind == Reshape) {
			hasAffine = hasAffine || in[e].Kind == Affine
			e++
		}
		if !hasAffine {
			out = append(out, in[k:e]...)
			k = e
			continue
		}
		var W *mat.Dense
		var B []float64
		var nodes, names []string
		for _, s := range in[k:e] {
			nodes = append(nodes, s.Nodes...)
			names = append(names, s.Name)
			if s.Kind != Affine {
				continue
			}
			if W == nil {
				W = mat.DenseCopyOf(s.W)
				B = append([]float64(nil), s.B...)
				continue
			}
			if _, c := W.Dims(); int64(s.Out) > maxElements/int64(c) {
				return nil, &LimitError{Limit: "MaxElements", Where: fmt.Sprintf("fused weight matrix of %q", joinNames(names)), Value: int64(s.Out) * int64(c), Max: maxElements}
			}
			// The product costs Out·In·c multiply-adds: bound the work
			// the same way, at MaxElements × fuseWork.
			if _, c := W.Dims(); int64(s.Out)*int64(s.In) > maxElements*fuseWork/int64(c) {
				return nil, &LimitError{Limit: "MaxElements", Where: fmt.Sprintf("fusing %q (multiply-adds, at most MaxElements × %d)", joinNames(names), fuseWork), Value: int64(s.Out) * int64(s.In) * int64(c), Max: maxElements * fuseWork}
			}
			var nw mat.Dense
			nw.Mul(s.W, W)
			nb := make([]float64, s.Out)
			bv := mat.NewVecDense(s.Out, nb)
			bv.MulVec(s.W, mat.NewVecDense(len(B), B))
			for j := range nb {
				nb[j] += s.B[j]
			}
			W, B = &nw, nb
		}
		r, c := W.Dims()
		out = append(out, Stage{Kind: Affine, In: c, Out: r, W: W, B: B, Nodes: nodes, Name: joinNames(names)})
		k = e
	}
	return out, nil
}
