// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"context"
	"math"
	"slices"
	"time"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/onnxload"
	"crease.dev/crease/relu"
)

// stageMeasures fills the Glued counts and Measures of stage st from
// its input in and output out. It returns the time spent in collapse and
// in overlap measures.
// For the input stage in and ms are nil and only overlap measures are
// computed.
func stageMeasures(ctx context.Context, st *Stage, in, out *mat.Dense, ms *onnxload.Stage, labels, units []int, rs Settings) (drelu, doverlap time.Duration, err error) {
	m := map[string]float64{}
	cm := make([]map[string]float64, len(st.Classes))
	put := func(name string, v float64) {
		if !math.IsNaN(v) && !math.IsInf(v, 0) {
			m[name] = v
		}
	}
	defer func() {
		if err != nil {
			return
		}
		if len(m) > 0 {
			st.Measures = m
		}
		for c, x := range cm {
			if len(x) > 0 {
				st.Classes[c].Measures = x
			}
		}
	}()
	t := time.Now()
	err = overlapMeasures(ctx, st, out, labels, units, rs, func(_ int, name string, v float64) { put(name, v) },
		func(c int, name string, v float64) {
			if c < 0 || c >= len(cm) || math.IsNaN(v) || math.IsInf(v, 0) {
				return
			}
			if cm[c] == nil {
				cm[c] = map[string]float64{}
			}
			cm[c][name] = v
		})
	if err != nil {
		return 0, 0, err
	}
	doverlap = time.Since(t)
	if ms == nil {
		return 0, doverlap, nil
	}
	t = time.Now()
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
	case onnxload.ReLU, onnxload.ReLU6, onnxload.Hardtanh, onnxload.HardSigmoid, onnxload.LeakyReLU, onnxload.PReLU:
		// Piecewise-linear activations (onnxload.Stage.Pieces): where no
		// piece is flat (LeakyReLU, PReLU, both injective) there is no
		// face or origin collapse, and only the activation patterns are
		// recorded. Plain ReLU keeps relu.Fold's default, which also
		// checks the outputs against max(x, 0).
		breaks, flat, ok := ms.Pieces()
		if !ok {
			break
		}
		var act *relu.Piecewise
		if ms.Kind != onnxload.ReLU {
			act = &relu.Piecewise{Breaks: breaks, Flat: flat}
		}
		injective := !slices.Contains(flat, true)
		f, err := relu.Fold(in, out, labels, &relu.FoldSettings{Activation: act})
		if err != nil {
			return 0, 0, err
		}
		if !injective {
			put("fold.untouched", f.UntouchedFrac)
			put("fold.face", f.FaceFrac)
			put("fold.origin", f.OriginFrac)
			put("fold.dead", float64(len(f.Dead)))
		}
		put("fold.always_active", float64(len(f.AlwaysActive)))
		put("fold.patterns", float64(f.Patterns))
		put("fold.entropy", f.Entropy)
		put("fold.shared_patterns", float64(f.SharedPatterns))
		put("fold.shared_points", float64(f.SharedPoints))
	}
	return time.Since(t), doverlap, nil
}

func b2f(b bool) float64 {
	if b {
		return 1
	}
	return 0
}
