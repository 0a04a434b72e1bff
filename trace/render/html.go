// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package render

import (
	"crease.dev/crease/trace"

	"bytes"
	"fmt"
	"html"
	"io"
	"slices"
	"strings"
	"time"
)

// HTML writes a self-contained HTML report of the trace: the model,
// sample and settings, the per-stage table, the Betti numbers of every
// class across stages (one plot per homology dimension), the gluing and folding
// measures across stages, and a barcode of every stage (the whole
// sample when it was recorded, else each class). Every plot is inline
// SVG; the page loads nothing (no scripts, fonts or styles from
// elsewhere), so a browser opens it offline and a notebook can display
// it. It returns the first error of a plot or of w.
func HTML(w io.Writer, t *trace.Trace) error {
	var b bytes.Buffer
	e := html.EscapeString
	b.WriteString("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\"/>\n")
	title := "crease trace"
	if t.Model.File != "" {
		title += " of " + t.Model.File
	}
	fmt.Fprintf(&b, "<title>%s</title>\n", e(title))
	b.WriteString(pageStyle)

	fmt.Fprintf(&b, "<h1>%s</h1>\n", e(title))
	b.WriteString("<table>\n")
	row := func(k, v string) {
		fmt.Fprintf(&b, "<tr><th class=\"l\">%s</th><td class=\"l\">%s</td></tr>\n", e(k), e(v))
	}
	row("tool", t.Tool)
	if t.Model.File != "" {
		row("model", t.Model.File)
	}
	if t.Model.SHA256 != "" {
		row("model SHA-256", t.Model.SHA256)
	}
	src := t.Sample.Source
	if src == "" {
		src = "(matrices)"
	}
	row("sample", fmt.Sprintf("%s: %d rows, %d used, width %d", src, t.Sample.Rows, len(t.Sample.Indices), t.Sample.Width))
	row("classes", strings.Join(t.Sample.Classes, ", "))
	row("settings", settingsLine(&t.Settings))
	if t.Timing != nil {
		row("wall time", fmt.Sprintf("%v (homology share %.0f %%)", t.Timing.Total.Round(time.Millisecond), 100*t.Timing.HomologyShare()))
	}
	b.WriteString("</table>\n")

	b.WriteString("<h2>Stages</h2>\n<table>\n")
	stageTable(&b, t)
	b.WriteString("</table>\n<p class=\"note\">Betti numbers are written (β₀,β₁,…); a “?” follows a dimension the sample cannot decide (the number before it is the best guess).</p>\n")
	if k := t.First(0, trace.AllSimple); k >= 0 {
		fmt.Fprintf(&b, "<p>Every class is first one component with no holes at stage %d (%s), %s.</p>\n",
			k, e(string(t.Stages[k].Kind)), yesNo(simpleFrom(t, k)))
	} else {
		b.WriteString("<p>At no stage is every class one component with no holes.</p>\n")
	}
	if k := t.First(1, trace.CrossGlued); k >= 0 {
		fmt.Fprintf(&b, "<p>Points of different classes are first glued together at stage %d (%s): %d pair(s).</p>\n",
			k, e(string(t.Stages[k].Kind)), t.Stages[k].Glued.Cross)
	} else if len(t.Stages) > 1 {
		b.WriteString("<p>No stage glues points of different classes together.</p>\n")
	}

	b.WriteString("<h2>Betti numbers across stages</h2>\n")
	for d := 0; d <= t.Settings.MaxDim; d++ {
		if err := figure(&b, bettiCaption(t, d),
			func(w io.Writer) error { return BettiSVG(w, t, d) }); err != nil {
			return err
		}
	}
	if len(t.Stages) > 1 {
		b.WriteString("<h2>Gluing and folding across stages</h2>\n")
		if err := figure(&b, "Pairs of points each stage glues together, and what ReLU-type stages do to the points.", func(w io.Writer) error { return GluingSVG(w, t) }); err != nil {
			return err
		}
	}
	if hasSeparation(t) {
		b.WriteString("<h2>Separation across stages</h2>\n")
		fmt.Fprintf(&b, "<p>%s.</p>\n", e(t.Separation().String()))
		if err := figure(&b, "Leave-one-out k-NN accuracy, 5-fold linear-probe accuracy and, at softmax stages, the share of points inside their own class's Voronoi cell (top); each class's k-NN accuracy (bottom).", func(w io.Writer) error { return SeparationSVG(w, t) }); err != nil {
			return err
		}
	}
	if names := OverlapMeasures(t); len(names) > 0 {
		b.WriteString("<h2>Every class-overlap measure across stages</h2>\n")
		for _, name := range names {
			m, _ := trace.LookupMeasure(name)
			caption := fmt.Sprintf("%s (%s): %s; %s", m.Label, name, m.Meaning, m.Range)
			if m.Better != "" {
				caption += ", " + m.Better + " is better"
			}
			if m.Class {
				caption += "; black: the stage, colours and shapes: each class"
			}
			if err := figure(&b, caption+".", func(w io.Writer) error { return MeasureSVG(w, t, name) }); err != nil {
				return err
			}
		}
	}
	b.WriteString("<h2>Barcodes</h2>\n")
	for i := range t.Stages {
		s := &t.Stages[i]
		if len(s.Whole.Bars) > 0 {
			if err := figure(&b, barcodeCaption(t, s, "whole sample"),
				func(w io.Writer) error { return BarcodeSVG(w, t, i, "") }); err != nil {
				return err
			}
			continue
		}
		for c := range s.Classes {
			if len(s.Classes[c].Bars) == 0 {
				continue
			}
			name := s.Classes[c].Label
			if err := figure(&b, barcodeCaption(t, s, "class "+name),
				func(w io.Writer) error { return BarcodeSVG(w, t, i, name) }); err != nil {
				return err
			}
		}
	}
	b.WriteString("<p class=\"note\">crease diagnoses models and certifies nothing.</p>\n</body>\n</html>\n")
	_, err := w.Write(b.Bytes())
	return err
}

// HTMLString returns the report of HTML, or a short HTML error message if
// a plot fails. It is meant for notebooks that display HTML.
func HTMLString(t *trace.Trace) string {
	var b bytes.Buffer
	if err := HTML(&b, t); err != nil {
		return "<p>crease: " + html.EscapeString(err.Error()) + "</p>"
	}
	return b.String()
}

// figure renders one plot into b as an inline SVG inside a figure.
func figure(b *bytes.Buffer, caption string, plot func(io.Writer) error) error {
	var s bytes.Buffer
	if err := plot(&s); err != nil {
		return err
	}
	svg := s.Bytes()
	// Drop the XML prolog: inline SVG in HTML starts at the <svg> element.
	if i := bytes.Index(svg, []byte("<svg")); i > 0 {
		svg = svg[i:]
	}
	b.WriteString("<figure>\n")
	b.Write(svg)
	fmt.Fprintf(b, "\n<figcaption>%s</figcaption>\n</figure>\n", html.EscapeString(caption))
	return nil
}

func settingsLine(s *trace.Settings) string {
	rule := s.RuleText()
	cap := "none"
	if s.Cap > 0 {
		cap = fmt.Sprint(s.Cap)
	}
	return fmt.Sprintf("H0–H%d; %s; per-class cap %s; seed %d; glue τ %g", s.MaxDim, rule, cap, s.Seed, s.GlueTau)
}

// simpleFrom reports whether every class stays simple from stage k to
// the last stage.
func simpleFrom(t *trace.Trace, k int) bool {
	for i := k; i < len(t.Stages); i++ {
		if !trace.AllSimple(&t.Stages[i]) {
			return false
		}
	}
	return true
}

func yesNo(v bool) string {
	if v {
		return "and stays so to the output"
	}
	return "but not at every later stage"
}

// hasSeparation reports whether some stage has a separation measure.
func hasSeparation(t *trace.Trace) bool {
	for i := range t.Stages {
		for _, k := range []string{"knn.accuracy", "probe.accuracy", "voronoi.inside"} {
			if _, ok := t.Stages[i].Measures[k]; ok {
				return true
			}
		}
	}
	return false
}

// hasWhole reports whether the trace recorded the whole sample's
// homology.
func hasWhole(t *trace.Trace) bool {
	for i := range t.Stages {
		if len(t.Stages[i].Whole.Betti) > 0 {
			return true
		}
	}
	return false
}

// pageStyle is the report's inline style sheet, the end of its head and
// the start of its body.
const pageStyle = `<style>
body{font-family:sans-serif;margin:2em;max-width:64em;color:#222}
table{border-collapse:collapse;margin:1em 0}
th,td{border:1px solid #bbb;padding:0.2em 0.6em;text-align:right}
th{background:#eee}
td.l,th.l{text-align:left}
figure{margin:1.5em 0}
figcaption{font-size:90%;color:#555}
svg{max-width:100%;height:auto}
.note{font-size:90%;color:#555}
.pair{display:grid;grid-template-columns:1fr 1fr;gap:1.5em}
.pair>div{min-width:0}
.pair table{display:block;overflow-x:auto;font-size:90%}
</style>
</head>
<body>
`

// stageTable writes the rows of t.Table into b (inside a <table>).
func stageTable(b *bytes.Buffer, t *trace.Trace) {
	header, rows := t.Table()
	tableRow(b, header, "th", 1)
	for _, r := range rows {
		tableRow(b, r, "td", 1)
	}
}

// tableRow writes one row of cells in tag ("th" or "td"), the columns
// left reading left-aligned.
func tableRow(b *bytes.Buffer, cells []string, tag string, left ...int) {
	b.WriteString("<tr>")
	for k, c := range cells {
		cls := ""
		if slices.Contains(left, k) {
			cls = ` class="l"`
		}
		fmt.Fprintf(b, "<%s%s>%s</%s>", tag, cls, html.EscapeString(c), tag)
	}
	b.WriteString("</tr>\n")
}

// bettiCaption is the caption of BettiSVG(t, d), true to what it draws.
func bettiCaption(t *trace.Trace, d int) string {
	if hasWhole(t) {
		return fmt.Sprintf("β%s of each class (solid) and of the whole sample (dashed grey) at every stage.", subscript(d))
	}
	return fmt.Sprintf("β%s of each class at every stage.", subscript(d))
}

// barcodeCaption is the caption of a barcode, true to what BarcodeSVG
// draws.
func barcodeCaption(t *trace.Trace, s *trace.Stage, who string) string {
	line := "the dashed line marks the scale the Betti numbers were read at"
	switch t.Settings.Rule {
	case trace.ScaleRatio:
		line = "the dashed line marks the sampling scale (the largest distance from a point to its k-th neighbour); the ratio rule counts bars by their death/birth ratio, not by where they cross it"
	case trace.ScalePersistence:
		line = "no line: the persistence rule counts bars by their length"
	}
	return fmt.Sprintf("Stage %d (%s), %s: one bar per class of H₀, H₁, … from birth to death (the longest ones; an arrow marks a bar alive at the threshold); %s.", s.Index, s.Kind, who, line)
}
