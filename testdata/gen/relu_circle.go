// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

//go:build ignore

// Command relu_circle writes the ReLU image of a noisy circle: n points
// at uniform angles on the unit circle of R², each moved by Gaussian
// noise of standard deviation -noise, pushed through one random affine
// map R² → R^dim (weights and biases standard Gaussian) and a ReLU, as a
// CSV of n lines of dim numbers (shortest round-trip form, so a reader
// parses exactly the doubles written here).
//
//	go run testdata/gen/relu_circle.go [-n 3000] [-dim 64] [-noise 0.05] [-seed 1] > cloud.csv
//
// bench/homology.sh makes its relu_circle3000 case with the defaults;
// testdata/homology/relu_circle.csv (the cloud of TestReLUCircleBar) is
// `-n 400`.
//
// The output depends on nothing but the flags: the random numbers are
// PCG-DXSM (math/rand/v2's NewPCG, a fixed algorithm) read as raw
// 64-bit words, turned into uniforms and Gaussians here (Box–Muller)
// rather than by a library distribution whose algorithm may change.
// The draws are, in order: the dim×2 weights row by row, the dim
// biases, then per point its angle and its two noise terms.
package main

import (
	"bufio"
	"flag"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
)

func main() {
	n := flag.Int("n", 3000, "number of points")
	dim := flag.Int("dim", 64, "dimension of the image")
	noise := flag.Float64("noise", 0.05, "standard deviation of the noise added in the plane")
	seed := flag.Uint64("seed", 1, "seed of the PCG generator")
	flag.Parse()
	if *n < 2 || *dim < 1 || !(*noise >= 0) {
		fmt.Fprintln(os.Stderr, "relu_circle: need -n ≥ 2, -dim ≥ 1 and -noise ≥ 0")
		os.Exit(2)
	}
	g := &draws{src: rand.NewPCG(*seed, 0x5eed)}
	w := make([]float64, 2**dim)
	for i := range w {
		w[i] = g.gauss()
	}
	b := make([]float64, *dim)
	for i := range b {
		b[i] = g.gauss()
	}
	out := bufio.NewWriter(os.Stdout)
	var line []byte
	for range *n {
		t := 2 * math.Pi * g.uniform()
		x := math.Cos(t) + *noise*g.gauss()
		y := math.Sin(t) + *noise*g.gauss()
		line = line[:0]
		for k := range *dim {
			v := max(w[2*k]*x+w[2*k+1]*y+b[k], 0)
			if k > 0 {
				line = append(line, ',')
			}
			line = strconv.AppendFloat(line, v, 'g', -1, 64)
		}
		line = append(line, '\n')
		out.Write(line)
	}
	if err := out.Flush(); err != nil {
		fmt.Fprintln(os.Stderr, "relu_circle:", err)
		os.Exit(1)
	}
}

// draws turns raw PCG words into uniforms and Gaussians.
type draws struct {
	src   *rand.PCG
	spare float64
	has   bool
}

// uniform returns a number in (0, 1): 53 random bits, offset by half a step.
func (d *draws) uniform() float64 {
	return (float64(d.src.Uint64()>>11) + 0.5) / (1 << 53)
}

// gauss returns a standard Gaussian by the Box–Muller transform, using
// both numbers of each pair.
func (d *draws) gauss() float64 {
	if d.has {
		d.has = false
		return d.spare
	}
	r := math.Sqrt(-2 * math.Log(d.uniform()))
	s, c := math.Sincos(2 * math.Pi * d.uniform())
	d.spare, d.has = r*s, true
	return r * c
}
