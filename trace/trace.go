// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"encoding/json"
	"fmt"
	"math"
	"time"

	"crease.dev/crease/homology"
	"crease.dev/crease/onnxload"
)

// SchemaVersion is the version of the JSON layout written by WriteJSON.
// It changes only when a field is renamed or removed or changes meaning.
// Version 2 renamed settings keys (maxdim, scale, persistence,
// max_threshold, k, cap became top_dim, scale_fraction,
// persistence_fraction, stop_at_fraction, graph_k, per_class_cap);
// ReadJSON reads version 1 too.
const SchemaVersion = 2

// StageKind is the kind of a stage: KindInput for stage 0, else the
// name of the onnxload kind of the model stage (KindOf). In JSON it is
// that name.
type StageKind string

// Stage kinds that trace and its callers test for. Every other
// activation is KindOf its onnxload.Kind.
const (
	KindInput      StageKind = "input"       // stage 0, the sample itself
	KindAffine     StageKind = "affine"      // onnxload.Affine
	KindReLU       StageKind = "relu"        // onnxload.ReLU
	KindSoftmax    StageKind = "softmax"     // onnxload.Softmax
	KindLogSoftmax StageKind = "log-softmax" // onnxload.LogSoftmax
)

// InputKind is the Kind of stage 0, the sample itself.
//
// Deprecated: use KindInput.
const InputKind = KindInput

// KindOf returns the StageKind of a model stage of kind k.
func KindOf(k onnxload.Kind) StageKind { return StageKind(k.String()) }

// Activation reports whether the stage is an activation (neither the
// input nor an affine map).
func (k StageKind) Activation() bool { return k != KindInput && k != KindAffine }

// Trace is the record of one run of a model over a labeled sample.
//
// A Trace is immutable once returned by Run or ReadJSON and is safe for
// concurrent reads; callers must not modify its fields.
type Trace struct {
	// Schema is SchemaVersion at the time of writing.
	Schema int `json:"schema"`
	// Tool names the program and version that made the trace.
	Tool string `json:"tool"`
	// Model identifies the model file; zero when Run was given stages
	// that did not come from a file.
	Model ModelInfo `json:"model"`
	// Settings are the resolved settings of the run (no zero-value
	// defaults left).
	Settings Settings `json:"settings"`
	// Sample describes the sample after subsampling.
	Sample SampleInfo `json:"sample"`
	// Stages holds the input (index 0) and then every model stage, in
	// order; Stages[i].Index == i.
	Stages []Stage `json:"stages"`
	// Timing holds wall times of the parts of the run; nil unless
	// Settings.Timing was set.
	Timing *Timing `json:"timing,omitempty"`
	// Notes say what the run left out that the settings asked for, and
	// why (such as a linear probe too large to fit).
	Notes []string `json:"notes,omitempty"`
}

// ModelInfo identifies a model file.
type ModelInfo struct {
	// File is the file name as given to RunFile.
	File string `json:"file,omitempty"`
	// SHA256 is the hex SHA-256 of the file's bytes.
	SHA256 string `json:"sha256,omitempty"`
}

// SampleInfo describes the sample a trace was computed on.
type SampleInfo struct {
	// Source names where the sample came from (a file name, or empty).
	Source string `json:"source,omitempty"`
	// Rows is the number of rows before subsampling.
	Rows int `json:"rows"`
	// Width is the number of features.
	Width int `json:"width"`
	// Classes holds the class names; class index c is Classes[c].
	Classes []string `json:"classes"`
	// Indices holds, for each row used, its 0-based row number in the
	// source (data rows only, headers and comments not counted), in
	// increasing order.
	Indices []int `json:"indices"`
	// Labels holds the class index of each row used, parallel to Indices.
	Labels []int `json:"labels"`
	// Units matches the classes to the model's output units; nil for a
	// trace of the input alone.
	Units *UnitMap `json:"units,omitempty"`
}

// Stage is the record of one stage: its identity, the topology of the
// whole sample and of each class, and its measures.
type Stage struct {
	// Index is the stage's position in Trace.Stages; 0 is the input.
	Index int `json:"index"`
	// Kind is "input" for stage 0, else the onnxload kind name
	// ("affine", "relu", "softmax", ...).
	Kind StageKind `json:"kind"`
	// In is the input width of the stage (0 for the input stage).
	In int `json:"in"`
	// Width is the stage's output width (the features for the input).
	Width int `json:"width"`
	// Nodes are the origin ONNX node names, in graph order.
	Nodes []string `json:"nodes,omitempty"`
	// Whole is the whole sample at this stage.
	Whole Group `json:"whole"`
	// Classes holds one Group per class, in class index order.
	Classes []Group `json:"classes"`
	// Glued counts the pairs of sample points that this stage maps to
	// the same point; nil for the input stage.
	Glued *Glued `json:"glued,omitempty"`
	// Measures holds the stage's scalar measures by name (collapse and
	// class-overlap measures, see MeasureNames). Undefined measures are
	// absent rather than NaN.
	Measures map[string]float64 `json:"measures,omitempty"`
}

// Group is the topology of one point cloud at one stage: the whole
// sample or one class.
type Group struct {
	// Label is the class name; empty for the whole sample.
	Label string `json:"label,omitempty"`
	// Count is the number of points.
	Count int `json:"count"`
	// Betti[d] is the best reading of the Betti number in dimension d
	// by the scale rule.
	Betti []int `json:"betti"`
	// BettiConfident[d] is true when Betti[d] is significant under the
	// rule's own criterion; false marks dimension d undetermined (the
	// sample cannot decide it; Betti[d] is then the best guess).
	BettiConfident []bool `json:"betti_confident"`
	// Evidence[d] is what the reading of dimension d rests on.
	Evidence []Evidence `json:"evidence"`
	// Scale is the ε at which Betti was read (for ScalePersistence, the
	// minimum persistence counted; for ScaleRatio, the sampling scale:
	// the largest distance from a point to its K-th nearest neighbour),
	// in units of the metric.
	Scale float64 `json:"scale"`
	// Diameter is the largest Euclidean distance between two points.
	Diameter float64 `json:"diameter"`
	// Threshold is the largest edge length admitted when computing Bars.
	Threshold float64 `json:"threshold"`
	// Truncated is true when Threshold is below the enclosing radius, so
	// bars alive at Threshold have Death = +Inf.
	Truncated bool `json:"truncated"`
	// Bars[d] are the bars of dimension d, in homology's canonical order.
	Bars [][]Bar `json:"bars"`
	// Measures holds per-class scalar measures by name (for example
	// "voronoi.inside" on softmax stages); empty for the whole sample.
	// Undefined measures are absent rather than NaN.
	Measures map[string]float64 `json:"measures,omitempty"`
}

// Evidence is what the reading of one dimension of a group rests on
// (homology.Evidence).
type Evidence struct {
	// Lo and Hi bound the scales over which the reading holds: every
	// counted class is alive on [Lo, Hi). Hi is nil when the classes
	// outlive the computation (+Inf).
	Lo float64  `json:"lo"`
	Hi *float64 `json:"hi"`
	// Weakest is the significance of the weakest counted bar and
	// Strongest that of the strongest bar left out (p-values under
	// ScaleRatio; see homology.Evidence); nil when there is none.
	Weakest   *float64 `json:"weakest,omitempty"`
	Strongest *float64 `json:"strongest,omitempty"`
	// Bound is the significance bound a counted bar had to pass.
	Bound float64 `json:"bound"`
	// Why says why the dimension is undetermined; empty when confident.
	Why string `json:"why,omitempty"`
	// Whitened is true when the count was read on each component in its
	// principal coordinates rescaled to unit spread (ScaleRatio); Lo
	// and Hi are then in units of that spread.
	Whitened bool `json:"whitened,omitempty"`
}

// Bar is one persistence interval [Birth, Death). Death is +Inf for an
// essential class or one alive at a truncation threshold; in JSON a bar
// is the array [birth, death] with null for an infinite death.
type Bar struct {
	Birth, Death float64
}

// MarshalJSON encodes b as [birth, death], with null for +Inf.
func (b Bar) MarshalJSON() ([]byte, error) {
	if math.IsInf(b.Death, 1) {
		return json.Marshal([]any{b.Birth, nil})
	}
	return json.Marshal([2]float64{b.Birth, b.Death})
}

// UnmarshalJSON decodes [birth, death] with null meaning +Inf.
func (b *Bar) UnmarshalJSON(data []byte) error {
	var v []*float64
	if err := json.Unmarshal(data, &v); err != nil {
		return fmt.Errorf("trace: bar: %w", err)
	}
	if len(v) != 2 || v[0] == nil {
		return fmt.Errorf("trace: bar %s: want [birth, death]", data)
	}
	b.Birth = *v[0]
	b.Death = math.Inf(1)
	if v[1] != nil {
		b.Death = *v[1]
	}
	return nil
}

// Persistence returns Death − Birth.
func (b Bar) Persistence() float64 { return b.Death - b.Birth }

// Glued counts pairs of distinct sample points sent to one point by a
// stage (relu.Glue on the stage's input and output).
type Glued struct {
	// Total is Within + Cross.
	Total int `json:"total"`
	// Within counts pairs from the same class.
	Within int `json:"within"`
	// Cross counts pairs from different classes.
	Cross int `json:"cross"`
}

// Timing holds wall times of a run's parts, summed over workers.
type Timing struct {
	// Total is the wall time of Run.
	Total time.Duration `json:"total"`
	// Forward is the time of the forward pass.
	Forward time.Duration `json:"forward"`
	// Homology, Relu and Overlap sum the time spent in each library over
	// all stages and groups (CPU-parallel parts can exceed Total).
	Homology time.Duration `json:"homology"`
	Relu     time.Duration `json:"relu"`
	Overlap  time.Duration `json:"overlap"`
	// Stages[i] is the homology time of stage i summed over its groups.
	Stages []time.Duration `json:"stages"`
}

// String describes the timing in one line: the wall time, the forward
// pass, and each part's share of the worker time (homology, collapse
// measures, class-overlap measures), with the whole trace's wall time
// relative to its homology time.
func (t *Timing) String() string {
	work := t.Homology + t.Relu + t.Overlap
	share := func(d time.Duration) float64 {
		if work == 0 {
			return 0
		}
		return 100 * float64(d) / float64(work)
	}
	ratio := "-"
	if t.Homology > 0 {
		ratio = fmt.Sprintf("%.2f×", float64(work)/float64(t.Homology))
	}
	return fmt.Sprintf("total %v, forward %v; of %v worker time: homology %.0f %%, collapse measures %.0f %%, overlap measures %.0f %%; all parts %s the homology",
		t.Total.Round(time.Millisecond), t.Forward.Round(time.Microsecond), work.Round(time.Millisecond), share(t.Homology), share(t.Relu), share(t.Overlap), ratio)
}

// HomologyShare returns the fraction of worker time spent in homology.
func (t *Timing) HomologyShare() float64 {
	s := t.Homology + t.Relu + t.Overlap
	if s == 0 {
		return 0
	}
	return float64(t.Homology) / float64(s)
}

// ScaleRule selects how Betti numbers are read from barcodes; it is
// homology.Rule, so the library, the CLI, the report and the JSON share
// one description of each rule (homology.Rule.Describe).
type ScaleRule = homology.Rule

const (
	// ScaleRatio counts bars whose death/birth ratio is significant
	// (homology.RuleRatio). It is the zero value and the default.
	ScaleRatio = homology.RuleRatio
	// ScaleRelative reads Betti numbers at ε = Scale × diameter.
	ScaleRelative = homology.RuleRelative
	// ScalePersistence counts bars with persistence ≥ Persistence ×
	// diameter (bars alive at the threshold count).
	ScalePersistence = homology.RulePersistence
	// ScaleHops uses the k-NN hop-count metric and reads at ε = Hops.
	ScaleHops = homology.RuleHops
)

// ParseScaleRule parses the String form of a ScaleRule ("ratio",
// "relative", "persistence" or "hops").
func ParseScaleRule(s string) (ScaleRule, error) {
	r, err := homology.ParseRule(s)
	if err != nil {
		return 0, fmt.Errorf("trace: unknown scale rule %q (want ratio, relative, persistence or hops)", s)
	}
	return r, nil
}

// Defaults used for zero Settings fields.
const (
	// DefaultCap is the per-class cap: 120 points per class keeps a
	// trace of a small MLP within seconds on 2 cores (measured on the
	// demo model, see BenchmarkRun).
	DefaultCap = 120
	// DefaultScale is the relative scale of ScaleRelative
	// (homology.DefaultRelativeScale, common practice).
	DefaultScale = homology.DefaultRelativeScale
	// DefaultPersistence is the relative persistence threshold of
	// ScalePersistence (homology.DefaultPersistence, common practice).
	DefaultPersistence = homology.DefaultPersistence
	// DefaultAlpha is the significance level of ScaleRatio
	// (homology.DefaultAlpha).
	DefaultAlpha = homology.DefaultAlpha
	// DefaultK is the neighbour count of ScaleHops and of the sampling
	// scale of ScaleRatio (homology.DefaultK).
	DefaultK = homology.DefaultK
	// DefaultHops is the hop-count scale of ScaleHops.
	DefaultHops = homology.DefaultHops
	// DefaultMaxDim is the highest homology dimension used when
	// Settings.MaxDim is zero.
	DefaultMaxDim = 1
	// H0Only, as Settings.MaxDim, computes H0 only (zero means
	// DefaultMaxDim). The Trace records it as 0.
	H0Only = -1
	// DefaultSeed is the seed used when Settings.Seed is zero, and the
	// CLI's.
	DefaultSeed = 1
	// DefaultOverlapK is the k of the k-NN agreement, overlap.DefaultK.
	DefaultOverlapK = 5
	// DefaultGlueTau is the gluing threshold (relu.GlueSettings.Tau).
	// It is our choice, below relu's own default of 0.5: on the demo
	// sample an injective 4→16 affine map glues no pair at 0.1 but a few
	// at 0.5, where anisotropic scaling alone brings neighbours within
	// half the output's median nearest-neighbour distance.
	DefaultGlueTau = 0.1
)

// Settings control Run. A nil *Settings means DefaultSettings(), and
// every zero field of a partly filled Settings means its documented
// default, so &Settings{Scale: 0.2} is the defaults with another scale.
// The Trace records the resolved values (with MaxDim 0 for H0 only).
type Settings struct {
	// MaxDim is the highest homology dimension, 1..3, or H0Only; zero
	// means DefaultMaxDim.
	MaxDim int `json:"top_dim"`
	// Rule is the scale rule; the zero value is ScaleRatio.
	Rule ScaleRule `json:"rule"`
	// Alpha is the family-wise significance level of ScaleRatio; zero
	// means DefaultAlpha.
	Alpha float64 `json:"alpha"`
	// Scale is the relative scale of ScaleRelative; zero means
	// DefaultScale.
	Scale float64 `json:"scale_fraction"`
	// Persistence is the relative persistence of ScalePersistence; zero
	// means DefaultPersistence.
	Persistence float64 `json:"persistence_fraction"`
	// MaxThreshold, if positive, caps the barcode threshold of
	// ScalePersistence at MaxThreshold × diameter; zero means the
	// enclosing radius.
	MaxThreshold float64 `json:"stop_at_fraction,omitempty"`
	// K is the neighbour count of ScaleHops; zero means DefaultK
	// (reduced to count−1 for small groups).
	K int `json:"graph_k"`
	// Hops is the hop-count scale of ScaleHops; zero means DefaultHops.
	Hops int `json:"hops"`
	// Cap is the per-class cap: Run first keeps at most Cap rows of each
	// class, chosen by Sample.Cap with Seed. Zero means DefaultCap,
	// negative means no cap.
	Cap int `json:"per_class_cap"`
	// Seed seeds the subsampling and every randomised measure; zero
	// means DefaultSeed.
	Seed uint64 `json:"seed"`
	// GlueTau is relu.GlueSettings.Tau: a pair counts as glued when its
	// input distance exceeds GlueTau × the input's median nearest-
	// neighbour distance and its output distance is at most GlueTau ×
	// the output's. Zero means DefaultGlueTau.
	GlueTau float64 `json:"glue_tau"`
	// OverlapK is the neighbour count of the k-NN agreement; zero means
	// DefaultOverlapK.
	OverlapK int `json:"overlap_k"`
	// ClassOrder, if not empty, names the classes in the order of the
	// model's output units (unit u is class ClassOrder[u]). Without it,
	// integer labels in 0..outputs−1 name their units and other labels
	// are matched to the units that agree most with the model's
	// predictions (Trace.Sample.Units records the match).
	ClassOrder []string `json:"class_order,omitempty"`
	// SkipProbe leaves out the linear probe, the slowest overlap
	// measure. The probe's folds come from overlap.Folds with Seed.
	SkipProbe bool `json:"skip_probe"`
	// Fuse makes RunFile fuse consecutive affine stages into one (the
	// layer view of onnxload.StageSettings.FuseAffine).
	Fuse bool `json:"fuse"`
	// SkipWhole leaves out the whole sample's homology (the costliest
	// part); the whole sample's Betti and Bars are then empty arrays.
	SkipWhole bool `json:"skip_whole"`
	// Workers is the run's worker budget: the tasks that run at once,
	// each computation inside a task using its share (internal/budget),
	// so that no pool of workers nests in another; zero means
	// GOMAXPROCS. Not recorded in the trace (it does not change the
	// result).
	Workers int `json:"-"`
	// MaxBytes is the memory budget of the run's homology, shared by the
	// tasks that run at once (each of Workers tasks may use MaxBytes /
	// Workers); zero means homology.DefaultMaxBytes. A task whose
	// estimate exceeds its share fails with a *homology.MemoryError
	// before it allocates. Not recorded in the trace.
	MaxBytes int64 `json:"-"`
	// Timing records wall times in Trace.Timing.
	Timing bool `json:"-"`
	// Progress, if not nil, is called after each finished task, from
	// one goroutine at a time.
	Progress func(Progress) `json:"-"`
}

// DefaultSettings returns the settings used for a nil *Settings, with
// the defaults of its zero fields spelt out where they are not zero: H0
// and H1 (DefaultMaxDim) read by ScaleRatio, per-class cap DefaultCap,
// seed DefaultSeed. The CLI's defaults are these.
func DefaultSettings() *Settings {
	return &Settings{MaxDim: DefaultMaxDim, Seed: DefaultSeed}
}

// Progress reports how far a run has got.
type Progress struct {
	// Done and Total count tasks (one per stage and group, plus one per
	// stage for the collapse and overlap measures).
	Done, Total int
	// Stage is the stage of the task just finished.
	Stage int
	// Part names the task: "whole", a class name, or "measures".
	Part string
}

// resolve fills defaults and checks ranges.
func (s Settings) resolve() (Settings, error) {
	switch {
	case s.MaxDim == 0:
		s.MaxDim = DefaultMaxDim
	case s.MaxDim == H0Only:
		s.MaxDim = 0
	case s.MaxDim < 0 || s.MaxDim > 3:
		return s, fmt.Errorf("trace: maxdim %d out of range 1..3 (or H0Only)", s.MaxDim)
	}
	if s.Seed == 0 {
		s.Seed = DefaultSeed
	}
	if s.Scale == 0 {
		s.Scale = DefaultScale
	}
	if s.Alpha == 0 {
		s.Alpha = DefaultAlpha
	}
	if s.Persistence == 0 {
		s.Persistence = DefaultPersistence
	}
	if s.K == 0 {
		s.K = DefaultK
	}
	if s.Hops == 0 {
		s.Hops = DefaultHops
	}
	if s.GlueTau == 0 {
		s.GlueTau = DefaultGlueTau
	}
	if s.OverlapK == 0 {
		s.OverlapK = DefaultOverlapK
	}
	if s.Cap == 0 {
		s.Cap = DefaultCap
	}
	switch {
	case !(s.Alpha > 0 && s.Alpha < 1):
		return s, fmt.Errorf("trace: alpha %v must lie in (0, 1)", s.Alpha)
	case s.Rule < ScaleRatio || s.Rule > ScaleHops:
		return s, fmt.Errorf("trace: unknown scale rule %d", int(s.Rule))
	case !(s.Scale > 0) || math.IsInf(s.Scale, 0):
		return s, fmt.Errorf("trace: scale %v must be positive", s.Scale)
	case !(s.Persistence > 0) || math.IsInf(s.Persistence, 0):
		return s, fmt.Errorf("trace: persistence %v must be positive", s.Persistence)
	case s.MaxThreshold < 0 || math.IsNaN(s.MaxThreshold):
		return s, fmt.Errorf("trace: max threshold %v must not be negative", s.MaxThreshold)
	case s.Cap > 0 && s.Cap < MinClassPoints:
		return s, fmt.Errorf("trace: per-class cap %d is below the minimum of %d points per class", s.Cap, MinClassPoints)
	case !(s.GlueTau > 0) || math.IsInf(s.GlueTau, 0):
		return s, fmt.Errorf("trace: glue tau %v must be positive", s.GlueTau)
	case s.K < 1:
		return s, fmt.Errorf("trace: k %d must be positive", s.K)
	case s.Hops < 1:
		return s, fmt.Errorf("trace: hops %d must be positive", s.Hops)
	}
	return s, nil
}

// homologyBars converts bars to homology's type.
func homologyBars(b []Bar) []homology.Bar {
	out := make([]homology.Bar, len(b))
	for i, x := range b {
		out[i] = homology.Bar{Birth: x.Birth, Death: x.Death}
	}
	return out
}
