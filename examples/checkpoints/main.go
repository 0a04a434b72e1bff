// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Command checkpoints compares the traces of two checkpoints of a model
// on the same sample, stage by stage: the bottleneck distance between
// each class's barcodes, the change in Betti numbers, and the first
// stage where they diverge beyond a tolerance.
//
//	go run ./examples/checkpoints [-a A.onnx] [-b B.onnx] [-data D.csv] [-tol 0.05]
//
// The defaults compare the demo's well-sized robot-arm model with its
// narrow variant (the same stage kinds, different first-layer widths).
package main

import (
	"context"
	"flag"
	"fmt"
	"io"
	"os"
	"text/tabwriter"

	"crease.dev/crease/trace"
)

func main() {
	os.Exit(run(context.Background(), os.Args[1:], os.Stdout, os.Stderr))
}

func run(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	fs := flag.NewFlagSet("checkpoints", flag.ContinueOnError)
	fs.SetOutput(stderr)
	a := fs.String("a", "cmd/crease/internal/demo/data/arm_wide.onnx", "first checkpoint")
	b := fs.String("b", "cmd/crease/internal/demo/data/arm_narrow.onnx", "second checkpoint")
	data := fs.String("data", "cmd/crease/internal/demo/data/arm.csv", "labeled sample (CSV, label column \"class\")")
	tol := fs.Float64("tol", 0.05, "largest bottleneck distance or measure change that is not a divergence")
	if err := fs.Parse(args); err != nil {
		return 2
	}
	f, err := os.Open(*data)
	if err != nil {
		fmt.Fprintln(stderr, "checkpoints:", err)
		return 2
	}
	s, err := trace.ReadCSV(f, *data, &trace.CSVSettings{Label: "class"})
	f.Close()
	if err != nil {
		fmt.Fprintln(stderr, "checkpoints:", err)
		return 2
	}
	set := &trace.Settings{MaxDim: 1, Scale: 0.2, Cap: -1, GlueTau: 0.1, SkipWhole: true}
	var traces [2]*trace.Trace
	for i, path := range []string{*a, *b} {
		if traces[i], err = trace.RunFile(ctx, path, s, set); err != nil {
			fmt.Fprintln(stderr, "checkpoints:", err)
			return 2
		}
	}
	cmp, err := trace.Compare(traces[0], traces[1], &trace.CompareSettings{Tol: *tol})
	if err != nil {
		fmt.Fprintln(stderr, "checkpoints:", err)
		return 2
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprint(tw, "stage\tkind A\tkind B")
	for _, c := range traces[0].Sample.Classes {
		fmt.Fprintf(tw, "\t%s H0/H1 bottleneck\t%s Δβ", c, c)
	}
	fmt.Fprintln(tw)
	for _, st := range cmp.Stages {
		fmt.Fprintf(tw, "%d\t%s\t%s", st.Index, st.KindA, st.KindB)
		for _, g := range st.Classes {
			fmt.Fprintf(tw, "\t%.3g/%.3g\t%v", at(g.Bottleneck, 0), at(g.Bottleneck, 1), g.Betti)
		}
		fmt.Fprintln(tw)
	}
	tw.Flush()
	if cmp.Diverge < 0 {
		fmt.Fprintf(stdout, "the checkpoints agree within %g at every stage\n", *tol)
	} else {
		fmt.Fprintf(stdout, "the checkpoints first diverge at stage %d: %s\n", cmp.Diverge, cmp.Reason)
	}
	return 0
}

func at(v []float64, i int) float64 {
	if i < len(v) {
		return v[i]
	}
	return 0
}
