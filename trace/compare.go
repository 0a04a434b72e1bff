// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"fmt"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"

	"crease.dev/crease/homology"
)

// CompareSettings control Compare. A nil *CompareSettings means the
// zero value: any change counts as divergence.
type CompareSettings struct {
	// Tol is the largest bottleneck distance or absolute change of a
	// scalar measure that does not count as divergence; +Inf leaves
	// them unjudged.
	Tol float64
	// BettiTol is the largest absolute change of a Betti number that
	// does not count as divergence; negative leaves Betti numbers
	// unjudged.
	BettiTol int
}

// Comparison is the result of Compare. It is immutable and safe for
// concurrent reads.
type Comparison struct {
	// Settings are the settings used.
	Settings CompareSettings
	// Stages holds one entry per stage present in both traces.
	Stages []StageComparison
	// Diverge is the first stage that diverges beyond the tolerances,
	// or −1.
	Diverge int
	// Reason says what diverged first ("" when Diverge is −1).
	Reason string
	// Unmatched lists the stages of A ("A 3") or B ("B 4") that match
	// no stage of the other trace.
	Unmatched []string
	// Warnings name what makes the traces hard to compare: settings or
	// samples that differ.
	Warnings []string
}

// StageComparison compares one stage of two traces.
type StageComparison struct {
	// Index and IndexB are the stage's index in A and in B (stages are
	// matched by structure, see CompareModels).
	Index, IndexB int
	// KindA and KindB are the stage kinds in each trace.
	KindA, KindB StageKind
	// Whole compares the whole sample; Classes compares each class
	// present in both traces, by label, in A's order.
	Whole   GroupComparison
	Classes []GroupComparison
	// Measures holds B − A for every stage measure present in both
	// (including glued.* counts), and Relative the same change relative
	// to the larger magnitude, (B − A)/max(|A|, |B|), 0 when both are 0.
	Measures, Relative map[string]float64
	// Max is the largest bottleneck distance or measure change here.
	Max float64
}

// GroupComparison compares one group of two traces.
type GroupComparison struct {
	Label string
	// Bottleneck[d] is the bottleneck distance between the dimension-d
	// barcodes, with bars alive at a group's threshold taken to die
	// there (barcodes are truncated at the scale the rule needs, and an
	// infinite bar would make every distance +Inf).
	Bottleneck []float64
	// Betti[d] is B's Betti number minus A's.
	Betti []int
	// Measures holds B − A for every per-class measure present in both
	// (nil for the whole sample).
	Measures map[string]float64
}

// Compare compares traces a and b stage by stage. Traces of different
// lengths are compared over the common stages. It returns an error when
// the traces share no class.
func Compare(a, b *Trace, set *CompareSettings) (*Comparison, error) {
	if set == nil {
		set = &CompareSettings{}
	}
	common := 0
	for _, c := range a.Sample.Classes {
		if b.Class(c) >= 0 {
			common++
		}
	}
	if common == 0 && len(a.Sample.Classes) > 0 {
		return nil, fmt.Errorf("trace: the traces share no class")
	}
	out := &Comparison{Settings: *set, Diverge: -1, Warnings: compareWarnings(a, b)}
	pairs, unmatched := matchStages(a.Stages, b.Stages)
	out.Unmatched = unmatched
	for _, p := range pairs {
		i := p[0]
		sa, sb := &a.Stages[p[0]], &b.Stages[p[1]]
		sc := StageComparison{Index: p[0], IndexB: p[1], KindA: sa.Kind, KindB: sb.Kind, Measures: map[string]float64{}, Relative: map[string]float64{}}
		reason := ""
		note := func(r string) {
			if reason == "" {
				reason = r
			}
		}
		if sa.Kind != sb.Kind {
			note(fmt.Sprintf("kind %s vs %s", sa.Kind, sb.Kind))
		}
		cmpGroup := func(ga, gb *Group, name string) GroupComparison {
			gc := GroupComparison{Label: ga.Label}
			for d := range min(len(ga.Bars), len(gb.Bars)) {
				bn := homology.Bottleneck(clipBars(ga.Bars[d], ga.Threshold), clipBars(gb.Bars[d], gb.Threshold))
				gc.Bottleneck = append(gc.Bottleneck, bn)
				sc.Max = max(sc.Max, bn)
				if bn > set.Tol {
					note(fmt.Sprintf("%s: bottleneck distance %.4g in dimension %d", name, bn, d))
				}
			}
			for d := range min(len(ga.Betti), len(gb.Betti)) {
				db := gb.Betti[d] - ga.Betti[d]
				gc.Betti = append(gc.Betti, db)
				if set.BettiTol >= 0 && abs(db) > set.BettiTol {
					note(fmt.Sprintf("%s: β%d %d → %d", name, d, ga.Betti[d], gb.Betti[d]))
				}
			}
			for _, k := range sortedKeys(ga.Measures) {
				vb, ok := gb.Measures[k]
				if !ok {
					continue
				}
				if gc.Measures == nil {
					gc.Measures = map[string]float64{}
				}
				d := vb - ga.Measures[k]
				gc.Measures[k] = d
				sc.Max = max(sc.Max, math.Abs(d))
				if math.Abs(d) > set.Tol {
					note(fmt.Sprintf("%s: %s %.4g → %.4g", name, k, ga.Measures[k], vb))
				}
			}
			return gc
		}
		sc.Whole = cmpGroup(&sa.Whole, &sb.Whole, "whole sample")
		for c := range sa.Classes {
			gb := sb.Group(sa.Classes[c].Label)
			if gb == nil {
				continue
			}
			sc.Classes = append(sc.Classes, cmpGroup(&sa.Classes[c], gb, "class "+sa.Classes[c].Label))
		}
		names := append(sortedKeys(sa.Measures), "glued.total", "glued.within", "glued.cross")
		sort.Strings(names)
		names = slices.Compact(names)
		for _, k := range names {
			va, oka := sa.Value("", k)
			vb, okb := sb.Value("", k)
			if !oka || !okb {
				continue
			}
			d := vb - va
			sc.Measures[k] = d
			if m := max(math.Abs(va), math.Abs(vb)); m > 0 {
				sc.Relative[k] = d / m
			} else {
				sc.Relative[k] = 0
			}
			sc.Max = max(sc.Max, math.Abs(d))
			if math.Abs(d) > set.Tol {
				note(fmt.Sprintf("%s %.4g → %.4g", k, va, vb))
			}
		}
		if reason != "" && out.Diverge < 0 {
			out.Diverge, out.Reason = i, reason
		}
		out.Stages = append(out.Stages, sc)
	}
	if len(unmatched) > 0 && out.Diverge < 0 {
		out.Diverge, out.Reason = len(a.Stages), fmt.Sprintf("stages without a partner: %s", unmatched)
	}
	return out, nil
}

// compareWarnings names the settings and sample facts in which a and b
// differ.
func compareWarnings(a, b *Trace) []string {
	var w []string
	sa, sb := a.Settings, b.Settings
	sa.Progress, sb.Progress = nil, nil
	type field struct {
		name string
		x, y any
	}
	for _, f := range []field{
		{"top_dim", sa.MaxDim, sb.MaxDim}, {"rule", sa.Rule, sb.Rule}, {"alpha", sa.Alpha, sb.Alpha},
		{"scale_fraction", sa.Scale, sb.Scale}, {"persistence_fraction", sa.Persistence, sb.Persistence},
		{"stop_at_fraction", sa.MaxThreshold, sb.MaxThreshold}, {"graph_k", sa.K, sb.K}, {"hops", sa.Hops, sb.Hops},
		{"per_class_cap", sa.Cap, sb.Cap}, {"seed", sa.Seed, sb.Seed}, {"glue_tau", sa.GlueTau, sb.GlueTau},
		{"overlap_k", sa.OverlapK, sb.OverlapK}, {"skip_probe", sa.SkipProbe, sb.SkipProbe}, {"fuse", sa.Fuse, sb.Fuse},
		{"skip_whole", sa.SkipWhole, sb.SkipWhole},
	} {
		if f.x != f.y {
			w = append(w, fmt.Sprintf("settings differ: %s %v vs %v", f.name, f.x, f.y))
		}
	}
	pa, pb := a.Sample, b.Sample
	switch {
	case pa.Source != pb.Source || pa.Rows != pb.Rows || pa.Width != pb.Width:
		w = append(w, fmt.Sprintf("samples differ: %q (%d rows, width %d) vs %q (%d rows, width %d)", pa.Source, pa.Rows, pa.Width, pb.Source, pb.Rows, pb.Width))
	case !slices.Equal(pa.Classes, pb.Classes):
		w = append(w, fmt.Sprintf("classes differ: %v vs %v", pa.Classes, pb.Classes))
	case !slices.Equal(pa.Indices, pb.Indices):
		w = append(w, "the traces use different rows of the sample (another cap or seed)")
	}
	return w
}

// sortedKeys returns the keys of m in increasing order.
func sortedKeys(m map[string]float64) []string {
	keys := make([]string, 0, len(m))
	for k := range m {
		keys = append(keys, k)
	}
	sort.Strings(keys)
	return keys
}

// clipBars converts bars to homology's type, ending infinite bars at
// the threshold when it is finite and positive.
func clipBars(b []Bar, threshold float64) []homology.Bar {
	out := homologyBars(b)
	if threshold > 0 && !math.IsInf(threshold, 0) {
		for i := range out {
			if math.IsInf(out[i].Death, 1) {
				out[i].Death = max(threshold, out[i].Birth)
			}
		}
	}
	return out
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// MaxBottleneck returns the largest bottleneck distance of the stage
// pair over the whole sample and every class and dimension.
func (s *StageComparison) MaxBottleneck() float64 {
	var bn float64
	for _, g := range append([]GroupComparison{s.Whole}, s.Classes...) {
		for _, v := range g.Bottleneck {
			bn = max(bn, v)
		}
	}
	return bn
}

// ClassBetti describes the classes whose Betti numbers changed, as
// "label [Δβ₀ Δβ₁ …]" joined by "; ", or "0" when none did.
func (s *StageComparison) ClassBetti() string {
	var classes []string
	for _, g := range s.Classes {
		if slices.ContainsFunc(g.Betti, func(d int) bool { return d != 0 }) {
			classes = append(classes, fmt.Sprintf("%s %v", g.Label, g.Betti))
		}
	}
	if len(classes) == 0 {
		return "0"
	}
	return strings.Join(classes, "; ")
}

// TopMeasure returns the stage measure whose value changed most
// relative to its size (Relative), with its change B − A and that
// relative change; "" when no measure changed. Relative changes keep a
// measure in large units (a scatter, a pair count) from hiding the rest.
func (s *StageComparison) TopMeasure() (name string, delta, relative float64) {
	var best float64
	for _, k := range sortedKeys(s.Relative) {
		if v := math.Abs(s.Relative[k]); v > best {
			name, best = k, v
		}
	}
	if name == "" {
		return "", 0, 0
	}
	return name, s.Measures[name], s.Relative[name]
}

// Table returns the per-stage table of the comparison that `crease
// compare` prints and the side-by-side report shows: A's and B's stage,
// the kind (A/B when they differ), the largest bottleneck distance, the
// whole sample's Δβ, the classes whose Betti numbers changed, and the
// measure that changed most relative to its size.
func (c *Comparison) Table() (header []string, rows [][]string) {
	header = []string{"A", "B", "kind", "max bottleneck", "whole Δβ", "class Δβ", "largest relative change"}
	for i := range c.Stages {
		s := &c.Stages[i]
		kind := string(s.KindA)
		if s.KindB != s.KindA {
			kind += "/" + string(s.KindB)
		}
		top := "-"
		if k, v, r := s.TopMeasure(); k != "" {
			top = fmt.Sprintf("%s %+.4g (%+.0f %%)", k, v, 100*r)
		}
		rows = append(rows, []string{strconv.Itoa(s.Index), strconv.Itoa(s.IndexB), kind,
			strconv.FormatFloat(s.MaxBottleneck(), 'g', 4, 64), fmt.Sprint(s.Whole.Betti), s.ClassBetti(), top})
	}
	return header, rows
}
