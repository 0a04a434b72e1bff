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
	"dropout", "batchnorm",
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

// TestConformance runs the ONNX backend test cases for the supported
// operators through Stages and Forward. The first graph input is the
// sample; the other inputs are bound as initializers, as an exporter
// would store weights. Cases that are not row-wise maps of a sample (a
// 1-D input, softmax over several axes, Flatten merging samples, transA,
// per-sample addends, training mode, or expanded graphs using other
// operators) are unsupported by design; they are counted and listed.
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
	ran := map[string]int{}
	var passed, nsets int
	var skipped []string
	for _, dir := range dirs {
		name := filepath.Base(dir)
		m, err := onnxload.Open(filepath.Join(dir, "model.onnx"), nil)
		if err != nil {
			var ue *onnxload.UnsupportedError
			if errors.As(err, &ue) {
				skipped = append(skipped, name+": "+ue.Reason)
				continue
			}
			t.Errorf("%s: %v", name, err)
			continue
		}
		sets, _ := filepath.Glob(filepath.Join(dir, "test_data_set_*"))
		ok := true
		for _, set := range sets {
			var inputs []*onnxload.Tensor
			for k := range m.Inputs {
				inputs = append(inputs, readTensor(t, filepath.Join(set, "input_"+strconv.Itoa(k)+".pb")))
			}
			want := readTensor(t, filepath.Join(set, "output_0.pb"))
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
				if errors.As(err, &ue) {
					skipped = append(skipped, name+": "+ue.Reason)
					ok = false
					break
				}
				t.Errorf("%s: %v", name, err)
				ok = false
				break
			}
			x := inputs[0]
			n := int(x.Dims[0])
			xm := mat.NewDense(n, x.Len()/n, x.Float64)
			outs, err := onnxload.Forward(t.Context(), stages, xm, nil)
			if err != nil {
				t.Errorf("%s: %v", name, err)
				ok = false
				break
			}
			got := xm
			if len(outs) > 0 {
				got = outs[len(outs)-1]
			}
			r, c := got.Dims()
			if r*c != want.Len() {
				t.Errorf("%s: output has %d×%d values, want dims %v", name, r, c, want.Dims)
				ok = false
				break
			}
			for i := 0; i < r; i++ {
				for j := 0; j < c; j++ {
					w := want.Float64[i*c+j]
					// Tolerance 1e-6 (the acceptance bound), absolute or relative.
					if g := got.At(i, j); !scalar.EqualWithinAbsOrRel(g, w, 1e-6, 1e-6) {
						t.Errorf("%s %s: element %d: got %.9g, want %.9g", name, filepath.Base(set), i*c+j, g, w)
						ok = false
					}
				}
			}
			nsets++
		}
		if ok {
			passed++
			op := strings.SplitN(strings.TrimPrefix(name, "test_"), "_", 2)[0]
			ran[op]++
			t.Logf("ran %s (%d data sets)", name, len(sets))
		}
	}
	for _, s := range skipped {
		t.Logf("not a row-wise MLP case: %s", s)
	}
	t.Logf("conformance: %d cases (%d data sets) passed, %d cases outside the MLP subset", passed, nsets, len(skipped))
	for _, op := range []string{"gemm", "matmul", "add", "relu", "leakyrelu", "elu", "softplus", "sigmoid", "tanh", "softmax", "logsoftmax", "flatten", "identity", "dropout", "batchnorm"} {
		if ran[op] == 0 {
			t.Errorf("no conformance case ran for %s", op)
		}
	}
}
