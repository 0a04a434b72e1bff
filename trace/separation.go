// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"fmt"
	"strings"
)

// SeparableAccuracy is the linear-probe accuracy at which a stage counts
// as linearly separating the classes (the probe is cross-validated, so
// 1 means every held-out point was classified right).
const SeparableAccuracy = 1

// KNNDrop is the least fall of k-NN accuracy from one stage to the next
// that Separation reports (our choice: 2 points of accuracy, above the
// run-to-run spread of a 5-fold probe on a few hundred points).
const KNNDrop = 0.02

// Separation says where the classes come apart along a trace. Stage
// fields are −1 when there is no such stage.
type Separation struct {
	// FirstSeparable is the first stage whose linear probe reaches
	// SeparableAccuracy; −1 also when the probe was not run.
	FirstSeparable int
	// KNNPeak is the first stage where k-NN accuracy is highest, and
	// KNNPeakValue that accuracy.
	KNNPeak      int
	KNNPeakValue float64
	// Drops lists the stages where k-NN accuracy falls by at least
	// KNNDrop from the stage before, with the fall.
	Drops []Drop
}

// Drop is a fall of k-NN accuracy at a stage.
type Drop struct {
	// Stage is the stage, Kind and Width its kind and width.
	Stage int
	Kind  StageKind
	Width int
	// From and To are the accuracies before and at the stage.
	From, To float64
}

// Separation summarises the trace's separation measures.
func (t *Trace) Separation() Separation {
	s := Separation{FirstSeparable: -1, KNNPeak: -1}
	prev, prevOK := 0.0, false
	for i := range t.Stages {
		st := &t.Stages[i]
		if v, ok := st.Measures["probe.accuracy"]; ok && v >= SeparableAccuracy && s.FirstSeparable < 0 {
			s.FirstSeparable = i
		}
		v, ok := st.Measures["knn.accuracy"]
		if !ok {
			prevOK = false
			continue
		}
		if s.KNNPeak < 0 || v > s.KNNPeakValue {
			s.KNNPeak, s.KNNPeakValue = i, v
		}
		if prevOK && prev-v >= KNNDrop {
			s.Drops = append(s.Drops, Drop{Stage: i, Kind: st.Kind, Width: st.Width, From: prev, To: v})
		}
		prev, prevOK = v, true
	}
	return s
}

// String writes the summary as one line.
func (s Separation) String() string {
	var parts []string
	if s.FirstSeparable >= 0 {
		parts = append(parts, fmt.Sprintf("the classes are first linearly separable at stage %d", s.FirstSeparable))
	} else {
		parts = append(parts, "no stage separates the classes linearly (or the probe was not run)")
	}
	if s.KNNPeak >= 0 {
		parts = append(parts, fmt.Sprintf("k-NN accuracy peaks at stage %d (%.3f)", s.KNNPeak, s.KNNPeakValue))
	}
	if len(s.Drops) == 0 {
		parts = append(parts, fmt.Sprintf("no stage lowers it by %g or more", KNNDrop))
	}
	for _, d := range s.Drops {
		parts = append(parts, fmt.Sprintf("stage %d (%s, width %d) lowers it from %.3f to %.3f", d.Stage, d.Kind, d.Width, d.From, d.To))
	}
	return strings.Join(parts, "; ")
}
