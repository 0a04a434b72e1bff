// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"golang.org/x/term"

	"crease.dev/crease/trace"
)

func init() {
	register(&command{
		name:    "trace",
		summary: "trace a labeled sample through every stage of an ONNX model",
		run:     runTrace,
	})
}

const traceSynopsis = "MODEL.onnx DATA.csv|FEATURES.npy [--labels COL|LABELS.npy] [--top-dim D] [--metric euclidean|knn] [--rule ratio|relative|persistence|hops] [--per-class-cap N] [--seed S] [--out trace.json] [--csv long.csv]"

// runTrace runs trace.RunFile and prints the per-stage table. For a CSV
// sample --labels names the label column (header name or 1-based
// number; default the last column); for an NPY sample it names the NPY
// file of integer labels.
func runTrace(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("trace", traceSynopsis, stderr)
	labels := fs.String("labels", "", "CSV: label column (header name or 1-based number; default last); NPY: the labels .npy file")
	header := fs.String("header", "auto", "CSV: is the first record a header: auto, yes or no")
	maxDim := fs.Int("top-dim", trace.DefaultMaxDim, "highest homology dimension, 0..3")
	metric := fs.String("metric", "euclidean", "euclidean or knn (hop count on the k-NN graph; same as --rule hops)")
	rule := fs.String("rule", "", "how Betti numbers are read: ratio (default; significant death/birth ratios), relative, persistence or hops (default from --metric)")
	alpha := fs.Float64("alpha", trace.DefaultAlpha, "ratio rule: family-wise significance level")
	scale := fs.Float64("scale-fraction", trace.DefaultScale, "relative rule: read Betti numbers at this fraction of the diameter")
	pers := fs.Float64("persistence-fraction", trace.DefaultPersistence, "persistence rule: count bars at least this fraction of the diameter long")
	k := fs.Int("graph-k", trace.DefaultK, "neighbours of the k-NN graph: its hop count is the hops rule's distance, and the ratio rule's sampling scale")
	overlapK := fs.Int("overlap-k", trace.DefaultOverlapK, "neighbours of the k-NN agreement (knn.accuracy)")
	hops := fs.Int("hops", trace.DefaultHops, "hops rule: read Betti numbers at this hop count")
	glueTau := fs.Float64("glue-tau", trace.DefaultGlueTau, "a pair is glued when its input distance exceeds this × the input's median nearest-neighbour distance and its output distance is at most this × the output's")
	classOrder := fs.String("class-order", "", "the class names in the order of the model's output units, comma-separated (default: integer labels name their units; other labels are matched to the units that agree most with the model's predictions)")
	skipProbe := fs.Bool("skip-probe", false, "leave out the linear probe (the slowest measure)")
	capN := fs.Int("per-class-cap", trace.DefaultCap, "at most this many points per class (seeded stratified subsample); negative means all")
	seed := fs.Uint64("seed", trace.DefaultSeed, "seed of the subsample")
	fuse := fs.Bool("fuse", false, "fuse consecutive affine stages (the layer view)")
	skipWhole := fs.Bool("skip-whole", false, "leave out the whole sample's homology (the costliest part)")
	out := fs.String("out", "", "write the trace as JSON to this file (atomically)")
	csvOut := fs.String("csv", "", "write the long CSV (stage,kind,class,measure,value) to this file")
	maxMem := fs.String("max-memory", "", "memory budget of the homology, shared by the tasks that run at once, e.g. 8GiB (default 4GiB)")
	workers := fs.Int("workers", 0, "tasks that run at once (default: the number of cores)")
	timing := fs.Bool("timing", false, "record wall times in the JSON (makes it differ between runs)")
	for old, new := range map[string]string{"maxdim": "top-dim", "scale": "scale-fraction", "persistence": "persistence-fraction", "k": "graph-k"} {
		deprecate(fs, old, new, stderr)
	}
	deprecateNegation(fs, "whole", "skip-whole", stderr)
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 2 {
		fs.Usage()
		return fmt.Errorf("usage: want MODEL and DATA arguments, got %d", len(pos))
	}
	if *maxDim < 0 || *maxDim > 3 {
		return fmt.Errorf("--top-dim %d: want 0..3", *maxDim)
	}
	if *maxDim == 0 {
		*maxDim = trace.H0Only
	}
	for _, p := range []string{*out, *csvOut} {
		if p != "" {
			if err := prepareOutput(p); err != nil {
				return err
			}
		}
	}
	set := &trace.Settings{MaxDim: *maxDim, Alpha: *alpha, Scale: *scale, Persistence: *pers, K: *k, Hops: *hops,
		Cap: *capN, Seed: *seed, Fuse: *fuse, SkipWhole: *skipWhole, GlueTau: *glueTau, OverlapK: *overlapK, SkipProbe: *skipProbe, Timing: *timing}
	if *maxMem != "" {
		if set.MaxBytes, err = parseBytes(*maxMem); err != nil {
			return fmt.Errorf("--max-memory %q: %v", *maxMem, err)
		}
	}
	set.Workers = *workers
	if *classOrder != "" {
		set.ClassOrder = strings.Split(*classOrder, ",")
	}
	switch *metric {
	case "euclidean":
	case "knn":
		set.Rule = trace.ScaleHops
	default:
		return fmt.Errorf("--metric %q: want euclidean or knn", *metric)
	}
	if *rule != "" {
		if set.Rule, err = trace.ParseScaleRule(*rule); err != nil {
			return err
		}
	}
	if *capN == 0 {
		return fmt.Errorf("--per-class-cap 0: want a positive cap or a negative value for no cap")
	}
	sample, err := readSample(pos[1], *labels, *header, stdin)
	if err != nil {
		return err
	}
	if f, ok := stderr.(*os.File); ok && term.IsTerminal(int(f.Fd())) {
		set.Progress = func(p trace.Progress) {
			const w = 30
			n := w * p.Done / max(p.Total, 1)
			fmt.Fprintf(stderr, "\r[%s%s] %d/%d stage %d", strings.Repeat("#", n), strings.Repeat(" ", w-n), p.Done, p.Total, p.Stage)
			if p.Done == p.Total {
				fmt.Fprintln(stderr)
			}
		}
	}
	tr, err := trace.RunFile(ctx, pos[0], sample, set)
	if err != nil {
		return err
	}
	fmt.Fprintf(stdout, "# %s: %d of %d rows, %d classes; %s\n", pos[0], len(tr.Sample.Indices), tr.Sample.Rows, len(tr.Sample.Classes), ruleText(tr.Settings))
	if um := tr.Sample.Units; um != nil {
		line := unitsText(tr.Sample.Classes, um)
		fmt.Fprintln(stdout, "# "+line)
		if um.Note != "" {
			fmt.Fprintln(stderr, "crease trace: warning: "+um.Note)
		}
	}
	if err := tr.WriteTable(stdout); err != nil {
		return err
	}
	fmt.Fprintf(stdout, "# separation: %s\n", tr.Separation())
	if tr.Timing != nil {
		fmt.Fprintf(stdout, "# timing: %s\n", tr.Timing)
	}
	for _, note := range tr.Notes {
		fmt.Fprintln(stdout, "# note: "+note)
		fmt.Fprintln(stderr, "crease trace: note: "+note)
	}
	var outs []output
	if *out != "" {
		outs = append(outs, output{*out, tr.WriteJSON})
	}
	if *csvOut != "" {
		outs = append(outs, output{*csvOut, tr.WriteCSV})
	}
	return writeOutputs(ctx, outs)
}

// ruleText describes the scale rule of resolved settings.
// unitsText says which output unit each class is and how that was
// decided.
func unitsText(classes []string, um *trace.UnitMap) string {
	if um.Units == nil {
		return "classes and output units: " + um.Note
	}
	parts := make([]string, len(classes))
	for c, name := range classes {
		parts[c] = fmt.Sprintf("%s→%d", name, um.Units[c])
	}
	return fmt.Sprintf("classes → output units: %s (%s; the model predicts %.1f %% of the rows as their class's unit)", strings.Join(parts, ", "), um.Source, 100*um.Agreement)
}

func ruleText(s trace.Settings) string {
	return fmt.Sprintf("%s; H0–H%d, seed %d", s.RuleText(), s.MaxDim, s.Seed)
}

// readSample reads a CSV sample, or an NPY pair when data ends in .npy.
func readSample(data, labels, header string, stdin io.Reader) (*trace.Sample, error) {
	if strings.HasSuffix(data, ".npy") {
		if !strings.HasSuffix(labels, ".npy") {
			return nil, fmt.Errorf("%s: NPY features need --labels LABELS.npy", data)
		}
		fx, err := os.Open(data)
		if err != nil {
			return nil, err
		}
		defer fx.Close()
		fl, err := os.Open(labels)
		if err != nil {
			return nil, err
		}
		defer fl.Close()
		return trace.ReadNPY(fx, data, fl, labels)
	}
	r, closeIn, name, err := openInput(data, stdin)
	if err != nil {
		return nil, err
	}
	defer closeIn()
	return trace.ReadCSV(r, name, &trace.CSVSettings{Label: labels, Header: header})
}

// flagSet reports whether the flag name was given on the command line.
func flagSet(fs *flag.FlagSet, name string) bool {
	found := false
	fs.Visit(func(f *flag.Flag) {
		if f.Name == name {
			found = true
		}
	})
	return found
}

// parseBytes parses a byte count such as 512MiB, 8GiB, 2GB or 1000000.
func parseBytes(s string) (int64, error) {
	units := []struct {
		suffix string
		factor float64
	}{{"KiB", 1 << 10}, {"MiB", 1 << 20}, {"GiB", 1 << 30}, {"TiB", 1 << 40}, {"KB", 1e3}, {"MB", 1e6}, {"GB", 1e9}, {"TB", 1e12}, {"B", 1}}
	f := 1.0
	for _, u := range units {
		if strings.HasSuffix(s, u.suffix) {
			s, f = strings.TrimSuffix(s, u.suffix), u.factor
			break
		}
	}
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || !(v > 0) || v*f > 1<<62 {
		return 0, errors.New("want a positive size such as 512MiB or 8GiB")
	}
	return int64(v * f), nil
}
