// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"context"
	"crypto/sha256"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"runtime"
	"sync"
	"time"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/homology"
	"crease.dev/crease/internal/budget"
	"crease.dev/crease/onnxload"
)

// Version is the tool version recorded in traces.
const Version = "0.1.0"

// RunFile opens the ONNX model at path, extracts its stages (one stage
// per node, or fused layers when Settings.Fuse is set), runs the trace and records the
// file name and SHA-256 in Trace.Model.
func RunFile(ctx context.Context, path string, s *Sample, set *Settings) (*Trace, error) {
	stages, info, err := loadModel(path, set != nil && set.Fuse)
	if err != nil {
		return nil, err
	}
	if err := checkWidth(s, stages, path); err != nil {
		return nil, err
	}
	t, err := Run(ctx, stages, s, set)
	if t != nil {
		t.Model = info
	}
	return t, err
}

// prepare resolves set (nil means DefaultSettings) and checks that s
// is a sample with enough points per class.
func prepare(s *Sample, set *Settings) (Settings, error) {
	if set == nil {
		set = DefaultSettings()
	}
	rs, err := set.resolve()
	if err != nil {
		return rs, err
	}
	if s == nil || s.X == nil {
		return rs, errors.New("trace: no sample")
	}
	return rs, s.checkCounts()
}

// loadModel decodes the ONNX file at path into stages and hashes it.
func loadModel(path string, fuse bool) ([]onnxload.Stage, ModelInfo, error) {
	// Decode first: onnxload bounds what it reads; only then hash the
	// file, streaming.
	m, err := onnxload.Open(path, nil)
	if err != nil {
		return nil, ModelInfo{}, err
	}
	f, err := os.Open(path)
	if err != nil {
		return nil, ModelInfo{}, err
	}
	h := sha256.New()
	_, err = io.Copy(h, f)
	f.Close()
	if err != nil {
		return nil, ModelInfo{}, fmt.Errorf("%s: %w", path, err)
	}
	stages, err := m.Stages(&onnxload.StageSettings{FuseAffine: fuse})
	if err != nil {
		return nil, ModelInfo{}, fmt.Errorf("%s: %w", path, err)
	}
	return stages, ModelInfo{File: path, SHA256: hex.EncodeToString(h.Sum(nil))}, nil
}

// MaxProbeWork bounds the linear probe's work per gradient evaluation,
// rows × classes × (width + 1 + probeExpCost), at the widest stage; a
// run above it leaves the probe out, with a note in Trace.Notes. 2^24
// keeps a 784→512→256→10 MLP at the default cap (1200 rows: 9.5·10⁶)
// and refuses 1000 classes of 3 points (3.9·10⁷, once 55 s of probing).
const MaxProbeWork = 1 << 24

// probeExpCost is the cost of one exponential in multiply-adds, about
// ten (measured here: math.Exp takes about ten times a multiply-add in
// gonum's Dgemm).
const probeExpCost = 10

// task is one unit of parallel work: a group's homology (group ≥ 0 is a
// class, −1 the whole sample) or a stage's measures (measures true).
type task struct {
	stage, group int
	measures     bool
}

// Run pushes the sample through stages and records every stage. The
// sample is first capped per class (Settings.Cap, Settings.Seed). Work
// runs in parallel over stages × groups, bounded by Settings.Workers.
//
// Run returns an error naming the problem for a nil or too small
// sample, a sample whose width differs from the model's input width, or
// invalid settings. If ctx is cancelled, Run returns a Trace holding the
// stages finished before the first unfinished one, together with
// ctx.Err().
func Run(ctx context.Context, stages []onnxload.Stage, s *Sample, set *Settings) (*Trace, error) {
	start := time.Now()
	rs, err := prepare(s, set)
	if err != nil {
		return nil, err
	}
	if len(stages)+1 > MaxStages {
		return nil, fmt.Errorf("trace: the model has %d stages, above the limit of %d with the input (trace.MaxStages)", len(stages), MaxStages)
	}
	if len(s.Classes) > MaxClasses {
		return nil, fmt.Errorf("trace: %d classes, above the limit of %d (trace.MaxClasses)", len(s.Classes), MaxClasses)
	}
	s = s.Cap(rs.Cap, rs.Seed)
	if err := checkWidth(s, stages, "the model"); err != nil {
		return nil, err
	}
	n, width := s.X.Dims()
	var notes []string
	if !rs.SkipProbe {
		// The probe's cost per gradient grows with rows × classes ×
		// (width + 1 + probeExpCost); past MaxProbeWork it would
		// dominate the run, so it is left out.
		wmax := width
		for i := range stages {
			wmax = max(wmax, stages[i].Out)
		}
		if work := float64(n) * float64(len(s.Classes)) * float64(wmax+1+probeExpCost); work > MaxProbeWork {
			rs.SkipProbe = true
			notes = append(notes, fmt.Sprintf("linear probe left out: %d rows × %d classes at width %d is above trace.MaxProbeWork; lower the per-class cap to include it", n, len(s.Classes), wmax))
		}
	}
	var timing Timing
	t0 := time.Now()
	acts, err := onnxload.Forward(ctx, stages, s.X, &onnxload.ForwardSettings{Workers: rs.Workers})
	if err != nil {
		if ctx.Err() != nil {
			return &Trace{Schema: SchemaVersion, Tool: "crease " + Version, Settings: rs}, ctx.Err()
		}
		return nil, err
	}
	timing.Forward = time.Since(t0)
	clouds := make([]*mat.Dense, 0, len(stages)+1)
	clouds = append(clouds, s.X)
	clouds = append(clouds, acts...)
	for i, c := range clouds {
		if err := checkFinite(c); err != nil {
			return nil, fmt.Errorf("trace: stage %d: %w", i, err)
		}
	}

	var um *UnitMap
	var units []int
	if len(acts) > 0 {
		if um, err = matchUnits(s.Classes, s.Labels, acts[len(acts)-1], rs.ClassOrder); err != nil {
			return nil, err
		}
		units = um.Units
	}

	tr := &Trace{
		Schema:   SchemaVersion,
		Tool:     "crease " + Version,
		Settings: rs,
		Sample: SampleInfo{
			Source: s.Source, Rows: s.SourceRows, Width: width,
			Classes: s.Classes, Indices: s.Rows, Labels: s.Labels, Units: um,
		},
		Stages: make([]Stage, len(clouds)),
		Notes:  notes,
	}
	tr.Settings.Workers, tr.Settings.Timing, tr.Settings.Progress = 0, false, nil
	members := make([][]int, len(s.Classes))
	for i, l := range s.Labels {
		members[l] = append(members[l], i)
	}
	counts := s.Counts()
	for i, c := range clouds {
		st := &tr.Stages[i]
		st.Index = i
		_, st.Width = c.Dims()
		if i == 0 {
			st.Kind = KindInput
		} else {
			ms := &stages[i-1]
			st.Kind = KindOf(ms.Kind)
			st.In = ms.In
			st.Nodes = append([]string(nil), ms.Nodes...)
		}
		st.Whole = Group{Count: n}
		if rs.SkipWhole {
			st.Whole.Betti, st.Whole.Bars = []int{}, [][]Bar{}
			st.Whole.BettiConfident, st.Whole.Evidence = []bool{}, []Evidence{}
		}
		st.Classes = make([]Group, len(s.Classes))
		for c := range s.Classes {
			st.Classes[c] = Group{Label: s.Classes[c], Count: counts[c]}
		}
	}

	var tasks []task
	for i := range clouds {
		if !rs.SkipWhole {
			tasks = append(tasks, task{stage: i, group: -1})
		}
		for c := range s.Classes {
			tasks = append(tasks, task{stage: i, group: c})
		}
		tasks = append(tasks, task{stage: i, measures: true})
	}
	workers := rs.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	// One memory budget for the run, shared by the tasks that run at
	// once.
	memBudget := rs.MaxBytes
	if memBudget <= 0 {
		memBudget = homology.DefaultMaxBytes
	}
	taskBytes := max(memBudget/int64(workers), 1)
	// One worker budget too: the tasks that run at once share the
	// workers, and each computation inside a task (homology, k-NN,
	// gluing) uses only its share, so no pool nests in another.
	share := max(1, workers/max(len(tasks), 1))
	var (
		mu        sync.Mutex
		done      int
		left      = make([]int, len(clouds)) // unfinished tasks per stage
		firstErr  error
		stageTime = make([]time.Duration, len(clouds))
	)
	for _, tk := range tasks {
		left[tk.stage]++
	}
	next := make(chan task)
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			ctx := budget.WithWorkers(ctx, share)
			for tk := range next {
				if ctx.Err() != nil {
					continue
				}
				st := &tr.Stages[tk.stage]
				var err error
				var part string
				var dh, dr, do time.Duration
				switch {
				case tk.measures:
					part = "measures"
					if tk.stage == 0 {
						dr, do, err = stageMeasures(ctx, st, nil, clouds[0], nil, s.Labels, units, rs)
					} else {
						dr, do, err = stageMeasures(ctx, st, clouds[tk.stage-1], clouds[tk.stage], &stages[tk.stage-1], s.Labels, units, rs)
					}
				case tk.group < 0:
					part = "whole"
					t := time.Now()
					err = group(ctx, &st.Whole, clouds[tk.stage], nil, rs, taskBytes)
					dh = time.Since(t)
				default:
					part = s.Classes[tk.group]
					t := time.Now()
					err = group(ctx, &st.Classes[tk.group], clouds[tk.stage], members[tk.group], rs, taskBytes)
					dh = time.Since(t)
				}
				mu.Lock()
				timing.Homology += dh
				timing.Relu += dr
				timing.Overlap += do
				stageTime[tk.stage] += dh
				if err != nil {
					if firstErr == nil && ctx.Err() == nil {
						firstErr = fmt.Errorf("trace: stage %d (%s), %s: %w", tk.stage, st.Kind, part, err)
					}
				} else {
					left[tk.stage]--
					done++
					if rs.Progress != nil {
						rs.Progress(Progress{Done: done, Total: len(tasks), Stage: tk.stage, Part: part})
					}
				}
				mu.Unlock()
			}
		}()
	}
	for _, tk := range tasks {
		mu.Lock()
		stop := firstErr != nil
		mu.Unlock()
		if stop || ctx.Err() != nil {
			break
		}
		next <- tk
	}
	close(next)
	wg.Wait()
	if firstErr != nil {
		return nil, firstErr
	}
	if rs.Timing {
		timing.Total = time.Since(start)
		timing.Stages = stageTime
		tr.Timing = &timing
	}
	if err := ctx.Err(); err != nil {
		k := 0
		for k < len(left) && left[k] == 0 {
			k++
		}
		tr.Stages = tr.Stages[:k]
		if tr.Timing != nil {
			tr.Timing.Stages = tr.Timing.Stages[:k]
		}
		return tr, err
	}
	return tr, nil
}

// checkWidth reports a sample whose width differs from the input width
// of stages, naming the sample's source and the model.
func checkWidth(s *Sample, stages []onnxload.Stage, model string) error {
	if s == nil || s.X == nil || len(stages) == 0 {
		return nil
	}
	if _, w := s.X.Dims(); w != stages[0].In {
		src := s.Source
		if src == "" {
			src = "the sample"
		}
		return fmt.Errorf("trace: %s has %d feature columns but %s takes inputs of width %d", src, w, model, stages[0].In)
	}
	return nil
}

// checkFinite reports the first NaN or ±Inf in m, or the first value
// above homology.MaxCoordinate in magnitude.
func checkFinite(m *mat.Dense) error {
	r, c := m.Dims()
	for i := range r {
		for j, v := range m.RawRowView(i)[:c] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("row %d, column %d is %v", i+1, j+1, v)
			}
			if math.Abs(v) > homology.MaxCoordinate {
				return fmt.Errorf("row %d, column %d is %v, above %g, where squared distances overflow", i+1, j+1, v, homology.MaxCoordinate)
			}
		}
	}
	return nil
}

// rowsOf returns the rows idx of m (all rows when idx is nil).
func rowsOf(m *mat.Dense, idx []int) *mat.Dense {
	if idx == nil {
		return m
	}
	_, c := m.Dims()
	out := mat.NewDense(len(idx), c, nil)
	for k, i := range idx {
		out.SetRow(k, m.RawRowView(i))
	}
	return out
}

// diameter returns the largest Euclidean distance between rows of m.
func diameter(m *mat.Dense) float64 {
	r, _ := m.Dims()
	var best float64
	for i := range r {
		a := m.RawRowView(i)
		for j := i + 1; j < r; j++ {
			b := m.RawRowView(j)
			var s float64
			for k, v := range a {
				d := v - b[k]
				s += d * d
			}
			best = max(best, s)
		}
	}
	return math.Sqrt(best)
}

// group computes the barcode and Betti numbers of rows idx of cloud
// into g by the scale rule (homology.Read), within maxBytes.
func group(ctx context.Context, g *Group, cloud *mat.Dense, idx []int, rs Settings, maxBytes int64) error {
	pts := rowsOf(cloud, idx)
	diam := diameter(pts)
	rd, err := homology.Read(ctx, pts, &homology.ReadSettings{
		Rule: rs.Rule, MaxDim: rs.MaxDim, Alpha: rs.Alpha, Scale: rs.Scale,
		Persistence: rs.Persistence, MaxThreshold: rs.MaxThreshold, K: min(rs.K, g.Count-1), Hops: rs.Hops,
		MaxBytes: maxBytes,
	})
	var me *homology.MemoryError
	if errors.As(err, &me) {
		return fmt.Errorf("%w: each task that runs at once has %d bytes of the run's memory budget (Settings.MaxBytes, crease trace --max-memory); raise it, or lower the workers, the per-class cap or maxdim", err, maxBytes)
	}
	if err != nil {
		return err
	}
	bc := rd.Barcode
	g.Diameter = diam
	g.Threshold = bc.Threshold
	g.Truncated = bc.Truncated
	g.Scale = rd.Scale
	g.Betti = rd.Betti
	g.BettiConfident = rd.Confident
	g.Evidence = make([]Evidence, len(rd.Evidence))
	for d, ev := range rd.Evidence {
		g.Evidence[d] = evidenceOf(ev)
	}
	g.Bars = make([][]Bar, len(bc.Bars))
	for d, bars := range bc.Bars {
		g.Bars[d] = make([]Bar, len(bars))
		for k, b := range bars {
			g.Bars[d][k] = Bar{Birth: b.Birth, Death: b.Death}
		}
	}
	return nil
}

// evidenceOf converts homology's evidence, with nil for +Inf and NaN.
func evidenceOf(ev homology.Evidence) Evidence {
	return Evidence{Lo: ev.Lo, Hi: finite(ev.Hi), Weakest: finite(ev.Weakest), Strongest: finite(ev.Strongest), Bound: ev.Bound, Why: ev.Why, Whitened: ev.Whitened}
}

// finite returns &x, or nil for NaN and ±Inf (JSON's null).
func finite(x float64) *float64 {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return nil
	}
	return &x
}
