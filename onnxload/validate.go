// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import (
	"fmt"
	"sort"

	"gonum.org/v1/gonum/graph"
	"gonum.org/v1/gonum/graph/simple"
	"gonum.org/v1/gonum/graph/topo"
)

// validate checks the decoded graph and sorts m.Nodes topologically.
func validate(m *Model) error {
	if len(m.Outputs) == 0 {
		return formatf("graph", "no outputs")
	}
	for _, v := range append(append([]ValueInfo(nil), m.Inputs...), m.Outputs...) {
		if v.nonTensor {
			return &UnsupportedError{Where: fmt.Sprintf("value %q", v.Name), Reason: "only tensor inputs and outputs are supported"}
		}
		if v.Elem != Undefined && !v.Elem.isFloat() && !v.Elem.isInt() {
			return &UnsupportedError{Where: fmt.Sprintf("value %q", v.Name), Reason: fmt.Sprintf("element type %v is not supported (want float32 or float64)", v.Elem)}
		}
	}
	// producer[name] is the index of the node producing name, or -1 for
	// graph inputs and initializers.
	producer := map[string]int{}
	define := func(name string, who int, where string) error {
		if name == "" {
			return nil
		}
		if _, dup := producer[name]; dup {
			return formatf(where, "value %q is defined more than once", name)
		}
		producer[name] = who
		return nil
	}
	for _, v := range m.Inputs {
		if err := define(v.Name, -1, fmt.Sprintf("input %q", v.Name)); err != nil {
			return err
		}
	}
	for _, t := range m.Initializers {
		if err := define(t.Name, -1, fmt.Sprintf("initializer %q", t.Name)); err != nil {
			return err
		}
	}
	for i, n := range m.Nodes {
		where := nodeWhere(n, i)
		if n.Domain != "" && n.Domain != "ai.onnx" {
			return &UnsupportedError{Node: n.Name, Op: n.OpType, Where: where, Reason: fmt.Sprintf("custom operator domain %q (only the default ONNX domain is supported)", n.Domain)}
		}
		for _, out := range n.Outputs {
			if err := define(out, i, where); err != nil {
				e := err.(*FormatError)
				e.Node = n.Name
				e.Reason = fmt.Sprintf("output %q duplicates an earlier output, input or initializer", out)
				return e
			}
		}
	}
	g := simple.NewDirectedGraph()
	for i := range m.Nodes {
		g.AddNode(simple.Node(i))
	}
	for i, n := range m.Nodes {
		for _, in := range n.Inputs {
			if in == "" {
				continue
			}
			p, ok := producer[in]
			if !ok {
				return &FormatError{Node: n.Name, Where: nodeWhere(n, i), Reason: fmt.Sprintf("input %q is not a graph input, an initializer or the output of any node (dangling input)", in)}
			}
			if p == i {
				return &FormatError{Node: n.Name, Where: nodeWhere(n, i), Reason: fmt.Sprintf("cycle: the node consumes its own output %q", in)}
			}
			if p >= 0 {
				g.SetEdge(simple.Edge{F: simple.Node(p), T: simple.Node(i)})
			}
		}
	}
	for _, v := range m.Outputs {
		if _, ok := producer[v.Name]; !ok {
			return formatf(fmt.Sprintf("output %q", v.Name), "no node, input or initializer defines this graph output")
		}
	}
	order, err := topo.SortStabilized(g, func(ns []graph.Node) {
		sort.Slice(ns, func(a, b int) bool { return ns[a].ID() < ns[b].ID() })
	})
	if err != nil {
		if u, ok := err.(topo.Unorderable); ok && len(u) > 0 && len(u[0]) > 0 {
			ids := make([]int, 0, len(u[0]))
			for _, n := range u[0] {
				ids = append(ids, int(n.ID()))
			}
			sort.Ints(ids)
			n := m.Nodes[ids[0]]
			names := make([]string, len(ids))
			for k, id := range ids {
				names[k] = nodeWhere(m.Nodes[id], id)
			}
			return &FormatError{Node: n.Name, Where: nodeWhere(n, ids[0]), Reason: fmt.Sprintf("cycle through %d nodes: %v", len(ids), names)}
		}
		return formatf("graph", "cannot order nodes: %v", err)
	}
	sorted := make([]*Node, len(order))
	for k, n := range order {
		sorted[k] = m.Nodes[n.ID()]
	}
	m.Nodes = sorted
	return nil
}
