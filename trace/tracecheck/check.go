// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package tracecheck

import (
	"fmt"
	"math"
	"strconv"
	"strings"
	"testing"

	"crease.dev/crease/trace"
)

// series formats a measure across stages as "0:input=2 1:affine=1 ...",
// marking stages from..to with brackets.
func series(tr *trace.Trace, class, measure string) string {
	v, err := tr.Series(class, measure)
	if err != nil {
		return err.Error()
	}
	parts := make([]string, len(v))
	for i, x := range v {
		s := "-"
		if !math.IsNaN(x) {
			s = strconv.FormatFloat(x, 'g', 4, 64)
		}
		parts[i] = fmt.Sprintf("%d:%s=%s", i, tr.Stages[i].Kind, s)
	}
	return strings.Join(parts, " ")
}

// SimpleFrom asserts that class is one component with no holes
// (β₀ = 1, βd = 0 for d ≥ 1) at every stage from stage from on.
func SimpleFrom(tb testing.TB, tr *trace.Trace, class string, from int) bool {
	tb.Helper()
	if tr.Class(class) < 0 {
		tb.Errorf("tracecheck: unknown class %q (classes: %s)", class, strings.Join(tr.Sample.Classes, ", "))
		return false
	}
	if from < 0 || from >= len(tr.Stages) {
		tb.Errorf("tracecheck: stage %d out of range 0..%d", from, len(tr.Stages)-1)
		return false
	}
	for i := from; i < len(tr.Stages); i++ {
		g := tr.Stages[i].Group(class)
		if g.Simple() {
			continue
		}
		var b strings.Builder
		fmt.Fprintf(&b, "class %q is not one component without holes at stage %d (%s): β = %v; want β₀ = 1, βd = 0 from stage %d on", class, i, tr.Stages[i].Kind, g.Betti, from)
		for d := range g.Betti {
			fmt.Fprintf(&b, "\n\tβ%d: %s", d, series(tr, class, "betti."+strconv.Itoa(d)))
		}
		tb.Errorf("%s", b.String())
		return false
	}
	return true
}

// NoCrossGlueBefore asserts that no stage before stage before glues
// points of different classes together.
func NoCrossGlueBefore(tb testing.TB, tr *trace.Trace, before int) bool {
	tb.Helper()
	for i := 0; i < before && i < len(tr.Stages); i++ {
		if s := &tr.Stages[i]; trace.CrossGlued(s) {
			tb.Errorf("stage %d (%s) glues %d pairs of points from different classes; want none before stage %d\n\tglued.cross: %s",
				i, s.Kind, s.Glued.Cross, before, series(tr, "", "glued.cross"))
			return false
		}
	}
	return true
}

// SoftmaxSeparates asserts that the last softmax stage puts every point
// of every class strictly inside its own class's Voronoi cell (measure
// "voronoi.inside" = 1 for every class).
func SoftmaxSeparates(tb testing.TB, tr *trace.Trace) bool {
	tb.Helper()
	sm := tr.StagesOfKind(trace.KindSoftmax)
	if len(sm) == 0 {
		tb.Errorf("tracecheck: the trace has no softmax stage")
		return false
	}
	s := sm[len(sm)-1]
	ok := true
	for _, g := range s.Classes {
		v, found := s.Value(g.Label, "voronoi.inside")
		if !found {
			tb.Errorf("tracecheck: stage %d (softmax) has no voronoi.inside for class %q", s.Index, g.Label)
			return false
		}
		if v < 1 {
			tb.Errorf("class %q: only %.4g of its points lie inside its own Voronoi cell at stage %d (softmax); want all\n\tvoronoi.inside: %s",
				g.Label, v, s.Index, series(tr, g.Label, "voronoi.inside"))
			ok = false
		}
	}
	return ok
}

// MeasureAtLeast asserts that measure name (see Stage.Value; class ""
// for a stage measure, else that class's) is at least min at stage.
func MeasureAtLeast(tb testing.TB, tr *trace.Trace, stage int, class, name string, min float64) bool {
	tb.Helper()
	if stage < 0 || stage >= len(tr.Stages) {
		tb.Errorf("tracecheck: stage %d out of range 0..%d", stage, len(tr.Stages)-1)
		return false
	}
	if class != "" && tr.Class(class) < 0 {
		tb.Errorf("tracecheck: unknown class %q (classes: %s)", class, strings.Join(tr.Sample.Classes, ", "))
		return false
	}
	if err := trace.CheckMeasure(name); err != nil {
		tb.Errorf("tracecheck: %v", err)
		return false
	}
	s := &tr.Stages[stage]
	v, ok := s.Value(class, name)
	switch {
	case !ok:
		tb.Errorf("tracecheck: stage %d (%s) has no measure %q (measures: %s)", stage, s.Kind, name, strings.Join(tr.MeasureNames(), ", "))
		return false
	case v < min:
		tb.Errorf("%s = %.4g at stage %d (%s); want at least %.4g\n\t%s: %s", name, v, stage, s.Kind, min, name, series(tr, class, name))
		return false
	}
	return true
}

// SeparableBy asserts that some stage up to stage by separates the
// classes linearly: its linear probe reaches trace.SeparableAccuracy
// (Trace.Separation).
func SeparableBy(tb testing.TB, tr *trace.Trace, by int) bool {
	tb.Helper()
	s := tr.Separation()
	if s.FirstSeparable >= 0 && s.FirstSeparable <= by {
		return true
	}
	if s.FirstSeparable < 0 {
		tb.Errorf("no stage separates the classes linearly (probe.accuracy below %v everywhere, or the probe was not run); want one by stage %d\n\tprobe.accuracy: %s", float64(trace.SeparableAccuracy), by, series(tr, "", "probe.accuracy"))
	} else {
		tb.Errorf("the classes are first linearly separable at stage %d; want by stage %d\n\tprobe.accuracy: %s", s.FirstSeparable, by, series(tr, "", "probe.accuracy"))
	}
	return false
}
