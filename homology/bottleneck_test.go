// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"math"
	"math/rand/v2"
	"slices"
	"strconv"
	"testing"
)

// denseBottleneck is the textbook reduction (Edelsbrunner and Harer,
// Computational Topology, 2010, §VIII.4): a perfect matching between
// A ∪ diag(B) and B ∪ diag(A), tested by augmenting paths at each of
// the |A|·|B| + |A| + |B| candidate values in turn of a binary search.
// It is slow and kept only to check Bottleneck.
func denseBottleneck(a, b []Bar) float64 {
	cand := []float64{0}
	for _, x := range a {
		cand = append(cand, half(x))
		for _, y := range b {
			cand = append(cand, linf(x, y))
		}
	}
	for _, y := range b {
		cand = append(cand, half(y))
	}
	slices.Sort(cand)
	na, nb := len(a), len(b)
	n := na + nb
	edge := func(u, v int, eps float64) bool {
		switch {
		case u < na && v < nb:
			return linf(a[u], b[v]) <= eps
		case u < na:
			return v-nb == u && half(a[u]) <= eps
		case v < nb:
			return u-na == v && half(b[v]) <= eps
		}
		return true // diagonal to diagonal
	}
	perfect := func(eps float64) bool {
		matchR := make([]int, n)
		for i := range matchR {
			matchR[i] = -1
		}
		var try func(u int, seen []bool) bool
		try = func(u int, seen []bool) bool {
			for v := range n {
				if !seen[v] && edge(u, v, eps) {
					seen[v] = true
					if matchR[v] < 0 || try(matchR[v], seen) {
						matchR[v] = u
						return true
					}
				}
			}
			return false
		}
		for u := range n {
			if !try(u, make([]bool, n)) {
				return false
			}
		}
		return true
	}
	lo, hi := 0, len(cand)-1
	for lo < hi {
		mid := (lo + hi) / 2
		if perfect(cand[mid]) {
			hi = mid
		} else {
			lo = mid + 1
		}
	}
	return cand[lo]
}

// TestBottleneckDense compares Bottleneck with the dense reduction on
// random diagrams of up to 40 bars, half of them on a coarse grid so
// that many costs tie.
func TestBottleneckDense(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	gen := func(grid bool) []Bar {
		bars := make([]Bar, rng.IntN(40))
		for i := range bars {
			b := rng.Float64() * 2
			d := b + rng.ExpFloat64()*0.5
			if grid {
				b = math.Round(b*10) / 10
				d = math.Max(b+0.1, math.Round(d*10)/10)
			}
			bars[i] = Bar{b, d}
		}
		return bars
	}
	for trial := range 100 {
		a, b := gen(trial%2 == 1), gen(trial%2 == 1)
		want := denseBottleneck(a, b)
		if got := Bottleneck(a, b); got != want {
			t.Fatalf("trial %d: a=%v b=%v: Bottleneck %v, dense %v", trial, a, b, got, want)
		}
	}
}

// noisyBars returns n bars of a noisy sample's kind: most short and
// near the diagonal, a few long.
func noisyBars(rng *rand.Rand, n int) []Bar {
	bars := make([]Bar, n)
	for i := range bars {
		b := rng.Float64()
		l := rng.ExpFloat64() * 0.01
		if i%500 == 0 {
			l = 0.5 + rng.Float64()
		}
		bars[i] = Bar{b, b + l}
	}
	return bars
}

// BenchmarkBottleneck measures barcodes of the size a 3000-point trace
// gives (the dense reduction took 18 s for a compare of two such traces
// and materialised 36 million candidates).
func BenchmarkBottleneck(b *testing.B) {
	for _, n := range []int{600, 6000} {
		rng := rand.New(rand.NewPCG(1, uint64(n)))
		x, y := noisyBars(rng, n), noisyBars(rng, n)
		b.Run(strconv.Itoa(n), func(b *testing.B) {
			for b.Loop() {
				Bottleneck(x, y)
			}
		})
	}
}

// BenchmarkBottleneckLong measures barcodes whose bars are all long, the
// worst case of the long-bar reduction.
func BenchmarkBottleneckLong(b *testing.B) {
	rng := rand.New(rand.NewPCG(3, 4))
	x, y := make([]Bar, 6000), make([]Bar, 6000)
	for i := range x {
		u := rng.Float64() * 100
		x[i] = Bar{u, u + 5 + rng.Float64()}
		y[i] = Bar{u + 0.1*rng.Float64(), u + 5 + rng.Float64()}
	}
	for b.Loop() {
		Bottleneck(x, y)
	}
}
