// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"bufio"
	"context"
	"fmt"
	"io"
	"runtime"
	"strconv"
	"sync"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
)

func init() {
	register(&command{
		name:    "forward",
		summary: "push a CSV sample through an ONNX model and print a stage's output",
		run:     runForward,
	})
}

func runForward(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("forward", "[--stage K] [--fuse] MODEL.onnx INPUT.csv", stderr)
	labelCol := fs.String("labels", "", "read the labeled CSV of crease trace and drop this label column (header name or 1-based number)")
	headerMode := fs.String("header", "auto", "with --labels: is the first record a header: auto, yes or no")
	stage := fs.Int("stage", -1, "stage whose output to print, numbered as by 'crease stages' and 'crease trace' (0 is the input, 1 the first stage); negative counts from the end (-1 is the last)")
	fuse := fs.Bool("fuse", false, "fuse consecutive affine stages, so K counts layers")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		fs.Usage()
		return fmt.Errorf("usage: want a model and an input file (- for stdin), got %d arguments", len(pos))
	}
	_, stages, err := loadModelStages(pos[0], *fuse)
	if err != nil {
		return err
	}
	// Stage 0 is the input and stage k ≥ 1 the output of model stage
	// k−1, as in crease stages and crease trace.
	k := *stage
	if k < 0 {
		k += len(stages) + 1
	}
	if k < 0 || k > len(stages) {
		return fmt.Errorf("--stage %d is out of range: %s has stages 0 (the input) to %d", *stage, pos[0], len(stages))
	}
	x, name, err := readPoints(pos[1], stdin, *labelCol, *headerMode)
	if err != nil {
		return err
	}
	if _, width := x.Dims(); width != stages[0].In {
		return fmt.Errorf("%s has %d columns but %s takes inputs of width %d", name, width, pos[0], stages[0].In)
	}
	if k == 0 {
		return writeForwardCSV(stdout, x)
	}
	outs, err := onnxload.Forward(ctx, stages[:k], x, nil)
	if err != nil {
		return err
	}
	return writeForwardCSV(stdout, outs[k-1])
}

// writeForwardCSV prints m one row per line with %.17g, which
// round-trips. Blocks of rows are formatted side by side on up to
// GOMAXPROCS goroutines (the forward pass is over by then) and written in
// order.
func writeForwardCSV(w io.Writer, m *mat.Dense) error {
	const blockRows = 1024
	bw := bufio.NewWriter(w)
	r, c := m.Dims()
	workers := max(1, runtime.GOMAXPROCS(0))
	bufs := make([][]byte, workers)
	for start := 0; start < r; start += workers * blockRows {
		var wg sync.WaitGroup
		for k := range workers {
			lo := start + k*blockRows
			hi := min(lo+blockRows, r)
			if lo >= hi {
				bufs[k] = bufs[k][:0]
				continue
			}
			wg.Add(1)
			go func() {
				defer wg.Done()
				buf := bufs[k][:0]
				for i := lo; i < hi; i++ {
					for j, v := range m.RawRowView(i)[:c] {
						if j > 0 {
							buf = append(buf, ',')
						}
						buf = strconv.AppendFloat(buf, v, 'g', 17, 64)
					}
					buf = append(buf, '\n')
				}
				bufs[k] = buf
			}()
		}
		wg.Wait()
		for _, buf := range bufs {
			if _, err := bw.Write(buf); err != nil {
				return err
			}
		}
	}
	return bw.Flush()
}
