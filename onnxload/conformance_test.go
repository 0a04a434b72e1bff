// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"errors"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
)

// conformanceDir holds the ONNX backend node tests shipped by Debian's
// libonnx-testdata package (.ci/run installs it).
const conformanceDir = "/usr/share/libonnx-testdata/data/node"

// conformanceOps are the operators whose backend test cases must pass.
var conformanceOps = []string{
	"gemm", "matmul_2d", "add", "relu", "leakyrelu", "elu", "softplus",
	"sigmoid", "tanh", "softmax", "logsoftmax", "flatten", "identity",
	"dropout", "batchnorm", "clip", "prelu", "hardsigmoid", "hardswish",
	"selu", "celu",
}

func readTensor(t *testing.T, path string) *onnxload.Tensor {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	x, err := onnxload.DecodeTensor(f, nil)
	if err != nil {
		t.Fatalf("%s: %v", path, err)
	}
	return x
}

// compareTensor reports whether got matches the reference want within
// 1e-6 (absolute or relative; the acceptance bound).
func compareTensor(t *testing.T, what string, got, want *onnxload.Tensor) bool {
	t.Helper()
	if got.Len() != want.Len() || len(got.Float64) != len(want.Float64) || len(got.Int64) != len(want.Int64) {
		t.Errorf("%s: got dims %v (%v), want %v (%v)", what, got.Dims, got.DataType, want.Dims, want.DataType)
		return false
	}
	ok := true
	for i, w := range want.Float64 {
		if g := got.Float64[i]; !scalar.EqualWithinAbsOrRel(g, w, 1e-6, 1e-6) {
			t.Errorf("%s: element %d: got %.9g, want %.9g", what, i, g, w)
			ok = false
		}
	}
	for i, w := range want.Int64 {
		if got.Int64[i] != w {
			t.Errorf("%s: element %d: got %d, want %d", what, i, got.Int64[i], w)
			ok = false
		}
	}
	return ok
}

// TestConformance runs the ONNX backend test cases shipped by
// libonnx-testdata for the supported operators, in two ways:
//
//   - Every single-node case goes through EvalNode, the whole-tensor
//     evaluator, and every output is compared.
//   - Every case whose graph is a row-wise map of a sample also goes
//     through Stages and Forward: the first graph input is the sample
//     and the other inputs are bound as initializers, as an exporter
//     would store weights. Cases that are not row-wise maps (a 1-D
//     input, softmax over a non-feature axis, Flatten merging samples,
//     transA, per-sample addends, training mode, expanded graphs using
//     other operators) are listed with the reason.
func TestConformance(t *testing.T) {
	if _, err := os.Stat(conformanceDir); err != nil {
		t.Skipf("libonnx-testdata is not installed (%s missing); .ci/run installs it", conformanceDir)
	}
	var dirs []string
	for _, op := range conformanceOps {
		got, _ := filepath.Glob(filepath.Join(conformanceDir, "test_"+op+"*"))
		dirs = append(dirs, got...)
	}
	sort.Strings(dirs)
	ranStages := map[string]int{}
	var evalPassed, stagePassed, nsets int
	var evalRan, notRowWise, notEvaluated []string
	for _, dir := range dirs {
		name := filepath.Base(dir)
		op := strings.SplitN(strings.TrimPrefix(name, "test_"), "_", 2)[0]
		m, err := onnxload.Open(filepath.Join(dir, "model.onnx"), nil)
		if err != nil {
			var ue *onnxload.UnsupportedError
			if errors.As(err, &ue) {
				notEvaluated = append(notEvaluated, name+": "+ue.Reason)
				continue
			}
			t.Errorf("%s: %v", name, err)
			continue
		}
		sets, _ := filepath.Glob(filepath.Join(dir, "test_data_set_*"))
		evalOK, stageOK := len(m.Nodes) == 1, true
		stageReason, evalReason := "", "expanded into several nodes"
		for _, set := range sets {
			nsets++
			var inputs []*onnxload.Tensor
			for k := range m.Inputs {
				inputs = append(inputs, readTensor(t, filepath.Join(set, "input_"+strconv.Itoa(k)+".pb")))
			}
			var wants []*onnxload.Tensor
			for k := 0; ; k++ {
				p := filepath.Join(set, "output_"+strconv.Itoa(k)+".pb")
				if _, err := os.Stat(p); err != nil {
					break
				}
				wants = append(wants, readTensor(t, p))
			}
			if evalOK {
				byName := map[string]*onnxload.Tensor{}
				for k, in := range inputs {
					byName[m.Inputs[k].Name] = in
				}
				var args []*onnxload.Tensor
				for _, in := range m.Nodes[0].Inputs {
					args = append(args, byName[in])
				}
				outs, err := onnxload.EvalNode(m.Nodes[0], m.Opset, args)
				var ue *onnxload.UnsupportedError
				switch {
				case errors.As(err, &ue):
					evalOK, evalReason = false, ue.Reason
				case err != nil:
					t.Errorf("%s: EvalNode: %v", name, err)
					evalOK = false
				default:
					for k, w := range wants {
						if k >= len(outs) || !compareTensor(t, name+" "+filepath.Base(set)+" output "+strconv.Itoa(k)+" (EvalNode)", outs[k], w) {
							evalOK = false
						}
					}
				}
			}
			if !stageOK {
				continue
			}
			bound := *m
			bound.Inputs = m.Inputs[:1]
			bound.Initializers = append([]*onnxload.Tensor(nil), m.Initializers...)
			for k, in := range inputs[1:] {
				c := *in
				c.Name = m.Inputs[k+1].Name
				bound.Initializers = append(bound.Initializers, &c)
			}
			stages, err := bound.Stages(nil)
			if err != nil {
				var ue *onnxload.UnsupportedError
				if !errors.As(err, &ue) {
					t.Errorf("%s: %v", name, err)
				}
				stageOK, stageReason = false, err.Error()
				continue
			}
			x := inputs[0]
			n := int(x.Dims[0])
			xm := mat.NewDense(n, x.Len()/n, x.Float64)
			outs, err := onnxload.Forward(t.Context(), stages, xm, nil)
			if err != nil {
				t.Errorf("%s: %v", name, err)
				stageOK = false
				continue
			}
			got := xm
			if len(outs) > 0 {
				got = outs[len(outs)-1]
			}
			r, c := got.Dims()
			flat := &onnxload.Tensor{DataType: wants[0].DataType, Dims: []int64{int64(r * c)}, Float64: make([]float64, 0, r*c)}
			for i := 0; i < r; i++ {
				flat.Float64 = append(flat.Float64, got.RawRowView(i)...)
			}
			if !compareTensor(t, name+" "+filepath.Base(set)+" (Stages+Forward)", flat, wants[0]) {
				stageOK = false
			}
		}
		if evalOK {
			evalPassed++
			evalRan = append(evalRan, name)
		} else if len(m.Nodes) == 1 {
			notEvaluated = append(notEvaluated, name+": "+evalReason)
		}
		if stageOK {
			stagePassed++
			ranStages[op]++
			t.Logf("Stages+Forward ran %s (%d data sets)", name, len(sets))
		} else if stageReason != "" {
			notRowWise = append(notRowWise, name+": "+stageReason)
		}
	}
	t.Logf("evalNode ran: %s", strings.Join(evalRan, " "))
	for _, s := range notRowWise {
		t.Logf("not a row-wise MLP case (Stages refuses it): %s", s)
	}
	for _, s := range notEvaluated {
		t.Logf("not evaluated: %s", s)
		if !strings.Contains(s, "training") && !strings.Contains(s, "element type") && !strings.Contains(s, "tensor inputs") {
			t.Errorf("single-node case not evaluated for an unexpected reason: %s", s)
		}
	}
	t.Logf("conformance: %d case directories (%d data sets); evalNode passed %d single-node cases; Stages+Forward passed %d cases, refused %d that are not row-wise maps; %d not evaluated (training mode, non-float types, non-tensor inputs)",
		len(dirs), nsets, evalPassed, stagePassed, len(notRowWise), len(notEvaluated))
	for _, op := range []string{"gemm", "matmul", "add", "relu", "leakyrelu", "elu", "softplus", "sigmoid", "tanh", "softmax", "logsoftmax", "flatten", "identity", "dropout", "batchnorm", "clip", "prelu", "hardsigmoid", "hardswish", "selu", "celu"} {
		if ranStages[op] == 0 {
			t.Errorf("no conformance case ran through Stages for %s", op)
		}
	}
}
