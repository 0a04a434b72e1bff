// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package demo

import (
	"bytes"
	"context"
	"crypto/sha256"
	"embed"
	"encoding/hex"
	"encoding/json"
	"fmt"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

//go:embed data/arm.csv data/arm.json data/arm_wide.onnx data/arm_narrow.onnx data/arm_wide.onnx.json data/arm_narrow.onnx.json
var files embed.FS

// Names of the embedded models.
const (
	// Wide is the well-sized model, 4→16→16→3 with a softmax output.
	Wide = "arm_wide"
	// Narrow is the model with a 2-unit first layer, 4→2→16→3.
	Narrow = "arm_narrow"
)

// Models lists the embedded models in the order the demo shows them.
var Models = []string{Wide, Narrow}

// SampleFile is the name of the embedded sample, as recorded in traces.
const SampleFile = "arm.csv"

// Sample returns the demo sample: 300 configurations per class, columns
// cos1, sin1, cos2, sin2, labels "clear", "contact", "near".
func Sample() (*trace.Sample, error) {
	data, err := files.ReadFile("data/arm.csv")
	if err != nil {
		return nil, err
	}
	return trace.ReadCSV(bytes.NewReader(data), SampleFile, &trace.CSVSettings{Label: "class"})
}

// SampleCSV returns the bytes of the embedded sample file.
func SampleCSV() []byte {
	data, err := files.ReadFile("data/arm.csv")
	if err != nil {
		panic("demo: embedded sample missing: " + err.Error())
	}
	return data
}

// Model returns the bytes of the embedded ONNX model name (Wide or
// Narrow). It returns an error for any other name.
func Model(name string) ([]byte, error) {
	data, err := files.ReadFile("data/" + name + ".onnx")
	if err != nil {
		return nil, fmt.Errorf("demo: no embedded model %q (want %q or %q)", name, Wide, Narrow)
	}
	return data, nil
}

// Stages decodes the embedded model name and returns its stages, one per
// ONNX node.
func Stages(name string) ([]onnxload.Stage, error) {
	data, err := Model(name)
	if err != nil {
		return nil, err
	}
	m, err := onnxload.Decode(bytes.NewReader(data), nil)
	if err != nil {
		return nil, fmt.Errorf("demo: %s.onnx: %w", name, err)
	}
	st, err := m.Stages(nil)
	if err != nil {
		return nil, fmt.Errorf("demo: %s.onnx: %w", name, err)
	}
	return st, nil
}

// Run traces the embedded model name over the demo sample with set (nil
// means trace.DefaultSettings), the classes matched to the output units
// in the generator's order (Info.Classes) unless set gives an order, and
// records the model's embedded file name and SHA-256 in the trace.
func Run(ctx context.Context, name string, set *trace.Settings) (*trace.Trace, error) {
	data, err := Model(name)
	if err != nil {
		return nil, err
	}
	stages, err := Stages(name)
	if err != nil {
		return nil, err
	}
	s, err := Sample()
	if err != nil {
		return nil, err
	}
	if set == nil || len(set.ClassOrder) == 0 {
		// The generator's class order is the models' output order.
		meta, err := Meta()
		if err != nil {
			return nil, err
		}
		given := trace.DefaultSettings()
		if set != nil {
			c := *set
			given = &c
		}
		given.ClassOrder = meta.Classes
		set = given
	}
	tr, err := trace.Run(ctx, stages, s, set)
	if tr != nil {
		sum := sha256.Sum256(data)
		tr.Model = trace.ModelInfo{File: name + ".onnx", SHA256: hex.EncodeToString(sum[:])}
	}
	return tr, err
}

// Info is what the generator recorded about the scenario (data/arm.json).
type Info struct {
	// Classes are the class names in the generator's order.
	Classes []string `json:"classes"`
	// RegionBetti holds, per class, the Betti numbers (β₀, β₁, β₂) of the
	// class's region of the torus, computed on a fine grid.
	RegionBetti map[string][]int `json:"region_betti"`
	// SampleRipsBetti holds, per class and relative scale ("0.10",
	// "0.15", "0.20"), GUDHI's Rips Betti numbers (β₀, β₁) of the class's
	// 300 sample points at ε = scale × the class's diameter.
	SampleRipsBetti map[string]map[string][]int `json:"sample_rips_betti"`
	// Versions holds the library versions used by the generator.
	Versions map[string]string `json:"versions"`
}

// Meta returns the generator's record of the scenario.
func Meta() (*Info, error) {
	data, err := files.ReadFile("data/arm.json")
	if err != nil {
		return nil, err
	}
	var in Info
	if err := json.Unmarshal(data, &in); err != nil {
		return nil, fmt.Errorf("demo: arm.json: %w", err)
	}
	return &in, nil
}

// Training is the generator's training record of one model.
type Training struct {
	// Architecture describes the network.
	Architecture string `json:"architecture"`
	// AccuracyDemo is the model's accuracy on the demo sample, measured
	// with PyTorch before export.
	AccuracyDemo float64 `json:"accuracy_demo_sample"`
	// AccuracyTrain is its accuracy on the training set.
	AccuracyTrain float64 `json:"accuracy_train"`
	// Versions holds the library versions used by the generator.
	Versions map[string]string `json:"versions"`
}

// TrainingOf returns the training record of the embedded model name.
func TrainingOf(name string) (*Training, error) {
	data, err := files.ReadFile("data/" + name + ".onnx.json")
	if err != nil {
		return nil, fmt.Errorf("demo: no embedded model %q (want %q or %q)", name, Wide, Narrow)
	}
	var tr Training
	if err := json.Unmarshal(data, &tr); err != nil {
		return nil, fmt.Errorf("demo: %s.onnx.json: %w", name, err)
	}
	return &tr, nil
}
