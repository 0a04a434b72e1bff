// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package render

import (
	"bytes"
	"fmt"
	"html"
	"io"
	"strings"

	"crease.dev/crease/trace"
)

// CompareHTML writes a self-contained HTML page that sets two traces
// side by side: their models, samples and settings, what trace.Compare
// finds (stages matched by structure, the largest bottleneck distance,
// the changes of Betti numbers, the measure that changed most, and the
// first divergence; warnings when settings or samples differ), then A's
// and B's stage tables, Betti numbers, separation and class-overlap
// measures in two columns, plot beside plot. Like HTML it loads nothing.
func CompareHTML(w io.Writer, a, b *trace.Trace) error {
	c, err := trace.Compare(a, b, nil)
	if err != nil {
		return err
	}
	var p bytes.Buffer
	e := html.EscapeString
	name := func(t *trace.Trace, def string) string {
		if t.Model.File != "" {
			return t.Model.File
		}
		return def
	}
	na, nb := name(a, "A"), name(b, "B")
	title := fmt.Sprintf("crease: %s beside %s", na, nb)
	fmt.Fprintf(&p, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n<title>%s</title>\n", e(title))
	p.WriteString(strings.Replace(pageStyle, "max-width:64em", "max-width:110em", 1))
	fmt.Fprintf(&p, "<h1>%s</h1>\n", e(title))
	for _, warn := range c.Warnings {
		fmt.Fprintf(&p, "<p><strong>Warning:</strong> %s.</p>\n", e(warn))
	}

	p.WriteString("<h2>Stage by stage</h2>\n<table>\n")
	header, rows := c.Table()
	tableRow(&p, header, "th", 2, 5, 6)
	for _, r := range rows {
		tableRow(&p, r, "td", 2, 5, 6)
	}
	p.WriteString("</table>\n")
	if len(c.Unmatched) > 0 {
		fmt.Fprintf(&p, "<p>Stages without a partner: %s.</p>\n", e(strings.Join(c.Unmatched, ", ")))
	}
	if c.Diverge >= 0 {
		fmt.Fprintf(&p, "<p>First divergence at stage %d: %s.</p>\n", c.Diverge, e(c.Reason))
	} else {
		p.WriteString("<p>The traces do not diverge.</p>\n")
	}
	p.WriteString("<p class=\"note\">Two traces alone give no resampling spread: to judge whether two models reshape a sample alike, run <code>crease compare A.onnx B.onnx DATA</code>.</p>\n")

	// pair writes A's and B's version of one section side by side.
	pair := func(heading string, part func(b *bytes.Buffer, t *trace.Trace) error) error {
		fmt.Fprintf(&p, "<h2>%s</h2>\n<div class=\"pair\">\n", e(heading))
		for i, t := range []*trace.Trace{a, b} {
			fmt.Fprintf(&p, "<div>\n<h3>%s: %s</h3>\n", []string{"A", "B"}[i], e([]string{na, nb}[i]))
			if err := part(&p, t); err != nil {
				return err
			}
			p.WriteString("</div>\n")
		}
		p.WriteString("</div>\n")
		return nil
	}
	if err := pair("Model, sample and settings", func(b *bytes.Buffer, t *trace.Trace) error {
		fmt.Fprintf(b, "<p>%s; %s: %d rows, %d used; %s.</p>\n", e(t.Tool), e(t.Sample.Source), t.Sample.Rows, len(t.Sample.Indices), e(settingsLine(&t.Settings)))
		return nil
	}); err != nil {
		return err
	}
	if err := pair("Stages", func(b *bytes.Buffer, t *trace.Trace) error {
		b.WriteString("<table>\n")
		stageTable(b, t)
		b.WriteString("</table>\n")
		return nil
	}); err != nil {
		return err
	}
	for d := 0; d <= min(a.Settings.MaxDim, b.Settings.MaxDim); d++ {
		if err := pair(fmt.Sprintf("β%s across stages", subscript(d)), func(b *bytes.Buffer, t *trace.Trace) error {
			return figure(b, bettiCaption(t, d), func(w io.Writer) error { return BettiSVG(w, t, d) })
		}); err != nil {
			return err
		}
	}
	if hasSeparation(a) && hasSeparation(b) {
		if err := pair("Separation across stages", func(b *bytes.Buffer, t *trace.Trace) error {
			return figure(b, t.Separation().String()+".", func(w io.Writer) error { return SeparationSVG(w, t) })
		}); err != nil {
			return err
		}
	}
	inB := map[string]bool{}
	for _, n := range OverlapMeasures(b) {
		inB[n] = true
	}
	for _, n := range OverlapMeasures(a) {
		if !inB[n] {
			continue
		}
		m, _ := trace.LookupMeasure(n)
		if err := pair(fmt.Sprintf("%s (%s)", m.Label, n), func(b *bytes.Buffer, t *trace.Trace) error {
			return figure(b, m.Meaning+".", func(w io.Writer) error { return MeasureSVG(w, t, n) })
		}); err != nil {
			return err
		}
	}
	p.WriteString("<p class=\"note\">crease diagnoses models and certifies nothing.</p>\n</body>\n</html>\n")
	_, err = w.Write(p.Bytes())
	return err
}
