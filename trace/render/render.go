// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package render

import (
	"crease.dev/crease/trace"

	"bytes"
	"fmt"
	"image/color"
	"io"
	"math"
	"sort"
	"strconv"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/plotter"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Plot sizes of the SVG renderings.
const (
	plotWidth  = 7.5 * vg.Inch
	plotHeight = 3.2 * vg.Inch
)

// palette holds the colours of classes, in class order (the whole sample
// is drawn in grey): our own twelve, chosen by testdata/gen/palette.go
// to stay apart for normal vision (CIE ΔE*ab ≥ 43) and, together with
// each class's marker shape, for protanopia and deuteranopia (ΔE*ab ≥
// 20; TestPalette).
var palette = []color.Color{
	color.RGBA{R: 0x1a, G: 0x40, B: 0xa6, A: 0xff},
	color.RGBA{R: 0x00, G: 0xcc, B: 0x00, A: 0xff},
	color.RGBA{R: 0x66, G: 0x33, B: 0x00, A: 0xff},
	color.RGBA{R: 0x00, G: 0xbf, B: 0xbf, A: 0xff},
	color.RGBA{R: 0x00, G: 0x00, B: 0xff, A: 0xff},
	color.RGBA{R: 0xf2, G: 0x0d, B: 0x73, A: 0xff},
	color.RGBA{R: 0xff, G: 0x26, B: 0xff, A: 0xff},
	color.RGBA{R: 0xb3, G: 0xb3, B: 0x66, A: 0xff},
	color.RGBA{R: 0x33, G: 0x4d, B: 0x40, A: 0xff},
	color.RGBA{R: 0x80, G: 0x00, B: 0x66, A: 0xff},
	color.RGBA{R: 0x40, G: 0x80, B: 0xb3, A: 0xff},
	color.RGBA{R: 0xe6, G: 0x8c, B: 0xf2, A: 0xff},
}

var grey = color.RGBA{R: 0x70, G: 0x70, B: 0x70, A: 0xff}

func classColor(c int) color.Color { return palette[c%len(palette)] }

// stageTicks labels the x axis with stage index and kind.
type stageTicks []*trace.Stage

func (s stageTicks) Ticks(min, max float64) []plot.Tick {
	var out []plot.Tick
	for _, st := range s {
		v := float64(st.Index)
		if v < min-0.5 || v > max+0.5 {
			continue
		}
		out = append(out, plot.Tick{Value: v, Label: strconv.Itoa(st.Index) + "\n" + string(st.Kind)})
	}
	return out
}

func stagePtrs(t *trace.Trace) []*trace.Stage {
	out := make([]*trace.Stage, len(t.Stages))
	for i := range t.Stages {
		out[i] = &t.Stages[i]
	}
	return out
}

func newStagePlot(t *trace.Trace, title, ylabel string) *plot.Plot {
	p := plot.New()
	p.Title.Text = title
	p.X.Label.Text = "stage"
	p.Y.Label.Text = ylabel
	p.X.Tick.Marker = stageTicks(stagePtrs(t))
	p.X.Min, p.X.Max = -0.3, float64(len(t.Stages)-1)+0.3
	p.Legend.Top = true
	p.Legend.Left = false
	p.Add(plotter.NewGrid())
	return p
}

// addSeries adds point markers to p and lines between points of
// consecutive stages (xy's X values are stage indices): no line is drawn
// across a stage where the measure is undefined.
func addSeries(p *plot.Plot, name string, xy plotter.XYs, c color.Color, dashed bool, shape int) error {
	if len(xy) == 0 {
		return nil
	}
	s, err := plotter.NewScatter(xy)
	if err != nil {
		return err
	}
	s.Color = c
	s.Shape = shapes[shape%len(shapes)]
	s.Radius = vg.Points(2.5)
	style := draw.LineStyle{Color: c, Width: vg.Points(1.5)}
	if dashed {
		style.Dashes = []vg.Length{vg.Points(4), vg.Points(3)}
	}
	var first *plotter.Line
	for lo := 0; lo < len(xy); {
		hi := lo + 1
		for hi < len(xy) && xy[hi].X-xy[hi-1].X <= 1 {
			hi++
		}
		if hi-lo > 1 {
			l, err := plotter.NewLine(xy[lo:hi])
			if err != nil {
				return err
			}
			l.LineStyle = style
			p.Add(l)
			if first == nil {
				first = l
			}
		}
		lo = hi
	}
	p.Add(s)
	if first == nil {
		first = &plotter.Line{LineStyle: style}
	}
	p.Legend.Add(name, first, s)
	return nil
}

// legendGap is the space between a plot's data area and its legend.
const legendGap = 6 * vg.Millimeter

// drawOutside draws p on c with its legend to the right of the data
// area, outside it, so that no entry hides a point.
func drawOutside(c draw.Canvas, p *plot.Plot) {
	leg := p.Legend
	w := leg.Rectangle(c).Size().X
	if w <= 0 {
		p.Draw(c)
		return
	}
	p.Legend = plot.NewLegend()
	leg.Top, leg.Left = true, true
	data, side := c, c
	data.Max.X = c.Max.X - w - legendGap
	side.Min.X = data.Max.X + legendGap
	p.Draw(data)
	leg.Draw(side)
	p.Legend = leg
}

// writePlot renders p as SVG to w, its legend outside the data.
func writePlot(w io.Writer, p *plot.Plot, width, height vg.Length) error {
	c := vgsvg.New(width, height)
	drawOutside(draw.New(c), p)
	_, err := c.WriteTo(w)
	return err
}

// writePanels draws the plots one above the other on c, their data
// areas aligned and their legends outside to the right.
func writePanels(c draw.Canvas, ps ...*plot.Plot) {
	var w vg.Length
	for _, p := range ps {
		w = max(w, p.Legend.Rectangle(c).Size().X)
	}
	legs := make([]plot.Legend, len(ps))
	for i, p := range ps {
		legs[i] = p.Legend
		p.Legend = plot.NewLegend()
	}
	data := c
	if w > 0 {
		data.Max.X = c.Max.X - w - legendGap
	}
	rows := make([][]*plot.Plot, len(ps))
	for i, p := range ps {
		rows[i] = []*plot.Plot{p}
	}
	tiles := draw.Tiles{Rows: len(ps), Cols: 1, PadY: vg.Points(6)}
	canvases := plot.Align(rows, tiles, data)
	for i, p := range ps {
		p.Draw(canvases[i][0])
		if legs[i].Rectangle(c).Size().X > 0 {
			side := canvases[i][0]
			side.Min.X, side.Max.X = data.Max.X+legendGap, c.Max.X
			legs[i].Top, legs[i].Left = true, true
			legs[i].Draw(side)
		}
		p.Legend = legs[i]
	}
}

// BettiSVG writes an SVG line plot of the Betti number βdim of
// every class (solid, in class colours) and of the whole sample (dashed
// grey, when recorded) across the stages. It returns an error if dim is
// outside 0..Settings.MaxDim or the trace has no stages.
func BettiSVG(w io.Writer, t *trace.Trace, dim int) error {
	if len(t.Stages) == 0 {
		return fmt.Errorf("render: the trace has no stages")
	}
	if dim < 0 || dim > t.Settings.MaxDim {
		return fmt.Errorf("render: dimension %d outside 0..%d", dim, t.Settings.MaxDim)
	}
	p := newStagePlot(t, fmt.Sprintf("β%s per class across stages", subscript(dim)), fmt.Sprintf("β%s", subscript(dim)))
	hi := 1.0
	for c, name := range t.Sample.Classes {
		var xy plotter.XYs
		for i := range t.Stages {
			if c < len(t.Stages[i].Classes) {
				if b := t.Stages[i].Classes[c].Betti; dim < len(b) {
					xy = append(xy, plotter.XY{X: float64(i), Y: float64(b[dim])})
					hi = math.Max(hi, float64(b[dim]))
				}
			}
		}
		if err := addSeries(p, name, xy, classColor(c), false, c); err != nil {
			return err
		}
	}
	var whole plotter.XYs
	for i := range t.Stages {
		if b := t.Stages[i].Whole.Betti; dim < len(b) {
			whole = append(whole, plotter.XY{X: float64(i), Y: float64(b[dim])})
			hi = math.Max(hi, float64(b[dim]))
		}
	}
	if err := addSeries(p, "whole sample", whole, grey, true, len(t.Sample.Classes)); err != nil {
		return err
	}
	p.Y.Min, p.Y.Max = 0, hi*1.1+0.5
	p.Y.Tick.Marker = intTicks{}
	return writePlot(w, p, plotWidth, plotHeight)
}

// intTicks puts ticks on integers only.
type intTicks struct{}

func (intTicks) Ticks(min, max float64) []plot.Tick {
	step := math.Max(1, math.Ceil((max-min)/8))
	var out []plot.Tick
	for v := math.Ceil(min); v <= max; v += step {
		out = append(out, plot.Tick{Value: v, Label: strconv.Itoa(int(v))})
	}
	return out
}

// GluingSVG writes an SVG plot of the gluing and folding measures across the
// stages after the input: the pairs of points glued within a class and
// cross (different classes) (log scale, plotted as count + 1) and, on a second axis
// set below, the fractions of points that ReLU-type stages leave
// untouched, send to a face, or send to the origin (fold.untouched,
// fold.face, fold.origin). It returns an error if the trace has fewer
// than two stages.
func GluingSVG(w io.Writer, t *trace.Trace) error {
	if len(t.Stages) < 2 {
		return fmt.Errorf("render: the trace has no stage after the input")
	}
	top := newStagePlot(t, "Pairs glued by each stage", "pairs + 1 (log)")
	top.Y.Scale = plot.LogScale{}
	top.Y.Tick.Marker = plot.LogTicks{Prec: -1}
	var within, cross plotter.XYs
	for i := range t.Stages {
		if g := t.Stages[i].Glued; g != nil {
			within = append(within, plotter.XY{X: float64(i), Y: float64(g.Within) + 1})
			cross = append(cross, plotter.XY{X: float64(i), Y: float64(g.Cross) + 1})
		}
	}
	if err := addSeries(top, "glued within (same class)", within, palette[0], false, 0); err != nil {
		return err
	}
	if err := addSeries(top, "glued cross (different classes)", cross, palette[1], false, 1); err != nil {
		return err
	}
	top.Y.Min = 1
	hi := 10.0
	for _, v := range append(within, cross...) {
		hi = math.Max(hi, v.Y*2)
	}
	top.Y.Max = hi

	bottom := newStagePlot(t, "What each ReLU-type stage does to the points", "fraction of points")
	names := []struct{ key, label string }{
		{"fold.untouched", "untouched"},
		{"fold.face", "sent to a face"},
		{"fold.origin", "sent to the origin"},
	}
	any := false
	for k, nm := range names {
		var xy plotter.XYs
		for i := range t.Stages {
			if v, ok := t.Stages[i].Measures[nm.key]; ok {
				xy = append(xy, plotter.XY{X: float64(i), Y: v})
			}
		}
		any = any || len(xy) > 0
		if err := addSeries(bottom, nm.label, xy, palette[k+2], false, k+2); err != nil {
			return err
		}
	}
	bottom.Y.Min, bottom.Y.Max = 0, 1.05
	if !any {
		bottom.Title.Text += " (no ReLU-type stage)"
	}

	c := vgsvg.New(plotWidth, 2*plotHeight)
	writePanels(draw.New(c), top, bottom)
	_, err := c.WriteTo(w)
	return err
}

// SeparationSVG writes an SVG plot of how well the classes are
// apart at each stage: on top the stage measures knn.accuracy,
// probe.accuracy and, on softmax stages, voronoi.inside; below, each
// class's knn.accuracy. Stages where a measure is undefined have no
// point. It returns an error if no stage has a separation measure.
func SeparationSVG(w io.Writer, t *trace.Trace) error {
	top := newStagePlot(t, "How well the classes are apart", "accuracy (fraction)")
	var names []struct{ key, label string }
	for _, k := range []string{"knn.accuracy", "probe.accuracy", "voronoi.inside"} {
		m, _ := trace.LookupMeasure(k)
		names = append(names, struct{ key, label string }{k, m.Label})
	}
	n := 0
	for k, nm := range names {
		var xy plotter.XYs
		for i := range t.Stages {
			if v, ok := t.Stages[i].Measures[nm.key]; ok {
				xy = append(xy, plotter.XY{X: float64(i), Y: v})
			}
		}
		n += len(xy)
		if err := addSeries(top, nm.label, xy, palette[k%len(palette)], false, k); err != nil {
			return err
		}
	}
	if n == 0 {
		return fmt.Errorf("render: no stage has a separation measure")
	}
	// Headroom above 1 keeps the legend (top right) off the data.
	top.Y.Min, top.Y.Max = 0, 1.45

	bottom := newStagePlot(t, "k-NN accuracy of each class", "accuracy (fraction)")
	for c, name := range t.Sample.Classes {
		var xy plotter.XYs
		for i := range t.Stages {
			if c < len(t.Stages[i].Classes) {
				if v, ok := t.Stages[i].Classes[c].Measures["knn.accuracy"]; ok {
					xy = append(xy, plotter.XY{X: float64(i), Y: v})
				}
			}
		}
		if err := addSeries(bottom, name, xy, palette[c%len(palette)], false, c); err != nil {
			return err
		}
	}
	bottom.Y.Min, bottom.Y.Max = 0, 1.1+0.12*float64(len(t.Sample.Classes))
	top.Y.Tick.Marker = unitTicks{}
	bottom.Y.Tick.Marker = unitTicks{}

	c := vgsvg.New(plotWidth, 2*plotHeight)
	writePanels(draw.New(c), top, bottom)
	_, err := c.WriteTo(w)
	return err
}

// unitTicks marks 0, 0.25, …, 1 only, whatever the axis' headroom.
type unitTicks struct{}

// Ticks implements plot.Ticker.
func (unitTicks) Ticks(min, max float64) []plot.Tick {
	var ts []plot.Tick
	for v := 0.0; v <= 1; v += 0.25 {
		ts = append(ts, plot.Tick{Value: v, Label: strconv.FormatFloat(v, 'g', -1, 64)})
	}
	return ts
}

// BarcodeSVG writes an SVG barcode of one group at stage i: class
// names a class, "" the whole sample. Each bar is a horizontal segment
// from birth to death, grouped by dimension (H0 at the top); bars alive
// at the threshold are drawn to the threshold and ended with an arrow
// head; a vertical line marks the scale at which the Betti numbers were
// read. It returns an error for an unknown stage or class or a group
// with no bars.
func BarcodeSVG(w io.Writer, t *trace.Trace, i int, class string) error {
	st := t.Stage(i)
	if st == nil {
		return fmt.Errorf("render: no stage %d (the trace has %d)", i, len(t.Stages))
	}
	g := &st.Whole
	name := "whole sample"
	if class != "" {
		g = st.Group(class)
		if g == nil {
			return fmt.Errorf("render: stage %d has no class %q", i, class)
		}
		name = "class " + class
	}
	if len(g.Bars) == 0 {
		return fmt.Errorf("render: stage %d, %s: no bars recorded", i, name)
	}
	p := plot.New()
	p.Title.Text = fmt.Sprintf("Barcode, stage %d (%s), %s", st.Index, st.Kind, name)
	p.X.Label.Text = "scale ε"
	p.Y.Label.Text = "bars"
	end := g.Threshold
	for _, bars := range g.Bars {
		for _, b := range bars {
			if !math.IsInf(b.Death, 1) {
				end = math.Max(end, b.Death)
			}
		}
	}
	if !(end > 0) || math.IsInf(end, 0) {
		end = math.Max(g.Diameter, 1)
	}
	// Keep at most maxDrawn longest bars per dimension so the picture
	// stays readable; the title says when bars were left out.
	const maxDrawn = 30
	row := 0.0
	var ticks []plot.Tick
	left := 0
	for d := len(g.Bars) - 1; d >= 0; d-- {
		bars := longest(g.Bars[d], maxDrawn)
		left += len(g.Bars[d]) - len(bars)
		first := row
		for _, b := range bars {
			death := b.Death
			open := math.IsInf(death, 1)
			if open {
				death = end
			}
			seg := plotter.XYs{{X: b.Birth, Y: row}, {X: death, Y: row}}
			l, err := plotter.NewLine(seg)
			if err != nil {
				return err
			}
			l.Color = classColor(d)
			l.Width = vg.Points(2)
			p.Add(l)
			if open {
				s, err := plotter.NewScatter(plotter.XYs{{X: death, Y: row}})
				if err != nil {
					return err
				}
				s.Color = classColor(d)
				s.Shape = draw.TriangleGlyph{}
				s.Radius = vg.Points(2.5)
				p.Add(s)
			}
			row++
		}
		ticks = append(ticks, plot.Tick{Value: (first + row - 1) / 2, Label: "H" + strconv.Itoa(d)})
		row += 1.5
	}
	if left > 0 {
		p.Title.Text += fmt.Sprintf(" (%d shortest bars not drawn)", left)
	}
	p.Y.Tick.Marker = plot.ConstantTicks(ticks)
	p.Y.Min, p.Y.Max = -1, math.Max(row-0.5, 1)
	p.X.Min, p.X.Max = 0, end*1.05
	if g.Scale > 0 && t.Settings.Rule != trace.ScalePersistence {
		l, err := plotter.NewLine(plotter.XYs{{X: g.Scale, Y: -1}, {X: g.Scale, Y: row}})
		if err != nil {
			return err
		}
		l.Color = grey
		l.Dashes = []vg.Length{vg.Points(3), vg.Points(3)}
		p.Add(l)
		p.Legend.Add(scaleLegend(t.Settings.Rule, g), l)
		p.Legend.Top = true
	}
	h := plotHeight
	if row > 40 {
		h = vg.Length(row) * vg.Points(5)
	}
	return writePlot(w, p, plotWidth, h)
}

// longest returns at most n bars of b with the largest persistence, in
// their original order.
func longest(b []trace.Bar, n int) []trace.Bar {
	if len(b) <= n {
		return b
	}
	pers := make([]float64, len(b))
	for i, x := range b {
		pers[i] = x.Persistence()
	}
	cut := append([]float64(nil), pers...)
	sort.Sort(sort.Reverse(sort.Float64Slice(cut)))
	th := cut[n-1]
	out := make([]trace.Bar, 0, n)
	for i, x := range b {
		if pers[i] > th && len(out) < n {
			out = append(out, x)
		}
	}
	for i, x := range b {
		if pers[i] == th && len(out) < n {
			out = append(out, x)
		}
	}
	return out
}

func subscript(d int) string {
	const subs = "₀₁₂₃₄₅₆₇₈₉"
	s := strconv.Itoa(d)
	var b bytes.Buffer
	for _, r := range s {
		b.WriteString(string([]rune(subs)[r-'0']))
	}
	return b.String()
}

// SVG returns the plot of β₀ per class across stages (BettiSVG with
// dimension 0), or an empty string for a trace with no stages. It is
// meant for notebooks that display SVG.
func SVG(t *trace.Trace) string {
	var b bytes.Buffer
	if err := BettiSVG(&b, t, 0); err != nil {
		return ""
	}
	return b.String()
}

// overlapPrefixes are the families of class-overlap measures the report
// plots one by one.
var overlapPrefixes = []string{"knn.", "margin.", "fisher.", "silhouette.", "nc1.", "probe.", "twonn.", "pca.", "voronoi."}

// OverlapMeasures returns the class-overlap measures the trace records
// (in the order of trace.Measures), leaving out the settings knn.k and
// probe.converged.
func OverlapMeasures(t *trace.Trace) []string {
	have := map[string]bool{}
	for _, n := range t.MeasureNames() {
		have[n] = true
	}
	var out []string
	for _, m := range trace.Measures() {
		if !have[m.Name] || m.Name == "knn.k" || m.Name == "probe.converged" {
			continue
		}
		for _, p := range overlapPrefixes {
			if strings.HasPrefix(m.Name, p) {
				out = append(out, m.Name)
				break
			}
		}
	}
	return out
}

// MeasureSVG writes an SVG plot of one measure across the stages: the
// stage's value (black) and, for a per-class measure, each class's (in
// class colours and shapes). Stages where it is undefined have no point
// and no line through them; a ratio is drawn on a log scale. It returns
// an error for a name the measure table does not know or a measure the
// trace never records.
func MeasureSVG(w io.Writer, t *trace.Trace, name string) error {
	m, ok := trace.LookupMeasure(name)
	if !ok {
		return trace.CheckMeasure(name)
	}
	ylabel := m.Range
	if m.Better != "" {
		ylabel += ", " + m.Better + " is better"
	}
	p := newStagePlot(t, m.Label+" ("+name+")", ylabel)
	logScale := m.Ratio
	points := func(class string) plotter.XYs {
		var xy plotter.XYs
		for i := range t.Stages {
			v, ok := t.Stages[i].Value(class, name)
			if !ok || math.IsNaN(v) || math.IsInf(v, 0) || (logScale && v <= 0) {
				continue
			}
			xy = append(xy, plotter.XY{X: float64(t.Stages[i].Index), Y: v})
		}
		return xy
	}
	n := 0
	if m.Stage {
		xy := points("")
		n += len(xy)
		if err := addSeries(p, "stage", xy, color.Black, false, len(t.Sample.Classes)); err != nil {
			return err
		}
	}
	if m.Class {
		for c, label := range t.Sample.Classes {
			xy := points(label)
			n += len(xy)
			if err := addSeries(p, label, xy, classColor(c), false, c); err != nil {
				return err
			}
		}
	}
	if n == 0 {
		return fmt.Errorf("render: the trace records no %s", name)
	}
	if logScale {
		p.Y.Scale = plot.LogScale{}
		p.Y.Tick.Marker = plot.LogTicks{Prec: -1}
	}
	return writePlot(w, p, plotWidth, plotHeight*0.8)
}

// Palette returns the class colours as sRGB components in [0, 1], in
// class order.
func Palette() [][3]float64 {
	out := make([][3]float64, len(palette))
	for i, c := range palette {
		r, g, b, _ := c.RGBA()
		out[i] = [3]float64{float64(r) / 0xffff, float64(g) / 0xffff, float64(b) / 0xffff}
	}
	return out
}

// Shapes returns the number of distinct class marker shapes.
func Shapes() int { return len(shapes) }

// scaleLegend names the dashed line of a barcode: the scale the rule
// read the Betti numbers at, and the reading.
func scaleLegend(rule trace.ScaleRule, g *trace.Group) string {
	if rule == trace.ScaleRatio {
		return fmt.Sprintf("sampling scale %.3g; read %s", g.Scale, g.BettiString())
	}
	return fmt.Sprintf("ε = %.3g; read %s", g.Scale, g.BettiString())
}
