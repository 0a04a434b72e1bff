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
	"strings"
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

// runCompare compares two models on one sample (A.onnx B.onnx DATA:
// trace.CompareFiles, exit 1 when they differ beyond the resampling
// spread), or two trace JSON files stage by stage (A.json B.json: the
// largest bottleneck distance, the change of the whole sample's Betti
// numbers and the largest change of a measure; with --tol or
// --betti-tol it exits 1 when the traces diverge beyond them).
func runCompare(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("compare", "A.onnx B.onnx DATA [--labels COL] [--replicates R] ... | A.json B.json [--tol T] [--betti-tol N]", stderr)
	tol := fs.Float64("tol", 0, "traces: largest bottleneck distance or measure change allowed; giving it makes divergence exit 1")
	bettiTol := fs.Int("betti-tol", 0, "traces: largest change of a Betti number allowed; giving it makes divergence exit 1")
	labels := fs.String("labels", "", "models: CSV label column (header name or 1-based number; default last); NPY: the labels .npy file")
	header := fs.String("header", "auto", "models: is the first CSV record a header: auto, yes or no")
	maxDim := fs.Int("top-dim", trace.DefaultMaxDim, "models: highest homology dimension, 0..3")
	capN := fs.Int("per-class-cap", trace.DefaultCap, "models: at most this many points per class; negative means all")
	seed := fs.Uint64("seed", trace.DefaultSeed, "models: seed of the cap and of the subsamples")
	classOrder := fs.String("class-order", "", "models: the class names in the order of the output units, comma-separated")
	skipProbe := fs.Bool("skip-probe", false, "models: leave out the linear probe")
	fuse := fs.Bool("fuse", false, "models: fuse consecutive affine stages (the layer view)")
	workers := fs.Int("workers", 0, "models: tasks that run at once (default: the number of cores)")
	reps := fs.Int("replicates", trace.DefaultReplicates, "models: subsamples the resampling spread is estimated from")
	keep := fs.Float64("keep", trace.DefaultKeep, "models: share of each class a subsample keeps")
	z := fs.Float64("z", trace.DefaultZ, "models: spreads a difference must exceed to count")
	ckaFloor := fs.Float64("cka-floor", trace.DefaultCKAFloor, "models: least 1 − CKA that counts")
	ckaMatrix := fs.Bool("cka-matrix", false, "models: also print linear CKA between every stage of A and every stage of B")
	out := fs.String("out", "", "models: write the comparison as JSON to this file (atomically)")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	models := len(pos) == 3
	if len(pos) != 2 && !models {
		fs.Usage()
		return fmt.Errorf("usage: want A.onnx B.onnx DATA or A.json B.json, got %d arguments", len(pos))
	}
	if models {
		for _, f := range []string{"tol", "betti-tol"} {
			if flagSet(fs, f) {
				return fmt.Errorf("--%s compares traces; models are judged against their resampling spread (see --z)", f)
			}
		}
		if *maxDim < 0 || *maxDim > 3 {
			return fmt.Errorf("--top-dim %d: want 0..3", *maxDim)
		}
		if *maxDim == 0 {
			*maxDim = trace.H0Only
		}
		if *capN == 0 {
			return fmt.Errorf("--per-class-cap 0: want a positive cap or a negative value for no cap")
		}
		if *out != "" {
			if err := prepareOutput(*out); err != nil {
				return err
			}
		}
		set := &trace.Settings{MaxDim: *maxDim, Cap: *capN, Seed: *seed, Fuse: *fuse, SkipProbe: *skipProbe, Workers: *workers}
		if *classOrder != "" {
			set.ClassOrder = strings.Split(*classOrder, ",")
		}
		sample, err := readSample(pos[2], *labels, *header, stdin)
		if err != nil {
			return err
		}
		as := &trace.AlikeSettings{Replicates: *reps, Keep: *keep, Z: *z, CKAFloor: *ckaFloor}
		c, err := trace.CompareFiles(ctx, pos[0], pos[1], sample, set, as)
		if err != nil {
			return err
		}
		if err := writeAlikeness(stdout, c); err != nil {
			return err
		}
		if *ckaMatrix {
			if err := writeCKAMatrix(stdout, c); err != nil {
				return err
			}
		}
		if *out != "" {
			if err := writeFileAtomic(ctx, *out, c.WriteJSON); err != nil {
				return err
			}
		}
		if !c.Alike() {
			return checkFailed("the models differ: %s", c.Reason())
		}
		return nil
	}
	for _, f := range []string{"labels", "header", "top-dim", "per-class-cap", "seed", "class-order", "skip-probe", "fuse", "workers", "replicates", "keep", "z", "cka-floor", "cka-matrix", "out"} {
		if flagSet(fs, f) {
			return fmt.Errorf("--%s applies to models (A.onnx B.onnx DATA), not to two traces", f)
		}
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
	cs := &trace.CompareSettings{Tol: *tol, BettiTol: *bettiTol}
	switch {
	case flagSet(fs, "betti-tol") && !flagSet(fs, "tol"):
		cs.Tol = math.Inf(1) // judge Betti numbers only
	case flagSet(fs, "tol") && !flagSet(fs, "betti-tol"):
		cs.BettiTol = -1 // judge distances and measures only
	}
	c, err := trace.Compare(tr[0], tr[1], cs)
	if err != nil {
		return err
	}
	for _, w := range c.Warnings {
		fmt.Fprintln(stdout, "# warning: "+w)
		fmt.Fprintln(stderr, "crease compare: warning: "+w)
	}
	tw := tabwriter.NewWriter(stdout, 0, 0, 2, ' ', 0)
	cols, rows := c.Table()
	fmt.Fprintln(tw, strings.Join(cols, "\t"))
	for _, r := range rows {
		fmt.Fprintln(tw, strings.Join(r, "\t"))
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if len(c.Unmatched) > 0 {
		fmt.Fprintf(stdout, "unmatched stages: %s\n", strings.Join(c.Unmatched, ", "))
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

// writeAlikeness prints the comparison of two models: one line per
// matched stage pair with CKA, the k-NN and probe accuracies of both,
// the shares of equal activation patterns and shared glued pairs, and
// the quantities that differ; then the verdict.
func writeAlikeness(w io.Writer, c *trace.Alikeness) error {
	fmt.Fprintf(w, "# A %s, B %s; %d subsamples keeping %.0f %% of each class; a difference counts beyond %g spreads (1 − CKA also beyond %g)\n",
		c.A.Model.File, c.B.Model.File, c.Settings.Replicates, 100*c.Settings.Keep, c.Settings.Z, c.Settings.CKAFloor)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "A\tB\tkind\tCKA\t± spread\tknn A\tknn B\tprobe A\tprobe B\tsame pattern\tshared glued\tdiffers")
	num := func(q *trace.Quantity, b bool) string {
		if q == nil {
			return "-"
		}
		if b {
			return fmt.Sprintf("%.3f", q.B)
		}
		return fmt.Sprintf("%.3f", q.A)
	}
	share := func(x float64) string {
		if math.IsNaN(x) {
			return "-"
		}
		return fmt.Sprintf("%.3f", x)
	}
	for _, p := range c.Pairs {
		var cka, knn, probe *trace.Quantity
		var differ []string
		for i := range p.Quantities {
			q := &p.Quantities[i]
			switch {
			case q.Name == "cka":
				cka = q
			case q.Name == "knn.accuracy" && q.Class == "":
				knn = q
			case q.Name == "probe.accuracy":
				probe = q
			}
			if q.Differs {
				name := q.Name
				if q.Class != "" {
					name = q.Class + ":" + name
				}
				differ = append(differ, name)
			}
		}
		ckaText, spread := "-", "-"
		if cka != nil {
			ckaText, spread = fmt.Sprintf("%.4f", cka.B), fmt.Sprintf("%.2g", cka.Spread)
		}
		d := "-"
		if len(differ) > 0 {
			d = strings.Join(differ, ",")
		}
		fmt.Fprintf(tw, "%d\t%d\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\t%s\n", p.A, p.B, p.Kind, ckaText, spread,
			num(knn, false), num(knn, true), num(probe, false), num(probe, true), share(p.SamePattern), share(p.GluedOverlap), d)
	}
	if err := tw.Flush(); err != nil {
		return err
	}
	if len(c.Unmatched) > 0 {
		fmt.Fprintf(w, "unmatched stages: %s\n", strings.Join(c.Unmatched, ", "))
	}
	// Every difference that counts, with its bound and spread, the
	// first maxListed of them.
	const maxListed = 20
	var diffs []trace.Quantity
	for _, p := range c.Pairs {
		for _, q := range p.Quantities {
			if q.Differs {
				diffs = append(diffs, q)
			}
		}
	}
	if len(diffs) > 0 {
		fmt.Fprintf(w, "differences (%d):\n", len(diffs))
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  stage\tclass\tquantity\tA\tB\tdifference\tbound\tspread")
		for i, q := range diffs {
			if i == maxListed {
				fmt.Fprintf(tw, "  … and %d more\n", len(diffs)-maxListed)
				break
			}
			class := q.Class
			if class == "" {
				class = "-"
			}
			fmt.Fprintf(tw, "  %s\t%s\t%s\t%.4g\t%.4g\t%.3g\t%.3g\t%.3g\n", q.Stage, class, q.Name, q.A, q.B, q.Delta, q.Bound, q.Spread)
		}
		if err := tw.Flush(); err != nil {
			return err
		}
	}
	verdict := "alike"
	if !c.Alike() {
		verdict = "different"
	}
	_, err := fmt.Fprintf(w, "verdict: %s; %s\n", verdict, c.Reason())
	return err
}

// writeCKAMatrix prints linear CKA between every stage of A (rows) and
// every stage of B (columns).
func writeCKAMatrix(w io.Writer, c *trace.Alikeness) error {
	fmt.Fprintln(w, "linear CKA, stage of A (rows) × stage of B (columns):")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprint(tw, "A \\ B\t")
	for j := range c.B.Stages {
		fmt.Fprintf(tw, "%d %s\t", j, c.B.Stages[j].Kind)
	}
	fmt.Fprintln(tw)
	for i, row := range c.CKA {
		fmt.Fprintf(tw, "%d %s\t", i, c.A.Stages[i].Kind)
		for _, v := range row {
			if math.IsNaN(v) {
				fmt.Fprint(tw, "-\t")
			} else {
				fmt.Fprintf(tw, "%.3f\t", v)
			}
		}
		fmt.Fprintln(tw)
	}
	return tw.Flush()
}
