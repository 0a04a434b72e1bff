// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
)

// fixtureDir holds the models written by testdata/gen/onnx_models.py
// (PyTorch 1.13.1, onnx 1.12 from Debian; versions are in each sidecar).
const fixtureDir = "../testdata/onnx"

// sidecar is the JSON file written beside each fixture.
type sidecar struct {
	Versions  map[string]string `json:"versions"`
	Opset     int64             `json:"opset"`
	IRVersion int64             `json:"ir_version"`
	Reference string            `json:"reference"`
	Ops       []string          `json:"ops"`
	Input     [][]float64       `json:"input"`
	Stages    []struct {
		Module string      `json:"module"`
		Output [][]float64 `json:"output"`
	} `json:"stages"`
}

func fixtures(t testing.TB) []string {
	t.Helper()
	names, err := filepath.Glob(filepath.Join(fixtureDir, "*.onnx"))
	if err != nil {
		t.Fatal(err)
	}
	if len(names) < 12 {
		t.Fatalf("found %d fixtures in %s, want at least 12 (run testdata/gen/onnx_models.py)", len(names), fixtureDir)
	}
	return names
}

func readSidecar(t testing.TB, model string) *sidecar {
	t.Helper()
	b, err := os.ReadFile(strings.TrimSuffix(model, ".onnx") + ".json")
	if err != nil {
		t.Fatal(err)
	}
	var s sidecar
	if err := json.Unmarshal(b, &s); err != nil {
		t.Fatal(err)
	}
	return &s
}

func denseOf(rows [][]float64) *mat.Dense {
	m := mat.NewDense(len(rows), len(rows[0]), nil)
	for i, r := range rows {
		m.SetRow(i, r)
	}
	return m
}

// TestFixturesAgreeWithTorch checks every stage output of every fixture
// against the reference outputs in the sidecar: PyTorch's per-module
// outputs (forward hooks), or NumPy for the hand-built graph.
func TestFixturesAgreeWithTorch(t *testing.T) {
	opsets := map[int64]bool{}
	ops := map[string]bool{}
	for _, path := range fixtures(t) {
		name := filepath.Base(path)
		t.Run(name, func(t *testing.T) {
			side := readSidecar(t, path)
			if side.Versions["torch"] == "" || side.Versions["onnx"] == "" {
				t.Errorf("sidecar does not record the torch and onnx versions: %v", side.Versions)
			}
			m, err := onnxload.Open(path, nil)
			if err != nil {
				t.Fatal(err)
			}
			if m.Opset != side.Opset || m.IRVersion != side.IRVersion {
				t.Errorf("opset, IR = %d, %d; want %d, %d", m.Opset, m.IRVersion, side.Opset, side.IRVersion)
			}
			opsets[m.Opset] = true
			var got []string
			seen := map[string]bool{}
			for _, n := range m.Nodes {
				ops[n.OpType] = true
				if !seen[n.OpType] {
					seen[n.OpType] = true
					got = append(got, n.OpType)
				}
			}
			sort.Strings(got)
			if strings.Join(got, ",") != strings.Join(side.Ops, ",") {
				t.Errorf("op types %v, onnx reports %v", got, side.Ops)
			}
			stages, err := m.Stages(nil)
			if err != nil {
				t.Fatal(err)
			}
			// Every node of the graph is an origin of exactly one stage.
			count := map[string]int{}
			for _, st := range stages {
				for _, n := range st.Nodes {
					count[n]++
				}
			}
			for _, n := range m.Nodes {
				if count[n.Name] != 1 {
					t.Errorf("node %q (%s) is listed in %d stages, want 1", n.Name, n.OpType, count[n.Name])
				}
			}
			if len(stages) != len(side.Stages) {
				t.Fatalf("%d stages, reference has %d modules", len(stages), len(side.Stages))
			}
			outs, err := onnxload.Forward(t.Context(), stages, denseOf(side.Input), nil)
			if err != nil {
				t.Fatal(err)
			}
			for k, ref := range side.Stages {
				if stages[k].Name != ref.Module {
					t.Errorf("stage %d is named %q, the module is %q", k, stages[k].Name, ref.Module)
				}
				worst := 0.0
				for i, row := range ref.Output {
					for j, want := range row {
						g := outs[k].At(i, j)
						// Relative 1e-5 (the acceptance tolerance); values
						// within 1e-6 of zero are compared absolutely.
						if !scalar.EqualWithinAbsOrRel(g, want, 1e-6, 1e-5) {
							t.Errorf("stage %d (%s %s) row %d col %d: got %.9g, want %.9g (%s)", k, stages[k].Kind, ref.Module, i, j, g, want, side.Reference)
						}
						worst = math.Max(worst, math.Abs(g-want)/math.Max(math.Abs(want), 1e-6))
					}
				}
				if r, c := outs[k].Dims(); r != len(ref.Output) || c != len(ref.Output[0]) {
					t.Errorf("stage %d output is %d×%d, want %d×%d", k, r, c, len(ref.Output), len(ref.Output[0]))
				}
				t.Logf("stage %d %-11s %-8s %d→%d worst relative error %.2g", k, stages[k].Kind, ref.Module, stages[k].In, stages[k].Out, worst)
			}
		})
	}
	for _, want := range []int64{7, 9, 11, 13, 14, 17} {
		if !opsets[want] {
			t.Errorf("no fixture at opset %d", want)
		}
	}
	for _, op := range onnxload.SupportedOps {
		if !ops[op] {
			t.Errorf("no fixture uses %s", op)
		}
	}
}
