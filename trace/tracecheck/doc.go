// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package tracecheck holds assertions on a trace for model-pipeline
// unit tests. Each assertion reports through a testing.TB with Errorf
// (the test continues) and returns whether it held; a failure message
// shows the measure's series across stages, so the failing stage is
// obvious:
//
//	tr, err := trace.RunFile(ctx, "model.onnx", sample, nil)
//	...
//	tracecheck.SimpleFrom(t, tr, "contact", 3)
//	tracecheck.NoCrossGlueBefore(t, tr, len(tr.Stages)-1)
//	tracecheck.SoftmaxSeparates(t, tr)
package tracecheck
