// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"context"
	"fmt"
	"io"
	"path/filepath"

	"crease.dev/crease/cmd/crease/internal/demo"
)

func init() {
	register(&command{
		name:    "demo",
		summary: "trace the two embedded robot-arm models and print what the traces show",
		run:     runDemo,
	})
}

// runDemo traces both embedded demo models over the embedded sample and
// prints, per model, its per-stage table and a one-line verdict read
// from the trace.
func runDemo(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("demo", "[--dir DIR]", stderr)
	dir := fs.String("dir", "", "also write each model's trace as DIR/<model>.json (atomically), e.g. for crease report")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) > 0 {
		return fmt.Errorf("usage: crease demo takes no arguments (got %q)", pos[0])
	}
	if *dir != "" {
		for _, name := range demo.Models {
			if err := prepareOutput(filepath.Join(*dir, name+".json")); err != nil {
				return err
			}
		}
	}
	fmt.Fprintln(stdout, "crease demo: a planar two-joint arm; configurations (cos θ1, sin θ1, cos θ2, sin θ2) on the torus of joint angles,")
	fmt.Fprintln(stdout, "classed clear / near / contact by the clearance to a disc obstacle; 300 points per class.")
	fmt.Fprintln(stdout, "Betti numbers are (β0,β1) read by the ratio rule; \"?\" marks a dimension the sample cannot decide; glued = pairs a stage brings together.")
	set := demo.Settings()
	var outs []output
	for i, name := range demo.Models {
		info, err := demo.TrainingOf(name)
		if err != nil {
			return err
		}
		tr, err := demo.Run(ctx, name, set)
		if err != nil {
			return fmt.Errorf("%s: %w", name, err)
		}
		fmt.Fprintf(stdout, "\n%s (%s, demo-sample accuracy %.1f %%)\n", name, info.Architecture, 100*info.AccuracyDemo)
		if err := tr.WriteTable(stdout); err != nil {
			return err
		}
		fmt.Fprintf(stdout, "verdict on %s: %s.\n", name, demo.Judge(tr).String(tr))
		fmt.Fprintf(stdout, "separation on %s: %s.\n", name, tr.Separation())
		if *dir != "" {
			outs = append(outs, output{filepath.Join(*dir, name+".json"), tr.WriteJSON})
		}
		if i == len(demo.Models)-1 {
			fmt.Fprintln(stdout, "\ncrease diagnoses models and certifies nothing.")
		}
	}
	// Both traces are committed together, once both are computed.
	if err := writeOutputs(ctx, outs); err != nil {
		return err
	}
	for _, o := range outs {
		fmt.Fprintf(stderr, "crease demo: wrote %s\n", o.path)
	}
	return nil
}
