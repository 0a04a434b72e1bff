// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package demo

import (
	"fmt"
	"strings"

	"crease.dev/crease/trace"
)

// Settings returns the trace settings of the demo: H0 and H1 read by
// the default rule (trace.ScaleRatio), no per-class cap (the whole
// sample of 300 points per class), a gluing threshold of 0.1, and
// per-class homology only (the whole sample's would take about half of
// the run's time, see BenchmarkDemoTrace).
//
// Every point is kept: with 120 points per class the sparse "clear"
// band breaks up. At the input the default rule reads every class as
// its region (GUDHI's Rips Betti numbers of the same points, recorded
// in data/arm.json, agree), "clear" and "near" with their loops marked
// undetermined: 300 points on a band of the torus leave them close to
// the significance bound.
// The gluing threshold 0.1 counts only pairs brought much closer than
// typical neighbours, so that an injective layer reports none.
func Settings() *trace.Settings {
	return &trace.Settings{MaxDim: 1, Seed: trace.DefaultSeed, Cap: -1, GlueTau: 0.1, SkipWhole: true}
}

// Verdict is the demo's plain-language reading of a trace, computed from
// the trace's queries.
type Verdict struct {
	// FirstCross is the first stage that glues points of different
	// classes together (trace.CrossGlued), or −1.
	FirstCross int
	// Cross is the number of cross-class pairs glued at FirstCross.
	Cross int
	// FirstLayer is the last stage of the first layer: the first stage
	// that is not affine, or the last stage; 0 for a trace of the input
	// only.
	FirstLayer int
	// FirstLayerCross is the number of cross-class pairs glued by
	// stages 1 .. FirstLayer.
	FirstLayerCross int
	// FirstSimple is the first stage at which every class is one
	// component with no holes (trace.AllSimple), or −1.
	FirstSimple int
	// NotSimple names the classes that are not one component with no
	// holes at the last stage, with their Betti numbers; empty when all
	// are.
	NotSimple []string
}

// Judge reads a Verdict from tr.
func Judge(tr *trace.Trace) Verdict {
	v := Verdict{FirstCross: tr.First(1, trace.CrossGlued), FirstSimple: tr.First(0, trace.AllSimple)}
	if v.FirstCross >= 0 {
		v.Cross = tr.Stages[v.FirstCross].Glued.Cross
	}
	for i := 1; i < len(tr.Stages); i++ {
		v.FirstLayer = i
		if g := tr.Stages[i].Glued; g != nil {
			v.FirstLayerCross += g.Cross
		}
		if tr.Stages[i].Kind != trace.KindAffine {
			break
		}
	}
	if n := len(tr.Stages); n > 0 {
		last := &tr.Stages[n-1]
		for c := range last.Classes {
			if g := &last.Classes[c]; !g.Simple() {
				v.NotSimple = append(v.NotSimple, fmt.Sprintf("%s %s", g.Label, betti(g.Betti)))
			}
		}
	}
	return v
}

// undetermined counts the class readings from stage from to the output
// with some dimension marked undetermined.
func undetermined(tr *trace.Trace, from int) int {
	n := 0
	for _, st := range tr.Stages[from:] {
		for _, g := range st.Classes {
			for _, ok := range g.BettiConfident {
				if !ok {
					n++
					break
				}
			}
		}
	}
	return n
}

func betti(b []int) string {
	s := make([]string, len(b))
	for i, x := range b {
		s[i] = fmt.Sprint(x)
	}
	return "(" + strings.Join(s, ",") + ")"
}

// String writes the verdict on tr as one line.
func (v Verdict) String(tr *trace.Trace) string {
	var b strings.Builder
	if v.FirstLayer > 0 {
		fmt.Fprintf(&b, "its first layer (stages 1–%d) glues %d pair(s) of points of different classes; ", v.FirstLayer, v.FirstLayerCross)
	}
	if v.FirstCross >= 0 {
		s := &tr.Stages[v.FirstCross]
		fmt.Fprintf(&b, "the first such gluing is at stage %d (%s, %d pair(s))", s.Index, s.Kind, v.Cross)
	} else {
		b.WriteString("glues no points of different classes at any stage")
	}
	b.WriteString("; ")
	last := len(tr.Stages) - 1
	switch {
	case v.FirstSimple < 0:
		fmt.Fprintf(&b, "at no stage is every class one component with no holes (output, stage %d: %s)", last, strings.Join(v.NotSimple, ", "))
	case len(v.NotSimple) == 0:
		s := &tr.Stages[v.FirstSimple]
		fmt.Fprintf(&b, "every class is one component with no holes from stage %d (%s)", s.Index, s.Kind)
		if v.FirstSimple < last {
			b.WriteString(" and at the output")
		}
		if n := undetermined(tr, v.FirstSimple); n > 0 {
			fmt.Fprintf(&b, " (best readings: %d of those class readings are undetermined, marked ?)", n)
		}
	default:
		s := &tr.Stages[v.FirstSimple]
		fmt.Fprintf(&b, "every class is one component with no holes at stage %d (%s), but not at the output (stage %d, %s): %s",
			s.Index, s.Kind, last, tr.Stages[last].Kind, strings.Join(v.NotSimple, ", "))
	}
	return b.String()
}
