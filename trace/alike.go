// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package trace

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"slices"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/homology"
	"crease.dev/crease/onnxload"
	"crease.dev/crease/relu"
)

// LinearCKA returns the linear centred kernel alignment of two
// representations of the same n points (one row per point, any widths):
// with X and Y centred column by column,
//
//	CKA(X, Y) = ‖YᵀX‖²_F / (‖XᵀX‖_F ‖YᵀY‖_F)
//
// (S. Kornblith, M. Norouzi, H. Lee and G. Hinton, "Similarity of neural
// network representations revisited", ICML 2019). It is 1 when Y is an
// orthogonal transform of X up to scale and translation, and lies in
// [0, 1]. It returns an error when the row counts differ, there are
// fewer than two rows, or a representation has no spread.
func LinearCKA(x, y mat.Matrix) (float64, error) {
	nx, _ := x.Dims()
	ny, _ := y.Dims()
	if nx != ny {
		return 0, fmt.Errorf("trace: CKA of %d and %d rows", nx, ny)
	}
	if nx < 2 {
		return 0, fmt.Errorf("trace: CKA needs at least 2 rows, got %d", nx)
	}
	cx, cy := centred(x), centred(y)
	var xy, xx, yy mat.Dense
	xy.Mul(cy.T(), cx)
	xx.Mul(cx.T(), cx)
	yy.Mul(cy.T(), cy)
	nxx, nyy := mat.Norm(&xx, 2), mat.Norm(&yy, 2)
	if !(nxx > 0) || !(nyy > 0) {
		return 0, errors.New("trace: CKA of a representation with no spread")
	}
	f := mat.Norm(&xy, 2)
	return f / nxx * f / nyy, nil
}

// centred returns a copy of m with each column's mean subtracted.
func centred(m mat.Matrix) *mat.Dense {
	out := mat.DenseCopyOf(m)
	n, d := out.Dims()
	for j := range d {
		var s float64
		for i := range n {
			s += out.At(i, j)
		}
		s /= float64(n)
		for i := range n {
			out.Set(i, j, out.At(i, j)-s)
		}
	}
	return out
}

// Defaults of AlikeSettings (ours unless a comment names a source).
const (
	// DefaultReplicates is the number of subsamples the spread of each
	// compared quantity is estimated from.
	DefaultReplicates = 8
	// DefaultKeep is the share of each class a subsample keeps.
	DefaultKeep = 0.8
	// DefaultZ is how many spreads a difference must exceed to count
	// (the usual three standard errors, common practice).
	DefaultZ = 3
	// DefaultCKAFloor is the least 1 − CKA that counts, however small
	// the spread: rounding a model's weights moves CKA by far less.
	DefaultCKAFloor = 0.01
)

// AlikeSettings control CompareModels. A nil *AlikeSettings means the
// defaults; zero fields mean the documented defaults.
type AlikeSettings struct {
	// Replicates is the number of subsamples; zero means
	// DefaultReplicates, at least 2.
	Replicates int `json:"replicates"`
	// Keep is the share of each class a subsample keeps, in (0, 1); zero
	// means DefaultKeep.
	Keep float64 `json:"keep"`
	// Z is the number of spreads a difference must exceed; zero means
	// DefaultZ.
	Z float64 `json:"z"`
	// CKAFloor is the least 1 − CKA that counts; zero means
	// DefaultCKAFloor.
	CKAFloor float64 `json:"cka_floor"`
}

func (s *AlikeSettings) resolve() (AlikeSettings, error) {
	var r AlikeSettings
	if s != nil {
		r = *s
	}
	if r.Replicates == 0 {
		r.Replicates = DefaultReplicates
	}
	if r.Keep == 0 {
		r.Keep = DefaultKeep
	}
	if r.Z == 0 {
		r.Z = DefaultZ
	}
	if r.CKAFloor == 0 {
		r.CKAFloor = DefaultCKAFloor
	}
	switch {
	case r.Replicates < 2:
		return r, fmt.Errorf("trace: %d replicates, want at least 2", r.Replicates)
	case !(r.Keep > 0 && r.Keep < 1):
		return r, fmt.Errorf("trace: keep share %v outside (0, 1)", r.Keep)
	case !(r.Z > 0) || math.IsInf(r.Z, 0):
		return r, fmt.Errorf("trace: z %v must be positive", r.Z)
	case !(r.CKAFloor >= 0 && r.CKAFloor < 1):
		return r, fmt.Errorf("trace: CKA floor %v outside [0, 1)", r.CKAFloor)
	}
	return r, nil
}

// Alikeness is the result of CompareModels: whether two models reshape
// one sample alike, stage by matched stage. It is immutable and safe
// for concurrent reads.
type Alikeness struct {
	// Settings are the resolved comparison settings.
	Settings AlikeSettings
	// A and B are the traces of the two models on the sample.
	A, B *Trace
	// Pairs are the matched stages, in model order.
	Pairs []StagePair
	// Unmatched lists stages of A ("A 3") or B ("B 4") that match no
	// stage of the other model.
	Unmatched []string
	// First is the first difference that counts, nil when the models
	// reshape the sample alike.
	First *Quantity
	// CKA[i][j] is the linear CKA between stage i of A and stage j of B
	// on the whole sample: where one model's stage corresponds to the
	// other's (NaN where a stage has no spread).
	CKA [][]float64
}

// Alike reports whether no compared quantity differs beyond its spread.
func (a *Alikeness) Alike() bool { return a.First == nil }

// StagePair is one stage of A matched with one stage of B.
type StagePair struct {
	// A and B are the stage indices in each trace.
	A, B int
	// Kind is the stages' kind.
	Kind StageKind
	// Quantities are the compared quantities, in a fixed order: CKA,
	// the stage measures, then each class's k-NN accuracy and Betti
	// numbers.
	Quantities []Quantity
	// SamePattern is the share of points whose activation pattern (the
	// set of positive units) is the same in both models; NaN unless
	// both stages are activations of the same width. It is reported,
	// not judged: a unit's sign flips under any change near zero.
	SamePattern float64
	// GluedOverlap is the share of the pairs glued by either stage that
	// both glue (Jaccard index; NaN when neither glues a pair).
	// Reported, not judged.
	GluedOverlap float64
}

// Quantity is one compared quantity at one stage pair.
type Quantity struct {
	// Stage names the pair ("stage 3 / 3").
	Stage string
	// Name is the measure name ("cka", "knn.accuracy", "betti.1", ...)
	// and Class the class, empty for a stage measure.
	Name, Class string
	// A and B are the values in each model (for "cka", 1 and the CKA).
	// Delta is the compared difference: B − A, on a log scale for
	// ratios (log B − log A), and 1 − CKA for "cka".
	A, B, Delta float64
	// Spread is the resampling spread Delta is judged against: the
	// delete-d jackknife standard error of A's value (of CKA for "cka")
	// over the subsamples; for "bottleneck.d" (the bottleneck distance
	// between the class's dimension-d barcodes, each in units of its own
	// sampling scale, so that a map that only rescales a class changes
	// nothing) the largest such distance between A's barcode and A's on
	// a subsample; zero for Betti numbers.
	Spread float64
	// Bound is the least |Delta| that counts.
	Bound float64
	// Differs is true when |Delta| > Bound.
	Differs bool
	// Note says why a quantity was not judged (a Betti number not
	// confident in both), or is empty.
	Note string
}

// comparedMeasures are the stage measures CompareModels judges; the
// measure table says which are ratios (compared on a log scale) and
// which are shares of points.
var comparedMeasures = []string{"knn.accuracy", "probe.accuracy", "margin.ratio", "fisher.ratio", "silhouette.score", "voronoi.inside"}

// CompareModels traces two models on one sample with the same settings
// and judges, stage by matched stage, whether they reshape it alike.
// Stages are matched by their structure (kind, then width and origin
// nodes), not by index, so models of different depth, or a fused and an
// unfused view, can be compared. Each compared quantity's spread comes
// from tracing model A on Replicates stratified subsamples that keep
// Keep of each class; the delete-d jackknife (J. Shao and C. F. J. Wu,
// "A general theory for jackknife variance estimation", Annals of
// Statistics 17, 1989) turns their variance into the standard error of
// the full-sample value. A difference counts when it exceeds Z times
// that spread (and, for shares of points, one point); 1 − CKA counts
// when it exceeds both Z spreads of CKA and CKAFloor; a Betti number
// counts when both readings are confident and differ; a bottleneck
// distance between a class's barcodes (each in units of its own
// sampling scale) counts when it exceeds every such distance between
// A's barcode and A's on a subsample.
func CompareModels(ctx context.Context, a, b []onnxload.Stage, s *Sample, set *Settings, as *AlikeSettings) (*Alikeness, error) {
	cs, err := as.resolve()
	if err != nil {
		return nil, err
	}
	rs, err := prepare(s, set)
	if err != nil {
		return nil, err
	}
	if err := checkWidth(s, a, "model A"); err != nil {
		return nil, err
	}
	if err := checkWidth(s, b, "model B"); err != nil {
		return nil, err
	}
	// Trace the capped sample once, so that both models and every
	// subsample see the same points.
	s = s.Cap(rs.Cap, rs.Seed)
	one := rs
	one.Cap = -1
	ta, err := Run(ctx, a, s, &one)
	if err != nil {
		return nil, fmt.Errorf("model A: %w", err)
	}
	oneB := one
	if len(oneB.ClassOrder) == 0 && ta.Sample.Units != nil && ta.Sample.Units.Units != nil {
		// B's output units mean what A's mean.
		order := make([]string, len(s.Classes))
		for c, u := range ta.Sample.Units.Units {
			if u >= 0 && u < len(order) {
				order[u] = s.Classes[c]
			}
		}
		if !slices.Contains(order, "") {
			oneB.ClassOrder = order
		}
	}
	tb, err := Run(ctx, b, s, &oneB)
	if err != nil {
		return nil, fmt.Errorf("model B: %w", err)
	}
	actsA, err := onnxload.Forward(ctx, a, s.X, &onnxload.ForwardSettings{Workers: rs.Workers})
	if err != nil {
		return nil, err
	}
	actsB, err := onnxload.Forward(ctx, b, s.X, &onnxload.ForwardSettings{Workers: rs.Workers})
	if err != nil {
		return nil, err
	}
	actsA = append([]*mat.Dense{s.X}, actsA...)
	actsB = append([]*mat.Dense{s.X}, actsB...)
	pairs, unmatched := matchStages(ta.Stages, tb.Stages)
	ckaAll := make([][]float64, len(actsA))
	for i := range actsA {
		ckaAll[i] = make([]float64, len(actsB))
		for j := range actsB {
			v, err := LinearCKA(actsA[i], actsB[j])
			if err != nil {
				v = math.NaN()
			}
			ckaAll[i][j] = v
		}
	}

	// Replicates: A on subsamples, and CKA of A and B on the same rows.
	reps := make([]*Trace, cs.Replicates)
	repRows := make([][]int, cs.Replicates)
	for r := range reps {
		sub, rows := subsample(s, cs.Keep, rs.Seed+uint64(r)+1)
		repRows[r] = rows
		if reps[r], err = Run(ctx, a, sub, &one); err != nil {
			return nil, fmt.Errorf("model A on subsample %d: %w", r+1, err)
		}
	}
	jack := math.Sqrt(cs.Keep / (1 - cs.Keep))
	spread := func(vals []float64) float64 {
		if len(vals) < 2 {
			return math.NaN()
		}
		var m float64
		for _, v := range vals {
			m += v
		}
		m /= float64(len(vals))
		var ss float64
		for _, v := range vals {
			ss += (v - m) * (v - m)
		}
		return jack * math.Sqrt(ss/float64(len(vals)-1))
	}
	n := len(s.Labels)
	out := &Alikeness{Settings: cs, A: ta, B: tb, Unmatched: unmatched, CKA: ckaAll}
	for _, p := range pairs {
		sa, sb := &ta.Stages[p[0]], &tb.Stages[p[1]]
		sp := StagePair{A: p[0], B: p[1], Kind: sa.Kind, SamePattern: math.NaN(), GluedOverlap: math.NaN()}
		name := fmt.Sprintf("stage %d / %d", p[0], p[1])
		xa, xb := actsA[p[0]], actsB[p[1]]
		// CKA.
		if cka, err := LinearCKA(xa, xb); err == nil {
			var vals []float64
			for _, rows := range repRows {
				if v, err := LinearCKA(rowsOf(xa, rows), rowsOf(xb, rows)); err == nil {
					vals = append(vals, v)
				}
			}
			q := Quantity{Stage: name, Name: "cka", A: 1, B: cka, Delta: 1 - cka, Spread: spread(vals)}
			q.Bound = max(cs.Z*nanZero(q.Spread), cs.CKAFloor)
			q.Differs = q.Delta > q.Bound
			sp.Quantities = append(sp.Quantities, q)
		}
		// judge compares measure mn of class ("" for the stage), whose
		// resolution is one of count points when it is a share.
		judge := func(class, mn string, count int) {
			m, _ := LookupMeasure(mn)
			va, oka := sa.Value(class, mn)
			vb, okb := sb.Value(class, mn)
			if !oka || !okb {
				return
			}
			var vals []float64
			for _, rt := range reps {
				if v, ok := rt.Stages[p[0]].Value(class, mn); ok {
					vals = append(vals, logIf(m.Ratio, v))
				}
			}
			q := Quantity{Stage: name, Name: mn, Class: class, A: va, B: vb, Delta: logIf(m.Ratio, vb) - logIf(m.Ratio, va), Spread: spread(vals)}
			q.Bound = cs.Z * nanZero(q.Spread)
			if m.Share {
				q.Bound = max(q.Bound, 1/float64(max(count, 1)))
			}
			q.Differs = math.Abs(q.Delta) > q.Bound
			sp.Quantities = append(sp.Quantities, q)
		}
		for _, mn := range comparedMeasures {
			judge("", mn, n)
		}
		// Per class: k-NN accuracy, barcodes and Betti numbers.
		for c := range sa.Classes {
			ga, gb := &sa.Classes[c], sb.Group(sa.Classes[c].Label)
			if gb == nil {
				continue
			}
			judge(ga.Label, "knn.accuracy", ga.Count)
			for d := range min(len(ga.Bars), len(gb.Bars)) {
				if !(ga.Scale > 0) || !(gb.Scale > 0) {
					break
				}
				own := scaledBars(ga, d)
				bn := homology.Bottleneck(own, scaledBars(gb, d))
				var floor float64
				for _, rt := range reps {
					if g := rt.Stages[p[0]].Group(ga.Label); g != nil && d < len(g.Bars) && g.Scale > 0 {
						floor = max(floor, homology.Bottleneck(own, scaledBars(g, d)))
					}
				}
				q := Quantity{Stage: name, Name: fmt.Sprintf("bottleneck.%d", d), Class: ga.Label, B: bn, Delta: bn, Spread: floor, Bound: floor}
				q.Differs = bn > floor
				sp.Quantities = append(sp.Quantities, q)
			}
			for d := range min(len(ga.Betti), len(gb.Betti)) {
				q := Quantity{Stage: name, Name: fmt.Sprintf("betti.%d", d), Class: ga.Label, A: float64(ga.Betti[d]), B: float64(gb.Betti[d])}
				q.Delta = q.B - q.A
				q.Bound = 0.5
				sure := d < len(ga.BettiConfident) && d < len(gb.BettiConfident) && ga.BettiConfident[d] && gb.BettiConfident[d]
				if sure {
					q.Differs = math.Abs(q.Delta) > q.Bound
				} else if q.Delta != 0 {
					q.Note = "not confident in both; not judged"
				}
				sp.Quantities = append(sp.Quantities, q)
			}
		}
		sp.SamePattern = samePattern(sa.Kind, xa, xb)
		sp.GluedOverlap = gluedOverlap(ctx, actsA, actsB, p, rs)
		for i := range sp.Quantities {
			if sp.Quantities[i].Differs && out.First == nil {
				q := sp.Quantities[i]
				out.First = &q
			}
		}
		out.Pairs = append(out.Pairs, sp)
	}
	return out, nil
}

// CompareFiles is CompareModels on the ONNX models in the files pathA
// and pathB (fused when set.Fuse); the traces record the files.
func CompareFiles(ctx context.Context, pathA, pathB string, s *Sample, set *Settings, as *AlikeSettings) (*Alikeness, error) {
	fuse := set != nil && set.Fuse
	a, infoA, err := loadModel(pathA, fuse)
	if err != nil {
		return nil, err
	}
	b, infoB, err := loadModel(pathB, fuse)
	if err != nil {
		return nil, err
	}
	if err := checkWidth(s, a, pathA); err != nil {
		return nil, err
	}
	if err := checkWidth(s, b, pathB); err != nil {
		return nil, err
	}
	out, err := CompareModels(ctx, a, b, s, set, as)
	if err != nil {
		return nil, err
	}
	out.A.Model, out.B.Model = infoA, infoB
	return out, nil
}

// Reason says in words what the first difference is, or that the
// models reshape the sample alike.
func (a *Alikeness) Reason() string {
	q := a.First
	if q == nil {
		return "the models reshape the sample alike: no compared quantity differs by more than its resampling spread"
	}
	who := ""
	if q.Class != "" {
		who = ", class " + q.Class
	}
	switch {
	case q.Name == "cka":
		return fmt.Sprintf("%s: linear CKA %.4g, 1 − CKA = %.3g above the bound %.3g (spread %.3g)", q.Stage, q.B, q.Delta, q.Bound, q.Spread)
	case len(q.Name) > 6 && q.Name[:6] == "betti.":
		return fmt.Sprintf("%s%s: β%s %v → %v, both confident", q.Stage, who, q.Name[6:], q.A, q.B)
	}
	return fmt.Sprintf("%s%s: %s %.4g → %.4g, a change of %.3g against the bound %.3g (spread %.3g)", q.Stage, who, q.Name, q.A, q.B, q.Delta, q.Bound, q.Spread)
}

func nanZero(x float64) float64 {
	if math.IsNaN(x) {
		return 0
	}
	return x
}

func logIf(on bool, v float64) float64 {
	if on {
		return math.Log(max(v, 1e-9)) // a ratio of 0 reads as 1e-9 (ours), so that it stays printable
	}
	return v
}

// subsample returns a stratified subsample keeping round(keep × count)
// rows of each class (at least MinClassPoints, at most all), chosen with
// seed, and the kept row indices in increasing order.
func subsample(s *Sample, keep float64, seed uint64) (*Sample, []int) {
	byClass := make([][]int, len(s.Classes))
	for i, l := range s.Labels {
		byClass[l] = append(byClass[l], i)
	}
	rng := rand.New(rand.NewPCG(seed, 0x7375627361))
	var rows []int
	for _, idx := range byClass {
		m := min(len(idx), max(MinClassPoints, int(math.Round(keep*float64(len(idx))))))
		idx = slices.Clone(idx)
		rng.Shuffle(len(idx), func(i, j int) { idx[i], idx[j] = idx[j], idx[i] })
		rows = append(rows, idx[:m]...)
	}
	slices.Sort(rows)
	return s.subset(rows), rows
}

// samePattern returns the share of rows whose sets of positive units
// agree, for activation stages of equal width; NaN otherwise.
func samePattern(kind StageKind, xa, xb *mat.Dense) float64 {
	n, wa := xa.Dims()
	_, wb := xb.Dims()
	if !kind.Activation() || wa != wb || n == 0 {
		return math.NaN()
	}
	same := 0
	for i := range n {
		ra, rb := xa.RawRowView(i), xb.RawRowView(i)
		eq := true
		for j := range ra {
			if (ra[j] > 0) != (rb[j] > 0) {
				eq = false
				break
			}
		}
		if eq {
			same++
		}
	}
	return float64(same) / float64(n)
}

// gluedOverlap returns the Jaccard index of the pairs the two stages
// glue (NaN when neither glues a pair or the stage is the input).
func gluedOverlap(ctx context.Context, actsA, actsB []*mat.Dense, p [2]int, rs Settings) float64 {
	if p[0] == 0 || p[1] == 0 {
		return math.NaN()
	}
	pa, errA := gluedPairs(ctx, actsA[p[0]-1], actsA[p[0]], rs)
	pb, errB := gluedPairs(ctx, actsB[p[1]-1], actsB[p[1]], rs)
	if errA != nil || errB != nil || len(pa)+len(pb) == 0 {
		return math.NaN()
	}
	set := make(map[[2]int]bool, len(pa))
	for _, q := range pa {
		set[q] = true
	}
	both := 0
	for _, q := range pb {
		if set[q] {
			both++
		}
	}
	return float64(both) / float64(len(pa)+len(pb)-both)
}

// matchStages aligns the stages of two traces by their structure: a
// global alignment (Needleman–Wunsch, gaps free) that may pair only
// stages of the same kind, scoring equal widths and the same last origin
// node (the same point of the graph) higher. It returns the index pairs in order and the unmatched stages.
func matchStages(a, b []Stage) ([][2]int, []string) {
	na, nb := len(a), len(b)
	score := func(i, j int) int {
		if a[i].Kind != b[j].Kind {
			return -1
		}
		s := 4
		if a[i].Width == b[j].Width {
			s++
		}
		// Stages that end at the same ONNX node output the same thing,
		// however many nodes each fused.
		if na, nb := len(a[i].Nodes), len(b[j].Nodes); na > 0 && nb > 0 && a[i].Nodes[na-1] == b[j].Nodes[nb-1] {
			s += 3
		}
		return s
	}
	best := make([][]int, na+1)
	for i := range best {
		best[i] = make([]int, nb+1)
	}
	for i := na - 1; i >= 0; i-- {
		for j := nb - 1; j >= 0; j-- {
			v := max(best[i+1][j], best[i][j+1])
			if s := score(i, j); s > 0 {
				v = max(v, s+best[i+1][j+1])
			}
			best[i][j] = v
		}
	}
	var pairs [][2]int
	var un []string
	i, j := 0, 0
	for i < na && j < nb {
		if s := score(i, j); s > 0 && best[i][j] == s+best[i+1][j+1] {
			pairs = append(pairs, [2]int{i, j})
			i++
			j++
			continue
		}
		if best[i][j] == best[i+1][j] {
			un = append(un, fmt.Sprintf("A %d", a[i].Index))
			i++
		} else {
			un = append(un, fmt.Sprintf("B %d", b[j].Index))
			j++
		}
	}
	for ; i < na; i++ {
		un = append(un, fmt.Sprintf("A %d", a[i].Index))
	}
	for ; j < nb; j++ {
		un = append(un, fmt.Sprintf("B %d", b[j].Index))
	}
	return pairs, un
}

// maxGluedPairs bounds the glued pairs gluedOverlap compares.
const maxGluedPairs = 200000

// gluedPairs returns the pairs a stage from in to out glues (at most
// maxGluedPairs).
func gluedPairs(ctx context.Context, in, out *mat.Dense, rs Settings) ([][2]int, error) {
	g, err := relu.Glue(ctx, in, out, nil, &relu.GlueSettings{Tau: rs.GlueTau, Examples: maxGluedPairs})
	if err != nil {
		return nil, err
	}
	pairs := make([][2]int, len(g.Examples))
	for i, e := range g.Examples {
		pairs[i] = [2]int{e.I, e.J}
	}
	return pairs, nil
}

// scaledBars returns g's dimension-d bars, clipped at its threshold, in
// units of its sampling scale.
func scaledBars(g *Group, d int) []homology.Bar {
	b := clipBars(g.Bars[d], g.Threshold)
	for i := range b {
		b[i].Birth /= g.Scale
		b[i].Death /= g.Scale
	}
	return b
}

// AlikeSchemaVersion is the version of the JSON that Alikeness.WriteJSON
// writes.
const AlikeSchemaVersion = 1

// WriteJSON writes the comparison as indented JSON: "schema", "models"
// (A's and B's files and hashes), "settings" (the comparison's) and
// "trace_settings" (both traces'), "verdict" ("alike" or "different"),
// "reason", "first" (the first difference, or null), "unmatched",
// "pairs" (per matched stage pair: "a", "b", "kind", "same_pattern",
// "shared_glued" and "quantities", each with "name", "class", "a", "b",
// "delta", "spread", "bound", "differs" and "note") and "cka" (A's
// stages × B's). Numbers that are undefined (NaN) are null.
func (a *Alikeness) WriteJSON(w io.Writer) error {
	type quantity struct {
		Stage   string   `json:"stage"`
		Name    string   `json:"name"`
		Class   string   `json:"class,omitempty"`
		A       *float64 `json:"a"`
		B       *float64 `json:"b"`
		Delta   *float64 `json:"delta"`
		Spread  *float64 `json:"spread"`
		Bound   *float64 `json:"bound"`
		Differs bool     `json:"differs"`
		Note    string   `json:"note,omitempty"`
	}
	conv := func(q Quantity) quantity {
		return quantity{q.Stage, q.Name, q.Class, finite(q.A), finite(q.B), finite(q.Delta), finite(q.Spread), finite(q.Bound), q.Differs, q.Note}
	}
	type pair struct {
		A           int        `json:"a"`
		B           int        `json:"b"`
		Kind        StageKind  `json:"kind"`
		SamePattern *float64   `json:"same_pattern"`
		SharedGlued *float64   `json:"shared_glued"`
		Quantities  []quantity `json:"quantities"`
	}
	out := struct {
		Schema        int           `json:"schema"`
		Models        [2]ModelInfo  `json:"models"`
		Settings      AlikeSettings `json:"settings"`
		TraceSettings [2]Settings   `json:"trace_settings"`
		Verdict       string        `json:"verdict"`
		Reason        string        `json:"reason"`
		First         *quantity     `json:"first"`
		Unmatched     []string      `json:"unmatched"`
		Pairs         []pair        `json:"pairs"`
		CKA           [][]*float64  `json:"cka"`
	}{Schema: AlikeSchemaVersion, Models: [2]ModelInfo{a.A.Model, a.B.Model}, Settings: a.Settings,
		TraceSettings: [2]Settings{a.A.Settings, a.B.Settings}, Verdict: "alike", Reason: a.Reason(), Unmatched: a.Unmatched}
	if out.Unmatched == nil {
		out.Unmatched = []string{}
	}
	if a.First != nil {
		q := conv(*a.First)
		out.First, out.Verdict = &q, "different"
	}
	for _, p := range a.Pairs {
		pp := pair{A: p.A, B: p.B, Kind: p.Kind, SamePattern: finite(p.SamePattern), SharedGlued: finite(p.GluedOverlap), Quantities: []quantity{}}
		for _, q := range p.Quantities {
			pp.Quantities = append(pp.Quantities, conv(q))
		}
		out.Pairs = append(out.Pairs, pp)
	}
	for _, row := range a.CKA {
		r := make([]*float64, len(row))
		for j, v := range row {
			r[j] = finite(v)
		}
		out.CKA = append(out.CKA, r)
	}
	enc := json.NewEncoder(w)
	enc.SetIndent("", " ")
	return enc.Encode(out)
}
