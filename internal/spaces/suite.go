// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package spaces

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// Case is one sample of the textbook suite.
type Case struct {
	Space Space
	// N is the number of points, Noise the noise level (a fraction of
	// the feature size) and Embed the embedding.
	N     int
	Noise float64
	Embed Embedding
	// Field is the prime of the coefficients the truth is for.
	Field int
	// Seed seeds the sample.
	Seed uint64
}

// Name identifies the case.
func (c Case) Name() string {
	return fmt.Sprintf("%s/Z%d/n=%d/R%d/cond=%g/noise=%g", c.Space.Name, c.Field, c.N, c.Embed.D, c.Embed.Cond, c.Noise)
}

// Points draws the case's sample.
func (c Case) Points() *mat.Dense { return c.Space.Sample(c.N, c.Noise, c.Embed, c.Seed) }

// Truth is the case's Betti numbers up to maxDim.
func (c Case) Truth(maxDim int) []int { return c.Space.Truth(c.Field, maxDim) }

// Embeddings of the suite: random isometries into R⁸ and R⁶⁴ and
// stretches of condition number 10 into each.
var Embeddings = []Embedding{{D: 8, Cond: 1}, {D: 8, Cond: 10}, {D: 64, Cond: 1}, {D: 64, Cond: 10}}

// Suite returns every case of the textbook suite with the given sample
// sizes: each space, size and embedding once (RP² over Z/2 and Z/3),
// with noise of 0, 2.5 % or 5 % of the feature size in turn. The seeds
// are ours and fixed.
func Suite(sizes []int) []Case { return SuiteSeeded(0, sizes) }

// SuiteSeeded is Suite with every seed offset by base: the same cases
// drawn afresh, to check that what was measured on Suite holds on
// samples it was not measured on.
func SuiteSeeded(base uint64, sizes []int) []Case {
	var out []Case
	for si, sp := range All() {
		for _, n := range sizes {
			for ei, e := range Embeddings {
				noise := []float64{0, 0.025, 0.05}[(si+ei+n)%3]
				fields := []int{2}
				if sp.Name == "rp2" {
					fields = []int{2, 3}
				}
				for _, p := range fields {
					out = append(out, Case{Space: sp, N: n, Noise: noise, Embed: e, Field: p, Seed: base + uint64(1000*si+10*ei+n)})
				}
			}
		}
	}
	return out
}
