// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"context"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"crease.dev/crease/trace"
)

func init() {
	register(&command{
		name:    "measures",
		summary: "list every measure a trace can record: name, where defined, range, better direction, meaning",
		run:     runMeasures,
	})
}

// runMeasures prints trace.Measures, as a table or (--markdown) as the
// Markdown table of the README.
func runMeasures(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("measures", "[--markdown]", stderr)
	md := fs.Bool("markdown", false, "print a Markdown table")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 0 {
		fs.Usage()
		return fmt.Errorf("usage: measures takes no arguments, got %d", len(pos))
	}
	return writeMeasures(stdout, *md)
}

func writeMeasures(w io.Writer, md bool) error {
	per := func(m trace.MeasureInfo) string {
		var p []string
		if m.Stage {
			p = append(p, "stage")
		}
		if m.Class {
			p = append(p, "class")
		}
		return strings.Join(p, ", ")
	}
	better := func(m trace.MeasureInfo) string {
		if m.Better == "" {
			return "-"
		}
		return m.Better
	}
	if md {
		fmt.Fprintln(w, "| measure | for | where | range | better | meaning |")
		fmt.Fprintln(w, "|---|---|---|---|---|---|")
		for _, m := range trace.Measures() {
			fmt.Fprintf(w, "| `%s` | %s | %s | %s | %s | %s |\n", m.Name, per(m), m.Scope, m.Range, better(m), m.Meaning)
		}
		return nil
	}
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "measure\tfor\twhere\trange\tbetter\tmeaning")
	for _, m := range trace.Measures() {
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%s\n", m.Name, per(m), m.Scope, m.Range, better(m), m.Meaning)
	}
	return tw.Flush()
}
