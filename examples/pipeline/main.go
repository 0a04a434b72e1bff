// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Command pipeline traces the demo's well-sized robot-arm model up to its
// logits (the stages before the softmax) and prints the per-stage table.
// Its test, pipeline_test.go, is the example: a model-pipeline unit test
// that asserts on the trace with the tracecheck helpers.
//
//	go run ./examples/pipeline      # the table
//	go test ./examples/pipeline     # the checks
package main

import (
	"context"
	"fmt"
	"os"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

func main() {
	tr, err := logitsTrace(context.Background(), "cmd/crease/internal/demo/data/")
	if err != nil {
		fmt.Fprintln(os.Stderr, "pipeline:", err)
		os.Exit(2)
	}
	fmt.Print(tr)
}

// logitsTrace traces dir/arm_wide.onnx over dir/arm.csv, leaving out the
// model's final softmax stage.
func logitsTrace(ctx context.Context, dir string) (*trace.Trace, error) {
	m, err := onnxload.Open(dir+"arm_wide.onnx", nil)
	if err != nil {
		return nil, err
	}
	stages, err := m.Stages(nil)
	if err != nil {
		return nil, err
	}
	if n := len(stages); n > 0 && stages[n-1].Kind == onnxload.Softmax {
		stages = stages[:n-1]
	}
	f, err := os.Open(dir + "arm.csv")
	if err != nil {
		return nil, err
	}
	defer f.Close()
	s, err := trace.ReadCSV(f, "arm.csv", &trace.CSVSettings{Label: "class"})
	if err != nil {
		return nil, err
	}
	return trace.Run(ctx, stages, s, &trace.Settings{MaxDim: 1, Scale: 0.2, Cap: -1, GlueTau: 0.1, SkipWhole: true})
}
