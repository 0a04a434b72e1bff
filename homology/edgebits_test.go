// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package homology

import (
	"context"
	"math"
	"math/rand/v2"
	"reflect"
	"testing"
)

// TestEdgeBits finds the apparent pairs of edges with the bit rows of
// edgeBits and with the distance test of dropApparent, on the GUDHI
// 3.7.1 fixture clouds (see TestGUDHI) and on integer grids (many equal
// lengths), from distances and from sparse edge lists: the barcodes must
// be identical bit for bit, the numbers of columns and apparent pairs
// equal, and the dropApparent path must match GUDHI. Not parallel: it
// switches useEdgeBits.
func TestEdgeBits(t *testing.T) {
	defer func() { useEdgeBits = true }()
	both := func(name string, compute func() (*Barcode, error)) [2]*Barcode {
		var got [2]*Barcode
		for k, on := range []bool{true, false} {
			useEdgeBits = on
			bc, err := compute()
			if err != nil {
				t.Fatalf("%s: %v", name, err)
			}
			got[k] = bc
		}
		if !reflect.DeepEqual(got[0].Bars, got[1].Bars) {
			t.Errorf("%s: edgeBits and dropApparent give different barcodes", name)
		}
		if a, b := got[0].Stats, got[1].Stats; !reflect.DeepEqual(a.Columns, b.Columns) || !reflect.DeepEqual(a.Apparent, b.Apparent) {
			t.Errorf("%s: columns %v apparent %v with edgeBits, %v and %v without", name, a.Columns, a.Apparent, b.Columns, b.Apparent)
		}
		return got
	}
	var fix gudhiFixture
	gudhiRead(t, "gudhi.json", &fix)
	for _, c := range fix.Cases {
		x := gudhiLoadCloud(t, c.File)
		set := &Settings{MaxDim: c.MaxDim, Threshold: c.Threshold, Field: c.Field}
		got := both(c.Name, func() (*Barcode, error) { return Rips(context.Background(), x, set) })
		for d := range c.Bars {
			if msg := gudhiMatch(gudhiBars(c.Bars[d]), got[1].Bars[d]); msg != "" {
				t.Errorf("%s: H%d without edgeBits: %s", c.Name, d, msg)
			}
		}
	}
	rng := rand.New(rand.NewPCG(7, 11))
	for trial := range 20 {
		n := 20 + rng.IntN(60)
		pts := make([][]float64, n)
		for i := range pts {
			pts[i] = []float64{float64(rng.IntN(6)), float64(rng.IntN(6)), float64(rng.IntN(3))}
		}
		set := &Settings{MaxDim: 2, Threshold: float64(1 + rng.IntN(3))}
		both("grid", func() (*Barcode, error) { return RipsPoints(context.Background(), pts, set) })
		var edges []Edge
		for i := 1; i < n; i++ {
			for j := 0; j < i; j++ {
				if rng.IntN(3) > 0 {
					d := 0.0
					for k := range pts[i] {
						d += (pts[i][k] - pts[j][k]) * (pts[i][k] - pts[j][k])
					}
					edges = append(edges, Edge{I: i, J: j, D: math.Sqrt(d)})
				}
			}
		}
		sp, err := NewSparse(n, edges)
		if err != nil {
			t.Fatal(err)
		}
		_ = trial
		both("sparse grid", func() (*Barcode, error) { return RipsDistances(context.Background(), sp, set) })
	}
}
