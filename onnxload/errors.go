// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

import "fmt"

// FormatError reports a malformed model: bytes that are not valid
// protobuf, fields with impossible values, or a graph that breaks the
// ONNX rules (dangling inputs, cycles, duplicate outputs, no outputs).
type FormatError struct {
	// Node is the name of the node at fault, if the fault is at a node.
	Node string
	// Where says which part of the model is at fault, for example
	// `node "/fc1/Gemm"`, `initializer "fc1.weight"` or `graph`.
	Where string
	// Reason says what is wrong.
	Reason string
}

func (e *FormatError) Error() string {
	if e.Where == "" {
		return "onnxload: malformed model: " + e.Reason
	}
	return "onnxload: malformed model: " + e.Where + ": " + e.Reason
}

// UnsupportedError reports a valid model that uses a feature this package
// does not handle: an operator outside the supported list, a custom
// domain, an element type other than float32/float64, external data or
// control flow.
type UnsupportedError struct {
	// Node is the name of the node at fault, if the fault is at a node.
	Node string
	// Op is the operator type of that node, if any.
	Op string
	// Where says which part of the model is at fault.
	Where string
	// Reason says what is not supported.
	Reason string
}

func (e *UnsupportedError) Error() string {
	if e.Where == "" {
		return "onnxload: unsupported: " + e.Reason
	}
	return "onnxload: unsupported: " + e.Where + ": " + e.Reason
}

// LimitError reports a model that exceeds one of the [Limits].
type LimitError struct {
	// Limit names the field of Limits that was exceeded, for example
	// "MaxDim".
	Limit string
	// Where says which part of the model exceeded it.
	Where string
	// Value is the size found (a lower bound if it overflowed) and Max
	// the limit in force.
	Value, Max int64
}

func (e *LimitError) Error() string {
	w := ""
	if e.Where != "" {
		w = e.Where + ": "
	}
	return fmt.Sprintf("onnxload: %s%d exceeds the limit %s=%d (onnxload.Limits.%s raises it)", w, e.Value, e.Limit, e.Max, e.Limit)
}

// nodeWhere describes node i for error messages.
func nodeWhere(n *Node, i int) string {
	if n.Name != "" {
		return fmt.Sprintf("node %q (%s)", n.Name, n.OpType)
	}
	return fmt.Sprintf("node #%d (%s)", i, n.OpType)
}
