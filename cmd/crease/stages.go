// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"context"
	"fmt"
	"io"
	"slices"
	"strings"
	"text/tabwriter"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
)

func init() {
	register(&command{
		name:    "stages",
		summary: "list the stages of an ONNX model",
		run:     runStages,
	})
}

// loadModelStages opens an ONNX model and builds its stages.
func loadModelStages(path string, fuse bool) (*onnxload.Model, []onnxload.Stage, error) {
	m, err := onnxload.Open(path, nil)
	if err != nil {
		return nil, nil, err
	}
	stages, err := m.Stages(&onnxload.StageSettings{FuseAffine: fuse})
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", path, err)
	}
	return m, stages, nil
}

func runStages(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("stages", "[--fuse] MODEL.onnx", stderr)
	fuse := fs.Bool("fuse", false, "fuse consecutive affine (and reshape) stages into one: the layer view")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 {
		fs.Usage()
		return fmt.Errorf("usage: want one model file, got %d arguments", len(pos))
	}
	m, stages, err := loadModelStages(pos[0], *fuse)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "model %s: IR %d, opset %d", pos[0], m.IRVersion, m.Opset)
	if m.ProducerName != "" {
		fmt.Fprintf(stdout, ", from %s %s", m.ProducerName, m.ProducerVersion)
	}
	fmt.Fprintln(stdout)
	in := m.Inputs[0]
	dims := make([]string, len(in.Shape))
	for i, d := range in.Shape {
		switch {
		case d.Param != "":
			dims[i] = d.Param
		case d.Fixed():
			dims[i] = fmt.Sprint(d.Value)
		default:
			dims[i] = "?"
		}
	}
	fmt.Fprintf(stdout, "input %s: %s (%s)\n", in.Name, in.Elem, strings.Join(dims, ", "))
	tw := tabwriter.NewWriter(stdout, 0, 4, 2, ' ', 0)
	fmt.Fprintln(tw, "#\tkind\tin→out\tname\tnodes")
	// Stage 0 is the input, as in crease trace and forward --stage.
	if len(stages) > 0 {
		fmt.Fprintf(tw, "0\t%s\t-→%d\t%s\t-\n", trace.InputKind, stages[0].In, in.Name)
	}
	for i, s := range stages {
		kind := s.Kind.String()
		switch s.Kind {
		// Parameters to 6 digits: exported weights are float32.
		case onnxload.LeakyReLU, onnxload.ELU, onnxload.CELU:
			kind += fmt.Sprintf("(%.6g)", s.Alpha)
		case onnxload.Hardtanh, onnxload.HardSigmoid, onnxload.SELU:
			kind += fmt.Sprintf("(%.6g, %.6g)", s.Alpha, s.Beta)
		case onnxload.PReLU:
			if len(s.Slope) > 0 && !slices.ContainsFunc(s.Slope, func(v float64) bool { return v != s.Slope[0] }) {
				kind += fmt.Sprintf("(%.6g)", s.Slope[0])
			} else {
				kind += fmt.Sprintf("(%d slopes)", len(s.Slope))
			}
		}
		fmt.Fprintf(tw, "%d\t%s\t%d→%d\t%s\t%s\n", i+1, kind, s.In, s.Out, s.Name, strings.Join(s.Nodes, " "))
	}
	return tw.Flush()
}
