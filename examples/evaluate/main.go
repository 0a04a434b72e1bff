// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Command evaluate traces a model over a labeled sample and exits with
// status 1 when a condition on the trace breaks, for use in an
// evaluation script or CI job:
//
//	go run ./examples/evaluate [-model M.onnx] [-data D.csv] [-labels COL] [-glue-before K] [-simple-by K]
//
// The conditions: no stage before stage glue-before glues points of
// different classes together, and by stage simple-by (negative: the
// last stage) every class has been one component with no holes at some
// stage. The defaults trace the demo's well-sized robot-arm model.
package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"

	"crease.dev/crease/trace"
)

func main() {
	os.Exit(run(context.Background(), os.Args[1:], os.Stdout, os.Stderr))
}

// run is main without the exit: 0 when every condition holds, 1 when one
// breaks, 2 on bad input.
func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("evaluate", flag.ContinueOnError)
	fs.SetOutput(stderr)
	model := fs.String("model", "cmd/crease/internal/demo/data/arm_wide.onnx", "ONNX model")
	data := fs.String("data", "cmd/crease/internal/demo/data/arm.csv", "labeled sample (CSV)")
	labels := fs.String("labels", "class", "label column")
	glueBefore := fs.Int("glue-before", 3, "no cross-class gluing at stages 1 .. this−1")
	simpleBy := fs.Int("simple-by", -1, "every class simple at some stage up to this one (negative: last stage)")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	f, err := os.Open(*data)
	if err != nil {
		fmt.Fprintln(stderr, "evaluate:", err)
		return 2
	}
	s, err := trace.ReadCSV(f, *data, &trace.CSVSettings{Label: *labels})
	f.Close()
	if err != nil {
		fmt.Fprintln(stderr, "evaluate:", err)
		return 2
	}
	// The demo's settings: Betti numbers at 0.2 × diameter, no cap.
	set := &trace.Settings{MaxDim: 1, Scale: 0.2, Cap: -1, GlueTau: 0.1, SkipWhole: true}
	tr, err := trace.RunFile(ctx, *model, s, set)
	if err != nil {
		fmt.Fprintln(stderr, "evaluate:", err)
		return 2
	}
	fmt.Fprint(stdout, tr)
	failed := false
	if k := tr.First(1, trace.CrossGlued); k >= 0 && k < *glueBefore {
		fmt.Fprintf(stdout, "FAIL: stage %d (%s) glues %d pairs of points of different classes (allowed from stage %d)\n",
			k, tr.Stages[k].Kind, tr.Stages[k].Glued.Cross, *glueBefore)
		failed = true
	}
	by := *simpleBy
	if by < 0 || by >= len(tr.Stages) {
		by = len(tr.Stages) - 1
	}
	if k := tr.First(0, trace.AllSimple); k < 0 || k > by {
		fmt.Fprintf(stdout, "FAIL: not every class is one component with no holes at any stage up to %d\n", by)
		failed = true
	}
	if failed {
		return 1
	}
	fmt.Fprintln(stdout, "ok")
	return 0
}
