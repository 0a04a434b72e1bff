// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// Package spaces draws random samples of spaces whose Betti numbers are
// textbook facts, for testing how Betti numbers are read from samples.
//
// Every Space names its truth and where it is proved: A. Hatcher,
// Algebraic Topology, Cambridge University Press (2002). A sample is
// drawn in the space's own coordinates, perturbed by Gaussian noise of a
// given size relative to the space's feature size (the smallest scale at
// which its topology shows: a radius, a tube, a gap), and carried into
// R^D by a random isometry or a random linear stretch of bounded
// condition number; both are homeomorphisms onto their image, so the
// truth is unchanged.
package spaces

import (
	"math"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"
)

// Space is a space with known Betti numbers and a way to sample it.
type Space struct {
	// Name is a short identifier ("circle", "torus", ...).
	Name string
	// Dim is the dimension of the coordinates Sample draws in.
	Dim int
	// Feature is the feature size in those coordinates.
	Feature float64
	// Betti2 and Betti3 are the Betti numbers over Z/2 and Z/3, H0..H2.
	Betti2, Betti3 [3]int
	// Source names the result in Hatcher (2002) the truth comes from.
	Source string
	// Apart, when not empty, says why the space is reported apart from
	// the suite's totals: a harder sampling of a space already in the
	// suite, kept to show where the reading stops.
	Apart string
	// draw returns one point.
	draw func(r *rand.Rand) []float64
}

// Truth returns the Betti numbers over Z/p (p = 2 or 3) up to maxDim.
func (s Space) Truth(p, maxDim int) []int {
	b := s.Betti2
	if p == 3 {
		b = s.Betti3
	}
	return append([]int(nil), b[:maxDim+1]...)
}

// circle returns a point of the circle of radius r about (cx, cy) at
// angle t.
func circle(r, cx, cy, t float64) []float64 {
	return []float64{cx + r*math.Cos(t), cy + r*math.Sin(t)}
}

func angle(r *rand.Rand) float64 { return 2 * math.Pi * r.Float64() }

// All returns the spaces of the suite, in a fixed order.
func All() []Space {
	return []Space{
		{
			Name: "circle", Dim: 2, Feature: 1, Betti2: [3]int{1, 1, 0}, Betti3: [3]int{1, 1, 0},
			Source: "Hatcher (2002), Example 2.4 / Corollary 2.14: H̃_n(S¹) is Z for n = 1, else 0",
			draw:   func(r *rand.Rand) []float64 { return circle(1, 0, 0, angle(r)) },
		},
		{
			Name: "wedge", Dim: 2, Feature: 1, Betti2: [3]int{1, 2, 0}, Betti3: [3]int{1, 2, 0},
			Source: "Hatcher (2002), Corollary 2.25: H̃ of a wedge is the direct sum (two tangent circles)",
			draw: func(r *rand.Rand) []float64 {
				if r.IntN(2) == 0 {
					return circle(1, -1, 0, angle(r))
				}
				return circle(1, 1, 0, angle(r))
			},
		},
		{
			Name: "figure-eight", Dim: 2, Feature: 0.7, Betti2: [3]int{1, 2, 0}, Betti3: [3]int{1, 2, 0},
			Source: "Hatcher (2002), Example 1.21 and Corollary 2.25: the figure-eight is S¹ ∨ S¹ (a lemniscate)",
			draw: func(r *rand.Rand) []float64 {
				// The lemniscate of Bernoulli with half-width 2, drawn
				// uniformly in its parameter; the sampling density is
				// uneven along the curve, as in real data.
				t := angle(r)
				s := math.Sin(t)
				d := 1 + s*s
				return []float64{2 * math.Cos(t) / d, 2 * math.Sin(t) * math.Cos(t) / d}
			},
		},
		{
			Name: "two-circles", Dim: 2, Feature: 1, Betti2: [3]int{2, 2, 0}, Betti3: [3]int{2, 2, 0},
			Source: "Hatcher (2002), Proposition 2.6: homology of a disjoint union is the direct sum (two copies of S¹)",
			draw: func(r *rand.Rand) []float64 {
				if r.IntN(2) == 0 {
					return circle(1, -2, 0, angle(r))
				}
				return circle(1, 2, 0, angle(r))
			},
		},
		{
			Name: "disc", Dim: 2, Feature: 1, Betti2: [3]int{1, 0, 0}, Betti3: [3]int{1, 0, 0},
			Source: "Hatcher (2002), Corollary 2.11: the disc is contractible",
			draw: func(r *rand.Rand) []float64 {
				return circle(math.Sqrt(r.Float64()), 0, 0, angle(r))
			},
		},
		{
			Name: "annulus", Dim: 2, Feature: 1, Betti2: [3]int{1, 1, 0}, Betti3: [3]int{1, 1, 0},
			Source: "Hatcher (2002), Corollary 2.11 and Example 2.4: the annulus deformation retracts onto S¹",
			draw: func(r *rand.Rand) []float64 {
				// Uniform in area between radii 1 and 2.
				return circle(math.Sqrt(1+3*r.Float64()), 0, 0, angle(r))
			},
		},
		{
			Name: "blobs", Dim: 2, Feature: 1, Betti2: [3]int{3, 0, 0}, Betti3: [3]int{3, 0, 0},
			Source: "Hatcher (2002), Proposition 2.6 and Corollary 2.11: three disjoint contractible pieces",
			draw: func(r *rand.Rand) []float64 {
				// Three Gaussian blobs of standard deviation 0.4 at the
				// corners of a triangle of side 5.
				c := r.IntN(3)
				t := 2 * math.Pi * float64(c) / 3
				return []float64{5/math.Sqrt(3)*math.Cos(t) + 0.4*r.NormFloat64(), 5/math.Sqrt(3)*math.Sin(t) + 0.4*r.NormFloat64()}
			},
		},
		{
			Name: "arc", Dim: 2, Feature: 1, Betti2: [3]int{1, 0, 0}, Betti3: [3]int{1, 0, 0},
			Source: "Hatcher (2002), Corollary 2.11: an arc is contractible (240° of the unit circle)",
			draw: func(r *rand.Rand) []float64 {
				return circle(1, 0, 0, 4*math.Pi/3*r.Float64())
			},
		},
		{
			Name: "uneven-circle", Dim: 2, Feature: 1, Betti2: [3]int{1, 1, 0}, Betti3: [3]int{1, 1, 0},
			Source: "Hatcher (2002), Example 2.4 / Corollary 2.14: S¹, sampled with density ratio 9:1",
			draw: func(r *rand.Rand) []float64 {
				// Density proportional to 1 + 0.8 cos t, by rejection.
				for {
					t := angle(r)
					if 1.8*r.Float64() < 1+0.8*math.Cos(t) {
						return circle(1, 0, 0, t)
					}
				}
			},
		},
		{
			Name: "sphere", Dim: 3, Feature: 1, Betti2: [3]int{1, 0, 1}, Betti3: [3]int{1, 0, 1},
			Source: "Hatcher (2002), Corollary 2.14: H̃_n(S²) is Z for n = 2, else 0",
			draw: func(r *rand.Rand) []float64 {
				return unit(r, 3)
			},
		},
		{
			Name: "torus", Dim: 4, Feature: 1, Betti2: [3]int{1, 2, 1}, Betti3: [3]int{1, 2, 1},
			Source: "Hatcher (2002), Example 2.36: H_n(S¹×S¹) is Z, Z², Z for n = 0, 1, 2",
			draw: func(r *rand.Rand) []float64 {
				// The product of two unit circles in R⁴ (the flat torus),
				// uniform in area.
				u, v := angle(r), angle(r)
				return []float64{math.Cos(u), math.Sin(u), math.Cos(v), math.Sin(v)}
			},
		},
		{
			Name: "rp2", Dim: 6, Feature: 0.5, Betti2: [3]int{1, 1, 1}, Betti3: [3]int{1, 0, 0},
			Source: "Hatcher (2002), Example 2.42 and Corollary 3.3 (universal coefficients): H(RP²; Z/2) = Z/2 in degrees 0–2, H(RP²; Z/3) = Z/3 in degree 0",
			draw: func(r *rand.Rand) []float64 {
				// The Veronese embedding of RP² = S²/±1 in R⁶, an
				// isometry up to scale for the quotient metric.
				p := unit(r, 3)
				x, y, z := p[0], p[1], p[2]
				s := math.Sqrt2
				return []float64{x * x, y * y, z * z, s * x * y, s * x * z, s * y * z}
			},
		},
		{
			Name: "torus-revolution", Dim: 3, Feature: 1, Betti2: [3]int{1, 2, 1}, Betti3: [3]int{1, 2, 1},
			Source: "Hatcher (2002), Example 2.36: H_n(S¹×S¹) is Z, Z², Z for n = 0, 1, 2",
			Apart:  "the torus again, with a tube loop half the size of the other loop: at 150 points the tube loop dies at about twice its birth, as long as the longest noise loops",
			draw: func(r *rand.Rand) []float64 {
				// Uniform in area on the torus of radii 2 and 1, by
				// rejection on the tube angle.
				for {
					u, v := angle(r), angle(r)
					if 3*r.Float64() < 2+math.Cos(v) {
						return []float64{(2 + math.Cos(v)) * math.Cos(u), (2 + math.Cos(v)) * math.Sin(u), math.Sin(v)}
					}
				}
			},
		},
	}
}

// unit returns a uniform point of the unit sphere in R^d.
func unit(r *rand.Rand, d int) []float64 {
	for {
		p := make([]float64, d)
		var s float64
		for i := range p {
			p[i] = r.NormFloat64()
			s += p[i] * p[i]
		}
		if s > 1e-12 {
			s = math.Sqrt(s)
			for i := range p {
				p[i] /= s
			}
			return p
		}
	}
}

// Embedding says how a sample is carried into R^D.
type Embedding struct {
	// D is the ambient dimension, at least the space's own.
	D int
	// Cond is the condition number of the linear map: 1 is an isometry;
	// above 1 the singular values are spaced geometrically from 1 to
	// Cond.
	Cond float64
}

// Sample draws n points of s with noise of RMS size noise × s.Feature
// (added in the space's own coordinates), carried into R^e.D by a random
// linear map of condition number e.Cond and a random translation, all
// from seed. It panics if e.D < s.Dim or n < 1.
func (s Space) Sample(n int, noise float64, e Embedding, seed uint64) *mat.Dense {
	if e.D < s.Dim || n < 1 {
		panic("spaces: bad sample size or dimension")
	}
	r := rand.New(rand.NewPCG(seed, 0x5eed))
	src := mat.NewDense(n, s.Dim, nil)
	sd := noise * s.Feature / math.Sqrt(float64(s.Dim))
	for i := range n {
		p := s.draw(r)
		for j, v := range p {
			src.Set(i, j, v+sd*r.NormFloat64())
		}
	}
	a := linearMap(r, e.D, s.Dim, max(e.Cond, 1))
	out := mat.NewDense(n, e.D, nil)
	out.Mul(src, a.T())
	shift := make([]float64, e.D)
	for j := range shift {
		shift[j] = 3 * r.NormFloat64()
	}
	for i := range n {
		row := out.RawRowView(i)
		for j := range row {
			row[j] += shift[j]
		}
	}
	return out
}

// linearMap returns the D×d matrix A = U Σ Vᵀ[:, :d] restricted to the
// first d coordinates, where U and V are random orthogonal D×D matrices
// and Σ has singular values from 1 to cond, geometrically spaced.
func linearMap(r *rand.Rand, D, d int, cond float64) *mat.Dense {
	u := orthogonal(r, D)
	a := mat.NewDense(D, d, nil)
	if cond == 1 {
		a.Copy(u.Slice(0, D, 0, d))
		return a
	}
	v := orthogonal(r, D)
	sig := mat.NewDense(D, D, nil)
	for i := range D {
		f := 0.0
		if D > 1 {
			f = float64(i) / float64(D-1)
		}
		sig.Set(i, i, math.Pow(cond, f))
	}
	var us, m mat.Dense
	us.Mul(u, sig)
	m.Mul(&us, v.T())
	a.Copy(m.Slice(0, D, 0, d))
	return a
}

// orthogonal returns a random orthogonal n×n matrix (Q of a Gaussian
// matrix's QR factorisation).
func orthogonal(r *rand.Rand, n int) *mat.Dense {
	g := mat.NewDense(n, n, nil)
	for i := range n {
		for j := range n {
			g.Set(i, j, r.NormFloat64())
		}
	}
	var qr mat.QR
	qr.Factorize(g)
	var q mat.Dense
	qr.QTo(&q)
	return &q
}
