// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"fmt"
	"os"
	"testing"

	"crease.dev/crease/onnxload"
)

func BenchmarkDecode(b *testing.B) {
	data, err := os.ReadFile(fixtureDir + "/digits.onnx")
	if err != nil {
		b.Fatal(err)
	}
	b.SetBytes(int64(len(data)))
	b.ReportAllocs()
	for b.Loop() {
		if _, err := onnxload.DecodeBytes(data, nil); err != nil {
			b.Fatal(err)
		}
	}
}

func BenchmarkForward(b *testing.B) {
	st := digitsStages(b, nil)
	for _, n := range []int{100, 1797, 20000} {
		x := randomRows(n, 64, 1)
		b.Run(fmt.Sprintf("digits/n=%d", n), func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				if _, err := onnxload.Forward(b.Context(), st, x, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}
