// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

//go:build ignore

// Command palette chooses the class colours of trace/render: twelve sRGB
// colours, legible on white (CIELAB L* between 25 and 72), as far apart
// as a greedy farthest-point search can put them when the distance is
// the least of CIE 1976 ΔE*ab seen by normal vision and twice ΔE*ab seen
// with protanopia or deuteranopia (internal/colour; marker shapes are
// the second cue). It starts from a dark blue, scans the
// sRGB cube in steps of 1/20, and prints the Go table and the least
// pairwise distance.
//
//	go run testdata/gen/palette.go
package main

import (
	"fmt"
	"math"

	"crease.dev/crease/internal/colour"
)

func main() {
	const steps = 20
	var cands [][3]float64
	for r := 0; r <= steps; r++ {
		for g := 0; g <= steps; g++ {
			for b := 0; b <= steps; b++ {
				c := [3]float64{float64(r) / steps, float64(g) / steps, float64(b) / steps}
				if l, _, _ := colour.Lab(colour.Normal, c[0], c[1], c[2]); l >= 25 && l <= 72 {
					cands = append(cands, c)
				}
			}
		}
	}
	chosen := [][3]float64{{0.1, 0.25, 0.65}}
	for len(chosen) < 12 {
		best, bestD := -1, -1.0
		for i, c := range cands {
			d := math.Inf(1)
			for _, p := range chosen {
				d = min(d, spread(c, p))
			}
			if d > bestD {
				best, bestD = i, d
			}
		}
		chosen = append(chosen, cands[best])
	}
	least := math.Inf(1)
	for i := range chosen {
		for j := range i {
			least = min(least, spread(chosen[i], chosen[j]))
		}
	}
	for _, c := range chosen {
		fmt.Printf("\tcolor.RGBA{R: 0x%02x, G: 0x%02x, B: 0x%02x, A: 0xff},\n", int(math.Round(255*c[0])), int(math.Round(255*c[1])), int(math.Round(255*c[2])))
	}
	fmt.Printf("// least pairwise spread: %.1f\n", least)
	for _, v := range colour.Visions {
		l := math.Inf(1)
		for i := range chosen {
			for j := range i {
				l = min(l, colour.Distance(v, chosen[i], chosen[j]))
			}
		}
		fmt.Printf("// least ΔE*ab, vision %d: %.1f\n", v, l)
	}
}

// spread is the distance the search maximises: ΔE*ab to normal vision,
// and twice ΔE*ab to each dichromacy, whichever is least (a dichromat
// also has each class's marker shape to tell it apart).
func spread(c1, c2 [3]float64) float64 {
	d := colour.Distance(colour.Normal, c1, c2)
	for _, v := range colour.Visions[1:] {
		d = min(d, 2*colour.Distance(v, c1, c2))
	}
	return d
}
