// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bytes"
	"encoding/json"
	"os"
	"strconv"
	"strings"
	"testing"
)

const onnxFixtures = "../../testdata/onnx/"

// onnxReference is the part of a fixture's sidecar the CLI tests use:
// input rows and PyTorch's per-module outputs (written by
// testdata/gen/onnx_models.py with PyTorch 1.13.1).
type onnxReference struct {
	Input  [][]float64 `json:"input"`
	Stages []struct {
		Module string      `json:"module"`
		Output [][]float64 `json:"output"`
	} `json:"stages"`
}

func readOnnxReference(t *testing.T, name string) *onnxReference {
	t.Helper()
	b, err := os.ReadFile(onnxFixtures + name + ".json")
	if err != nil {
		t.Fatal(err)
	}
	var r onnxReference
	if err := json.Unmarshal(b, &r); err != nil {
		t.Fatal(err)
	}
	return &r
}

func TestStagesTable(t *testing.T) {
	for _, name := range []string{"digits", "opset9_batchnorm", "opset11_leaky_elu", "dynamic_batch"} {
		t.Run(name, func(t *testing.T) {
			ref := readOnnxReference(t, name)
			var out, errb bytes.Buffer
			code := creaseMain(t.Context(), []string{"stages", onnxFixtures + name + ".onnx"}, nil, &out, &errb)
			if code != 0 {
				t.Fatalf("exit %d: %s", code, errb.String())
			}
			lines := strings.Split(strings.TrimSpace(out.String()), "\n")
			// Two header lines, the column header, the input (stage 0),
			// then one line per stage.
			if f := strings.Fields(lines[3]); f[0] != "0" || f[1] != "input" {
				t.Errorf("line %q: want stage 0, the input", lines[3])
			}
			if len(lines) != 4+len(ref.Stages) {
				t.Fatalf("%d lines, want %d stages:\n%s", len(lines), len(ref.Stages), out.String())
			}
			for k, s := range ref.Stages {
				f := strings.Fields(lines[4+k])
				if f[0] != strconv.Itoa(k+1) || f[3] != s.Module {
					t.Errorf("line %q: want stage %d named %q (the PyTorch module)", lines[4+k], k+1, s.Module)
				}
				if w := len(s.Output[0]); !strings.HasSuffix(f[2], "→"+strconv.Itoa(w)) {
					t.Errorf("line %q: want output width %d", lines[4+k], w)
				}
			}
		})
	}
	// The dynamic batch dimension is printed by its symbolic name.
	var out bytes.Buffer
	creaseMain(t.Context(), []string{"stages", onnxFixtures + "dynamic_batch.onnx"}, nil, &out, &out)
	if !strings.Contains(out.String(), "(batch, 2, 4)") {
		t.Errorf("input shape not shown with its symbolic batch:\n%s", out.String())
	}
	// --fuse merges Gemm and BatchNormalization into one affine stage.
	out.Reset()
	creaseMain(t.Context(), []string{"stages", "--fuse", onnxFixtures + "opset9_batchnorm.onnx"}, nil, &out, &out)
	if !strings.Contains(out.String(), "0+1") || strings.Count(out.String(), "affine") != 2 {
		t.Errorf("--fuse did not merge the first Linear with its BatchNorm:\n%s", out.String())
	}
}

func TestStagesErrors(t *testing.T) {
	for _, c := range []struct {
		name, want string
		args       []string
	}{
		{"no args", "want one model file", []string{"stages"}},
		{"missing file", "no such file", []string{"stages", "nonexistent.onnx"}},
		{"malformed", "raw_data has 20 bytes", []string{"stages", onnxFixtures + "malformed/short_raw_data.onnx"}},
		{"unsupported op", `node "/conv/Conv" (Conv)`, []string{"stages", onnxFixtures + "malformed/conv.onnx"}},
		{"bad flag", "flag provided but not defined", []string{"stages", "--nope", onnxFixtures + "iris.onnx"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var out, errb bytes.Buffer
			code := creaseMain(t.Context(), c.args, nil, &out, &errb)
			if code != 2 {
				t.Errorf("exit %d, want 2", code)
			}
			if !strings.Contains(errb.String(), c.want) {
				t.Errorf("stderr %q does not contain %q", errb.String(), c.want)
			}
			if out.Len() != 0 {
				t.Errorf("stdout not empty: %q", out.String())
			}
		})
	}
}
