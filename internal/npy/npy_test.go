// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package npy

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"testing"
)

// TestNumpyFixtures reads every fixture numpy wrote
// (testdata/gen/npy_fixtures.py; numpy's version is in expected.json)
// and checks shape, dtype and values against numpy's own listing.
func TestNumpyFixtures(t *testing.T) {
	b, err := os.ReadFile("../../testdata/npy/expected.json")
	if err != nil {
		t.Fatal(err)
	}
	var want struct {
		Numpy string
		Cases map[string]struct {
			Descr   string
			Shape   []int
			Fortran bool
			Values  []any
		}
	}
	if err := json.Unmarshal(b, &want); err != nil {
		t.Fatal(err)
	}
	if len(want.Cases) < 25 {
		t.Fatalf("%d cases in expected.json", len(want.Cases))
	}
	for name, w := range want.Cases {
		t.Run(name, func(t *testing.T) {
			f, err := os.Open(filepath.Join("../../testdata/npy", name+".npy"))
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			a, err := Read(f)
			if err != nil {
				t.Fatal(err)
			}
			if a.Descr != w.Descr || !slices.Equal(a.Shape, w.Shape) {
				t.Errorf("dtype %s shape %v, numpy %s says %s %v", a.Descr, a.Shape, want.Numpy, w.Descr, w.Shape)
			}
			for i, v := range w.Values {
				switch v := v.(type) {
				case string:
					if a.Strings[i] != v {
						t.Errorf("element %d: %q, want %q", i, a.Strings[i], v)
					}
				case float64:
					if a.Numbers[i] != v {
						t.Errorf("element %d: %v, want %v", i, a.Numbers[i], v)
					}
				}
			}
		})
	}
}

// header builds an NPY v1 file with the given header text and data.
func header(h string, data []byte) []byte {
	var b bytes.Buffer
	b.WriteString("\x93NUMPY\x01\x00")
	binary.Write(&b, binary.LittleEndian, uint16(len(h)))
	b.WriteString(h)
	b.Write(data)
	return b.Bytes()
}

// TestHostile checks that malformed and hostile files are refused with
// a message naming the problem, without a panic and without allocating
// what the header claims.
func TestHostile(t *testing.T) {
	v2 := []byte("\x93NUMPY\x02\x00\xff\xff\xff\x7f{")
	for _, tc := range []struct {
		name string
		in   []byte
		want string
	}{
		{"empty", nil, "too short"},
		{"magic", []byte("PK\x03\x04 not numpy"), "magic"},
		{"version", []byte("\x93NUMPY\x09\x00\x00\x00"), "version 9.0"},
		{"short header length", []byte("\x93NUMPY\x01\x00\x10"), "header length"},
		{"truncated header", header("{'descr': '<f8', 'fortran_order': False, 'shape': (2,), }", nil)[:20], "header truncated"},
		{"huge v2 header", v2, "above the limit"},
		{"negative shape", header("{'descr': '<f8', 'fortran_order': False, 'shape': (-1, 4), }", nil), "not a non-negative integer"},
		{"huge shape", header("{'descr': '<f8', 'fortran_order': False, 'shape': (100000000, 4), }", make([]byte, 2000)), "more than"},
		{"overflowing shape", header("{'descr': '<f8', 'fortran_order': False, 'shape': (4611686018427387904, 4), }", nil), "more than"},
		{"truncated data", header("{'descr': '<f8', 'fortran_order': False, 'shape': (1000, 4), }", make([]byte, 2000)), "data truncated"},
		{"structured dtype", header("{'descr': [('a', '<f8')], 'fortran_order': False, 'shape': (2,), }", nil), "structured"},
		{"object dtype", header("{'descr': '|O', 'fortran_order': False, 'shape': (2,), }", nil), "dtype"},
		{"complex dtype", header("{'descr': '<c16', 'fortran_order': False, 'shape': (2,), }", nil), "not supported"},
		{"no shape", header("{'descr': '<f8', 'fortran_order': False, }", nil), "lacks \"shape\""},
		{"not a dict", header("descr", nil), "not a dictionary"},
		{"many dims", header("{'descr': '<f8', 'fortran_order': False, 'shape': ("+strings.Repeat("1,", 40)+"), }", nil), "dimensions"},
		{"bad code point", header("{'descr': '<U1', 'fortran_order': False, 'shape': (1,), }", []byte{0, 0, 0x20, 0}), "not unicode"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var before, after runtime.MemStats
			runtime.ReadMemStats(&before)
			_, err := Read(bytes.NewReader(tc.in))
			runtime.ReadMemStats(&after)
			if err == nil || !strings.Contains(err.Error(), tc.want) {
				t.Fatalf("err = %v, want it to mention %q", err, tc.want)
			}
			if !errors.Is(err, ErrFormat) {
				t.Errorf("err = %v is not ErrFormat", err)
			}
			// The header is at most 1 MiB; nothing the shape claims is
			// allocated before the data is there.
			if got := after.TotalAlloc - before.TotalAlloc; got > 2<<20+uint64(16*len(tc.in)) {
				t.Errorf("allocated %d bytes for a %d-byte input", got, len(tc.in))
			}
		})
	}
}

func TestZeroRows(t *testing.T) {
	a, err := Read(bytes.NewReader(header("{'descr': '<f4', 'fortran_order': False, 'shape': (0, 4), }", nil)))
	if err != nil || !slices.Equal(a.Shape, []int{0, 4}) || len(a.Numbers) != 0 {
		t.Fatalf("got %+v, %v", a, err)
	}
}

func TestHalf(t *testing.T) {
	// IEEE 754-2008 binary16 reference values.
	for _, tc := range []struct {
		bits uint16
		want float64
	}{
		{0x3c00, 1}, {0xc000, -2}, {0x7bff, 65504}, {0x0001, math.Ldexp(1, -24)}, {0x3555, 0.333251953125}, {0x7c00, math.Inf(1)},
	} {
		if got := half(tc.bits); got != tc.want {
			t.Errorf("half(%#04x) = %v, want %v", tc.bits, got, tc.want)
		}
	}
	if !math.IsNaN(half(0x7e00)) {
		t.Error("half(0x7e00) is not NaN")
	}
}

func FuzzRead(f *testing.F) {
	for _, name := range []string{"f8_le", "f2_be", "U_le", "f8_fortran", "bool"} {
		b, err := os.ReadFile(filepath.Join("../../testdata/npy", name+".npy"))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(b)
	}
	f.Add(header("{'descr': '<f8', 'fortran_order': True, 'shape': (2, 3, 1), }", make([]byte, 48)))
	f.Fuzz(func(t *testing.T, b []byte) {
		a, err := Read(bytes.NewReader(b))
		if err != nil {
			return
		}
		n := 1
		for _, d := range a.Shape {
			n *= d
		}
		if got := len(a.Numbers) + len(a.Strings); got != n {
			t.Fatalf("shape %v but %d elements", a.Shape, got)
		}
		_ = fmt.Sprint(a.Kind)
	})
}
