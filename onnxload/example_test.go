// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"context"
	"errors"
	"fmt"
	"log"
	"os"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
)

// This example loads the iris classifier fixture (trained with PyTorch on
// scikit-learn's iris data) and lists its stages.
func ExampleModel_Stages() {
	m, err := onnxload.Open("../testdata/onnx/iris.onnx", nil)
	if err != nil {
		log.Fatal(err)
	}
	stages, err := m.Stages(nil)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println("opset", m.Opset)
	for i, s := range stages {
		fmt.Printf("%d %-6s %2d→%-2d %s %v\n", i, s.Kind, s.In, s.Out, s.Name, s.Nodes)
	}
	// Output:
	// opset 13
	// 0 affine  4→16 0 [/0/Gemm]
	// 1 relu   16→16 1 [/1/Relu]
	// 2 affine 16→8  2 [/2/Gemm]
	// 3 relu    8→8  3 [/3/Relu]
	// 4 affine  8→3  4 [/4/Gemm]
}

// This example fuses the affine stages of a model with a batch
// normalization: the layer view has one affine stage per layer.
func ExampleStageSettings() {
	m, err := onnxload.Open("../testdata/onnx/opset9_batchnorm.onnx", nil)
	if err != nil {
		log.Fatal(err)
	}
	for _, fuse := range []bool{false, true} {
		stages, err := m.Stages(&onnxload.StageSettings{FuseAffine: fuse})
		if err != nil {
			log.Fatal(err)
		}
		fmt.Print("fuse=", fuse, ":")
		for _, s := range stages {
			fmt.Print(" ", s.Kind, "(", s.Name, ")")
		}
		fmt.Println()
	}
	// Output:
	// fuse=false: affine(0) affine(1) relu(2) affine(3)
	// fuse=true: affine(0+1) relu(2) affine(3)
}

// This example builds two stages by hand and pushes a sample through
// them, keeping each stage's output.
func ExampleForward() {
	stages := []onnxload.Stage{
		{Kind: onnxload.Affine, In: 2, Out: 2, W: mat.NewDense(2, 2, []float64{1, -1, 1, 1}), B: []float64{0, -1}},
		{Kind: onnxload.ReLU, In: 2, Out: 2},
	}
	x := mat.NewDense(2, 2, []float64{
		1, 2,
		3, -1,
	})
	outs, err := onnxload.Forward(context.Background(), stages, x, nil)
	if err != nil {
		log.Fatal(err)
	}
	for i, o := range outs {
		fmt.Printf("stage %d (%s):\n%v\n", i, stages[i].Kind, mat.Formatted(o))
	}
	// Output:
	// stage 0 (affine):
	// ⎡-1   2⎤
	// ⎣ 4   1⎦
	// stage 1 (relu):
	// ⎡0  2⎤
	// ⎣4  1⎦
}

// This example reads only the header of a model.
func ExampleDecodeConfig() {
	f, err := os.Open("../testdata/onnx/dynamic_batch.onnx")
	if err != nil {
		log.Fatal(err)
	}
	defer f.Close()
	c, err := onnxload.DecodeConfig(f, nil)
	if err != nil {
		log.Fatal(err)
	}
	in := c.Inputs[0]
	fmt.Println(c.ProducerName, "opset", c.Opset, "input", in.Name, in.Elem, in.Shape[0].Param, in.Shape[1].Value, in.Shape[2].Value)
	// Output:
	// pytorch opset 13 input x float32 batch 2 4
}

// This example tells a malformed model from an unsupported one.
func ExampleUnsupportedError() {
	for _, name := range []string{"short_raw_data.onnx", "if_node.onnx"} {
		_, err := onnxload.Open("../testdata/onnx/malformed/"+name, nil)
		var fe *onnxload.FormatError
		var ue *onnxload.UnsupportedError
		switch {
		case errors.As(err, &fe):
			fmt.Println(name, "is malformed:", fe.Reason)
		case errors.As(err, &ue):
			fmt.Println(name, "is unsupported at node", ue.Node+":", ue.Reason)
		}
	}
	// Output:
	// short_raw_data.onnx is malformed: raw_data has 20 bytes, dims [2 3] of float32 need 24
	// if_node.onnx is unsupported at node /branch/If: attribute "else_branch" holds a subgraph (control flow such as If or Loop is not supported)
}
