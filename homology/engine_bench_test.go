// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
)

// engTorus samples n points of the torus of radii R, r in R³ with
// uniform angles.
func engTorus(n int, R, r float64, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 7))
	pts := make([][]float64, n)
	for i := range pts {
		u, v := 2*math.Pi*rng.Float64(), 2*math.Pi*rng.Float64()
		pts[i] = []float64{(R + r*math.Cos(v)) * math.Cos(u), (R + r*math.Cos(v)) * math.Sin(u), r * math.Sin(v)}
	}
	return pts
}

// engCircle samples n points of the unit circle with Gaussian noise.
func engCircle(n int, noise float64, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 11))
	pts := make([][]float64, n)
	for i := range pts {
		a := 2 * math.Pi * rng.Float64()
		pts[i] = []float64{math.Cos(a) + noise*rng.NormFloat64(), math.Sin(a) + noise*rng.NormFloat64()}
	}
	return pts
}

// engSphere samples n points uniformly on the unit sphere S^(dim−1).
func engSphere(n, dim int, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 13))
	pts := make([][]float64, n)
	for i := range pts {
		x := make([]float64, dim)
		s := 0.0
		for k := range x {
			x[k] = rng.NormFloat64()
			s += x[k] * x[k]
		}
		s = math.Sqrt(s)
		for k := range x {
			x[k] /= s
		}
		pts[i] = x
	}
	return pts
}

// engClusters samples n points from c unit Gaussian clusters in R^dim
// whose centres are 10 apart along the axes.
func engClusters(n, dim, c int, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 17))
	pts := make([][]float64, n)
	for i := range pts {
		x := make([]float64, dim)
		for k := range x {
			x[k] = rng.NormFloat64()
		}
		x[i%c] += 10
		pts[i] = x
	}
	return pts
}

var engSink *Barcode

// BenchmarkEngine times the engine on synthetic clouds like the issue's
// calibration cases (the committed clouds are benchmarked in bench_test.go).
// The large cases take tens of seconds each; select with -bench.

func BenchmarkEngine(b *testing.B) {
	small := engTorus(500, 2, 1, 1)
	cases := []struct {
		name string
		pts  [][]float64
		set  Settings
	}{
		{"torus500/enclosing", small, Settings{MaxDim: 1}},
		{"torus2000/thr1.0", engTorus(2000, 2, 1, 1), Settings{MaxDim: 1, Threshold: 1.0}},
		{"torus2000/thr1.5", engTorus(2000, 2, 1, 1), Settings{MaxDim: 1, Threshold: 1.5}},
		{"torus2000/thr3.0", engTorus(2000, 2, 1, 1), Settings{MaxDim: 1, Threshold: 3.0}},
		{"torus2000/enclosing", engTorus(2000, 2, 1, 1), Settings{MaxDim: 1}},
		{"clusters1500x16", engClusters(1500, 16, 3, 1), Settings{MaxDim: 1}},
		{"circle1000", engCircle(1000, 0.1, 1), Settings{MaxDim: 1}},
		{"sphere600/H2/thr1.0", engSphere(600, 3, 1), Settings{MaxDim: 2, Threshold: 1.0}},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				bc, err := RipsPoints(context.Background(), c.pts, &c.set)
				if err != nil {
					b.Fatal(err)
				}
				engSink = bc
			}
			b.ReportMetric(float64(engSink.Stats.Edges), "edges")
		})
	}
}
