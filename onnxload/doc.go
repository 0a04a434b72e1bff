// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package onnxload decodes ONNX models of multilayer perceptrons, turns
// them into an ordered chain of stages (affine maps and row-wise
// nonlinearities) and pushes a sample through every stage.
//
// # Decoding
//
// [Decode], [DecodeBytes] and [Open] read the protobuf wire format
// directly (google.golang.org/protobuf/encoding/protowire); no generated
// code is involved. Files are untrusted input: every length and
// dimension is checked before anything is allocated, and [Limits] bound
// the file size, the total number of tensor elements and any single
// dimension. [DecodeConfig] reads only versions and declared inputs and
// outputs.
//
// After decoding, the graph is checked (dangling inputs, cycles,
// duplicate outputs, missing outputs, custom domains, unsupported element
// types, external data, subgraph attributes) and its nodes are sorted
// topologically with gonum's graph/topo.
//
// # Errors
//
// As in image/png, malformed input and unsupported features are told
// apart: a *[FormatError] means the file is not a valid model, an
// *[UnsupportedError] that it is valid but uses something this package
// does not handle, and a *[LimitError] that it exceeds a limit. All can
// be found with errors.As; errors from [Open] are wrapped in an
// *fs.PathError naming the file. No input makes the package panic.
//
// # Stages
//
// [Model.Stages] walks the sorted graph from its single data input and
// folds the operators PyTorch exports for MLPs at opsets 7 to 17 into
// stages: Gemm (alpha, beta, transB, optional bias), MatMul with or
// without a following Add bias on either side, MatMul by a transposed
// initializer, inference-mode BatchNormalization (its own affine stage),
// Flatten and Reshape to (N, −1) (reshape stages; the Shape, Gather,
// Unsqueeze and Concat that x.view(x.size(0), −1) exports with a dynamic
// batch are folded into the Reshape), Identity and Dropout
// (no stage), and the activations Relu, LeakyRelu, Elu, Softplus,
// Sigmoid, Tanh, Softmax and LogSoftmax over the feature axis, Clip
// (bounds 0 and 6 give a relu6 stage, others hardtanh), PRelu (one slope
// or one per unit), HardSigmoid, HardSwish, Selu and Celu, and the node
// patterns PyTorch 1.13 exports for GELU (x·(1 + erf(x/√2))/2 as Div,
// Erf, Add, Mul, Mul), GELU with approximate="tanh" (Mul, Add and Tanh
// nodes), SiLU (Sigmoid, Mul), Mish (Softplus, Tanh, Mul) and Hardswish
// before opset 14 (HardSigmoid, Mul), each made one stage. One operator
// table gives [SupportedOps], the arity checks and the dispatch of both
// the stage builder and the package's reference evaluator. Constant
// nodes and initializers listed as graph inputs (IR version 3) are
// handled. All numbers are float64; float32 initializers are converted
// exactly.
//
// [Forward] applies the stages to an n×d sample in row blocks on all
// cores and keeps every stage's output.
//
// The package's tests check every operator against the ONNX backend
// test cases with an unexported whole-tensor evaluator (full ONNX
// semantics: any axis, transA, broadcasting) that shares the operator
// table with the stage builder.
//
// Models, stages and their weights are never changed after they are
// built and are safe for concurrent reads.
package onnxload
