// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
)

const malformedDir = "../testdata/onnx/malformed"

// errClass names the typed error in err: "format", "unsupported",
// "limit", or "" if it is none of them.
func errClass(err error) string {
	var fe *onnxload.FormatError
	var ue *onnxload.UnsupportedError
	var le *onnxload.LimitError
	switch {
	case errors.As(err, &fe):
		return "format"
	case errors.As(err, &ue):
		return "unsupported"
	case errors.As(err, &le):
		return "limit"
	}
	return ""
}

// TestMalformed checks every file of the corpus written by
// testdata/gen/onnx_malformed.py gives the typed error its manifest
// names, at the step it names, without panicking.
func TestMalformed(t *testing.T) {
	b, err := os.ReadFile(filepath.Join(malformedDir, "manifest.json"))
	if err != nil {
		t.Fatal(err)
	}
	var man struct {
		Files map[string]struct {
			Want, At, Why string
		}
	}
	if err := json.Unmarshal(b, &man); err != nil {
		t.Fatal(err)
	}
	if len(man.Files) < 25 {
		t.Fatalf("corpus has %d files, want at least 25", len(man.Files))
	}
	for name, c := range man.Files {
		t.Run(name, func(t *testing.T) {
			path := filepath.Join(malformedDir, name)
			m, err := onnxload.Open(path, nil)
			if c.At == "stages" {
				if err != nil {
					t.Fatalf("decode: %v (want success, then a %s error from Stages: %s)", err, c.Want, c.Why)
				}
				_, err = m.Stages(nil)
			}
			if err == nil {
				t.Fatalf("no error, want %s (%s)", c.Want, c.Why)
			}
			if got := errClass(err); got != c.Want {
				t.Fatalf("error %q is of class %q, want %q (%s)", err, got, c.Want, c.Why)
			}
			if c.At == "decode" {
				var pe *os.PathError
				if !errors.As(err, &pe) || pe.Path != path {
					t.Errorf("error %q does not name the file", err)
				}
			}
			t.Logf("%s: %v", c.Why, err)
		})
	}
}

// fuzzLimits keep each fuzz execution small.
var fuzzLimits = &onnxload.Limits{MaxFileBytes: 1 << 20, MaxElements: 1 << 16, MaxDim: 1 << 12}

// FuzzDecode feeds arbitrary bytes to the decoder, the stage builder and
// the forward pass. Every failure must be a typed error; nothing may
// panic. Seeds are the fixtures and the malformed corpus.
func FuzzDecode(f *testing.F) {
	for _, pat := range []string{filepath.Join(fixtureDir, "*.onnx"), filepath.Join(malformedDir, "*.onnx")} {
		names, _ := filepath.Glob(pat)
		for _, n := range names {
			b, err := os.ReadFile(n)
			if err != nil {
				f.Fatal(err)
			}
			// Large seeds (digits.onnx and its long truncations) make
			// the engine spend its time minimizing; the small ones
			// cover the same fields.
			if len(b) <= 4096 {
				f.Add(b)
			}
		}
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		m, err := onnxload.DecodeBytes(data, fuzzLimits)
		if err != nil {
			if errClass(err) == "" {
				t.Fatalf("untyped decode error: %v", err)
			}
			return
		}
		stages, err := m.Stages(nil)
		if err != nil {
			if errClass(err) == "" {
				t.Fatalf("untyped stages error: %v", err)
			}
			return
		}
		if len(stages) == 0 {
			return
		}
		x := mat.NewDense(2, stages[0].In, nil)
		if _, err := onnxload.Forward(t.Context(), stages, x, nil); err != nil {
			t.Fatalf("forward on stages the builder accepted: %v", err)
		}
		if _, err := m.Stages(&onnxload.StageSettings{FuseAffine: true}); err != nil && errClass(err) != "limit" {
			t.Fatalf("fused stages failed where unfused succeeded: %v", err)
		}
	})
}
