// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"context"
	"fmt"
	"io"
	"math"
	"os"
	"text/tabwriter"

	"crease.dev/crease/trace"
)

func init() {
	register(&command{
		name:    "compare",
		summary: "compare two traces stage by stage",
		run:     runCompare,
	})
}

// runCompare reads two trace JSON files and prints, per stage, the
// largest bottleneck distance, the change of the whole sample's Betti
// numbers and the largest change of a measure, then the first stage
// where they diverge. With --tol or --betti-tol it exits 1 when the
// traces diverge beyond the tolerances.
func runCompare(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("compare", "A.json B.json [--tol T] [--betti-tol N]", stderr)
	tol := fs.Float64("tol", 0, "largest bottleneck distance or measure change allowed; giving it makes divergence exit 1")
	bettiTol := fs.Int("betti-tol", 0, "largest change of a Betti number allowed; giving it makes divergence exit 1")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		fs.Usage()
		return fmt.Errorf("usage: want two trace files, got %d", len(pos))
	}
	if *tol < 0 || math.IsNaN(*tol) || *bettiTol < 0 {
		return fmt.Errorf("tolerances must not be negative")
	}
	var tr [2]*trace.Trace
	for i, p := range pos {
		f, err := os.Open(p)
		if err != nil {
			return err
		}
		tr[i], err = trace.ReadJSON(f)
		f.Close()
		if err != nil {
			return fmt.Errorf("%s: %w", p, err)
		}
	}
	c, err := trace.Compare(tr[0], tr[1], &trace.CompareSettings{Tol: *tol, BettiTol: *bettiTol})
	if err != nil {
		return err
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "stage\tkind\tmax bottleneck\twhole Δβ\tmax |Δ measure|")
	for _, s := range c.Stages {
		kind := s.KindA
		if s.KindB != s.KindA {
			kind += "/" + s.KindB
		}
		bn := 0.0
		for _, g := range append([]trace.GroupComparison{s.Whole}, s.Classes...) {
			for _, v := range g.Bottleneck {
				bn = max(bn, v)
			}
		}
		dm := 0.0
		for _, v := range s.Measures {
			dm = max(dm, math.Abs(v))
		}
		fmt.Fprintf(tw, "%d\t%s\t%.4g\t%v\t%.4g\n", s.Index, kind, bn, s.Whole.Betti, dm)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if c.Diverge < 0 {
		fmt.Fprintln(stdout, "no divergence beyond the tolerances")
		return nil
	}
	fmt.Fprintf(stdout, "first divergence at stage %d: %s\n", c.Diverge, c.Reason)
	if flagSet(fs, "tol") || flagSet(fs, "betti-tol") {
		return checkFailed("traces diverge at stage %d: %s", c.Diverge, c.Reason)
	}
	return nil
}
