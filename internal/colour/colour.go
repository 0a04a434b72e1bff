// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package colour measures how far apart two sRGB colours look, to normal
// vision and to the two common dichromacies, for choosing plot colours
// that stay distinguishable.
package colour

import "math"

// Vision is a kind of colour vision.
type Vision int

// Kinds of colour vision.
const (
	Normal       Vision = iota
	Protanopia          // no long-wavelength cones
	Deuteranopia        // no medium-wavelength cones
)

// Visions lists every Vision.
var Visions = []Vision{Normal, Protanopia, Deuteranopia}

// linear returns the linear-light value of an sRGB component in [0, 1]
// (IEC 61966-2-1).
func linear(c float64) float64 {
	if c <= 0.04045 {
		return c / 12.92
	}
	return math.Pow((c+0.055)/1.055, 2.4)
}

// simulate maps linear RGB to what a dichromat of kind v sees, in linear
// RGB. The matrices are those of F. Viénot, H. Brettel and J. D. Mollon,
// "Digital video colourmaps for checking the legibility of displays by
// dichromats", Color Research & Application 24 (1999), for linear sRGB
// (values as we remember them; the tests check their defining property,
// that they map a colour and its confusion partners to one colour).
func simulate(v Vision, r, g, b float64) (float64, float64, float64) {
	switch v {
	case Protanopia:
		return 0.11238*r + 0.88762*g, 0.11238*r + 0.88762*g, 0.00401*r - 0.00401*g + b
	case Deuteranopia:
		return 0.29275*r + 0.70725*g, 0.29275*r + 0.70725*g, -0.02234*r + 0.02234*g + b
	}
	return r, g, b
}

// Lab returns the CIELAB coordinates (D65 white) of the sRGB colour
// (r, g, b), components in [0, 1], as seen with vision v.
func Lab(v Vision, r, g, b float64) (l, a, bb float64) {
	lr, lg, lb := simulate(v, linear(r), linear(g), linear(b))
	x := 0.4124564*lr + 0.3575761*lg + 0.1804375*lb
	y := 0.2126729*lr + 0.7151522*lg + 0.0721750*lb
	z := 0.0193339*lr + 0.1191920*lg + 0.9503041*lb
	f := func(t float64) float64 {
		if t > 216.0/24389 {
			return math.Cbrt(t)
		}
		return (24389.0/27*t + 16) / 116
	}
	fx, fy, fz := f(x/0.95047), f(y), f(z/1.08883)
	return 116*fy - 16, 500 * (fx - fy), 200 * (fy - fz)
}

// Distance returns the CIE 1976 colour difference ΔE*ab between two sRGB
// colours as seen with vision v.
func Distance(v Vision, c1, c2 [3]float64) float64 {
	l1, a1, b1 := Lab(v, c1[0], c1[1], c1[2])
	l2, a2, b2 := Lab(v, c2[0], c2[1], c2[2])
	return math.Sqrt((l1-l2)*(l1-l2) + (a1-a2)*(a1-a2) + (b1-b2)*(b1-b2))
}

// MinDistance returns the least Distance between two colours seen with
// any of Visions.
func MinDistance(c1, c2 [3]float64) float64 {
	d := math.Inf(1)
	for _, v := range Visions {
		d = min(d, Distance(v, c1, c2))
	}
	return d
}
