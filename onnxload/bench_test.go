// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package onnxload_test

import (
	"fmt"
	"math"
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

// mlpStages returns a ReLU MLP with the given widths and random
// weights (the 784→512→256→10 network of bench/forward_torch.py).
func mlpStages(widths ...int) []onnxload.Stage {
	var st []onnxload.Stage
	for k := 1; k < len(widths); k++ {
		in, out := widths[k-1], widths[k]
		w := randomRows(out, in, uint64(k))
		w.Scale(2/math.Sqrt(float64(in)), w)
		st = append(st, onnxload.Stage{Kind: onnxload.Affine, In: in, Out: out, W: w, B: make([]float64, out)})
		if k < len(widths)-1 {
			st = append(st, onnxload.Stage{Kind: onnxload.ReLU, In: out, Out: out})
		}
	}
	return st
}

// BenchmarkForward times the forward pass in rows per second; the
// figures of torch 1.13 on the same networks come from
// bench/forward_torch.py.
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
	mlp := mlpStages(784, 512, 256, 10)
	for _, n := range []int{1000, 20000} {
		x := randomRows(n, 784, 2)
		b.Run(fmt.Sprintf("mlp784/n=%d", n), func(b *testing.B) {
			for b.Loop() {
				if _, err := onnxload.Forward(b.Context(), mlp, x, nil); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "rows/s")
		})
	}
}
