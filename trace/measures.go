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
		// Piecewise-linear activations: ReLU is flat below 0; ReLU6,
		// Hardtanh and Hardsigmoid clamp at two levels (flat outside
		// their breakpoints); LeakyReLU and PReLU are injective (no flat
		// piece, so no face or origin collapse: only the activation
		// patterns are recorded).
		var act *relu.Piecewise
		injective := false
		switch ms.Kind {
		case onnxload.ReLU6, onnxload.Hardtanh, onnxload.HardSigmoid:
			lo, hi := ms.Alpha, ms.Beta
			if ms.Kind == onnxload.ReLU6 {
				lo, hi = 0, 6
			}
			if ms.Kind == onnxload.HardSigmoid {
				// max(0, min(1, αx + β)) is flat where αx + β ∉ (0, 1).
				if ms.Alpha == 0 {
					break
				}
				lo, hi = -ms.Beta/ms.Alpha, (1-ms.Beta)/ms.Alpha
				lo, hi = min(lo, hi), max(lo, hi)
			}
			var breaks []float64
			var flat []bool
			if !math.IsInf(lo, -1) {
				breaks, flat = append(breaks, lo), append(flat, true)
			}
			flat = append(flat, false)
			if !math.IsInf(hi, 1) {
				breaks, flat = append(breaks, hi), append(flat, true)
			}
			if len(breaks) > 0 && lo < hi {
				act = &relu.Piecewise{Breaks: breaks, Flat: flat}
			}
		case onnxload.LeakyReLU, onnxload.PReLU:
			act = &relu.Piecewise{Breaks: []float64{0}, Flat: []bool{false, false}}
			injective = true
		}
		if ms.Kind != onnxload.ReLU && act == nil {
			break
		}
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
