// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package render

import (
	"math"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// polygonGlyph is a regular polygon marker with Sides corners, the
// first at angle Turn (radians, 0 pointing right), filled or outlined.
type polygonGlyph struct {
	Sides  int
	Turn   float64
	Filled bool
}

// DrawGlyph implements draw.GlyphDrawer.
func (g polygonGlyph) DrawGlyph(c *draw.Canvas, sty draw.GlyphStyle, pt vg.Point) {
	var p vg.Path
	r := float64(sty.Radius) * 1.15
	for k := range g.Sides {
		a := g.Turn + 2*math.Pi*float64(k)/float64(g.Sides)
		q := vg.Point{X: pt.X + vg.Length(r*math.Cos(a)), Y: pt.Y + vg.Length(r*math.Sin(a))}
		if k == 0 {
			p.Move(q)
		} else {
			p.Line(q)
		}
	}
	p.Close()
	if g.Filled {
		c.SetColor(sty.Color)
		c.Fill(p)
		return
	}
	c.SetLineStyle(draw.LineStyle{Color: sty.Color, Width: vg.Points(1)})
	c.Stroke(p)
}

// shapes are the point markers of classes, in class order: twelve
// distinct shapes, the second cue beside colour.
var shapes = []draw.GlyphDrawer{
	draw.CircleGlyph{}, draw.SquareGlyph{}, draw.PyramidGlyph{},
	polygonGlyph{Sides: 4, Turn: math.Pi / 2, Filled: true},  // diamond
	polygonGlyph{Sides: 3, Turn: -math.Pi / 2, Filled: true}, // triangle pointing down
	draw.RingGlyph{}, draw.BoxGlyph{}, draw.TriangleGlyph{},
	polygonGlyph{Sides: 4, Turn: math.Pi / 2}, // outlined diamond
	draw.PlusGlyph{}, draw.CrossGlyph{},
	polygonGlyph{Sides: 6, Turn: 0, Filled: true}, // hexagon
}
