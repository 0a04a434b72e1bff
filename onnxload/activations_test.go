// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"encoding/json"
	"errors"
	"maps"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"crease.dev/crease/onnxload"
)

// TestActivationFixtures checks that each activation PyTorch 1.13
// exports (testdata/gen/onnx_activations.py; the exports per opset are
// in testdata/onnx/act_exports.json) becomes one stage of its own kind
// with the parameters of the torch module. The stage outputs are
// checked against torch by TestFixturesAgreeWithTorch.
func TestActivationFixtures(t *testing.T) {
	f32 := func(v float64) float64 { return float64(float32(v)) }
	// What each activation must become, by the name in act_<name>_op<N>.
	want := map[string]struct {
		kind        onnxload.Kind
		alpha, beta float64
		slope       []float64
		reason      string
	}{
		"relu6":       {onnxload.ReLU6, 0, 6, nil, "Clip(0, 6): min, max attributes before opset 11, Constant inputs from 11"},
		"hardtanh":    {onnxload.Hardtanh, -0.5, 1.25, nil, "nn.Hardtanh(-0.5, 1.25) as Clip"},
		"prelu":       {onnxload.PReLU, 0, 0, []float64{f32(0.1), f32(0.1), f32(0.1), f32(0.1)}, "one slope broadcast to 4 units"},
		"prelu4":      {onnxload.PReLU, 0, 0, []float64{f32(0.1), f32(-0.3), f32(0.6), f32(0.2)}, "a slope per unit"},
		"hardsigmoid": {onnxload.HardSigmoid, f32(1.0 / 6), 0.5, nil, "HardSigmoid, alpha 1/6 as float32"},
		"hardswish":   {onnxload.HardSwish, 0, 0, nil, "the HardSigmoid·Mul pattern before opset 14, the HardSwish operator from 14"},
		"selu":        {onnxload.SELU, 1.67326319217681884765625, 1.05070102214813232421875, nil, "Selu with ONNX's default alpha, gamma"},
		"celu":        {onnxload.CELU, f32(0.7), 0, nil, "Celu(alpha 0.7); torch 1.13 refuses to export CELU below opset 12"},
		"mish":        {onnxload.Mish, 0, 0, nil, "the Softplus·Tanh·Mul pattern"},
		"gelu_tanh":   {onnxload.GELUTanh, 0, 0, nil, "the Mul/Add/Tanh pattern of approximate=\"tanh\""},
	}
	b, err := os.ReadFile(filepath.Join(fixtureDir, "act_exports.json"))
	if err != nil {
		t.Fatal(err)
	}
	var rec struct {
		Exports map[string]struct {
			Error string `json:"error"`
		} `json:"exports"`
	}
	if err := json.Unmarshal(b, &rec); err != nil {
		t.Fatal(err)
	}
	files := slices.Sorted(maps.Keys(rec.Exports))
	if len(files) != len(want)*11 {
		t.Fatalf("%d exports recorded, want %d activations at opsets 7..17", len(files), len(want))
	}
	for _, file := range files {
		if rec.Exports[file].Error != "" {
			continue
		}
		name := strings.TrimPrefix(file[:strings.LastIndex(file, "_op")], "act_")
		w, ok := want[name]
		if !ok {
			t.Errorf("%s: no expectation for activation %q", file, name)
			continue
		}
		c := struct {
			file        string
			kind        onnxload.Kind
			alpha, beta float64
			slope       []float64
			reason      string
		}{file, w.kind, w.alpha, w.beta, w.slope, w.reason}
		t.Run(c.file, func(t *testing.T) {
			m, err := onnxload.Open(filepath.Join(fixtureDir, c.file+".onnx"), nil)
			if err != nil {
				t.Fatal(err)
			}
			stages, err := m.Stages(nil)
			if err != nil {
				t.Fatalf("%s: %v", c.reason, err)
			}
			var kinds []onnxload.Kind
			for _, s := range stages {
				kinds = append(kinds, s.Kind)
			}
			want := []onnxload.Kind{onnxload.Affine, c.kind, onnxload.Affine}
			if !slices.Equal(kinds, want) {
				t.Fatalf("%s: kinds %v, want %v", c.reason, kinds, want)
			}
			s := stages[1]
			if s.Alpha != c.alpha || s.Beta != c.beta || !slices.Equal(s.Slope, c.slope) {
				t.Errorf("%s: Alpha, Beta, Slope = %v, %v, %v; want %v, %v, %v", c.reason, s.Alpha, s.Beta, s.Slope, c.alpha, c.beta, c.slope)
			}
			if s.Name != "1" {
				t.Errorf("%s: stage named %q, want the module name \"1\"", c.reason, s.Name)
			}
		})
	}
}

// TestKindNames checks the names of the activation kinds.
func TestKindNames(t *testing.T) {
	for k, want := range map[onnxload.Kind]string{
		onnxload.ReLU6: "relu6", onnxload.Hardtanh: "hardtanh", onnxload.PReLU: "prelu",
		onnxload.HardSigmoid: "hardsigmoid", onnxload.HardSwish: "hardswish", onnxload.SELU: "selu",
		onnxload.CELU: "celu", onnxload.Mish: "mish", onnxload.GELUTanh: "gelu-tanh",
	} {
		if got := k.String(); got != want {
			t.Errorf("Kind(%d).String() = %q, want %q", int(k), got, want)
		}
	}
}

// TestStagesUnsupportedOperator checks that an operator outside the
// table, or a pattern that does not match, gives an *UnsupportedError
// naming the node, the op and every supported operator and pattern.
func TestStagesUnsupportedOperator(t *testing.T) {
	attr := func(name string, v float64) onnxload.Attribute {
		return onnxload.Attribute{Name: name, Type: onnxload.AttrFloat, F: v}
	}
	for _, c := range []struct {
		name, node, op string
		m              *onnxload.Model
		reason         string
	}{
		{"pow", "/act/Pow", "Pow", chain(
			node("Pow", "/act/Pow", []string{"x", "c"}, "y")), "no Pow operator"},
		{"hardsigmoid mul", "/act/Mul", "Mul", chain(
			node("HardSigmoid", "/act/HardSigmoid", []string{"x"}, "h"),
			node("Mul", "/act/Mul", []string{"x", "h"}, "y")), "x·HardSigmoid(x) with the ONNX default alpha 0.2 is not Hardswish"},
		{"mish branch", "/act/Mul", "Mul", chain(
			node("Softplus", "/act/Softplus", []string{"x"}, "s"),
			node("Tanh", "/act/Tanh", []string{"s"}, "t"),
			node("Mul", "/act/Mul", []string{"t", "t"}, "y")), "Mul(tanh, tanh) is not Mish"},
		{"silu not x", "/act/Mul", "Mul", chain(
			node("HardSigmoid", "/act/HardSigmoid", []string{"x"}, "h", attr("alpha", 1.0/6)),
			node("Mul", "/act/Mul", []string{"h", "h"}, "y")), "Mul(h, h) is not Hardswish"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := c.m.Stages(nil)
			var ue *onnxload.UnsupportedError
			if !errors.As(err, &ue) {
				t.Fatalf("%s: got %v, want an UnsupportedError", c.reason, err)
			}
			if ue.Node != c.node || ue.Op != c.op {
				t.Errorf("%s: error names node %q op %q, want %q %q", c.reason, ue.Node, ue.Op, c.node, c.op)
			}
			msg := err.Error()
			for _, op := range onnxload.SupportedOps {
				if !strings.Contains(msg, op) {
					t.Errorf("%s: error %q does not list %s", c.reason, msg, op)
				}
			}
			for _, p := range []string{"GELU (Div, Erf", "SiLU (Sigmoid, Mul)", "Hardswish before opset 14", "Mish (Softplus, Tanh, Mul)", "approximate=\"tanh\""} {
				if !strings.Contains(msg, p) {
					t.Errorf("%s: error %q does not list the pattern %s", c.reason, msg, p)
				}
			}
		})
	}
	// HardSwish is defined from opset 14.
	m := chain(node("HardSwish", "/act/HardSwish", []string{"x"}, "y"))
	_, err := m.Stages(nil)
	var ue *onnxload.UnsupportedError
	if !errors.As(err, &ue) || ue.Node != "/act/HardSwish" || !strings.Contains(err.Error(), "opset 14") {
		t.Errorf("HardSwish at opset 13: got %v, want an UnsupportedError naming opset 14", err)
	}
	if !slices.IsSorted(onnxload.SupportedOps) || slices.Contains(onnxload.SupportedOps, "Mul") {
		t.Errorf("SupportedOps %v is not sorted or lists Mul, which is supported only inside patterns", onnxload.SupportedOps)
	}
}

// TestClipBounds checks the bounds of Clip stages: attributes before
// opset 11, optional inputs from 11 (an empty name is no bound).
func TestClipBounds(t *testing.T) {
	inf := math.Inf(1)
	for _, c := range []struct {
		name   string
		opset  int64
		inputs []string
		attrs  []onnxload.Attribute
		kind   onnxload.Kind
		lo, hi float64
		reason string
	}{
		{"attrs", 9, []string{"x"}, []onnxload.Attribute{{Name: "min", Type: onnxload.AttrFloat, F: 0}, {Name: "max", Type: onnxload.AttrFloat, F: 6}}, onnxload.ReLU6, 0, 6, "opset 9 reads attributes"},
		{"no max attr", 9, []string{"x"}, []onnxload.Attribute{{Name: "min", Type: onnxload.AttrFloat, F: -1}}, onnxload.Hardtanh, -1, inf, "an absent max is no bound"},
		{"inputs", 13, []string{"x", "lo", "hi"}, nil, onnxload.Hardtanh, -1, 2, "opset 13 reads inputs"},
		{"empty min", 13, []string{"x", "", "six"}, nil, onnxload.Hardtanh, -inf, 6, "an empty input name is no bound"},
		{"relu6", 13, []string{"x", "zero", "six"}, nil, onnxload.ReLU6, 0, 6, "bounds 0 and 6 are relu6"},
	} {
		t.Run(c.name, func(t *testing.T) {
			m := chain(&onnxload.Node{Name: "/act/Clip", OpType: "Clip", Inputs: c.inputs, Outputs: []string{"y"}, Attributes: c.attrs})
			m.Opset = c.opset
			for name, v := range map[string]float64{"lo": -1, "hi": 2, "zero": 0, "six": 6} {
				m.Initializers = append(m.Initializers, &onnxload.Tensor{Name: name, DataType: onnxload.Float, Float64: []float64{v}})
			}
			stages, err := m.Stages(nil)
			if err != nil {
				t.Fatalf("%s: %v", c.reason, err)
			}
			s := stages[0]
			if s.Kind != c.kind || s.Alpha != c.lo || s.Beta != c.hi {
				t.Errorf("%s: %v [%v, %v], want %v [%v, %v]", c.reason, s.Kind, s.Alpha, s.Beta, c.kind, c.lo, c.hi)
			}
		})
	}
}
