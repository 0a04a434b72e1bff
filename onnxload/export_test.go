// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload

// EvalNode exports evalNode, the whole-tensor reference evaluator, to
// the external tests (conformance_test.go).
var EvalNode = evalNode
