// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package render_test

import (
	"bytes"
	"context"
	"encoding/xml"
	"io"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/colour"
	"crease.dev/crease/onnxload"
	"crease.dev/crease/trace"
	"crease.dev/crease/trace/render"
)

// renderTrace traces two rings of 24 points (each β = (1, 1), Hatcher,
// Algebraic Topology, Example 2.23) through an identity, a ReLU and a
// projection onto the first coordinate.
func renderTrace(t testing.TB) *trace.Trace {
	tr, err := twoRingTrace()
	if err != nil {
		t.Fatal(err)
	}
	return tr
}

// twoRingTrace is renderTrace returning its error.
func twoRingTrace() (*trace.Trace, error) {
	const m = 24
	x := mat.NewDense(2*m, 2, nil)
	labels := make([]string, 2*m)
	for k := range m {
		th := 2 * math.Pi * float64(k) / m
		x.SetRow(k, []float64{3 + math.Cos(th), 3 + math.Sin(th)})
		x.SetRow(m+k, []float64{3 + math.Cos(th), 8 + math.Sin(th)})
		labels[k], labels[m+k] = "low", "high"
	}
	s, err := trace.NewSample(x, labels)
	if err != nil {
		return nil, err
	}
	stages := []onnxload.Stage{
		{Kind: onnxload.Affine, In: 2, Out: 2, W: mat.NewDense(2, 2, []float64{1, 0, 0, 1}), B: []float64{0, 0}},
		{Kind: onnxload.ReLU, In: 2, Out: 2},
		{Kind: onnxload.Affine, In: 2, Out: 2, W: mat.NewDense(2, 2, []float64{1, 0, 0, 0}), B: []float64{0, 0}},
	}
	set := trace.DefaultSettings()
	set.Scale = 0.2
	return trace.Run(context.Background(), stages, s, set)
}

// wellFormed checks that data is well-formed XML (XML 1.0, as read by
// encoding/xml) and returns the number of elements named name.
func wellFormed(t *testing.T, what string, data []byte, name string) int {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader(data))
	d.Strict = true
	n := 0
	for {
		tok, err := d.Token()
		if err == io.EOF {
			return n
		}
		if err != nil {
			t.Fatalf("%s: not well-formed XML: %v", what, err)
		}
		if se, ok := tok.(xml.StartElement); ok && se.Name.Local == name {
			n++
		}
	}
}

func TestRenderSVG(t *testing.T) {
	tr := renderTrace(t)
	for _, tc := range []struct {
		name   string
		render func(io.Writer) error
		want   []string // texts the plot must show
	}{
		{"betti0", func(w io.Writer) error { return render.BettiSVG(w, tr, 0) }, []string{"high", "low", "whole sample"}},
		{"betti1", func(w io.Writer) error { return render.BettiSVG(w, tr, 1) }, []string{"high", "low"}},
		{"gluing", func(w io.Writer) error { return render.GluingSVG(w, tr) }, []string{"glued cross (different classes)", "glued within (same class)"}},
		{"barcode-whole", func(w io.Writer) error { return render.BarcodeSVG(w, tr, 0, "") }, []string{"H0", "H1", "whole sample"}},
		{"barcode-class", func(w io.Writer) error { return render.BarcodeSVG(w, tr, 3, "low") }, []string{"H0", "class low"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var b bytes.Buffer
			if err := tc.render(&b); err != nil {
				t.Fatal(err)
			}
			if n := wellFormed(t, tc.name, b.Bytes(), "svg"); n != 1 {
				t.Errorf("%d <svg> elements, want 1", n)
			}
			for _, s := range tc.want {
				if !bytes.Contains(b.Bytes(), []byte(s)) {
					t.Errorf("plot lacks %q", s)
				}
			}
		})
	}
}

func TestRenderErrors(t *testing.T) {
	tr := renderTrace(t)
	for _, tc := range []struct {
		name, want string
		err        error
	}{
		{"dim above maxdim", "dimension 2 outside 0..1", render.BettiSVG(io.Discard, tr, 2)},
		{"negative dim", "dimension -1", render.BettiSVG(io.Discard, tr, -1)},
		{"no such stage", "no stage 9", render.BarcodeSVG(io.Discard, tr, 9, "")},
		{"no such class", `no class "mid"`, render.BarcodeSVG(io.Discard, tr, 1, "mid")},
		{"empty trace", "no stages", render.BettiSVG(io.Discard, &trace.Trace{}, 0)},
	} {
		if tc.err == nil || !strings.Contains(tc.err.Error(), tc.want) {
			t.Errorf("%s: error %v, want one containing %q", tc.name, tc.err, tc.want)
		}
	}
}

// TestRenderHTML checks that the report is self-contained: one inline
// SVG per plot (β₀, β₁, collapse, separation, each overlap measure, a
// barcode per stage), no
// script and no reference to anything outside the page.
func TestRenderHTML(t *testing.T) {
	tr := renderTrace(t)
	page := render.HTMLString(tr)
	if !strings.HasPrefix(page, "<!DOCTYPE html>") {
		t.Fatalf("report does not start with a doctype: %.40q", page)
	}
	body := strings.TrimPrefix(page, "<!DOCTYPE html>\n")
	want := (tr.Settings.MaxDim + 1) + 1 + 1 + len(render.OverlapMeasures(tr)) + len(tr.Stages)
	if n := wellFormed(t, "report", []byte(body), "svg"); n != want {
		t.Errorf("report has %d <svg> elements, want %d", n, want)
	}
	for _, bad := range []string{"<script", "src=", "href=", "@import", "url(", "<?xml"} {
		if strings.Contains(page, bad) {
			t.Errorf("report contains %q", bad)
		}
	}
	for _, s := range []string{"high", "low", "certifies nothing"} {
		if !strings.Contains(page, s) {
			t.Errorf("report lacks %q", s)
		}
	}
	// The projection glues the two rings: the report says where.
	if !strings.Contains(page, "first glued together at stage 3") {
		t.Errorf("report does not name stage 3 as the first cross-class gluing")
	}
	if render.HTMLString(tr) != page {
		t.Error("two renderings of one trace differ")
	}
}

func BenchmarkHTML(b *testing.B) {
	tr := renderTrace(b)
	for b.Loop() {
		if err := render.HTML(io.Discard, tr); err != nil {
			b.Fatal(err)
		}
	}
}

// TestMeasureSVG plots every class-overlap measure of a trace and checks
// the report holds one figure for each, and that an unknown or absent
// measure is refused by name.
func TestMeasureSVG(t *testing.T) {
	tr := renderTrace(t)
	names := render.OverlapMeasures(tr)
	if len(names) < 10 {
		t.Fatalf("only %d overlap measures: %v", len(names), names)
	}
	for _, name := range names {
		var b bytes.Buffer
		if err := render.MeasureSVG(&b, tr, name); err != nil {
			t.Errorf("%s: %v", name, err)
			continue
		}
		wellFormed(t, name, b.Bytes(), name)
	}
	page := render.HTMLString(tr)
	for _, name := range names {
		if !strings.Contains(page, "("+name+")") {
			t.Errorf("the report has no figure of %s", name)
		}
	}
	if err := render.MeasureSVG(io.Discard, tr, "knn.acuracy"); err == nil || !strings.Contains(err.Error(), "knn.accuracy") {
		t.Errorf("misspelt measure: %v", err)
	}
	if err := render.MeasureSVG(io.Discard, tr, "voronoi.own_min"); err == nil || !strings.Contains(err.Error(), "records no voronoi.own_min") {
		t.Errorf("absent measure: %v", err)
	}
}

// TestPalette checks the class colours and shapes: twelve of each, all
// distinct; the colours at least 40 CIE ΔE*ab apart to normal vision and
// 20 apart with protanopia or deuteranopia (internal/colour).
func TestPalette(t *testing.T) {
	cols := render.Palette()
	if len(cols) < 12 || render.Shapes() < 12 {
		t.Fatalf("%d colours and %d shapes, want at least 12 of each", len(cols), render.Shapes())
	}
	for i := range cols {
		for j := range i {
			for _, v := range colour.Visions {
				d := colour.Distance(v, cols[i], cols[j])
				bound := 20.0
				if v == colour.Normal {
					bound = 40
				}
				if d < bound {
					t.Errorf("colours %d and %d are %.1f apart with vision %d, want at least %v", i, j, d, v, bound)
				}
			}
		}
	}
}

// TestCompareHTML sets a trace beside itself: the page is self-contained,
// holds every plot twice, and says the traces do not diverge.
func TestCompareHTML(t *testing.T) {
	tr := renderTrace(t)
	var b bytes.Buffer
	if err := render.CompareHTML(&b, tr, tr); err != nil {
		t.Fatal(err)
	}
	page := b.String()
	var one bytes.Buffer
	if err := render.HTML(&one, tr); err != nil {
		t.Fatal(err)
	}
	barcodes := len(tr.Stages) // the single report's barcodes are not paired
	if got, want := strings.Count(page, "<svg"), 2*(strings.Count(one.String(), "<svg")-barcodes-1); got != want {
		t.Errorf("%d plots side by side, want %d (every plot of the report but the gluing plot and the barcodes, twice)", got, want)
	}
	for _, want := range []string{"The traces do not diverge.", `class="pair"`, "certifies nothing"} {
		if !strings.Contains(page, want) {
			t.Errorf("page lacks %q", want)
		}
	}
	for _, bad := range []string{"<script", "src=", "href=", "url("} {
		if strings.Contains(page, bad) {
			t.Errorf("page contains %q", bad)
		}
	}
}
