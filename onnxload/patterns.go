// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import "math"

// Operator types of the nodes that stand for a recognised pattern. They
// cannot clash with an ONNX operator (a ':' is not part of one).
const (
	patternGELU = "pattern:GELU"
	patternSiLU = "pattern:SiLU"
	// patternHardSwish is nn.Hardswish before opset 14.
	patternHardSwish = "pattern:HardSwish"
	patternMish      = "pattern:Mish"
	patternGELUTanh  = "pattern:GELUTanh"
)

// patterns replaces the node patterns PyTorch 1.13 exports for
// activations that ONNX (before opset 20) has no operator for by one
// node each, with the labels of the nodes it replaces in fused:
//
//	GELU (nn.GELU(), F.gelu): y = Mul(Mul(x, Add(Erf(Div(x, √2)), 1)), 0.5)
//	SiLU (nn.SiLU(), F.silu): y = Mul(x, Sigmoid(x))
//	Hardswish (opsets 7–13): y = Mul(x, HardSigmoid(x)), alpha 1/6, beta 1/2
//	Mish (nn.Mish(), F.mish): y = Mul(x, Tanh(Softplus(x)))
//	GELU, approximate="tanh":
//		y = Mul(Mul(x, Add(Tanh(Mul(Add(x, Mul(Mul(x, Mul(x, x)), 0.044715)), √(2/π))), 1)), 0.5)
//
// Each Mul and Add may take its operands in either order; constants are
// matched within a relative 1e-5 (the exporter stores them as float32).
//
// A pattern counts only when its inner values feed nothing else and x
// feeds nothing but the pattern; nodes without names are left alone.
func patterns(m *Model, nodes []*Node) ([]*Node, map[*Node][]string) {
	for _, n := range nodes {
		if n.Name == "" {
			return nodes, nil
		}
	}
	consumers := map[string][]int{}
	for i, n := range nodes {
		for _, in := range n.Inputs {
			consumers[in] = append(consumers[in], i)
		}
	}
	for _, o := range m.Outputs {
		consumers[o.Name] = append(consumers[o.Name], -1)
	}
	constant := map[string]*Tensor{}
	for _, n := range nodes {
		if n.OpType == "Constant" && len(n.Outputs) == 1 {
			if t, err := constantValue(n); err == nil {
				constant[n.Outputs[0]] = t
			}
		}
	}
	scalar := func(name string, want float64) bool {
		t := constant[name]
		if t == nil {
			t = m.Initializer(name)
		}
		if t == nil || t.Len() != 1 || len(t.Float64) != 1 {
			return false
		}
		return math.Abs(t.Float64[0]-want) <= 1e-5*max(1, math.Abs(want))
	}
	near := func(v, want float64) bool {
		return math.Abs(v-want) <= 1e-5*max(1, math.Abs(want))
	}
	// only returns the single consumer of name if it has type op.
	only := func(name, op string) (int, *Node) {
		c := consumers[name]
		if len(c) != 1 || c[0] < 0 || nodes[c[0]].OpType != op || nodes[c[0]].Name == "" || len(nodes[c[0]].Outputs) != 1 {
			return -1, nil
		}
		return c[0], nodes[c[0]]
	}
	// other returns the input of a two-input node that is not name.
	other := func(n *Node, name string) (string, bool) {
		if len(n.Inputs) != 2 {
			return "", false
		}
		switch name {
		case n.Inputs[0]:
			return n.Inputs[1], true
		case n.Inputs[1]:
			return n.Inputs[0], true
		}
		return "", false
	}
	drop := map[int]bool{}
	replace := map[int]*Node{}
	fused := map[*Node][]string{}
	// selfGate replaces x·f(x), node i computing f(x) from x alone and
	// one Mul its only consumer, by one node of type op.
	selfGate := func(i int, n *Node, op string) {
		x := n.Inputs[0]
		im, mul := only(n.Outputs[0], "Mul")
		if mul == nil || len(consumers[x]) != 2 {
			return
		}
		if c, ok := other(mul, n.Outputs[0]); !ok || c != x {
			return
		}
		g := &Node{Name: n.Name, OpType: op, Inputs: []string{x}, Outputs: mul.Outputs}
		drop[i] = true
		replace[im] = g
		fused[g] = []string{n.Name, mul.Name}
	}
	for i, n := range nodes {
		if drop[i] || n.Name == "" || len(n.Outputs) != 1 {
			continue
		}
		switch n.OpType {
		case "Div":
			if len(n.Inputs) != 2 || !scalar(n.Inputs[1], math.Sqrt2) {
				continue
			}
			x := n.Inputs[0]
			ie, erf := only(n.Outputs[0], "Erf")
			if erf == nil {
				continue
			}
			ia, add := only(erf.Outputs[0], "Add")
			if add == nil {
				continue
			}
			if c, ok := other(add, erf.Outputs[0]); !ok || !scalar(c, 1) {
				continue
			}
			im, mul := only(add.Outputs[0], "Mul")
			if mul == nil {
				continue
			}
			if c, ok := other(mul, add.Outputs[0]); !ok || c != x {
				continue
			}
			ih, half := only(mul.Outputs[0], "Mul")
			if half == nil {
				continue
			}
			c, ok := other(half, mul.Outputs[0])
			if !ok || !scalar(c, 0.5) || len(consumers[x]) != 2 {
				continue
			}
			g := &Node{Name: n.Name, OpType: patternGELU, Inputs: []string{x, n.Inputs[1], c}, Outputs: half.Outputs}
			if one, _ := other(add, erf.Outputs[0]); one != "" {
				g.Inputs = append(g.Inputs, one)
			}
			for _, k := range []int{i, ie, ia, im} {
				drop[k] = true
			}
			replace[ih] = g
			fused[g] = []string{n.Name, erf.Name, add.Name, mul.Name, half.Name}
		case "HardSigmoid":
			if len(n.Inputs) != 1 || !near(floatAttr(n, "alpha", 0.2), 1.0/6) || !near(floatAttr(n, "beta", 0.5), 0.5) {
				continue
			}
			selfGate(i, n, patternHardSwish)
		case "Softplus":
			if len(n.Inputs) != 1 {
				continue
			}
			x := n.Inputs[0]
			it, th := only(n.Outputs[0], "Tanh")
			if th == nil {
				continue
			}
			im, mul := only(th.Outputs[0], "Mul")
			if mul == nil || len(consumers[x]) != 2 {
				continue
			}
			if c, ok := other(mul, th.Outputs[0]); !ok || c != x {
				continue
			}
			g := &Node{Name: n.Name, OpType: patternMish, Inputs: []string{x}, Outputs: mul.Outputs}
			drop[i], drop[it] = true, true
			replace[im] = g
			fused[g] = []string{n.Name, th.Name, mul.Name}
		case "Mul":
			// x·x, the start of the tanh approximation of GELU.
			if len(n.Inputs) != 2 || n.Inputs[0] != n.Inputs[1] {
				continue
			}
			x := n.Inputs[0]
			// next follows the single consumer of the output of prev, of
			// type op, whose other operand must be want (a value name)
			// or, when want is "", a constant near k.
			var chain []int
			var consts []string
			prev := n
			next := func(op, want string, k float64) *Node {
				if prev == nil {
					return nil
				}
				ic, c := only(prev.Outputs[0], op)
				if c == nil {
					prev = nil
					return nil
				}
				if op != "Tanh" {
					o, ok := other(c, prev.Outputs[0])
					switch {
					case !ok, want != "" && o != want, want == "" && !scalar(o, k):
						prev = nil
						return nil
					}
					if want == "" {
						consts = append(consts, o)
					}
				} else if len(c.Inputs) != 1 {
					prev = nil
					return nil
				}
				chain = append(chain, ic)
				prev = c
				return c
			}
			next("Mul", x, 0)                          // x³
			next("Mul", "", geluTanhC)                 // 0.044715·x³
			next("Add", x, 0)                          // x + 0.044715·x³
			next("Mul", "", math.Sqrt(2/math.Pi))      // √(2/π)·(…)
			next("Tanh", "", 0)                        // tanh(…)
			next("Add", "", 1)                         // 1 + tanh(…)
			next("Mul", x, 0)                          // x·(1 + tanh(…))
			last := next("Mul", "", 0.5)               // y
			if last == nil || len(consumers[x]) != 5 { // x·x counts twice
				continue
			}
			g := &Node{Name: n.Name, OpType: patternGELUTanh, Inputs: append([]string{x}, consts...), Outputs: last.Outputs}
			labels := []string{n.Name}
			drop[i] = true
			for _, k := range chain[:len(chain)-1] {
				drop[k] = true
				labels = append(labels, nodes[k].Name)
			}
			replace[chain[len(chain)-1]] = g
			fused[g] = append(labels, last.Name)
		case "Sigmoid":
			if len(n.Inputs) != 1 {
				continue
			}
			selfGate(i, n, patternSiLU)
		}
	}
	if len(fused) == 0 {
		return nodes, nil
	}
	out := make([]*Node, 0, len(nodes))
	for i, n := range nodes {
		switch {
		case drop[i]:
		case replace[i] != nil:
			out = append(out, replace[i])
		default:
			out = append(out, n)
		}
	}
	return out, fused
}
