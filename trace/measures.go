// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"context"
	"time"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
)

// glueTol is the distance at or below which two outputs count as one
// point when the inputs were distinct.
const glueTol = 1e-12

// stageMeasures fills the Glued counts and Measures of stage st from
// its input in and output out. It returns the time spent in collapse and
// in overlap measures.
func stageMeasures(ctx context.Context, st *Stage, in, out *mat.Dense, ms *onnxload.Stage, labels []int, rs Settings) (drelu, doverlap time.Duration, err error) {
	t := time.Now()
	g, err := gluedPairs(ctx, in, out, labels)
	if err != nil {
		return 0, 0, err
	}
	st.Glued = g
	drelu = time.Since(t)
	return drelu, 0, nil
}

// gluedPairs counts pairs with distinct inputs and coincident outputs.
func gluedPairs(ctx context.Context, in, out *mat.Dense, labels []int) (*Glued, error) {
	n, _ := in.Dims()
	g := &Glued{}
	for i := range n {
		if i%64 == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		for j := i + 1; j < n; j++ {
			if sqdist(in.RawRowView(i), in.RawRowView(j)) == 0 {
				continue
			}
			if sqdist(out.RawRowView(i), out.RawRowView(j)) <= glueTol*glueTol {
				if labels[i] == labels[j] {
					g.Within++
				} else {
					g.Cross++
				}
			}
		}
	}
	g.Total = g.Within + g.Cross
	return g, nil
}

func sqdist(a, b []float64) float64 {
	var s float64
	for k, v := range a {
		d := v - b[k]
		s += d * d
	}
	return s
}
