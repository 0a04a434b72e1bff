// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"math"
	"slices"
	"strings"
)

// opDef describes one ONNX operator, or one node pattern standing for
// an activation, that the package handles. The stage builder
// ([Model.Stages]) and the reference evaluator (evalNode) both dispatch
// through opTable, which also gives [SupportedOps] and the arity
// checks, so these cannot disagree.
type opDef struct {
	// op is the ONNX operator type, or a pattern's node type (patterns.go).
	op string
	// minIn and maxIn bound the number of inputs, empty names included.
	minIn, maxIn int
	// since is the first opset of the default domain that defines the
	// operator; a model importing an older opset is refused. Zero means
	// any opset.
	since int64
	// pattern names the nodes of a pattern, for error messages; it is
	// empty for ONNX operators.
	pattern string
	// dataIn reports whether any input, not only input 0, may be the data.
	dataIn bool
	// stage builds the stage (or passes the data through) when an input
	// is the data; nil means the operator never applies to the data.
	stage func(b *builder, n *Node, i int, data *value) error
	// fold computes the node when every input is a constant; nil means
	// such nodes are refused.
	fold func(b *builder, n *Node, i int) error
	// eval evaluates the node on whole tensors; nil means evalNode
	// refuses it.
	eval func(e *evalCtx) ([]*Tensor, error)
}

// actParams returns the parameters of an activation stage (Kind, Alpha,
// Beta, Slope) for a node. shape is the shape the parameters are
// broadcast to: one sample's trailing shape for a stage, the whole
// tensor's for evalNode.
type actParams func(c *opCtx, shape []int64) (Stage, error)

// opCtx is what an actParams function may read of a node.
type opCtx struct {
	n     *Node
	opset int64
	// in returns the constant (stage) or evaluated (evalNode) value of
	// input k ≥ 1, or nil when it is absent.
	in func(k int) *Tensor
	// sample is true for a stage: shape is one sample's, not a tensor's.
	sample     bool
	unsup, bad func(format string, args ...any) error
}

// opTable is the table of operators. Order only matters for messages.
var opTable = []opDef{
	{op: "Add", minIn: 2, maxIn: 2, dataIn: true, stage: (*builder).add, eval: evalAdd},
	{op: "BatchNormalization", minIn: 5, maxIn: 5, stage: (*builder).batchNorm, eval: evalBatchNorm},
	{op: "Celu", minIn: 1, maxIn: 1, since: 12, stage: stageAct(celuParams), eval: evalAct(celuParams)},
	{op: "Clip", minIn: 1, maxIn: 3, stage: stageAct(clipParams), eval: evalAct(clipParams)},
	{op: "Concat", minIn: 1, maxIn: math.MaxInt32, fold: (*builder).foldShape},
	{op: "Constant", minIn: 0, maxIn: 0, fold: (*builder).constant},
	{op: "Dropout", minIn: 1, maxIn: 3, stage: (*builder).passThrough, fold: (*builder).foldIdentity, eval: evalDropout},
	{op: "Elu", minIn: 1, maxIn: 1, stage: stageAct(eluParams), eval: evalAct(eluParams)},
	{op: "Flatten", minIn: 1, maxIn: 1, stage: (*builder).flatten, eval: evalFlatten},
	{op: "Gather", minIn: 2, maxIn: 2, fold: (*builder).foldShape},
	{op: "Gemm", minIn: 2, maxIn: 3, stage: (*builder).gemm, eval: evalGemm},
	{op: "HardSigmoid", minIn: 1, maxIn: 1, stage: stageAct(hardSigmoidParams), eval: evalAct(hardSigmoidParams)},
	{op: "HardSwish", minIn: 1, maxIn: 1, since: 14, stage: stageAct(kindParams(HardSwish)), eval: evalAct(kindParams(HardSwish))},
	{op: "Identity", minIn: 1, maxIn: 1, stage: (*builder).passThrough, fold: (*builder).foldIdentity, eval: evalIdentity},
	{op: "LeakyRelu", minIn: 1, maxIn: 1, stage: stageAct(leakyParams), eval: evalAct(leakyParams)},
	{op: "LogSoftmax", minIn: 1, maxIn: 1, stage: (*builder).softmax, eval: evalSoftmax},
	{op: "MatMul", minIn: 2, maxIn: 2, dataIn: true, stage: (*builder).matMul, eval: evalMatMul},
	{op: "PRelu", minIn: 2, maxIn: 2, stage: stageAct(preluParams), eval: evalAct(preluParams)},
	{op: "Relu", minIn: 1, maxIn: 1, stage: stageAct(kindParams(ReLU)), eval: evalAct(kindParams(ReLU))},
	{op: "Reshape", minIn: 2, maxIn: 2, stage: (*builder).reshapeStage},
	{op: "Selu", minIn: 1, maxIn: 1, stage: stageAct(seluParams), eval: evalAct(seluParams)},
	{op: "Shape", minIn: 1, maxIn: 1, stage: (*builder).shapeOf},
	{op: "Sigmoid", minIn: 1, maxIn: 1, stage: stageAct(kindParams(Sigmoid)), eval: evalAct(kindParams(Sigmoid))},
	{op: "Softmax", minIn: 1, maxIn: 1, stage: (*builder).softmax, eval: evalSoftmax},
	{op: "Softplus", minIn: 1, maxIn: 1, stage: stageAct(kindParams(Softplus)), eval: evalAct(kindParams(Softplus))},
	{op: "Tanh", minIn: 1, maxIn: 1, stage: stageAct(kindParams(Tanh)), eval: evalAct(kindParams(Tanh))},
	{op: "Transpose", minIn: 1, maxIn: 1, stage: (*builder).transposeData, fold: (*builder).foldTranspose},
	{op: "Unsqueeze", minIn: 1, maxIn: 2, fold: (*builder).foldShape},

	{op: patternGELU, minIn: 1, maxIn: 4, pattern: "GELU (Div, Erf, Add, Mul, Mul)", stage: stageAct(kindParams(GELU))},
	{op: patternSiLU, minIn: 1, maxIn: 1, pattern: "SiLU (Sigmoid, Mul)", stage: stageAct(kindParams(SiLU))},
	{op: patternHardSwish, minIn: 1, maxIn: 1, pattern: "Hardswish before opset 14 (HardSigmoid, Mul)", stage: stageAct(kindParams(HardSwish))},
	{op: patternMish, minIn: 1, maxIn: 1, pattern: "Mish (Softplus, Tanh, Mul)", stage: stageAct(kindParams(Mish))},
	{op: patternGELUTanh, minIn: 1, maxIn: 5, pattern: "GELU with approximate=\"tanh\" (Mul, Mul, Mul, Add, Mul, Tanh, Add, Mul, Mul)", stage: stageAct(kindParams(GELUTanh))},
}

// ops indexes opTable by operator type.
var ops = func() map[string]*opDef {
	m := make(map[string]*opDef, len(opTable))
	for k := range opTable {
		m[opTable[k].op] = &opTable[k]
	}
	return m
}()

// SupportedOps lists, in alphabetical order, the ONNX operators that
// [Model.Stages] understands, not counting the operators that occur only
// inside the recognised activation patterns (such as Erf and Mul). It is
// derived from the package's operator table; changing it changes
// nothing but the caller's copy.
var SupportedOps = func() []string {
	var s []string
	for _, d := range opTable {
		if d.pattern == "" {
			s = append(s, d.op)
		}
	}
	slices.Sort(s)
	return s
}()

// supportedList describes the supported operators and patterns for an
// error message.
func supportedList() string {
	var p []string
	for _, d := range opTable {
		if d.pattern != "" {
			p = append(p, d.pattern)
		}
	}
	return strings.Join(SupportedOps, ", ") + ", and the node patterns PyTorch exports for " + strings.Join(p, ", ")
}

// foldedList names the operators folded on constants, for messages.
func foldedList() string {
	var s []string
	for _, d := range opTable {
		if d.fold != nil && d.op != "Constant" {
			s = append(s, d.op)
		}
	}
	return strings.Join(s[:len(s)-1], ", ") + " and " + s[len(s)-1]
}

// kindParams gives activations without parameters.
func kindParams(k Kind) actParams {
	return func(*opCtx, []int64) (Stage, error) { return Stage{Kind: k}, nil }
}

func leakyParams(c *opCtx, _ []int64) (Stage, error) {
	return Stage{Kind: LeakyReLU, Alpha: floatAttr(c.n, "alpha", 0.01)}, nil
}

func eluParams(c *opCtx, _ []int64) (Stage, error) {
	return Stage{Kind: ELU, Alpha: floatAttr(c.n, "alpha", 1)}, nil
}

func celuParams(c *opCtx, _ []int64) (Stage, error) {
	a := floatAttr(c.n, "alpha", 1)
	if a == 0 || math.IsNaN(a) {
		return Stage{}, c.bad("celu alpha is %v, want a non-zero number", a)
	}
	return Stage{Kind: CELU, Alpha: a}, nil
}

// ONNX's Selu defaults: the SELU constants of Klambauer et al. (2017)
// rounded to float32, as in the operator definition.
const (
	seluAlpha = 1.67326319217681884765625
	seluGamma = 1.05070102214813232421875
)

func seluParams(c *opCtx, _ []int64) (Stage, error) {
	return Stage{Kind: SELU, Alpha: floatAttr(c.n, "alpha", seluAlpha), Beta: floatAttr(c.n, "gamma", seluGamma)}, nil
}

func hardSigmoidParams(c *opCtx, _ []int64) (Stage, error) {
	return Stage{Kind: HardSigmoid, Alpha: floatAttr(c.n, "alpha", 0.2), Beta: floatAttr(c.n, "beta", 0.5)}, nil
}

// clipParams reads the bounds of Clip: attributes min and max before
// opset 11, optional scalar inputs 1 and 2 from opset 11. An absent
// bound is no bound (±Inf). Bounds 0 and 6 give relu6, others hardtanh.
func clipParams(c *opCtx, _ []int64) (Stage, error) {
	lo, hi := math.Inf(-1), math.Inf(1)
	if c.opset > 0 && c.opset < 11 {
		lo, hi = floatAttr(c.n, "min", lo), floatAttr(c.n, "max", hi)
	} else {
		for k, p := range []*float64{&lo, &hi} {
			t := c.in(k + 1)
			if t == nil {
				continue
			}
			if t.Len() != 1 || len(t.Float64) != 1 {
				return Stage{}, c.unsup("%s %q of Clip has dims %v; want a float scalar", []string{"min", "max"}[k], t.Name, t.Dims)
			}
			*p = t.Float64[0]
		}
	}
	if math.IsNaN(lo) || math.IsNaN(hi) {
		return Stage{}, c.bad("clip bounds %v, %v are not numbers", lo, hi)
	}
	if lo == 0 && hi == 6 {
		return Stage{Kind: ReLU6, Alpha: 0, Beta: 6}, nil
	}
	return Stage{Kind: Hardtanh, Alpha: lo, Beta: hi}, nil
}

// preluParams broadcasts the slope (input 1) to shape: per unit for a
// stage, a dimension aligned with the batch must be 1.
func preluParams(c *opCtx, shape []int64) (Stage, error) {
	t := c.in(1)
	if t == nil {
		return Stage{}, c.bad("missing slope input")
	}
	s, ok := broadcastTo(t, shape, 1)
	if !ok {
		if c.sample {
			return Stage{}, c.unsup("slope %q has dims %v, which do not broadcast to one sample of shape %v (a per-sample slope is not a map of each row)", t.Name, t.Dims, shape)
		}
		return Stage{}, c.bad("slope dims %v do not broadcast to %v", t.Dims, shape)
	}
	return Stage{Kind: PReLU, Slope: s}, nil
}

// stageAct makes the stage builder of an activation.
func stageAct(p actParams) func(b *builder, n *Node, i int, data *value) error {
	return func(b *builder, n *Node, i int, data *value) error {
		c := &opCtx{n: n, opset: b.m.Opset, sample: true,
			in: func(k int) *Tensor {
				if v := b.input(n, k); v != nil {
					return v.konst
				}
				return nil
			},
			unsup: func(format string, args ...any) error { return b.unsupported(n, i, format, args...) },
			bad:   func(format string, args ...any) error { return b.malformed(n, i, format, args...) },
		}
		s, err := p(c, data.shape)
		if err != nil {
			return err
		}
		w := data.width()
		s.In, s.Out = w, w
		b.push(n, i, s, data.shape)
		return nil
	}
}

// evalAct makes the evaluator of an element-wise activation.
func evalAct(p actParams) func(e *evalCtx) ([]*Tensor, error) {
	return func(e *evalCtx) ([]*Tensor, error) {
		c := &opCtx{n: e.n, opset: e.opset, in: e.in, unsup: e.unsup, bad: e.bad}
		s, err := p(c, e.x.Dims)
		if err != nil {
			return nil, err
		}
		applyRow(&s, e.out.Float64)
		return []*Tensor{e.out}, nil
	}
}

// checkOp looks up the operator of n and checks its arity and opset.
// unsup and bad make the errors.
func checkOp(n *Node, opset int64, unsup, bad func(format string, args ...any) error) (*opDef, error) {
	d := ops[n.OpType]
	if d == nil {
		return nil, unsup("operator %s is not supported; supported operators: %s", n.OpType, supportedList())
	}
	if len(n.Inputs) < d.minIn || len(n.Inputs) > d.maxIn {
		return nil, bad("%s has %d inputs, want %d to %d", n.OpType, len(n.Inputs), d.minIn, d.maxIn)
	}
	if d.since > 0 && opset > 0 && opset < d.since {
		return nil, unsup("operator %s is defined from opset %d; the model imports opset %d", n.OpType, d.since, opset)
	}
	return d, nil
}
