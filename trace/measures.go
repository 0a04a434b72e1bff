// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"context"
	"math"
	"time"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/relu"
)

// stageMeasures fills the Glued counts and Measures of stage st from
// its input in and output out. It returns the time spent in collapse and
// in overlap measures.
func stageMeasures(ctx context.Context, st *Stage, in, out *mat.Dense, ms *onnxload.Stage, labels []int, rs Settings) (drelu, doverlap time.Duration, err error) {
	t := time.Now()
	m := map[string]float64{}
	put := func(name string, v float64) {
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			m[name] = v
		}
	}
	g, err := relu.Glue(ctx, in, out, labels, &relu.GlueSettings{Tau: rs.GlueTau, Examples: -1})
	if err != nil {
		return 0, 0, err
	}
	st.Glued = &Glued{Total: g.Total, Within: g.Within, Cross: g.Cross}
	put("glue.scale_in", g.ScaleIn)
	put("glue.scale_out", g.ScaleOut)
	d, err := relu.Distort(ctx, in, out, nil)
	if err != nil {
		return 0, 0, err
	}
	put("distort.median", d.Median)
	put("distort.p10", d.P10)
	put("distort.p90", d.P90)
	switch ms.Kind {
	case onnxload.Affine:
		a, err := relu.AffineContext(ctx, ms.W, in, out, nil)
		if err != nil {
			return 0, 0, err
		}
		put("affine.rank", float64(a.Rank))
		put("affine.kernel", float64(a.Kernel))
		put("affine.cond", a.Cond)
		put("affine.rank_in", float64(a.RankIn))
		put("affine.rank_out", float64(a.RankOut))
		put("affine.identified", float64(a.Identified))
		put("affine.forces_identifications", b2f(a.ForcesIdentifications))
	case onnxload.ReLU:
		f, err := relu.Fold(in, out, labels, nil)
		if err != nil {
			return 0, 0, err
		}
		put("fold.untouched", f.UntouchedFrac)
		put("fold.face", f.FaceFrac)
		put("fold.origin", f.OriginFrac)
		put("fold.dead", float64(len(f.Dead)))
		put("fold.always_active", float64(len(f.AlwaysActive)))
		put("fold.patterns", float64(f.Patterns))
		put("fold.entropy", f.Entropy)
		put("fold.shared_patterns", float64(f.SharedPatterns))
		put("fold.shared_points", float64(f.SharedPoints))
	}
	drelu = time.Since(t)
	if len(m) > 0 {
		st.Measures = m
	}
	return drelu, 0, nil
}

func b2f(b bool) float64 {
	if b {
		return 1
	}
	return 0
}
