// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package main

import (
	"context"
	"fmt"
	"io"

	"crease.dev/crease/trace"
	"crease.dev/crease/trace/render"
)

func init() {
	register(&command{
		name:    "report",
		summary: "write a self-contained HTML report of a trace (plots as inline SVG)",
		run:     runReport,
	})
}

// runReport reads a trace JSON file (or "-" for stdin) and writes its
// HTML report, or two and writes the page that sets them side by side,
// to --out atomically, or to stdout without --out.
func runReport(ctx context.Context, args []string, stdin io.Reader, stdout, stderr io.Writer) error {
	fs := newFlagSet("report", "TRACE.json [B.json] [--out report.html]", stderr)
	out := fs.String("out", "", "write the report to this file (atomically) instead of stdout")
	pos, err := parseFlags(fs, args)
	if err != nil {
		return err
	}
	if len(pos) != 1 && len(pos) != 2 {
		fs.Usage()
		return fmt.Errorf("usage: want one trace file, or two to set side by side, got %d arguments", len(pos))
	}
	if *out != "" {
		if err := prepareOutput(*out); err != nil {
			return err
		}
	}
	var trs []*trace.Trace
	for _, arg := range pos {
		r, closer, name, err := openInput(arg, stdin)
		if err != nil {
			return err
		}
		tr, err := trace.ReadJSON(r)
		closer()
		if err != nil {
			return fmt.Errorf("%s: %w", name, err)
		}
		if len(tr.Stages) == 0 {
			return fmt.Errorf("%s: the trace has no stages", name)
		}
		trs = append(trs, tr)
	}
	write := func(w io.Writer) error { return render.HTML(w, trs[0]) }
	if len(trs) == 2 {
		write = func(w io.Writer) error { return render.CompareHTML(w, trs[0], trs[1]) }
	}
	if *out == "" {
		return write(stdout)
	}
	return writeFileAtomic(ctx, *out, write)
}
