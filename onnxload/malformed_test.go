// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"bytes"
	"encoding/json"
	"errors"
	"os"
	"path/filepath"
	"runtime"
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

// Memory per input byte: the decoder may allocate at most
// decodePerByte bytes for each byte of input plus decodeFixed; the stage
// builder and the forward pass may add what fuzzLimits.MaxElements
// allows (float64 weights, counted three times over for the builder's
// copies). The multiples are ours: a decoded node costs about a hundred
// bytes of structs and strings for the eight or more bytes that encode
// it.
const (
	decodePerByte = 64
	decodeFixed   = 256 << 10
)

// allocated returns the bytes allocated while fn ran.
func allocated(fn func()) uint64 {
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	fn()
	runtime.ReadMemStats(&after)
	return after.TotalAlloc - before.TotalAlloc
}

// seedModels adds the small fixtures and the malformed corpus to f.
func seedModels(f *testing.F) {
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
}

// FuzzDecode feeds arbitrary bytes to the decoder, the stage builder and
// the forward pass. Every failure must be a typed error; nothing may
// panic; the decoder's allocations stay within decodePerByte per input
// byte plus decodeFixed, and the whole run's within that plus what
// MaxElements allows. Seeds are the fixtures and the malformed corpus.
func FuzzDecode(f *testing.F) {
	seedModels(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		var m *onnxload.Model
		var err error
		bound := decodePerByte*uint64(len(data)) + decodeFixed
		if got := allocated(func() { m, err = onnxload.DecodeBytes(data, fuzzLimits) }); got > bound {
			t.Fatalf("decoding %d bytes allocated %d bytes, above %d per byte plus %d", len(data), got, decodePerByte, decodeFixed)
		}
		if err != nil {
			if errClass(err) == "" {
				t.Fatalf("untyped decode error: %v", err)
			}
			return
		}
		var stages []onnxload.Stage
		bound += 3 * 8 * uint64(fuzzLimits.MaxElements)
		if got := allocated(func() { stages, err = m.Stages(nil) }); got > bound {
			t.Fatalf("building the stages of %d bytes allocated %d bytes, above %d", len(data), got, bound)
		}
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

// FuzzDecodeConfig feeds arbitrary bytes to DecodeConfig: typed errors
// only, no panic, and allocations bounded per input byte as for Decode.
func FuzzDecodeConfig(f *testing.F) {
	seedModels(f)
	f.Fuzz(func(t *testing.T, data []byte) {
		var err error
		bound := decodePerByte*uint64(len(data)) + decodeFixed
		if got := allocated(func() { _, err = onnxload.DecodeConfig(bytes.NewReader(data), fuzzLimits) }); got > bound {
			t.Fatalf("reading the header of %d bytes allocated %d bytes, above %d", len(data), got, bound)
		}
		if err != nil && errClass(err) == "" {
			t.Fatalf("untyped error: %v", err)
		}
	})
}

// FuzzDecodeTensor feeds arbitrary bytes to DecodeTensor, seeded with the
// initializers of the fixtures (each re-encoded as a TensorProto): typed
// errors only, no panic, allocations bounded per input byte, and a
// decoded tensor holds exactly the elements its dims declare.
func FuzzDecodeTensor(f *testing.F) {
	for _, pb := range []string{"input_0.pb", "output_0.pb"} {
		names, _ := filepath.Glob(filepath.Join(conformanceDir, "test_gemm_*", "test_data_set_0", pb))
		for _, n := range names {
			if b, err := os.ReadFile(n); err == nil && len(b) <= 4096 {
				f.Add(b)
			}
		}
	}
	f.Add([]byte{0x08, 0x02, 0x08, 0x03, 0x10, 0x01, 0x4a, 0x18})                                              // dims 2,3 float, raw_data cut short
	f.Add([]byte{0x08, 0x02, 0x10, 0x0b, 0x52, 0x10, 0, 0, 0, 0, 0, 0, 0xf0, 0x3f, 0, 0, 0, 0, 0, 0, 0, 0x40}) // double_data [1, 2]
	f.Fuzz(func(t *testing.T, data []byte) {
		var tn *onnxload.Tensor
		var err error
		bound := decodePerByte*uint64(len(data)) + decodeFixed
		if got := allocated(func() { tn, err = onnxload.DecodeTensor(bytes.NewReader(data), fuzzLimits) }); got > bound {
			t.Fatalf("decoding a tensor of %d bytes allocated %d bytes, above %d", len(data), got, bound)
		}
		if err != nil {
			if errClass(err) == "" {
				t.Fatalf("untyped error: %v", err)
			}
			return
		}
		n := 1
		for _, d := range tn.Dims {
			n *= int(d)
		}
		if got := len(tn.Float64) + len(tn.Int64); got != n {
			t.Fatalf("tensor of dims %v holds %d values", tn.Dims, got)
		}
	})
}
