// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// torusCloud samples n points of the torus of radii R, r in R³ with
// uniform angles.
func torusCloud(n int, R, r float64, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 7))
	pts := make([][]float64, n)
	for i := range pts {
		u, v := 2*math.Pi*rng.Float64(), 2*math.Pi*rng.Float64()
		pts[i] = []float64{(R + r*math.Cos(v)) * math.Cos(u), (R + r*math.Cos(v)) * math.Sin(u), r * math.Sin(v)}
	}
	return pts
}

// circleCloud samples n points of the unit circle with Gaussian noise.
func circleCloud(n int, noise float64, seed uint64) [][]float64 {
	rng := rand.New(rand.NewPCG(seed, 11))
	pts := make([][]float64, n)
	for i := range pts {
		a := 2 * math.Pi * rng.Float64()
		pts[i] = []float64{math.Cos(a) + noise*rng.NormFloat64(), math.Sin(a) + noise*rng.NormFloat64()}
	}
	return pts
}

// sphereCloud samples n points uniformly on the unit sphere S^(dim−1).
func sphereCloud(n, dim int, seed uint64) [][]float64 {
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

// clusterCloud samples n points from c unit Gaussian clusters in R^dim
// whose centres are 10 apart along the axes.
func clusterCloud(n, dim, c int, seed uint64) [][]float64 {
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

var benchSink *Barcode

func BenchmarkEngine(b *testing.B) {
	cases := []struct {
		name string
		pts  [][]float64
		set  Settings
	}{
		{"torus2000/thr1.0", torusCloud(2000, 2, 1, 1), Settings{MaxDim: 1, Threshold: 1.0}},
		{"torus2000/thr1.5", torusCloud(2000, 2, 1, 1), Settings{MaxDim: 1, Threshold: 1.5}},
		{"torus2000/thr3.0", torusCloud(2000, 2, 1, 1), Settings{MaxDim: 1, Threshold: 3.0}},
		{"torus2000/enclosing", torusCloud(2000, 2, 1, 1), Settings{MaxDim: 1}},
		{"clusters1500x16", clusterCloud(1500, 16, 3, 1), Settings{MaxDim: 1}},
		{"circle1000", circleCloud(1000, 0.1, 1), Settings{MaxDim: 1}},
		{"sphere600/H2/thr1.0", sphereCloud(600, 3, 1), Settings{MaxDim: 2, Threshold: 1.0}},
	}
	for _, c := range cases {
		b.Run(c.name, func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				bc, err := RipsPoints(context.Background(), c.pts, &c.set)
				if err != nil {
					b.Fatal(err)
				}
				benchSink = bc
			}
			b.ReportMetric(float64(benchSink.Stats.Edges), "edges")
			_ = fmt.Sprint()
		})
	}
}
