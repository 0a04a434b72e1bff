// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"math"
	"slices"
	"testing"
)

// engStableScale picks a scale from a barcode: the midpoint of the longest
// interval between consecutive bar endpoints at which the sample is
// connected (after the last finite H0 death) and some bar of dimension
// ≥ 1 is alive.
func engStableScale(b *Barcode) float64 {
	var ends []float64
	lastH0 := 0.0
	for _, bar := range b.Bars[0] {
		if !isInf(bar.Death) {
			lastH0 = math.Max(lastH0, bar.Death)
		}
	}
	ends = append(ends, lastH0, b.Threshold)
	for _, bars := range b.Bars {
		for _, bar := range bars {
			for _, v := range []float64{bar.Birth, bar.Death} {
				if v > lastH0 && v < b.Threshold {
					ends = append(ends, v)
				}
			}
		}
	}
	slices.Sort(ends)
	best, at := -1.0, 0.0
	for i := 1; i < len(ends); i++ {
		mid := (ends[i] + ends[i-1]) / 2
		alive := 0
		for _, n := range b.Betti(mid)[1:] {
			alive += n
		}
		if g := ends[i] - ends[i-1]; g > best && alive > 0 {
			best, at = g, (ends[i]+ends[i-1])/2
		}
	}
	return at
}

func gridTorus4(m int) [][]float64 {
	// Clifford torus S¹×S¹ ⊂ R⁴ on an m×m grid of angles.
	var pts [][]float64
	for a := 0; a < m; a++ {
		for c := 0; c < m; c++ {
			u, v := 2*math.Pi*float64(a)/float64(m), 2*math.Pi*float64(c)/float64(m)
			pts = append(pts, []float64{math.Cos(u), math.Sin(u), math.Cos(v), math.Sin(v)})
		}
	}
	return pts
}

func gridKlein(mu, mv int) [][]float64 {
	// The Klein bottle in R⁴: ((R + r cos v) cos u, (R + r cos v) sin u,
	// r sin v cos(u/2), r sin v sin(u/2)); (u+2π, v) and (u, −v) are the
	// same point, so u runs over [0, 2π) and v over [0, 2π).
	const R, r = 2.0, 1.0
	var pts [][]float64
	for a := 0; a < mu; a++ {
		for c := 0; c < mv; c++ {
			u, v := 2*math.Pi*float64(a)/float64(mu), 2*math.Pi*float64(c)/float64(mv)
			pts = append(pts, []float64{(R + r*math.Cos(v)) * math.Cos(u), (R + r*math.Cos(v)) * math.Sin(u),
				r * math.Sin(v) * math.Cos(u/2), r * math.Sin(v) * math.Sin(u/2)})
		}
	}
	return pts
}

// fibonacciSphere returns n nearly uniform points of S².
func fibonacciSphere(n int) [][]float64 {
	pts := make([][]float64, n)
	g := math.Pi * (3 - math.Sqrt(5))
	for i := range pts {
		z := 1 - (2*float64(i)+1)/float64(n)
		r := math.Sqrt(1 - z*z)
		pts[i] = []float64{r * math.Cos(g*float64(i)), r * math.Sin(g*float64(i)), z}
	}
	return pts
}

func veroneseRP2(n int) [][]float64 {
	// RP² as the image of S² under the Veronese map
	// x ↦ (x², y², z², √2xy, √2xz, √2yz), which identifies x with −x;
	// the upper hemisphere of a Fibonacci sphere covers it once.
	var pts [][]float64
	for _, p := range fibonacciSphere(2 * n) {
		x, y, z := p[0], p[1], p[2]
		if z < 0 {
			continue
		}
		s := math.Sqrt2
		pts = append(pts, []float64{x * x, y * y, z * z, s * x * y, s * x * z, s * y * z})
	}
	return pts
}

func engCirclePoints(n int, cx, cy float64, skip bool) [][]float64 {
	var pts [][]float64
	for i := 0; i < n; i++ {
		if skip && i == 0 {
			continue
		}
		a := 2 * math.Pi * float64(i) / float64(n)
		pts = append(pts, []float64{cx + math.Cos(a), cy + math.Sin(a)})
	}
	return pts
}

// TestHatcherBetti recovers Betti numbers of standard spaces from
// samples. The reference values are the homology groups computed in
// A. Hatcher, Algebraic Topology (2002), chapter 2 (spheres, the torus,
// the Klein bottle, RP², wedge sums, by simplicial and cellular
// homology), turned into Betti numbers over Z/2 and Z/3 with the
// universal coefficient theorem of §3.A: the Klein bottle has
// H1 = Z ⊕ Z/2 and H2 = 0, so (1,2,1) over Z/2 and (1,1,0) over Z/3;
// RP² has H1 = Z/2 and H2 = 0, so (1,1,1) over Z/2 and (1,0,0) over Z/3.
func TestHatcherBetti(t *testing.T) {
	// Two unit circles centred at (∓1, 0) sharing the point (0, 0): the
	// first starts there, the second is the mirror image without it.
	wedge := engCirclePoints(40, -1, 0, false)
	for _, p := range engCirclePoints(40, -1, 0, true) {
		wedge = append(wedge, []float64{-p[0], p[1]})
	}
	for _, test := range []struct {
		name   string
		pts    [][]float64
		maxDim int
		field  int
		want   []int
	}{
		// For Z/3 the scale is taken from the Z/2 barcode of the same
		// cloud, where the space's classes are visible.
		{"circle", engCirclePoints(60, 0, 0, false), 1, 2, []int{1, 1}},
		{"sphere", fibonacciSphere(150), 2, 2, []int{1, 0, 1}},
		{"torus", gridTorus4(12), 2, 2, []int{1, 2, 1}},
		{"wedge of two circles", wedge, 1, 2, []int{1, 2}},
		{"Klein bottle Z/2", gridKlein(24, 8), 2, 2, []int{1, 2, 1}},
		{"Klein bottle Z/3", gridKlein(24, 8), 2, 3, []int{1, 1, 0}},
		{"RP2 Z/2", veroneseRP2(120), 2, 2, []int{1, 1, 1}},
		{"RP2 Z/3", veroneseRP2(120), 2, 3, []int{1, 0, 0}},
	} {
		t.Run(test.name, func(t *testing.T) {
			b, err := RipsPoints(context.Background(), test.pts, &Settings{MaxDim: test.maxDim, Field: test.field})
			if err != nil {
				t.Fatal(err)
			}
			eps := engStableScale(b)
			if test.field != 2 {
				b2, err := RipsPoints(context.Background(), test.pts, &Settings{MaxDim: test.maxDim})
				if err != nil {
					t.Fatal(err)
				}
				eps = engStableScale(b2)
			}
			if got := b.Betti(eps); !slices.Equal(got, test.want) {
				t.Errorf("%d points: Betti(%.4g) = %v, want %v; bars %v", len(test.pts), eps, got, test.want, b.Bars[1:])
			}
		})
	}
}
