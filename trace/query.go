// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"fmt"
	"iter"
	"math"
	"slices"
	"sort"
	"strconv"
	"strings"
)

// Stage returns stage i, or nil when i is out of range.
func (t *Trace) Stage(i int) *Stage {
	if i < 0 || i >= len(t.Stages) {
		return nil
	}
	return &t.Stages[i]
}

// All iterates over the stages in order, with their indices.
func (t *Trace) All() iter.Seq2[int, *Stage] {
	return func(yield func(int, *Stage) bool) {
		for i := range t.Stages {
			if !yield(i, &t.Stages[i]) {
				return
			}
		}
	}
}

// StagesOfKind returns the stages of the given kind (KindInput,
// KindAffine, KindSoftmax, KindOf(onnxload.Tanh), ...), in order.
func (t *Trace) StagesOfKind(kind StageKind) []*Stage {
	var out []*Stage
	for i := range t.Stages {
		if t.Stages[i].Kind == kind {
			out = append(out, &t.Stages[i])
		}
	}
	return out
}

// StageOfNode returns the first stage that came from the ONNX node with
// the given name, or nil.
func (t *Trace) StageOfNode(name string) *Stage {
	for i := range t.Stages {
		if slices.Contains(t.Stages[i].Nodes, name) {
			return &t.Stages[i]
		}
	}
	return nil
}

// Class returns the index of the class with the given name, or −1.
func (t *Trace) Class(name string) int {
	return slices.Index(t.Sample.Classes, name)
}

// Group returns the group of the named class at this stage; the empty
// name means the whole sample. It returns nil for an unknown class.
func (s *Stage) Group(class string) *Group {
	if class == "" {
		return &s.Whole
	}
	for i := range s.Classes {
		if s.Classes[i].Label == class {
			return &s.Classes[i]
		}
	}
	return nil
}

// Simple reports whether the group is one component with no holes at
// the trace's scale: β₀ = 1 and βd = 0 for d ≥ 1.
func (g *Group) Simple() bool {
	if len(g.Betti) == 0 || g.Betti[0] != 1 {
		return false
	}
	for _, b := range g.Betti[1:] {
		if b != 0 {
			return false
		}
	}
	return true
}

// Value returns the measure with the given name for a class at this
// stage (class "" is the whole sample). Group measures are "count",
// "betti.D", "bars.D" (number of bars in dimension D), "diameter",
// "scale" and "threshold"; stage measures, the same for every class,
// are "glued.total", "glued.within", "glued.cross" and the keys of
// Stage.Measures; a class's own Group.Measures come first. ok is false when the class or measure is unknown or
// undefined at this stage.
func (s *Stage) Value(class, measure string) (v float64, ok bool) {
	g := s.Group(class)
	if g == nil {
		return 0, false
	}
	if head, tail, found := strings.Cut(measure, "."); found && (head == "betti" || head == "bars") {
		d, err := strconv.Atoi(tail)
		if err != nil || d < 0 {
			return 0, false
		}
		if head == "betti" {
			if d >= len(g.Betti) {
				return 0, false
			}
			return float64(g.Betti[d]), true
		}
		if d >= len(g.Bars) {
			return 0, false
		}
		return float64(len(g.Bars[d])), true
	}
	switch measure {
	case "count":
		return float64(g.Count), true
	case "diameter":
		return g.Diameter, true
	case "scale":
		return g.Scale, true
	case "threshold":
		return g.Threshold, true
	case "glued.total", "glued.within", "glued.cross":
		if s.Glued == nil {
			return 0, false
		}
		switch measure {
		case "glued.total":
			return float64(s.Glued.Total), true
		case "glued.within":
			return float64(s.Glued.Within), true
		}
		return float64(s.Glued.Cross), true
	}
	if v, ok = g.Measures[measure]; ok {
		return v, true
	}
	v, ok = s.Measures[measure]
	return v, ok
}

// Series returns the measure (see Stage.Value) of a class at every
// stage, NaN where it is undefined. It returns an error for an unknown
// class or a measure defined at no stage.
func (t *Trace) Series(class, measure string) ([]float64, error) {
	if class != "" && t.Class(class) < 0 {
		return nil, fmt.Errorf("trace: unknown class %q (classes: %s)", class, strings.Join(t.Sample.Classes, ", "))
	}
	out := make([]float64, len(t.Stages))
	any := false
	for i := range t.Stages {
		v, ok := t.Stages[i].Value(class, measure)
		if !ok {
			v = math.NaN()
		}
		any = any || ok
		out[i] = v
	}
	if !any {
		return nil, fmt.Errorf("trace: no stage has measure %q", measure)
	}
	return out, nil
}

// First returns the index of the first stage at or after from for which
// pred holds, or −1.
func (t *Trace) First(from int, pred func(*Stage) bool) int {
	for i := max(from, 0); i < len(t.Stages); i++ {
		if pred(&t.Stages[i]) {
			return i
		}
	}
	return -1
}

// AllSimple is a predicate for First: every class is one component with
// no holes (Group.Simple).
func AllSimple(s *Stage) bool {
	for i := range s.Classes {
		if !s.Classes[i].Simple() {
			return false
		}
	}
	return true
}

// CrossGlued is a predicate for First: the stage glues points of
// different classes together.
func CrossGlued(s *Stage) bool { return s.Glued != nil && s.Glued.Cross > 0 }

// MeasureNames returns every measure name defined at some stage, sorted.
func (t *Trace) MeasureNames() []string {
	set := map[string]bool{"count": true, "diameter": true, "scale": true, "threshold": true}
	for i := range t.Stages {
		s := &t.Stages[i]
		for d := range s.Whole.Betti {
			set["betti."+strconv.Itoa(d)] = true
			set["bars."+strconv.Itoa(d)] = true
		}
		if s.Glued != nil {
			set["glued.total"], set["glued.within"], set["glued.cross"] = true, true, true
		}
		for k := range s.Measures {
			set[k] = true
		}
		for c := range s.Classes {
			for k := range s.Classes[c].Measures {
				set[k] = true
			}
		}
	}
	out := make([]string, 0, len(set))
	for k := range set {
		out = append(out, k)
	}
	sort.Strings(out)
	return out
}

// Summary is a one-line digest of a stage.
type Summary struct {
	Index int
	Kind  StageKind
	Width int
	// Betti is the whole sample's Betti numbers.
	Betti []int
	// Simple counts the classes with β₀ = 1 and no holes.
	Simple int
	// Cross is the number of cross-class glued pairs (0 for the input).
	Cross int
}

// Summaries returns one Summary per stage.
func (t *Trace) Summaries() []Summary {
	out := make([]Summary, len(t.Stages))
	for i := range t.Stages {
		s := &t.Stages[i]
		sm := Summary{Index: s.Index, Kind: s.Kind, Width: s.Width, Betti: s.Whole.Betti}
		for j := range s.Classes {
			if s.Classes[j].Simple() {
				sm.Simple++
			}
		}
		if s.Glued != nil {
			sm.Cross = s.Glued.Cross
		}
		out[i] = sm
	}
	return out
}
